//! Heegner points of `E0: y² = x³ − x` (conductor 32) over `K = Q(√−n)`,
//! landing on `E_n: y² = x³ − n²x` (the quadratic twist of `E0` by `−n`),
//! for square-free `n ≡ 7 (mod 8)`. See `docs/heegner.md` for the method.
//!
//! Facts used, each checked by a test of this crate:
//! * the a_k of `E0` vanish unless `k ≡ 1 (mod 4)` (the series steps by
//!   the gcd of `k − 1` over the non-zero `a_k` of the list, found from the
//!   list itself);
//! * the periods of `2πi·f(τ)dτ` over `Γ₀(32)` form the lattice
//!   `Λ_f = ((1 + i)/2)·ω₁·Z[i]`, `ω₁ = π/M(√2, 1)` the real period of
//!   `E0`, whose own lattice is `Λ₀ = ω₁·Z[i]`; so `z ↦ 2z` maps
//!   `C/Λ_f → C/Λ₀` (a real isogeny of degree 2, hence defined over Q);
//! * for the trace `z = Σ φ(τ_i)`, `8·Re z/ω₁` is an integer `k` (the
//!   point `z + z̄` is a rational torsion point of `C/Λ_f`); `z − Re z` is a
//!   point of the minus part when `k` is even, `z − z̄` always; on `E0`
//!   these are `2i·Im z` and `4i·Im z`.
//! * a point `v = s·ω₁/2 + iy` (`s ∈ {0, 1}`, `y` real) of `C/Λ₀` has
//!   real `x = ℘(v)`, and `(x, y₀) ∈ E0(K)` with `y₀ ∈ √−n·Q` maps to
//!   `(X, Y) = (−n·x, n²·y₀/√−n)` on `E_n` (checked on the exact
//!   equation: `Y² = n⁴y₀²/(−n) = −n³(x³ − x) = X³ − n²X`).

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive, Zero};

use super::fixed::{Cx, Fixed};
use super::forms::{Form, Rep};
use crate::arith::sqrt_exact;
use crate::budget::Budget;
use crate::curve::{Curve, Point};
use crate::error::{Error, Result};

/// The level of `E0`.
pub(crate) const LEVEL: i64 = 32;

fn spend(budget: &mut Budget, units: u64) -> Result<()> {
    budget.spend(units).map_err(|_| Error::BudgetExhausted {
        stage: "Heegner point".into(),
    })
}

/// Constants of one precision: π, `ω₁`, `(2π/ω₁)²`, `e^{−2π}`.
pub(crate) struct Constants {
    pub(crate) f: Fixed,
    pub(crate) pi: BigInt,
    pub(crate) w1: BigInt,
    k2: BigInt,
    q0: BigInt,
}

impl Constants {
    pub(crate) fn new(p: u32) -> Constants {
        let f = Fixed::new(p);
        let pi = f.pi();
        let r2 = f.sqrt(&f.int(&BigInt::from(2)));
        let w1 = f.div(&pi, &f.agm(&r2, &f.one()));
        let two_pi = &pi * 2;
        let t = f.div(&two_pi, &w1);
        let k2 = f.mul(&t, &t);
        let q0 = f.exp(&-&two_pi);
        Constants { f, pi, w1, k2, q0 }
    }

    /// `℘(s·ω₁/2 + iy)` on `Λ₀ = ω₁Z[i]` (the lattice of `dx/(2y)` on
    /// `y² = x³ − x`), real. `None` at the lattice points (`s = 0`,
    /// `y ∈ ω₁Z` within `2^{−p/2}`).
    ///
    /// The q-expansion (Silverman, *Advanced Topics*, I.6.2; from memory)
    /// with `τ = i`, `q = e^{−2π}`, `u = e^{2πiv/ω₁} = (−1)^s e^{−2πy/ω₁}`:
    /// `℘ = (2πi/ω₁)²·[1/12 + u/(1−u)² + Σ_{m≥1} (q^m u/(1−q^m u)² +
    /// q^m u⁻¹/(1−q^m u⁻¹)² − 2q^m/(1−q^m)²)]`. With `y` reduced to
    /// `[0, ω₁/2]`, `|u| ≥ e^{−π}`, so the m-th term is at most
    /// `4e^{−2πm+π}/(1 − e^{−π})²`; the sum stops when `q^m e^{π}` is
    /// below one ulp, and runs at 32 guard bits.
    pub(crate) fn wp(&self, s: bool, y: &BigInt) -> Option<BigInt> {
        let g = Fixed::new(self.f.p + 32);
        let w1 = self.f.rescale(&self.w1, g.p);
        let mut r = self.f.rescale(y, g.p);
        let k = r.div_floor(&w1);
        r -= &k * &w1;
        if &r * 2 > w1 {
            r = &w1 - r;
        }
        if !s && r.bits() < u64::from(g.p / 2) {
            return None;
        }
        let pi = self.f.rescale(&self.pi, g.p);
        let t = g.div(&g.mul(&(&pi * 2), &r), &w1);
        let mut u = g.exp(&-t);
        if s {
            u = -u;
        }
        if u.is_zero() {
            return None;
        }
        let one = g.one();
        let frac = |a: &BigInt| -> BigInt {
            let d = &one - a;
            g.div(a, &g.mul(&d, &d))
        };
        let uinv = g.div(&one, &u);
        let q = self.f.rescale(&self.q0, g.p);
        let mut sum = g.ratio(&BigInt::one(), &BigInt::from(12)) + frac(&u);
        let mut qm = q.clone();
        while !qm.is_zero() {
            let a = g.mul(&qm, &u);
            let b = g.mul(&qm, &uinv);
            sum += frac(&a) + frac(&b) - frac(&qm) * 2;
            qm = g.mul(&qm, &q);
        }
        let k2 = self.f.rescale(&self.k2, g.p);
        Some(g.rescale(&-g.mul(&k2, &sum), self.f.p))
    }
}

/// `φ(τ) = Σ_{k≥1} (a_k/k) q^k`, `q = e^{2πiτ}`, at `τ = (−B + √D)/(2A)`,
/// to absolute error below `2^{−p+8}` plus the propagated rounding
/// (≤ `4M²` ulp for `M` terms, covered by the caller's guard bits).
///
/// Tail: `|a_k| ≤ d(k)√k ≤ 2k` (Hasse–Deligne for the CM form of `E0`:
/// `|a_p| ≤ 2√p`, multiplicativity, `d(k) ≤ 2√k`; common practice), so
/// `|Σ_{k>M} (a_k/k)q^k| ≤ 2|q|^{M+1}/(1 − |q|)`; `M` is the least with
/// that bound below `2^{−p}`.
pub(crate) fn phi(
    c: &Constants,
    an: &[i64],
    step: usize,
    form: Form,
    d: i64,
    budget: &mut Budget,
) -> Result<(Cx, u64)> {
    phi_with(c.f, &c.pi, an, step, form, d, budget)
}

/// [`phi`] with only the precision and π given (any curve's `a_k`; the
/// tail bound `|a_k| ≤ 2k` holds for every newform of weight 2).
pub(crate) fn phi_with(
    f: Fixed,
    pi: &BigInt,
    an: &[i64],
    step: usize,
    form: Form,
    d: i64,
    budget: &mut Budget,
) -> Result<(Cx, u64)> {
    let (a, b, _) = form;
    // |q| = e^{−π√|D|/A}; angle −πB/A reduced modulo 2π.
    let sqrt_d = f.sqrt(&f.int(&BigInt::from(-d)));
    let modulus = f.exp(&-(f.div(&f.mul(pi, &sqrt_d), &f.int(&BigInt::from(a)))));
    let bred = b.rem_euclid(2 * a);
    let theta = -(f.div(&(pi * BigInt::from(bred)), &f.int(&BigInt::from(a))));
    let e = f.expi(&theta);
    let q = Cx {
        re: f.mul(&modulus, &e.re),
        im: f.mul(&modulus, &e.im),
    };
    let qabs = (-std::f64::consts::PI * ((-d) as f64).sqrt() / a as f64).exp();
    let terms = terms_for(qabs, f.p);
    if terms as usize >= an.len() {
        return Err(Error::Internal {
            check: format!("{} coefficients prepared, {terms} needed", an.len()),
        });
    }
    Ok((series(f, an, step, &q, terms, budget)?, terms))
}

/// `Σ_{k ≤ M, k ≡ 1 (mod step)} (a_k/k) q^k` by rectangular splitting
/// (Paterson–Stockmeyer; common practice): with `x = q^step` and
/// `k = 1 + step·(bL + i)`, the sum is `q·Σ_b x^{bL}·(Σ_{i<L} c_{bL+i} x^i)`;
/// the powers `x^i`, `i < L`, are kept, each inner sum costs only
/// multiplications and divisions by the small integers `a_k` and `k`, and
/// the outer sum is a Horner scheme in `x^L`. About `L + M/(step·L)` full
/// products instead of `M/step`, with `L ≈ √(M/step)` (at most 4096 powers
/// stored). Rounding: each power `x^i` errs by ≤ `2i` ulp, each inner term
/// by ≤ `|a_k/k|·2i + 2` ulp, each Horner step adds ≤ 2 ulp (`|x| < 1`
/// does not enlarge earlier errors): in all ≤ `4M²` ulp, the bound the
/// caller's guard bits cover, as for the plain sum.
fn series(
    f: Fixed,
    an: &[i64],
    step: usize,
    q: &Cx,
    terms: u64,
    budget: &mut Budget,
) -> Result<Cx> {
    let count = (terms as usize).saturating_sub(1) / step + 1; // j = 0..count
    let l = ((count as f64).sqrt().ceil() as usize).clamp(1, 4096);
    let limbs = u64::from(f.p / 64 + 1);
    let mut x = q.clone();
    for _ in 1..step {
        x = f.cmul(&x, q);
    }
    let mut pow: Vec<Cx> = Vec::with_capacity(l + 1);
    pow.push(Cx {
        re: f.one(),
        im: BigInt::zero(),
    });
    for i in 1..=l {
        spend(budget, 4 * limbs)?;
        let next = f.cmul(&pow[i - 1], &x);
        pow.push(next);
    }
    let xl = pow.pop().unwrap_or_else(Cx::zero);
    let blocks = count.div_ceil(l);
    let mut acc = Cx::zero();
    for blk in (0..blocks).rev() {
        spend(budget, 4 * limbs)?;
        acc = f.cmul(&acc, &xl);
        for (i, p) in pow.iter().enumerate() {
            let j = blk * l + i;
            if j >= count {
                break;
            }
            let k = 1 + step * j;
            let ak = an[k];
            if ak != 0 {
                spend(budget, limbs / 4 + 1)?;
                acc.re += &p.re * ak / k as u64;
                acc.im += &p.im * ak / k as u64;
            }
        }
    }
    Ok(f.cmul(&acc, q))
}

/// The least `M` with `2|q|^{M+1}/(1 − |q|) ≤ 2^{−p}`, with `|q|` inflated
/// by `10⁻⁹` relative to cover its binary64 rounding.
pub(crate) fn terms_for(qabs: f64, p: u32) -> u64 {
    let q = (qabs * (1.0 + 1e-9)).min(1.0 - 1e-12);
    let target = -(f64::from(p)) * std::f64::consts::LN_2 - (2.0 / (1.0 - q)).ln();
    (target / q.ln()).ceil().max(1.0) as u64
}

/// The continued-fraction convergents `h/k` of `x·2^{−p}` with `k` a
/// perfect square of at most `max_bits` bits, within `2^{tol−p}` of
/// `x·2^{−p}`, and `(h/k)³ − n²(h/k)` a non-zero rational square: the
/// first such point of `E_n` (not a 2-torsion point), checked exactly.
pub(crate) fn recognise(
    f: &Fixed,
    x: &BigInt,
    n: &BigInt,
    max_bits: u64,
    tol: u32,
) -> Option<Point> {
    let n2 = n * n;
    square_convergent(f, x, (max_bits, tol), |h, k, d| {
        // Y² = (h³ − n²h·d⁴)/d⁶.
        let d4 = k * k;
        let top = h * h * h - &n2 * h * &d4;
        let s = sqrt_exact(&top).filter(|s| !s.is_zero())?;
        let x = BigRational::new(h.clone(), k.clone());
        let y = BigRational::new(s, k * d);
        Some(Point::new(x, y))
    })
}

/// The search both recognisers share (this one on `E_n`, the one of
/// `own_level` on any model): the continued-fraction convergents `h/k` of
/// `x·2^{−p}` in turn, up to the first `k` of more than `max_bits` bits;
/// for each within `2^{tol−p}` of `x·2^{−p}` with `k = d²` a perfect
/// square, `point(h, k, d)`; the first point it gives.
pub(crate) fn square_convergent(
    f: &Fixed,
    x: &BigInt,
    (max_bits, tol): (u64, u32),
    mut point: impl FnMut(&BigInt, &BigInt, &BigInt) -> Option<Point>,
) -> Option<Point> {
    let (mut num, mut den) = (x.clone(), f.one());
    let (mut h1, mut h2) = (BigInt::one(), BigInt::zero());
    let (mut k1, mut k2) = (BigInt::zero(), BigInt::one());
    while !den.is_zero() {
        let a = num.div_floor(&den);
        let h = &a * &h1 + &h2;
        let k = &a * &k1 + &k2;
        if k.bits() > max_bits {
            return None;
        }
        // Only convergents within the approximation's own accuracy
        // (|x·2^{−p} − h/k| ≤ 2^{tol−p}) are candidates; the first
        // convergents (like ⌊x⌋) may happen to be points of the curve.
        let close = (x * &k - (&h << f.p)).abs() <= (&k << tol);
        if let (true, Some(d)) = (close, sqrt_exact(&k)) {
            if let Some(p) = point(&h, &k, &d) {
                return Some(p);
            }
        }
        let r = &num - &a * &den;
        num = std::mem::replace(&mut den, r);
        h2 = std::mem::replace(&mut h1, h);
        k2 = std::mem::replace(&mut k1, k);
    }
    None
}

/// `X = −n·℘(v)` for `v = s·ω₁/2 + iy`, then [`recognise`].
pub(crate) fn point_at(
    c: &Constants,
    s: bool,
    y: &BigInt,
    n: &BigInt,
    guard: u32,
) -> Option<Point> {
    let x = c.wp(s, y)?;
    let big_x = -(x * n);
    let max_bits = u64::from(c.f.p.saturating_sub(guard)) / 2;
    recognise(&c.f, &big_x, n, max_bits, guard)
}

/// The point of parameter `iy` on `E_n` if it is rational, else the first
/// rational point among its halves, quarters, … down to `2^{−depth}`:
/// returns `R`, its parameter and `j` with `2^j·R = ±Q + T`, `T ∈ E_n[2]`,
/// `Q` the point of `iy`.
///
/// Halving: the real points of `E_n` are the parameters `s·ω₁/2 + iy'`
/// (`s ∈ {0, 1}`, `y'` modulo `ω₁`, the two components), a group
/// `R/ω₁Z × Z/2`; the doubles are the points with `s = 0`. The points `R`
/// with `2R ∈ Q + E_n[2]` are therefore, up to adding `E_n[2]`, the
/// parameters `i·y/2` and `i·(y/2 + ω₁/4)`; since `E_n[2] ⊂ E_n(Q)`, one
/// representative of each coset is rational exactly when all are. Each
/// candidate is recognised and checked on the curve exactly
/// ([`point_at`]); the relation to `Q` is the numerical one above.
pub(crate) fn point_or_halves(
    c: &Constants,
    y: &BigInt,
    n: &BigInt,
    guard: u32,
    depth: u32,
    budget: &mut Budget,
) -> Result<Option<(Point, BigInt, u32)>> {
    let mut level = vec![y.clone()];
    let quarter = &c.w1 >> 2;
    for j in 0..=depth {
        for yy in &level {
            spend(budget, 64 * u64::from(c.f.p / 64 + 1))?;
            if let Some(p) = point_at(c, false, yy, n, guard) {
                return Ok(Some((p, yy.clone(), j)));
            }
        }
        level = level
            .iter()
            .flat_map(|yy| {
                let h: BigInt = yy >> 1;
                [h.clone(), h + &quarter]
            })
            .collect();
    }
    Ok(None)
}

/// The torsion points of `E_n`: `O, (0, 0), (±n, 0)`.
pub(crate) fn torsion(n: &BigInt) -> Vec<Point> {
    let z = BigRational::zero();
    vec![
        Point::Infinity,
        Point::new(z.clone(), z.clone()),
        Point::new(BigRational::from_integer(n.clone()), z.clone()),
        Point::new(BigRational::from_integer(-n), z),
    ]
}

/// True when `p·r ∓ q` is a torsion point of `E_n` (exact arithmetic).
pub(crate) fn is_multiple(e: &Curve, r: &Point, q: &Point, p: u64, n: &BigInt) -> bool {
    let pr = e.mul(r, &BigInt::from(p));
    let tors = torsion(n);
    [e.sub(&pr, q), e.add(&pr, q)]
        .iter()
        .any(|d| tors.contains(d))
}

/// The curve `E_n` with the constants of the series at the working
/// precision and the guard bits of recognition, for [`divide`].
pub(crate) struct Twist<'a> {
    pub(crate) c: &'a Constants,
    pub(crate) e: &'a Curve,
    pub(crate) n: &'a BigInt,
    pub(crate) guard: u32,
}

/// Tries to write the point `Q` with elliptic parameter `(s, y)` as
/// `p·R` (up to sign and torsion) with `R ∈ E_n(Q)`: the candidates of
/// the module docs, each recognised and checked exactly. Returns `R` and
/// its parameter.
pub(crate) fn divide(
    twist: &Twist<'_>,
    q: &Point,
    (s, y): (bool, &BigInt),
    p: u64,
    budget: &mut Budget,
) -> Result<Option<(Point, bool, BigInt)>> {
    let Twist { c, e, n, guard } = *twist;
    let w1 = &c.w1;
    let half = w1 / 2;
    let mut shifts: Vec<(bool, BigInt)> = vec![(s, y.clone())];
    if p == 2 {
        // Q + T for the 2-torsion T = (1, 0), (0, ω₁/2), (1, ω₁/2).
        shifts.push((!s, y.clone()));
        shifts.push((s, y + &half));
        shifts.push((!s, y + &half));
    }
    for (ss, yy) in shifts {
        let targets: Vec<bool> = if p == 2 {
            if ss {
                continue;
            }
            vec![false, true]
        } else {
            vec![ss]
        };
        for j in 0..p {
            let num = &yy + w1 * BigInt::from(j);
            let ny = num / BigInt::from(p);
            for &ns in &targets {
                spend(budget, 64 * u64::from(c.f.p / 64 + 1))?;
                if let Some(r) = point_at(c, ns, &ny, n, guard) {
                    if is_multiple(e, &r, q, p, n) {
                        return Ok(Some((r, ns, ny)));
                    }
                }
            }
        }
    }
    Ok(None)
}

/// The sum `z = Σ φ(τ_i)` over the classes, and the number of terms. A
/// class reached through `W_N` ([`Rep::Flipped`]) adds `ω₁/4 − φ(τ_F)`:
/// for `E0` at level 32, `φ(W_N τ) = −φ(τ) + ω₁/4` modulo `Λ_f` (the sign
/// `ε = −w(E0) = −1`, and the constant `φ(0)` is real; checked by the test
/// `atkin_lehner_relation_of_e0`).
pub(crate) fn trace(
    c: &Constants,
    an: &[i64],
    step: usize,
    reps: &[Rep],
    d: i64,
    budget: &mut Budget,
) -> Result<(Cx, u64)> {
    let mut z = Cx::zero();
    let mut terms = 0;
    for rep in reps {
        let (v, t) = phi(c, an, step, rep.form(), d, budget)?;
        z = match rep {
            Rep::Direct(_) => z.add(&v),
            Rep::Flipped(_) => Cx {
                re: z.re - v.re + (&c.w1 >> 2),
                im: z.im - v.im,
            },
        };
        terms += t;
    }
    Ok((z, terms))
}

/// From the trace `z` on `C/Λ_f` to the parameter `y` of the point
/// `i·y` of the minus part on `C/Λ₀` (module docs), with `k = 8Re z/ω₁`.
///
/// # Errors
/// [`Error::Internal`] when `8·Re z/ω₁` is not within `2^{−20}` of an
/// integer (the trace is not where the theory puts it: a defect).
pub(crate) fn minus_part(c: &Constants, z: &Cx) -> Result<(BigInt, i64)> {
    let f = c.f;
    let kf = f.div(&(&z.re * 8), &c.w1);
    let k = f.round(&kf);
    let off = (&kf - f.int(&k)).abs();
    if off.bits() + 20 > u64::from(f.p) {
        return Err(Error::Internal {
            check: format!(
                "8·Re(trace)/ω₁ = {:.6} is not an integer",
                f.approx_f64(&kf)
            ),
        });
    }
    let k = k.to_i64().unwrap_or(0);
    let factor = if k.is_even() { 2 } else { 4 };
    Ok((&z.im * factor, k))
}

/// `y ≡ 0 (mod ω₁)` within `2^{−p/2}`: the point is O.
pub(crate) fn is_zero_point(c: &Constants, y: &BigInt) -> bool {
    let mut r = y.mod_floor(&c.w1);
    if &r * 2 > c.w1 {
        r = &c.w1 - r;
    }
    r.bits() < u64::from(c.f.p / 2)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn wp_satisfies_the_differential_equation_numerically() {
        // ℘ on the two circles iy and ω₁/2 + iy is real with x³ − x ≤ 0
        // (there ℘′ = 2y₀ is purely imaginary): x ≤ −1 on the first,
        // 0 ≤ x ≤ 1 on the second (Silverman, AEC, VI.3; from memory).
        let c = Constants::new(200);
        for s in [false, true] {
            for num in [1i64, 3, 7] {
                let y =
                    c.f.mul(&c.w1, &c.f.ratio(&BigInt::from(num), &BigInt::from(17)));
                let x = c.f.approx_f64(&c.wp(s, &y).unwrap());
                assert!(x * x * x - x <= 1e-30, "s = {s}, x = {x}");
            }
        }
        // The 2-torsion: ℘(ω₁/2) = 1 and ℘(iω₁/2) = −1, ℘((1+i)ω₁/2) = 0
        // (the roots of x³ − x).
        let half = &c.w1 / 2;
        let x = c.f.approx_f64(&c.wp(true, &BigInt::zero()).unwrap());
        assert!((x - 1.0).abs() < 1e-12, "{x}");
        let x = c.f.approx_f64(&c.wp(false, &half).unwrap());
        assert!((x + 1.0).abs() < 1e-12, "{x}");
        let x = c.f.approx_f64(&c.wp(true, &half).unwrap());
        assert!(x.abs() < 1e-12, "{x}");
    }

    #[test]
    fn atkin_lehner_relation_of_e0() {
        // φ(−1/(32τ)) = −φ(τ) + ω₁/4 modulo Λ_f = ((1+i)/2)ω₁Z[i] (so the
        // real part modulo ω₁), used by `trace` for classes reached through
        // W_32; derived numerically and checked here at 200 bits. The sign
        // is ε = −w(E0) with root number w(E0) = +1 (rank 0).
        let c = Constants::new(200);
        let f = c.f;
        let e0 = Curve::from_ints([0, 0, 0, -1, 0]).unwrap();
        let local =
            crate::curve::global_local_data(e0.coefficients(), &mut Budget::unlimited()).unwrap();
        let an = crate::analytic::dirichlet_coefficients(&local, 4000, &mut Budget::unlimited())
            .unwrap();
        // The Heegner form [32, 8, 3] of discriminant −320 = −64·5.
        let (a, b, cc) = (32i64, 8i64, 3i64);
        let d = b * b - 4 * a * cc;
        let (v, _) = phi(&c, &an, 4, (a, b, cc), d, &mut Budget::unlimited()).unwrap();
        // W_32 τ is the point of [32·C, −B, A/32] = [96, −8, 1].
        let (w, _) = phi(
            &c,
            &an,
            4,
            (32 * cc, -b, a / 32),
            d,
            &mut Budget::unlimited(),
        )
        .unwrap();
        let im = f.approx_f64(&(&v.im + &w.im));
        let re = f.approx_f64(&f.div(&(&v.re + &w.re), &c.w1));
        assert!(im.abs() < 1e-40, "{im}");
        let frac = re - re.round();
        assert!((frac - 0.25).abs() < 1e-12, "{re}");
    }
}
