//! The real period by the arithmetic–geometric mean.
//!
//! For a model with invariants `b2, b4, b6`, `(2y + a1x + a3)² =
//! f(x) = 4x³ + b2x² + 2b4x + b6`, and the invariant differential is
//! `ω = dx/(2y + a1x + a3)`. With the roots `e_i` of `f`:
//!
//! * `Δ > 0`, roots `e1 > e2 > e3`: the least positive real period is
//!   `ω₁ = π / M(√(e1 − e3), √(e1 − e2))`, and `E(R)` has two components;
//! * `Δ < 0`, one real root `e1`, `R = √((e1 − e2)(e1 − e3)) =
//!   √(3e1² + b2e1/2 + b4/2)`: `ω₁ = 2π / M(2√R, √(2R + 3e1 + b2/4))`, one
//!   component
//!
//! ([Cre97, §3.7], [Cohen93, Alg. 7.4.7]; from memory). The period in the
//! Birch–Swinnerton-Dyer formula is `Ω = ∫_{E(R)} |ω| = ω₁ · (number of
//! real components)` for the global minimal model.
//!
//! Rigour: the real roots are enclosed between two binary64 numbers at
//! which the exact integer polynomial `f` is proven to change sign
//! (evaluated in big integers); everything after is midpoint–radius
//! arithmetic ([`Certified`]); the AGM is enclosed by running it twice with
//! downward and upward inflated roundings, using that `M(a, b)` increases in
//! both arguments and that `min(a_k, b_k) ≤ M ≤ max(a_k, b_k)` at every step
//! (Gauss; common practice).

use std::cmp::Ordering;

use num_bigint::BigInt;
use num_traits::{Signed, ToPrimitive};

use crate::arith::certified::{pi, Certified};
use crate::curve::weierstrass_invariants;

/// The real period of a model and its number of real components.
#[derive(Debug, Clone, Copy, PartialEq)]
#[non_exhaustive]
pub struct RealPeriod {
    /// The least positive real period `ω₁` of the lattice of the model.
    pub least: Certified,
    /// Number of connected components of `E(R)` (1 or 2).
    pub components: u8,
    /// `Ω = ω₁ · components`, the normalisation of the BSD formula.
    pub omega: Certified,
}

/// Sign of `4x³ + b2x² + 2b4x + b6` at a binary64 `x`, exactly
/// ([`crate::arith::sign_at_f64`]); `Equal` for a non-finite `x`.
fn sign_at(b: &[BigInt; 3], x: f64) -> Ordering {
    let c = [b[2].clone(), &b[1] * 2, b[0].clone(), BigInt::from(4)];
    crate::arith::sign_at_f64(&c, x).unwrap_or(Ordering::Equal)
}

fn big_f64(x: &BigInt) -> Option<Certified> {
    let v = x.to_f64()?;
    if !v.is_finite() || v.abs() > 1e300 {
        return None;
    }
    // Exact below 2^53; else rounded to nearest (relative error ≤ 2⁻⁵³).
    let err = if v.abs() < 9.0e15 {
        0.0
    } else {
        v.abs() * f64::EPSILON
    };
    Some(Certified::with_radius(v, err))
}

/// Encloses a root of `f` near `guess` given the sign `s_left` of `f`
/// just left of the root: returns `(lo, hi)` with proven sign change.
fn enclose(b: &[BigInt; 3], guess: f64, left_sign: Ordering) -> Option<(f64, f64)> {
    let mut delta = guess.abs() * 4.0 * f64::EPSILON + 1e-300;
    for _ in 0..200 {
        let lo = guess - delta;
        let hi = guess + delta;
        if sign_at(b, guess) == Ordering::Equal {
            return Some((guess, guess));
        }
        if sign_at(b, lo) == left_sign && sign_at(b, hi) == left_sign.reverse() {
            return Some(refine(b, lo, hi, left_sign));
        }
        delta *= 16.0;
        if !delta.is_finite() {
            return None;
        }
    }
    None
}

/// Bisection with exact signs until the bracket is tight.
fn refine(b: &[BigInt; 3], mut lo: f64, mut hi: f64, left: Ordering) -> (f64, f64) {
    for _ in 0..80 {
        let mid = 0.5 * (lo + hi);
        if mid <= lo || mid >= hi {
            break;
        }
        match sign_at(b, mid) {
            Ordering::Equal => return (mid, mid),
            s if s == left => lo = mid,
            _ => hi = mid,
        }
    }
    (lo, hi)
}

/// Approximate real roots of `4x³ + b2x² + 2b4x + b6` in binary64 (Newton
/// from the bracket given by the critical points), ascending.
fn approximate_roots(b: [f64; 3], three: bool) -> Vec<f64> {
    let [b2, b4, b6] = b;
    let f = |x: f64| ((4.0 * x + b2) * x + 2.0 * b4) * x + b6;
    let bound = 1.0 + (b2.abs() / 4.0).max((b4.abs() / 2.0).max(b6.abs() / 4.0));
    let bisect = |mut lo: f64, mut hi: f64| {
        let up = f(hi) > 0.0;
        for _ in 0..2000 {
            let mid = 0.5 * (lo + hi);
            if mid <= lo || mid >= hi {
                break;
            }
            if (f(mid) > 0.0) == up {
                hi = mid;
            } else {
                lo = mid;
            }
        }
        0.5 * (lo + hi)
    };
    if !three {
        return vec![bisect(-bound, bound)];
    }
    // Critical points of f: 12x² + 2b2x + 2b4 = 0.
    let disc = (4.0 * b2 * b2 - 96.0 * b4).max(0.0).sqrt();
    let c1 = (-2.0 * b2 - disc) / 24.0;
    let c2 = (-2.0 * b2 + disc) / 24.0;
    vec![bisect(-bound, c1), bisect(c1, c2), bisect(c2, bound)]
}

/// The real period of an integral model `[a1, a2, a3, a4, a6]`; `None`
/// when the coefficients are too large for binary64 or a root could not
/// be enclosed (never for models of moderate size).
pub fn real_period(model: &[BigInt; 5]) -> Option<RealPeriod> {
    let inv = weierstrass_invariants(model);
    let b = [inv.b2.clone(), inv.b4.clone(), inv.b6.clone()];
    let bc = [big_f64(&b[0])?, big_f64(&b[1])?, big_f64(&b[2])?];
    let three = inv.discriminant.is_positive();
    let approx = approximate_roots([bc[0].value(), bc[1].value(), bc[2].value()], three);
    let mut roots = Vec::new();
    for (i, g) in approx.iter().enumerate() {
        // f has positive leading coefficient: left of the largest (or
        // only) root it is negative, left of the middle one positive.
        let left = if three && i == 1 {
            Ordering::Greater
        } else {
            Ordering::Less
        };
        let (lo, hi) = enclose(&b, *g, left)?;
        let mid = 0.5 * (lo + hi);
        let rad = (hi - mid).max(mid - lo);
        roots.push(Certified::with_radius(
            mid,
            rad * (1.0 + 4.0 * f64::EPSILON),
        ));
    }
    let p = pi();
    if three {
        let (e1, e2, e3) = (roots[2], roots[1], roots[0]);
        let a = e1.minus(&e3).sqrt();
        let c = e1.minus(&e2).sqrt();
        let m = agm(&a, &c)?;
        let least = p.div(&m);
        Some(RealPeriod {
            least,
            components: 2,
            omega: least.scale(2.0),
        })
    } else {
        let e1 = roots[0];
        // R² = 3e1² + b2·e1/2 + b4/2.
        let r2 = e1
            .mul(&e1)
            .scale(3.0)
            .add(&bc[0].mul(&e1).scale(0.5))
            .add(&bc[1].scale(0.5));
        let r = r2.sqrt();
        let a = r.sqrt().scale(2.0);
        let c = r
            .scale(2.0)
            .add(&e1.scale(3.0))
            .add(&bc[0].scale(0.25))
            .sqrt();
        let m = agm(&a, &c)?;
        let least = p.scale(2.0).div(&m);
        Some(RealPeriod {
            least,
            components: 1,
            omega: least,
        })
    }
}

/// The arithmetic–geometric mean of two positive enclosures.
fn agm(a: &Certified, b: &Certified) -> Option<Certified> {
    let (alo, blo) = (a.lower(), b.lower());
    if !(alo > 0.0 && blo > 0.0 && a.is_finite() && b.is_finite()) {
        return None;
    }
    let down = 1.0 - 4.0 * f64::EPSILON;
    let upf = 1.0 + 4.0 * f64::EPSILON;
    let run = |mut x: f64, mut y: f64, f: f64| {
        for _ in 0..100 {
            let nx = 0.5 * (x + y) * f;
            let ny = (x * y * f).sqrt() * f;
            x = nx;
            y = ny;
            if (x - y).abs() <= 2e-15 * x {
                break;
            }
        }
        (x, y)
    };
    let (l1, l2) = run(alo, blo, down);
    let (h1, h2) = run(a.upper(), b.upper(), upf);
    let lo = l1.min(l2) * down;
    let hi = h1.max(h2) * upf;
    let mid = 0.5 * (lo + hi);
    Some(Certified::with_radius(mid, (hi - mid).max(mid - lo) * upf))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn agm_of_one_and_root_two_is_gauss_value() {
        // M(1, √2) = 1.19814023473559220744… (Gauss; from memory).
        let m = agm(&Certified::exact(1.0), &Certified::exact(2f64.sqrt())).unwrap();
        assert!((m.value() - 1.198_140_234_735_592_2).abs() <= m.error() + 3e-16);
        assert!(m.error() < 1e-14, "{m}");
    }
}
