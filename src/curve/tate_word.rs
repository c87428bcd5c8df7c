//! Tate's algorithm in machine words: the twin of `tate::local_reduction`
//! for models whose coefficients, and every intermediate, fit in `i128`,
//! at primes `p < 2^62`.
//!
//! The steps, the choices of `r, s, t` and the order of the tests are
//! those of the `BigInt` routine in `tate.rs` ([Sil94, IV.9, Algorithm
//! 9.4]; see its docs): every residue is taken in `[0, p)` exactly as
//! there, so both routines return the same Kodaira symbol, conductor
//! exponent, Tamagawa number and change of model. Every product and sum on
//! the coefficients is checked ([`Ck`]); on overflow the routine answers
//! [`Stop::Overflow`] and the caller runs the `BigInt` routine instead.
//! Residue arithmetic (products of two residues below `p < 2^62`) runs in
//! `u128`. The tests in `tests` compare the two routines on random models
//! near the word-size boundary, and `src/family/word_sweep.rs` compares
//! whole families with the word paths on and off.

use super::tate::{Kodaira, ReductionKind};
use crate::arith::word::{divisible_pow, inv_mod, mul_mod, pow_i128, residue, Ck};
use crate::local::legendre_u64;

/// Largest prime the word routine takes (products of residues fit in u128
/// and `p^k` stays checked).
pub(crate) const WORD_PRIME_LIMIT: u64 = 1 << 62;

/// Why the word routine stopped without an answer.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Stop {
    /// An intermediate left i128: run the `BigInt` routine.
    Overflow,
    /// A check the algorithm guarantees failed (a defect, never input).
    Internal(&'static str),
}

type W<T> = std::result::Result<T, Stop>;

#[inline]
fn ok(x: Ck) -> W<i128> {
    x.get().ok_or(Stop::Overflow)
}

/// The answer of the word routine (the change `[u, r, s, t]` in integers).
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) struct WordReduction {
    pub(crate) kodaira: Kodaira,
    pub(crate) conductor_exponent: u32,
    pub(crate) tamagawa: u64,
    pub(crate) disc_valuation: u64,
    pub(crate) minimal_at_input: bool,
    pub(crate) reduction: ReductionKind,
    pub(crate) change: [i128; 4],
}

/// b2, b4, b6, b8, c4, c6 of `[a1, a2, a3, a4, a6]` [Sil86, III.1].
pub(crate) fn bc_word(a: &[i128; 5]) -> W<[i128; 6]> {
    let [a1, a2, a3, a4, a6] = a.map(Ck::new);
    let b2 = a1 * a1 + 4 * a2;
    let b4 = a1 * a3 + 2 * a4;
    let b6 = a3 * a3 + 4 * a6;
    let b8 = a1 * a1 * a6 + 4 * a2 * a6 - a1 * a3 * a4 + a2 * a3 * a3 - a4 * a4;
    let c4 = b2 * b2 - 24 * b4;
    let c6 = -(b2 * b2 * b2) + 36 * b2 * b4 - 216 * b6;
    Ok([ok(b2)?, ok(b4)?, ok(b6)?, ok(b8)?, ok(c4)?, ok(c6)?])
}

/// The discriminant `Δ = −b2²b8 − 8·b4³ − 27·b6² + 9·b2·b4·b6`.
pub(crate) fn discriminant_word(a: &[i128; 5]) -> W<i128> {
    let [b2, b4, b6, b8, _, _] = bc_word(a)?.map(Ck::new);
    ok(-(b2 * b2 * b8) - 8 * b4 * b4 * b4 - 27 * b6 * b6 + 9 * b2 * b4 * b6)
}

/// `v_p(x)` for `x ≠ 0`.
pub(crate) fn val_word(mut x: i128, p: u64) -> u64 {
    let q = i128::from(p);
    let mut v = 0;
    while x != 0 && x % q == 0 {
        x /= q;
        v += 1;
    }
    v
}

/// Applies `[1, r, s, t]` (Table 3.1 of [Sil86, III.1]).
pub(crate) fn shift_word(a: &[i128; 5], r: i128, s: i128, t: i128) -> W<[i128; 5]> {
    let [a1, a2, a3, a4, a6] = a.map(Ck::new);
    let (r, s, t) = (Ck::new(r), Ck::new(s), Ck::new(t));
    let n1 = a1 + 2 * s;
    let n2 = a2 - s * a1 + 3 * r - s * s;
    let n3 = a3 + r * a1 + 2 * t;
    let n4 = a4 - s * a3 + 2 * r * a2 - (t + r * s) * a1 + 3 * r * r - 2 * s * t;
    let n6 = a6 + r * a4 + r * r * a2 + r * r * r - t * a3 - t * t - r * t * a1;
    Ok([ok(n1)?, ok(n2)?, ok(n3)?, ok(n4)?, ok(n6)?])
}

/// Applies the integral change `[u, r, s, t]` to an integral model, which
/// must give an integral model (`None`-like [`Stop::Overflow`] otherwise,
/// so the caller recomputes in `BigInt` and reports any defect there).
pub(crate) fn apply_change_word(a: &[i128; 5], ch: &[i128; 4]) -> W<[i128; 5]> {
    let [u, r, s, t] = *ch;
    let shifted = shift_word(a, r, s, t)?;
    let mut out = [0i128; 5];
    for ((o, c), w) in out.iter_mut().zip(shifted).zip([1u32, 2, 3, 4, 6]) {
        let uw = u.checked_pow(w).ok_or(Stop::Overflow)?;
        *o = Ck::new(c).exact_div(uw).ok_or(Stop::Overflow)?;
    }
    Ok(out)
}

/// `first ∘ second` for integral changes (module docs of `model`).
pub(crate) fn compose_word(first: &[i128; 4], second: &[i128; 4]) -> W<[i128; 4]> {
    let [u1, r1, s1, t1] = first.map(Ck::new);
    let [u2, r2, s2, t2] = second.map(Ck::new);
    let u1sq = u1 * u1;
    Ok([
        ok(u1 * u2)?,
        ok(r1 + u1sq * r2)?,
        ok(s1 + u1 * s2)?,
        ok(t1 + u1sq * u1 * t2 + s1 * u1sq * r2)?,
    ])
}

/// Roots of `A·X² + B·X + C` over F_p, `p ∤ A` (`tate::quadratic_roots`).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Quad {
    Distinct { rational: bool },
    Double(u64),
}

fn quadratic_roots(qa: i128, qb: i128, qc: i128, p: u64) -> W<Quad> {
    if p == 2 {
        return Ok(if qb % 2 != 0 {
            Quad::Distinct {
                rational: qc % 2 == 0,
            }
        } else {
            Quad::Double(residue(qc, 2))
        });
    }
    let (ra, rb, rc) = (residue(qa, p), residue(qb, p), residue(qc, p));
    let bb = mul_mod(rb, rb, p);
    let ac4 = mul_mod(mul_mod(4 % p, ra, p), rc, p);
    let d = (bb + p - ac4) % p;
    if d == 0 {
        let den =
            inv_mod(mul_mod(2, ra, p), p).ok_or(Stop::Internal("inverting a multiple of p"))?;
        Ok(Quad::Double(mul_mod((p - rb) % p, den, p)))
    } else {
        Ok(Quad::Distinct {
            rational: legendre_u64(d, p) == 1,
        })
    }
}

/// Root structure of a monic cubic over F_p (`tate::cubic_roots`).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Cubic {
    Distinct { count: u64 },
    Double(u64),
    Triple(u64),
}

fn cubic_roots(a: i128, b: i128, c: i128, p: u64) -> W<Cubic> {
    let (a, b, c) = (residue(a, p), residue(b, p), residue(c, p));
    if p <= 3 {
        return cubic_by_search(a, b, c, p);
    }
    let m = |x: u64, y: u64| mul_mod(x, y, p);
    let add = |x: u64, y: u64| (x + y) % p;
    let sub = |x: u64, y: u64| (x + p - y) % p;
    let small = |k: u64| k % p;
    // D = a²b² − 4b³ − 4a³c − 27c² + 18abc.
    let (aa, bb) = (m(a, a), m(b, b));
    let mut d = m(aa, bb);
    d = sub(d, m(small(4), m(bb, b)));
    d = sub(d, m(small(4), m(m(aa, a), c)));
    d = sub(d, m(small(27), m(c, c)));
    d = add(d, m(small(18), m(m(a, b), c)));
    if d != 0 {
        return Ok(Cubic::Distinct {
            count: count_roots(a, b, c, p)?,
        });
    }
    let e = sub(aa, m(small(3), b));
    if e == 0 {
        let i3 = inv_mod(3, p).ok_or(Stop::Internal("inverting a multiple of p"))?;
        Ok(Cubic::Triple(m((p - a) % p, i3)))
    } else {
        let num = sub(m(a, b), m(small(9), c));
        let den = inv_mod(m(p - 2, e), p).ok_or(Stop::Internal("inverting a multiple of p"))?;
        Ok(Cubic::Double(m(num, den)))
    }
}

fn cubic_by_search(a: u64, b: u64, c: u64, q: u64) -> W<Cubic> {
    let mut poly: Vec<u64> = vec![1, a, b, c];
    let mut roots: Vec<(u64, u32)> = Vec::new();
    let mut x = 0u64;
    while x < q && poly.len() > 1 {
        let mut quo: Vec<u64> = Vec::with_capacity(poly.len());
        let mut acc = 0u64;
        for &co in &poly {
            acc = (acc * x + co) % q;
            quo.push(acc);
        }
        let rem = quo.pop().unwrap_or(0);
        if rem == 0 {
            poly = quo;
            match roots.last_mut() {
                Some((r, m)) if *r == x => *m += 1,
                _ => roots.push((x, 1)),
            }
        } else {
            x += 1;
        }
    }
    let total: u32 = roots.iter().map(|(_, m)| m).sum();
    if let Some((r, _)) = roots.iter().find(|(_, m)| *m == 3) {
        return Ok(Cubic::Triple(*r));
    }
    if let Some((r, _)) = roots.iter().find(|(_, m)| *m == 2) {
        return Ok(Cubic::Double(*r));
    }
    if total == 2 {
        return Err(Stop::Internal(
            "cubic with exactly two simple rational roots",
        ));
    }
    Ok(Cubic::Distinct {
        count: u64::from(total),
    })
}

/// `f·g mod (T³ + aT² + bT + c, p)`, low to high.
fn mul_mod_cubic(f: [u64; 3], g: [u64; 3], abc: [u64; 3], p: u64) -> [u64; 3] {
    let mut h = [0u64; 5];
    for i in 0..3 {
        for j in 0..3 {
            h[i + j] = (h[i + j] + mul_mod(f[i], g[j], p)) % p;
        }
    }
    for k in (3..5).rev() {
        let co = h[k];
        h[k] = 0;
        for (off, &x) in abc.iter().enumerate() {
            let idx = k - 1 - off;
            h[idx] = (h[idx] + p - mul_mod(co, x, p)) % p;
        }
    }
    [h[0], h[1], h[2]]
}

/// `deg gcd(f, g)` over F_p (low to high).
fn gcd_degree(mut f: Vec<u64>, mut g: Vec<u64>, p: u64) -> W<usize> {
    fn trim(v: &mut Vec<u64>) {
        while v.last() == Some(&0) {
            v.pop();
        }
    }
    trim(&mut f);
    trim(&mut g);
    while !g.is_empty() {
        let lead_inv =
            inv_mod(g[g.len() - 1], p).ok_or(Stop::Internal("inverting a multiple of p"))?;
        while f.len() >= g.len() {
            let shift = f.len() - g.len();
            let co = mul_mod(f[f.len() - 1], lead_inv, p);
            for (i, &gi) in g.iter().enumerate() {
                f[shift + i] = (f[shift + i] + p - mul_mod(co, gi, p)) % p;
            }
            trim(&mut f);
            if f.is_empty() {
                break;
            }
        }
        std::mem::swap(&mut f, &mut g);
    }
    Ok(f.len().saturating_sub(1))
}

/// Roots in F_p of a square-free monic cubic: `deg gcd(T^p − T, P)`.
fn count_roots(a: u64, b: u64, c: u64, p: u64) -> W<u64> {
    let abc = [a, b, c];
    let mut acc = [1u64, 0, 0];
    for i in (0..64 - p.leading_zeros()).rev() {
        acc = mul_mod_cubic(acc, acc, abc, p);
        if p >> i & 1 == 1 {
            acc = mul_mod_cubic(acc, [0, 1, 0], abc, p);
        }
    }
    let h = vec![acc[0], (acc[1] + p - 1) % p, acc[2]];
    Ok(gcd_degree(vec![c, b, a, 1], h, p)? as u64)
}

struct Run {
    p: u64,
    q: i128,
    a: [i128; 5],
    u: i128,
    r: i128,
    s: i128,
    t: i128,
}

impl Run {
    fn apply(&mut self, r: i128, s: i128, t: i128) -> W<()> {
        if r == 0 && s == 0 && t == 0 {
            return Ok(());
        }
        self.a = shift_word(&self.a, r, s, t)?;
        let (u, ss) = (Ck::new(self.u), Ck::new(self.s));
        let u2 = u * u;
        self.t = ok(Ck::new(self.t) + u2 * u * t + ss * u2 * r)?;
        self.r = ok(Ck::new(self.r) + u2 * r)?;
        self.s = ok(ss + u * s)?;
        Ok(())
    }

    fn scale_down(&mut self) -> W<()> {
        let mut out = self.a;
        for (coef, e) in out.iter_mut().zip([1u32, 2, 3, 4, 6]) {
            let pe = pow_i128(self.q, e).ok_or(Stop::Overflow)?;
            *coef = Ck::new(*coef)
                .exact_div(pe)
                .ok_or(Stop::Internal("inexact division"))?;
        }
        self.a = out;
        self.u = ok(Ck::new(self.u) * self.q)?;
        Ok(())
    }

    fn part(&self, i: usize, k: u32) -> W<i128> {
        let Some(pk) = pow_i128(self.q, k) else {
            // |a_i| < 2^127 ≤ p^k: exact only for a_i = 0.
            return if self.a[i] == 0 {
                Ok(0)
            } else {
                Err(Stop::Internal("inexact division"))
            };
        };
        Ck::new(self.a[i])
            .exact_div(pk)
            .ok_or(Stop::Internal("inexact division"))
    }

    fn div(&self, i: usize, k: u32) -> bool {
        divisible_pow(self.a[i], self.q, k)
    }
}

enum Pass {
    Found(Kodaira, u64, ReductionKind),
    NotMinimal,
}

/// Step 2 (`tate::singular_point`), residues in `[0, p)`.
fn singular_point(a: &[i128; 5], bc: &[i128; 6], p: u64) -> W<(i128, i128)> {
    let [a1, a2, a3, a4, a6] = *a;
    let [b2, b4, b6, _, c4, c6] = *bc;
    let res = |x: i128| residue(x, p);
    let m = |x: u64, y: u64| mul_mod(x, y, p);
    let (r, t) = match p {
        2 => {
            if a1 % 2 == 0 {
                let r = res(a4);
                let t = (m(r, (res(a2) + res(a4) + 1) % 2) + res(a6)) % 2;
                (r, t)
            } else {
                let r = res(a3);
                (r, (r + res(a4)) % 2)
            }
        }
        3 => {
            let r = if b2 % 3 == 0 {
                (3 - res(b6)) % 3
            } else {
                m((3 - res(b2)) % 3, res(b4))
            };
            (r, (m(res(a1), r) + res(a3)) % 3)
        }
        _ => {
            let r = if c4 % i128::from(p) == 0 {
                let i12 = inv_mod(12 % p, p).ok_or(Stop::Internal("inverting a multiple of p"))?;
                m((p - res(b2)) % p, i12)
            } else {
                let den = inv_mod(m(12 % p, res(c4)), p)
                    .ok_or(Stop::Internal("inverting a multiple of p"))?;
                let num = (res(c6) + m(res(b2), res(c4))) % p;
                m((p - num) % p, den)
            };
            let i2 = inv_mod(2, p).ok_or(Stop::Internal("inverting a multiple of p"))?;
            let v = (m(res(a1), r) + res(a3)) % p;
            (r, m((p - v) % p, i2))
        }
    };
    Ok((i128::from(r), i128::from(t)))
}

fn tate_pass(run: &mut Run, n: u64) -> W<Pass> {
    let p = run.p;
    let q = run.q;
    let bc0 = bc_word(&run.a)?;
    let (r, t) = singular_point(&run.a, &bc0, p)?;
    run.apply(r, 0, t)?;
    if !(run.div(2, 1) && run.div(3, 1) && run.div(4, 1)) {
        return Err(Stop::Internal("singular point not moved to (0, 0)"));
    }
    let [b2, _, b6, b8, _, _] = bc_word(&run.a)?;
    if b2 % q != 0 {
        let split = matches!(
            quadratic_roots(1, run.a[0], -run.a[1], p)?,
            Quad::Distinct { rational: true }
        );
        let tamagawa = if split {
            n
        } else if n % 2 == 0 {
            2
        } else {
            1
        };
        let kind = if split {
            ReductionKind::SplitMultiplicative
        } else {
            ReductionKind::NonSplitMultiplicative
        };
        return Ok(Pass::Found(Kodaira::In(n), tamagawa, kind));
    }
    let add = |k, c| Ok(Pass::Found(k, c, ReductionKind::Additive));
    if !run.div(4, 2) {
        return add(Kodaira::II, 1);
    }
    if !divisible_pow(b8, q, 3) {
        return add(Kodaira::III, 2);
    }
    if !divisible_pow(b6, q, 3) {
        let rq = quadratic_roots(1, run.part(2, 1)?, -run.part(4, 2)?, p)?;
        let c = if matches!(rq, Quad::Distinct { rational: true }) {
            3
        } else {
            1
        };
        return add(Kodaira::IV, c);
    }
    let (s, t) = if p == 2 {
        (
            i128::from(residue(run.a[1], 2)),
            2 * i128::from(residue(run.part(4, 2)?, 2)),
        )
    } else {
        let half = p.div_ceil(2);
        let s = mul_mod((p - residue(run.a[0], p)) % p, half, p);
        let t = mul_mod((p - residue(run.part(2, 1)?, p)) % p, half, p);
        (i128::from(s), ok(Ck::new(q) * i128::from(t))?)
    };
    run.apply(0, s, t)?;
    if !(run.div(0, 1) && run.div(1, 1) && run.div(2, 2) && run.div(3, 2) && run.div(4, 3)) {
        return Err(Stop::Internal("step 6 divisibility"));
    }
    match cubic_roots(run.part(1, 1)?, run.part(3, 2)?, run.part(4, 3)?, p)? {
        Cubic::Distinct { count } => add(Kodaira::I0Star, 1 + count),
        Cubic::Double(alpha) => {
            run.apply(ok(Ck::new(i128::from(alpha)) * q)?, 0, 0)?;
            let (k, c) = subprocedure_in_star(run, n)?;
            add(Kodaira::InStar(k), c)
        }
        Cubic::Triple(alpha) => {
            run.apply(ok(Ck::new(i128::from(alpha)) * q)?, 0, 0)?;
            match quadratic_roots(1, run.part(2, 2)?, -run.part(4, 4)?, p)? {
                Quad::Distinct { rational } => add(Kodaira::IVStar, if rational { 3 } else { 1 }),
                Quad::Double(y0) => {
                    let p2 = pow_i128(q, 2).ok_or(Stop::Overflow)?;
                    run.apply(0, 0, ok(Ck::new(i128::from(y0)) * p2)?)?;
                    if !run.div(3, 4) {
                        return add(Kodaira::IIIStar, 2);
                    }
                    if !run.div(4, 6) {
                        return add(Kodaira::IIStar, 1);
                    }
                    Ok(Pass::NotMinimal)
                }
            }
        }
    }
}

fn subprocedure_in_star(run: &mut Run, disc_val: u64) -> W<(u64, u64)> {
    let p = run.p;
    let mut k: u64 = 1;
    loop {
        if k > disc_val {
            return Err(Stop::Internal("I_n* loop longer than v(Δ)"));
        }
        let m = u32::try_from(if k % 2 == 1 { (k + 3) / 2 } else { k / 2 + 1 })
            .map_err(|_| Stop::Internal("I_n* level overflow"))?;
        let qr = if k % 2 == 1 {
            quadratic_roots(1, run.part(2, m)?, -run.part(4, 2 * m)?, p)?
        } else {
            quadratic_roots(
                run.part(1, 1)?,
                run.part(3, m + 1)?,
                run.part(4, 2 * m + 1)?,
                p,
            )?
        };
        match qr {
            Quad::Distinct { rational } => return Ok((k, if rational { 4 } else { 2 })),
            Quad::Double(root) => {
                let pm = pow_i128(run.q, m).ok_or(Stop::Overflow)?;
                let by = ok(Ck::new(i128::from(root)) * pm)?;
                if k % 2 == 1 {
                    run.apply(0, 0, by)?;
                } else {
                    run.apply(by, 0, 0)?;
                }
            }
        }
        k += 1;
    }
}

/// Tate's algorithm at `p < WORD_PRIME_LIMIT` on the integral model `a`
/// with discriminant `disc ≠ 0` (the twin of `tate::local_reduction`).
pub(crate) fn local_reduction_word(a: &[i128; 5], disc: i128, p: u64) -> W<WordReduction> {
    if !(2..WORD_PRIME_LIMIT).contains(&p) || disc == 0 {
        return Err(Stop::Overflow);
    }
    let mut run = Run {
        p,
        q: i128::from(p),
        a: *a,
        u: 1,
        r: 0,
        s: 0,
        t: 0,
    };
    let mut scalings = 0u64;
    let mut n = val_word(disc, p);
    loop {
        let found = if n == 0 {
            Pass::Found(Kodaira::I0, 1, ReductionKind::Good)
        } else {
            tate_pass(&mut run, n)?
        };
        match found {
            Pass::NotMinimal => {
                run.scale_down()?;
                scalings += 1;
                n = n
                    .checked_sub(12)
                    .ok_or(Stop::Internal("non-minimal with v(Δ) < 12"))?;
            }
            Pass::Found(kodaira, tamagawa, reduction) => {
                let f: u64 = match reduction {
                    ReductionKind::Good => 0,
                    ReductionKind::SplitMultiplicative | ReductionKind::NonSplitMultiplicative => 1,
                    ReductionKind::Additive if p > 3 => 2,
                    ReductionKind::Additive => (n + 1)
                        .checked_sub(kodaira.component_count())
                        .ok_or(Stop::Internal("negative conductor exponent"))?,
                };
                let conductor_exponent =
                    u32::try_from(f).map_err(|_| Stop::Internal("conductor exponent overflow"))?;
                return Ok(WordReduction {
                    kodaira,
                    conductor_exponent,
                    tamagawa,
                    disc_valuation: n,
                    minimal_at_input: scalings == 0,
                    reduction,
                    change: [run.u, run.r, run.s, run.t],
                });
            }
        }
    }
}

/// The normalising shift of `tate::normalising_shift` in words:
/// `s = −⌊a1/2⌋`, `r = −⌊(a2 − s·a1 − s² + 1)/3⌋`, `t = −⌊(a3 + r·a1)/2⌋`.
pub(crate) fn normalising_shift_word(a: &[i128; 5]) -> W<(i128, i128, i128)> {
    let [a1, a2, a3, _, _] = *a;
    let s = -a1.div_euclid(2);
    let a2s = ok(Ck::new(a2) - Ck::new(s) * a1 - Ck::new(s) * s + 1)?;
    let r = -a2s.div_euclid(3);
    let t = -ok(Ck::new(a3) + Ck::new(r) * a1)?.div_euclid(2);
    Ok((r, s, t))
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;
    use crate::arith::word::set_word_paths;
    use crate::budget::Budget;
    use crate::curve::tate::{global_local_data, local_reduction_big};
    use crate::local::Prime;
    use num_bigint::BigInt;
    use num_rational::BigRational;
    use proptest::prelude::*;

    /// Primes of every kind the algorithm distinguishes: 2 and 3 (Ogg's
    /// formula, searches), small and large p ≥ 5 (the gcd root count),
    /// and one near the word limit (primality: sympy 1.14 `isprime`).
    const PRIMES: [u64; 9] = [2, 3, 5, 7, 11, 13, 1_000_003, 4_294_967_311, (1 << 61) - 1];

    fn big_answer(a: &[i128; 5], p: u64) -> crate::curve::LocalReduction {
        local_reduction_big(&a.map(BigInt::from), &Prime::new(BigInt::from(p)).unwrap()).unwrap()
    }

    /// Coefficients `c·p^e` with `c` of `bits` bits: small ones exercise
    /// the deep branches (I_n*, II*, non-minimal models), large ones the
    /// i128 boundary.
    fn model(raw: [i64; 5], bits: u32, p: u64, exps: [u32; 5]) -> Option<[i128; 5]> {
        let mut a = [0i128; 5];
        for ((o, &c), &e) in a.iter_mut().zip(&raw).zip(&exps) {
            let c = i128::from(c) >> (64 - bits.clamp(1, 63));
            *o = c.checked_mul(i128::from(p).checked_pow(e)?)?;
        }
        Some(a)
    }

    proptest! {
        #![proptest_config(ProptestConfig { cases: 2000, ..ProptestConfig::default() })]

        /// Word and BigInt Tate's algorithm agree on Kodaira symbol,
        /// conductor exponent, Tamagawa number, v(Δ_min), minimality and
        /// the change of model, wherever the word routine answers.
        #[test]
        fn word_and_bigint_tate_agree(
            raw in any::<[i64; 5]>(),
            bits in 1u32..64,
            pi in 0usize..PRIMES.len(),
            exps in proptest::array::uniform5(0u32..8),
        ) {
            let p = PRIMES[pi];
            let Some(a) = model(raw, bits, p, exps) else { return Ok(()) };
            let Ok(disc) = discriminant_word(&a) else { return Ok(()) };
            prop_assume!(disc != 0);
            let want = big_answer(&a, p);
            match local_reduction_word(&a, disc, p) {
                Ok(w) => {
                    prop_assert_eq!(w.kodaira, want.kodaira);
                    prop_assert_eq!(w.conductor_exponent, want.conductor_exponent);
                    prop_assert_eq!(w.tamagawa, want.tamagawa);
                    prop_assert_eq!(w.disc_valuation, want.disc_valuation);
                    prop_assert_eq!(w.minimal_at_input, want.minimal_at_input);
                    prop_assert_eq!(w.reduction, want.reduction);
                    let ch = w.change.map(|x| BigRational::from_integer(BigInt::from(x)));
                    prop_assert_eq!(ch, want.change);
                }
                Err(Stop::Overflow) => {}
                Err(Stop::Internal(what)) => prop_assert!(false, "internal: {}", what),
            }
        }

        /// The whole global computation (minimal model, change, conductor,
        /// records) is the same with the word paths on and off.
        #[test]
        fn global_data_same_with_and_without_words(
            raw in any::<[i64; 5]>(),
            bits in 1u32..9,
            pi in 0usize..4,
            exps in proptest::array::uniform5(0u32..4),
        ) {
            let p = PRIMES[pi];
            let Some(a) = model(raw, bits, p, exps) else { return Ok(()) };
            let q = a.map(|x| BigRational::from_integer(BigInt::from(x)));
            let on = global_local_data(&q, &mut Budget::unlimited());
            let old = set_word_paths(false);
            let off = global_local_data(&q, &mut Budget::unlimited());
            set_word_paths(old);
            prop_assert_eq!(on, off);
        }
    }

    /// The word routine does answer on most models of the property test's
    /// size (so the comparison above is not vacuous), and gives up on a
    /// model whose discriminant leaves i128.
    #[test]
    fn word_routine_answers_below_the_boundary_and_stops_above() {
        // y² = x³ − n²x for n = 999_999 (Δ = 64n⁶ < 2^127) answers; for
        // n = 2^21 (Δ = 2^132) the discriminant overflows.
        let n: i128 = 999_999;
        let a = [0, 0, 0, -n * n, 0];
        let disc = discriminant_word(&a).unwrap();
        assert_eq!(disc, 64 * n.pow(6));
        for p in [2u64, 3, 333_667] {
            let w = local_reduction_word(&a, disc, p).unwrap();
            let b = big_answer(&a, p);
            assert_eq!((w.kodaira, w.tamagawa), (b.kodaira, b.tamagawa));
        }
        let m: i128 = 1 << 21;
        assert_eq!(
            discriminant_word(&[0, 0, 0, -m * m, 0]),
            Err(Stop::Overflow)
        );
    }
}
