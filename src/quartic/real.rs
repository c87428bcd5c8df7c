//! The real place: does `y² = g(x, z)` have a real point?
//!
//! # Lemma R (the real criterion)
//!
//! Let `g` be a real binary quartic with `Δ(g) ≠ 0`. Then `y² = g(x, z)` has
//! a point over `R` iff `g(x₀, z₀) > 0` for some `(x₀, z₀) ∈ R²`, iff
//! `c4 > 0`, or `c0 > 0`, or `g` has a root in `P¹(R)`.
//!
//! *Proof.* A real point is `(x, z)` with `g(x, z) ≥ 0`. If `g(x, z) = 0`,
//! `(x : z)` is a root, which is simple (`Δ ≠ 0`), so `g` changes sign there
//! and takes positive values nearby. Conversely `g(1, 0) = c4`,
//! `g(0, 1) = c0`, and a simple real root gives a sign change. If `g` has no
//! root in `P¹(R)`, it has constant sign on `R² \ {0}`, the sign of `c4`. ∎
//!
//! # Algorithm
//!
//! 1. `c4 > 0`: witness `(1, 0)`. `c0 > 0`: witness `(0, 1)`.
//! 2. `c4 = 0` (so `c3 ≠ 0`, the root at infinity is simple): `f(x) = g(x, 1)`
//!    has odd degree 3 and `|roots| < B = 1 + max|cᵢ|` (Cauchy's bound
//!    [Marden66, §27], with `|c3| ≥ 1`), so `f(B)` and `f(−B)` have opposite
//!    signs; the positive one is the witness.
//! 3. Otherwise (`c4 < 0`, `c0 ≤ 0`): count the distinct real roots of
//!    `f = g(x, 1)` by Sturm's theorem [BasuPollackRoy06, Thm. 2.50] with an
//!    integer Sturm sequence (`S₀ = f`, `S₁ = f'`,
//!    `S_{i+1} = −|lc S_i|^{δ+1} S_{i−1} mod S_i` divided by its positive
//!    content — positive multipliers keep every sign). No root: insoluble.
//!    Otherwise bisect `(−B, B)` into pieces holding at most one root,
//!    choosing split points that are not roots; since `f < 0` at `±∞` and
//!    its roots are simple, some split point lies strictly between two
//!    consecutive roots where `f > 0`; it is the witness (cleared of its
//!    denominator: `g(n, m) = m⁴ f(n/m)`).
//!
//! Cost: `O(log B + log(1/sep))` Sturm evaluations, each a handful of
//! multiplications of numbers of the size of the coefficients times the
//! current dyadic precision. One budget unit is charged per evaluation of
//! the Sturm sequence.

use super::form::Quartic;
use crate::budget::Budget;
use crate::error::{Error, Result};
use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Signed, Zero};
use std::cmp::Ordering;

/// An integer polynomial, lowest degree first, no trailing zeros.
type ZPoly = Vec<BigInt>;

fn trim(mut p: ZPoly) -> ZPoly {
    while p.last().is_some_and(|c| c.is_zero()) {
        p.pop();
    }
    p
}

fn derivative(p: &ZPoly) -> ZPoly {
    trim(
        p.iter()
            .enumerate()
            .skip(1)
            .map(|(i, c)| c * BigInt::from(i))
            .collect(),
    )
}

/// `−(|lc b|^{deg a − deg b + 1} · a) mod b`, divided by its positive content.
fn neg_pseudo_rem(a: &ZPoly, b: &ZPoly) -> ZPoly {
    let db = b.len() - 1;
    let lc = b[db].clone();
    let lc_abs = lc.abs();
    let mut r = a.clone();
    let delta = a.len() - b.len() + 1;
    // multiply a by |lc|^delta, then do exact division steps.
    let mult = num_traits::pow(lc_abs, delta);
    for c in r.iter_mut() {
        *c *= &mult;
    }
    while r.len() > db && !r.is_empty() {
        let dr = r.len() - 1;
        let top = r[dr].clone();
        if top.is_zero() {
            r.pop();
            continue;
        }
        // top is divisible by lc by construction of the multiplier.
        let q = &top / &lc;
        for (i, bc) in b.iter().enumerate() {
            r[dr - db + i] -= &q * bc;
        }
        r = trim(r);
    }
    let cont = r.iter().fold(BigInt::zero(), |g, c| g.gcd(c));
    if cont.is_zero() {
        return Vec::new();
    }
    r.iter().map(|c| -(c / &cont)).collect()
}

/// The Sturm sequence of `f` (which must be non-constant).
fn sturm_sequence(f: &ZPoly) -> Vec<ZPoly> {
    let mut seq = vec![f.clone(), derivative(f)];
    loop {
        let n = seq.len();
        if seq[n - 1].len() <= 1 {
            break;
        }
        let r = neg_pseudo_rem(&seq[n - 2], &seq[n - 1]);
        if r.is_empty() {
            break;
        }
        seq.push(r);
    }
    seq
}

/// `m^deg · p(n/m)` for `m > 0`: same sign as `p(n/m)`.
fn eval_homog(p: &ZPoly, n: &BigInt, m: &BigInt) -> BigInt {
    // Horner: acc_{k} = acc_{k-1}·n + c_{d-k}·m^k.
    let mut acc = BigInt::zero();
    let mut mp = BigInt::one();
    for c in p.iter().rev() {
        acc = acc * n + c * &mp;
        mp *= m;
    }
    acc
}

fn sign_changes(signs: impl Iterator<Item = Ordering>) -> usize {
    let mut last = Ordering::Equal;
    let mut count = 0;
    for s in signs {
        if s == Ordering::Equal {
            continue;
        }
        if last != Ordering::Equal && s != last {
            count += 1;
        }
        last = s;
    }
    count
}

fn sign(x: &BigInt) -> Ordering {
    x.cmp(&BigInt::zero())
}

/// Sign variations of the Sturm sequence at `n/m` (`m > 0`).
fn variations_at(seq: &[ZPoly], n: &BigInt, m: &BigInt) -> usize {
    sign_changes(seq.iter().map(|p| sign(&eval_homog(p, n, m))))
}

/// Sign variations at `+∞` (`plus = true`) or `−∞`.
fn variations_at_infinity(seq: &[ZPoly], plus: bool) -> usize {
    sign_changes(seq.iter().map(|p| {
        let d = p.len() - 1;
        let s = sign(&p[d]);
        if !plus && d % 2 == 1 {
            s.reverse()
        } else {
            s
        }
    }))
}

/// `g(x, 1)` as an integer polynomial, lowest degree first.
fn dehomogenise(q: &Quartic) -> ZPoly {
    let c = q.coeffs();
    trim(vec![
        c[4].clone(),
        c[3].clone(),
        c[2].clone(),
        c[1].clone(),
        c[0].clone(),
    ])
}

#[cfg(test)]
/// The number of roots of `g` in `P¹(R)`, counted without multiplicity
/// (for a non-degenerate quartic: with multiplicity, as all are simple).
///
/// Statement: the real roots of `g(x, 1)` are counted by Sturm's theorem
/// [BasuPollackRoy06, Thm. 2.50], `V(−∞) − V(+∞)`; the point `(1 : 0)` is a
/// root iff `c4 = 0`.
///
/// Cost: one Sturm sequence (degree ≤ 4), no evaluation at finite points.
///
/// Example: `x⁴ − 17z⁴` has 2 real roots `±17^{1/4}`; `x⁴ + z⁴` has none;
/// `x³z − xz³` has 4 (`0, ±1, ∞`).
pub fn real_root_count(q: &Quartic) -> usize {
    let f = dehomogenise(q);
    let at_infinity = usize::from(q.coeffs()[0].is_zero());
    if f.len() <= 1 {
        return at_infinity;
    }
    let seq = sturm_sequence(&f);
    variations_at_infinity(&seq, false) - variations_at_infinity(&seq, true) + at_infinity
}

/// Decides real solubility of `y² = g(x, z)` by Lemma R; returns a witness
/// `(x, z)` of integers with `g(x, z) > 0`, or `None` when there is no real
/// point.
///
/// # Errors
/// [`Error::BudgetExhausted`] when the budget runs out (one unit per
/// Sturm evaluation).
pub(crate) fn real_witness(q: &Quartic, budget: &mut Budget) -> Result<Option<(BigInt, BigInt)>> {
    let c = q.coeffs();
    let one = BigInt::one();
    let zero = BigInt::zero();
    if c[0].is_positive() {
        return Ok(Some((one, zero)));
    }
    if c[4].is_positive() {
        return Ok(Some((zero, one)));
    }
    if let Some(w) = biquadratic_witness(q) {
        return Ok(w);
    }
    let f = dehomogenise(q);
    // Cauchy-type bound: every real root r satisfies |r| < B.
    let bound = one.clone() + c.iter().map(|x| x.abs()).max().unwrap_or_default();
    let charge = |budget: &mut Budget| {
        budget.spend(1).map_err(|_| Error::BudgetExhausted {
            stage: "real solubility (Sturm sequence)".into(),
        })
    };
    if c[0].is_zero() {
        // Odd degree 3 (c3 ≠ 0 by non-degeneracy): opposite signs at ±B.
        for x in [bound.clone(), -bound.clone()] {
            charge(budget)?;
            if q.eval(&x, &one).is_positive() {
                return Ok(Some((x, one)));
            }
        }
        // Unreachable for a non-degenerate form; report "no point" would be
        // wrong, so signal the inconsistency as a degenerate input.
        return Err(Error::Degenerate {
            reason: format!("{q}: no sign change of an odd-degree form"),
        });
    }
    if f.len() <= 1 {
        // c4 < 0 and g = c4 x⁴ only: degenerate (excluded by construction).
        return Ok(None);
    }
    let seq = sturm_sequence(&f);
    let roots = variations_at_infinity(&seq, false) - variations_at_infinity(&seq, true);
    if roots == 0 {
        return Ok(None);
    }
    // Bisection over rationals n/m (m a power of two), split points avoid roots.
    let mut stack: Vec<((BigInt, BigInt), (BigInt, BigInt))> =
        vec![((-bound.clone(), one.clone()), (bound.clone(), one.clone()))];
    while let Some((lo, hi)) = stack.pop() {
        charge(budget)?;
        let count = variations_at(&seq, &lo.0, &lo.1) - variations_at(&seq, &hi.0, &hi.1);
        if count < 2 {
            continue;
        }
        // Denominators are powers of two; put both ends over `den`, a
        // multiple of 8 of both, and try lo + (hi − lo)·j/8 (exact).
        let den = lo.1.clone().max(hi.1.clone()) * BigInt::from(8);
        let lo_n = &lo.0 * (&den / &lo.1);
        let hi_n = &hi.0 * (&den / &hi.1);
        let step = (&hi_n - &lo_n) / BigInt::from(8);
        // At most 4 roots, so one of these 7 points is not a root.
        let mut split = None;
        for j in [4, 3, 5, 2, 6, 1, 7] {
            let n = &lo_n + &step * BigInt::from(j);
            let v = eval_homog(&f, &n, &den);
            if v.is_zero() {
                continue;
            }
            if v.is_positive() {
                let g = n.gcd(&den);
                return Ok(Some((&n / &g, &den / &g)));
            }
            split = Some(n);
            break;
        }
        if let Some(n) = split {
            let mid = (n, den);
            stack.push((lo, mid.clone()));
            stack.push((mid, hi));
        }
    }
    Err(Error::Degenerate {
        reason: format!("{q}: real roots found but no positive value isolated"),
    })
}

/// Fast path for even forms g = c4 x⁴ + c2 x² z² + c0 z⁴ (c3 = c1 = 0, the
/// shape of every 2-isogeny homogeneous space) with c4 < 0 and c0 < 0.
/// In t = x²/z² ≥ 0, g/z⁴ = c4 t² + c2 t + c0 is a downward parabola, so g
/// takes a positive value iff its vertex t₀ = −c2/(2c4) is positive (c2 > 0)
/// and the maximum c0 − c2²/(4c4) is positive, i.e. c2² > 4 c4 c0 (common
/// practice: elementary calculus). Then the positive set is an open
/// interval of t > 0 around t₀, and x = ⌊z√t₀⌋ or x + 1 hits it once z is
/// large enough; z runs through powers of 2, which terminates.
///
/// Returns `None` when the form is not of this shape (the caller falls back
/// to the Sturm sequence), `Some(None)` for "no real point", and
/// `Some(Some((x, z)))` with g(x, z) > 0.
fn biquadratic_witness(q: &Quartic) -> Option<Option<(BigInt, BigInt)>> {
    let c = q.coeffs();
    if !(c[1].is_zero() && c[3].is_zero() && c[0].is_negative() && c[4].is_negative()) {
        return None;
    }
    let (c4, c2, c0) = (&c[0], &c[2], &c[4]);
    if !c2.is_positive() || c2 * c2 <= BigInt::from(4) * c4 * c0 {
        return Some(None);
    }
    // t₀ = c2 / (2|c4|); x ≈ z·√t₀ = √(z² c2 / (2|c4|))
    let two_abs_c4: BigInt = -(c4 * 2u32);
    let mut z = BigInt::one();
    for _ in 0..4096 {
        let t_scaled = (&z * &z * c2) / &two_abs_c4;
        let x0 = t_scaled.sqrt();
        for x in [x0.clone(), &x0 + 1u32] {
            if q.eval(&x, &z).is_positive() {
                return Some(Some((x, z)));
            }
        }
        z <<= 1;
    }
    // Not reached for a non-degenerate form; let the general path decide.
    None
}
