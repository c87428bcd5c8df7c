//! Rational 2-torsion and the reduced model for descent via 2-isogeny.
//!
//! # 2-torsion
//! A point P ≠ O has order 2 iff P = −P, i.e. 2y + a1x + a3 = 0; on
//! substituting, x is a root of the 2-division polynomial
//! 4x³ + b2x² + 2b4x + b6 [Sil09, III.2, Exercise 3.7]. Rather than search
//! rational roots of that cubic directly, we pass to the integral short
//! model y² = x³ + Ax + B (see [`short_integral_model`]): there the rational
//! 2-torsion points are (e, 0) with e an *integer* root of x³ + Ax + B
//! (a rational root of a monic integer polynomial is an integer), found
//! exactly by p-adic lifting (`poly` module), then mapped back. A curve has
//! 0, 1 or 3 nonzero rational 2-torsion points.
//!
//! # The reduced model
//! Given T of order 2 on E, three changes of model give
//! E_T: y² = x³ + a x² + b x with a, b ∈ Z and T ↦ (0, 0):
//! 1. (u, r, s, t) = (1, x_T, −a1/2, −(a1x_T + a3)/2) completes the square
//!    (a1′ = a3′ = 0) and moves T to (0, 0) (so a6′ = 0): the curve is
//!    y² = x³ + a2′x² + a4′x;
//! 2. the scaling u = 1/d, d = lcm(den a2′, den a4′), makes a = d²a2′ and
//!    b = d⁴a4′ integers;
//! 3. the scaling u = D, with D the largest integer with D² | a and
//!    D⁴ | b (equivalently D⁴ | gcd(a², b)), gives a/D², b/D⁴: afterwards
//!    no prime p has p² | a and p⁴ | b together.
//!
//! Each step is exact over Q; the composite change is recorded so points
//! can be moved both ways. Step 3 factors gcd(a², b) (after trial division
//! by the primes below 4096, only when the cofactor is at least 2^48, since
//! a prime p > 4096 with p⁴ | G forces G > 2^48).

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};

use super::model::{lcm_denominators, ModelChange};
use super::point::Point;
use super::poly::{integer_roots, ZPoly};
use super::weierstrass::Curve;
use crate::budget::Budget;
use crate::error::{Error, Result};

/// Work units granted to the factorisation in [`two_torsion_model`]
/// (ample for coefficients of 60 digits; see [`two_torsion_model_with_budget`]).
pub const DEFAULT_REDUCTION_UNITS: u64 = 200_000_000;

fn rat(n: i64) -> BigRational {
    BigRational::from_integer(BigInt::from(n))
}

/// An integral short model y² = x³ + A x + B of E, returned as
/// (A, B, the short curve, the change from E to it).
///
/// The change (1/6, −b2/12, −a1/2, −(a1r + a3)/2) gives
/// y² = x³ − 27c4 x − 54c6 [Sil09, III.1]; then the scaling 1/d with
/// d = lcm(den A, den B) clears denominators (A ↦ d⁴A, B ↦ d⁶B).
pub fn short_integral_model(e: &Curve) -> (BigInt, BigInt, Curve, ModelChange) {
    let r = -e.b2() / rat(12);
    let s = -e.a1() / rat(2);
    let t = -(e.a1() * &r + e.a3()) / rat(2);
    let u = BigRational::new(BigInt::one(), BigInt::from(6));
    let mut change = match ModelChange::new(u, r, s, t) {
        Ok(c) => c,
        Err(_) => ModelChange::identity(), // u = 1/6 ≠ 0: unreachable
    };
    let mut short = change.apply_to_curve(e);
    let d = lcm_denominators([short.a4(), short.a6()]);
    if !d.is_one() {
        if let Ok(sc) = ModelChange::scaling(BigRational::new(BigInt::one(), d)) {
            short = sc.apply_to_curve(&short);
            change = change.then(&sc);
        }
    }
    let a = short.a4().to_integer();
    let b = short.a6().to_integer();
    (a, b, short, change)
}

/// The nonzero rational points of order 2 of E, in ascending order of x.
///
/// Method: integer roots of x³ + Ax + B on the integral short model
/// (module docs), mapped back. Exact; cost dominated by a few Newton lifts
/// to the size of B, so 100-digit coefficients take well under a
/// millisecond (see docs/performance.md).
///
/// Example: y² = x³ − x has (−1, 0), (0, 0), (1, 0); y² = x³ + 1 has only
/// (−1, 0); y² = x³ − 2 has none.
pub fn two_torsion_points(e: &Curve) -> Vec<Point> {
    let (a, b, _, change) = short_integral_model(e);
    let cubic = ZPoly::new(vec![b, a, BigInt::zero(), BigInt::one()]);
    let mut pts: Vec<Point> = integer_roots(&cubic)
        .into_iter()
        .map(|x| {
            change.to_old(&Point::Affine {
                x: BigRational::from_integer(x),
                y: BigRational::zero(),
            })
        })
        .collect();
    pts.sort();
    pts
}

/// E in the form y² = x³ + a x² + b x with T at (0, 0), integral and
/// reduced (no prime p with p² | a and p⁴ | b), together with the change
/// of model from the input curve.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct TwoTorsionModel {
    /// The coefficient a of y² = x³ + a x² + b x.
    pub a: BigInt,
    /// The coefficient b of y² = x³ + a x² + b x (nonzero, and a² − 4b ≠ 0).
    pub b: BigInt,
    curve: Curve,
    input: Curve,
    change: ModelChange,
    input_point: Point,
}

impl TwoTorsionModel {
    /// The reduced curve y² = x³ + a x² + b x.
    pub fn curve(&self) -> &Curve {
        &self.curve
    }
    /// The curve this model was computed from.
    pub fn input_curve(&self) -> &Curve {
        &self.input
    }
    /// The change of model from the input curve to the reduced curve
    /// (`change().apply_to_curve(input_curve()) == curve()`).
    pub fn change(&self) -> &ModelChange {
        &self.change
    }
    /// The point of order 2 on the input curve that is sent to (0, 0).
    pub fn input_point(&self) -> &Point {
        &self.input_point
    }
    /// A point of the reduced curve, written on the input curve.
    pub fn to_input(&self, p: &Point) -> Point {
        self.change.to_old(p)
    }
    /// A point of the input curve, written on the reduced curve.
    pub fn from_input(&self, p: &Point) -> Point {
        self.change.to_new(p)
    }
}

/// The reduced model E_T for descent via the 2-isogeny with kernel {O, T}
/// (module docs), with the default factoring budget
/// [`DEFAULT_REDUCTION_UNITS`].
///
/// # Errors
/// [`Error::PointNotOnCurve`] if T is not on E; [`Error::InvalidArgument`]
/// if T does not have order 2; [`Error::FactorBudgetExhausted`] if
/// gcd(a², b) could not be factored within the budget.
///
/// Example: y² = x³ − x² − 4x + 4 = (x − 1)(x − 2)(x + 2) with T = (1, 0)
/// gives y² = x³ + 2x² − 3x.
pub fn two_torsion_model(e: &Curve, t: &Point) -> Result<TwoTorsionModel> {
    let mut budget = Budget::with_units(DEFAULT_REDUCTION_UNITS);
    two_torsion_model_with_budget(e, t, &mut budget)
}

/// [`two_torsion_model`] with a caller-supplied factoring budget.
///
/// # Errors
/// As [`two_torsion_model`].
pub fn two_torsion_model_with_budget(
    e: &Curve,
    t: &Point,
    budget: &mut Budget,
) -> Result<TwoTorsionModel> {
    e.check_point(t)?;
    let (xt, _) = match t {
        Point::Affine { x, y } if e.double(t).is_infinity() => (x.clone(), y.clone()),
        _ => {
            return Err(Error::InvalidArgument {
                reason: format!("the point {t} does not have order 2 on the curve {e}"),
            })
        }
    };
    // Step 1: complete the square and move T to (0, 0).
    let s = -e.a1() / rat(2);
    let tt = -(e.a1() * &xt + e.a3()) / rat(2);
    let step1 = ModelChange::translation(xt, s, tt);
    let e1 = step1.apply_to_curve(e);
    // Step 2: clear denominators.
    let d = lcm_denominators([e1.a2(), e1.a4()]);
    let a_int = (e1.a2() * BigRational::from_integer(&d * &d)).to_integer();
    let d2 = &d * &d;
    let b_int = (e1.a4() * BigRational::from_integer(&d2 * &d2)).to_integer();
    // Step 3: divide out D with D² | a, D⁴ | b.
    let big_d = fourth_power_root_part(&a_int.pow(2).gcd(&b_int), budget)?;
    let d2b = &big_d * &big_d;
    let a = &a_int / &d2b;
    let b = &b_int / (&d2b * &d2b);
    let scale = ModelChange::scaling(BigRational::new(big_d, d))?;
    let change = step1.then(&scale);
    let curve = Curve::new([
        BigRational::zero(),
        BigRational::from_integer(a.clone()),
        BigRational::zero(),
        BigRational::from_integer(b.clone()),
        BigRational::zero(),
    ])?;
    Ok(TwoTorsionModel {
        a,
        b,
        curve,
        input: e.clone(),
        change,
        input_point: t.clone(),
    })
}

/// The first (least x) rational point of order 2 and its reduced model.
///
/// # Errors
/// [`Error::NoTwoTorsion`] if E(Q) has no point of order 2; otherwise as
/// [`two_torsion_model`].
pub fn first_two_torsion_model(e: &Curve) -> Result<TwoTorsionModel> {
    match two_torsion_points(e).first() {
        Some(t) => two_torsion_model(e, t),
        None => Err(Error::NoTwoTorsion),
    }
}

/// The largest D > 0 with D⁴ | g (g > 0).
fn fourth_power_root_part(g: &BigInt, budget: &mut Budget) -> Result<BigInt> {
    let mut g = g.abs();
    let mut d = BigInt::one();
    if g.is_zero() {
        return Ok(d);
    }
    const TRIAL: u64 = 4096;
    let mut p = 2u64;
    while p < TRIAL {
        let pb = BigInt::from(p);
        let mut e = 0u32;
        while (&g % &pb).is_zero() {
            g /= &pb;
            e += 1;
        }
        for _ in 0..e / 4 {
            d *= &pb;
        }
        p = next_prime_u64(p);
    }
    let limit = BigInt::from(TRIAL).pow(4);
    if g < limit {
        return Ok(d);
    }
    let f = crate::arith::factor(&g, budget)?;
    for (q, e) in f.factors() {
        for _ in 0..e / 4 {
            d *= q;
        }
    }
    Ok(d)
}

fn next_prime_u64(p: u64) -> u64 {
    let mut n = p + 1;
    loop {
        if (2..).take_while(|k: &u64| k * k <= n).all(|k| n % k != 0) {
            return n;
        }
        n += 1;
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;

    #[test]
    fn y2_equals_x3_minus_x_has_three_points_of_order_two() {
        let e = Curve::from_ints([0, 0, 0, -1, 0]).unwrap();
        let pts = two_torsion_points(&e);
        assert_eq!(
            pts,
            vec![
                Point::from_ints(-1, 0),
                Point::from_ints(0, 0),
                Point::from_ints(1, 0)
            ]
        );
    }

    #[test]
    fn documented_reduced_model_example_holds() {
        let e = Curve::from_ints([0, -1, 0, -4, 4]).unwrap();
        let m = two_torsion_model(&e, &Point::from_ints(1, 0)).unwrap();
        assert_eq!(
            (m.a.clone(), m.b.clone()),
            (BigInt::from(2), BigInt::from(-3))
        );
        assert_eq!(m.change().apply_to_curve(&e), *m.curve());
    }
}
