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
//! Each step is exact over Q; the composite change (D/d, x_T, −a1/2,
//! −(a1x_T + a3)/2) is recorded so points can be moved both ways. When the
//! input is integral with a1 = a3 = 0 and x_T ∈ Z (every model the descent
//! builds), steps 1–2 reduce to a = a2 + 3x_T, b = F′(x_T) for
//! F = x³ + a2x² + a4x + a6, computed in integers. Step 3 divides
//! G = gcd(a², b) by the primes below 4096 (in machine words once G < 2^128,
//! stopping as soon as p⁴ exceeds the cofactor), and factors the cofactor
//! only when it is at least 4096⁴ (a prime p > 4096 with p⁴ | G forces
//! that).

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive, Zero};
use std::sync::OnceLock;

use super::model::{lcm_denominators, ModelChange};
use super::point::Point;
use super::poly::{integer_roots_with_budget, ZPoly};
use super::reduced::ReducedModel;
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
/// y² = x³ − 27·c4 x − 54·c6 [Sil09, III.1]; then the scaling 1/d with
/// d = lcm(den A, den B) clears denominators (A ↦ d⁴A, B ↦ d⁶B).
pub fn short_integral_model(e: &Curve) -> (BigInt, BigInt, Curve, ModelChange) {
    let r = -e.b2() / rat(12);
    let s = -e.a1() / rat(2);
    let t = -(e.a1() * &r + e.a3()) / rat(2);
    // A = −27·c4, B = −54·c6 [Sil09, III.1]; then clear denominators.
    let a_q = e.c4() * rat(-27);
    let b_q = e.c6() * rat(-54);
    let d = lcm_denominators([&a_q, &b_q]);
    let d2 = &d * &d;
    let a = (a_q * BigRational::from_integer(&d2 * &d2)).to_integer();
    let b = (b_q * BigRational::from_integer(&d2 * &d2 * &d2)).to_integer();
    let u = BigRational::new(BigInt::one(), BigInt::from(6) * &d);
    let change = match ModelChange::new(u, r, s, t) {
        Ok(c) => c,
        Err(_) => ModelChange::identity(), // u = 1/(6d) ≠ 0: unreachable
    };
    let zero = BigRational::zero;
    let short = match Curve::new([
        zero(),
        zero(),
        zero(),
        BigRational::from_integer(a.clone()),
        BigRational::from_integer(b.clone()),
    ]) {
        Ok(c) => c,
        Err(_) => change.apply_to_curve(e), // Δ′ = u⁻¹²Δ ≠ 0: unreachable
    };
    (a, b, short, change)
}

/// The nonzero rational points of order 2 of E, in ascending order of x.
///
/// Method: a point of order 2 has 2y + a1x + a3 = 0 and x a root of
/// 4x³ + b2x² + 2b4x + b6 [Sil09, III.2, Exercise 3.7]. For an integral
/// model X = 4x is then an integer root of the monic
/// X³ + b2X² + 8·b4·X + 16·b6 (and for a1 = a3 = 0 simply x is an integer
/// root of x³ + a2x² + a4x + a6); other models go through the integral
/// short model (module docs). Integer roots are found exactly by p-adic
/// lifting, or directly when the cubic has the factor x. Cost: a few
/// microseconds for small coefficients; 100-digit coefficients take well
/// under a millisecond (see docs/performance.md).
///
/// Example: y² = x³ − x has (−1, 0), (0, 0), (1, 0); y² = x³ + 1 has only
/// (−1, 0); y² = x³ − 2 has none.
pub fn two_torsion_points(e: &Curve) -> Vec<Point> {
    // An unlimited budget never runs out, so the error arm is unreachable.
    two_torsion_points_with_budget(e, &mut Budget::unlimited()).unwrap_or_default()
}

/// [`two_torsion_points`] charging `budget` for the root finding by
/// operand size (one unit per 64-bit word product, see
/// `poly::integer_roots_with_budget`) and honouring its deadline.
///
/// # Errors
/// [`Error::BudgetExhausted`] (stage "2-torsion root finding")
/// when the budget runs out.
pub fn two_torsion_points_with_budget(e: &Curve, budget: &mut Budget) -> Result<Vec<Point>> {
    let exhausted = |_| Error::BudgetExhausted {
        stage: "2-torsion root finding".into(),
    };
    let mut pts: Vec<Point> = if let Some([a1, a2, a3, a4, a6]) = e.integer_coefficients() {
        if a1.is_zero() && a3.is_zero() {
            let cubic = ZPoly::new(vec![a6.clone(), a4.clone(), a2.clone(), BigInt::one()]);
            integer_roots_with_budget(&cubic, budget)
                .map_err(exhausted)?
                .into_iter()
                .map(|x| Point::new(BigRational::from_integer(x), BigRational::zero()))
                .collect()
        } else {
            let [b2, b4, b6] = [e.b2(), e.b4(), e.b6()].map(|c| c.numer().clone());
            let cubic = ZPoly::new(vec![b6 * 16, b4 * 8, b2, BigInt::one()]);
            integer_roots_with_budget(&cubic, budget)
                .map_err(exhausted)?
                .into_iter()
                .map(|big_x| {
                    let x = BigRational::new(big_x, BigInt::from(4));
                    let y = -(e.a1() * &x + e.a3()) / rat(2);
                    Point::new(x, y)
                })
                .collect()
        }
    } else {
        let (a, b, _, change) = short_integral_model(e);
        let cubic = ZPoly::new(vec![b, a, BigInt::zero(), BigInt::one()]);
        integer_roots_with_budget(&cubic, budget)
            .map_err(exhausted)?
            .into_iter()
            .map(|x| {
                change.to_old(&Point::Affine {
                    x: BigRational::from_integer(x),
                    y: BigRational::zero(),
                })
            })
            .collect()
    };
    pts.sort();
    Ok(pts)
}

/// E in the form y² = x³ + a x² + b x with T at (0, 0), integral and
/// reduced (no prime p with p² | a and p⁴ | b), together with the change
/// of model from the input curve.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct TwoTorsionModel {
    reduced: ReducedModel,
    input: Curve,
    change: ModelChange,
    input_point: Point,
}

impl TwoTorsionModel {
    /// The reduced curve y² = x³ + a x² + b x.
    pub fn curve(&self) -> &Curve {
        self.reduced.curve()
    }
    /// The checked pair (a, b) of the reduced curve.
    pub fn reduced(&self) -> &ReducedModel {
        &self.reduced
    }
    /// The coefficient a of y² = x³ + a x² + b x.
    pub(crate) fn a(&self) -> &BigInt {
        self.reduced.a()
    }
    /// The coefficient b of y² = x³ + a x² + b x (nonzero, and a² − 4b ≠ 0).
    pub(crate) fn b(&self) -> &BigInt {
        self.reduced.b()
    }
    /// The change of model from the input curve to the reduced curve
    /// (`change().apply_to_curve(input_curve()) == curve()`).
    pub fn change(&self) -> &ModelChange {
        &self.change
    }
    /// A point of the reduced curve, written on the input curve.
    pub(crate) fn to_input(&self, p: &Point) -> Point {
        self.change.to_old(p)
    }
}

/// The reduced model E_T for descent via the 2-isogeny with kernel {O, T}
/// (module docs), with the default factoring budget
/// `DEFAULT_REDUCTION_UNITS`.
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
    let (xt, yt) = match t {
        Point::Affine { x, y } => (x, y),
        Point::Infinity => return Err(not_order_two(e, t)),
    };
    // Order 2 iff P = −P, i.e. 2y + a1x + a3 = 0 [Sil09, III.2.3(a)].
    let fast = match e.integer_coefficients() {
        Some([a1, a2, a3, a4, _]) if a1.is_zero() && a3.is_zero() && xt.is_integer() => {
            Some((a2, a4, xt.numer()))
        }
        _ => None,
    };
    let (a_int, b_int, d, s, tt) = if let Some((a2, a4, x)) = fast {
        // y² = F(x) with F monic integral: the translation x ↦ x + x_T
        // gives a = a2 + 3x_T, b = F′(x_T) directly (d = 1, s = t = 0).
        if !yt.is_zero() {
            return Err(not_order_two(e, t));
        }
        let a = a2 + x * 3;
        let b = (x * 3 + a2 * 2) * x + a4;
        (
            a,
            b,
            BigInt::one(),
            BigRational::zero(),
            BigRational::zero(),
        )
    } else {
        if !(yt * rat(2) + e.a1() * xt + e.a3()).is_zero() {
            return Err(not_order_two(e, t));
        }
        // Step 1: complete the square and move T to (0, 0): the change
        // (1, x_T, s, t) of [Sil09, III.1, Table 3.1] gives a2′, a4′.
        let [a1, a2, a3, a4, _] = e.coefficients();
        let s = -a1 / rat(2);
        let tt = -(a1 * xt + a3) / rat(2);
        let r = xt;
        let a2p = a2 - &s * a1 + r * rat(3) - &s * &s;
        let a4p = a4 - &s * a3 + r * a2 * rat(2) - (&tt + r * &s) * a1 + r * r * rat(3)
            - &s * &tt * rat(2);
        // Step 2: clear denominators.
        let d = lcm_denominators([&a2p, &a4p]);
        let d2 = &d * &d;
        let a_int = (a2p * BigRational::from_integer(d2.clone())).to_integer();
        let b_int = (a4p * BigRational::from_integer(&d2 * &d2)).to_integer();
        (a_int, b_int, d, s, tt)
    };
    // Step 3: divide out D with D² | a, D⁴ | b.
    let big_d = fourth_power_root_part(&a_int.pow(2).gcd(&b_int), budget)?;
    let (a, b) = if big_d.is_one() {
        (a_int, b_int)
    } else {
        let d2b = &big_d * &big_d;
        (&a_int / &d2b, &b_int / (&d2b * &d2b))
    };
    // The composite of (1, x_T, s, t) and the scaling by D/d.
    let change = ModelChange::new(BigRational::new(big_d, d), xt.clone(), s, tt)?;
    Ok(TwoTorsionModel {
        reduced: ReducedModel::new(a, b)?,
        input: e.clone(),
        change,
        input_point: t.clone(),
    })
}

fn not_order_two(e: &Curve, t: &Point) -> Error {
    Error::InvalidArgument {
        reason: format!("the point {t} does not have order 2 on the curve {e}"),
    }
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
///
/// Trial division by the primes below 4096, stopping as soon as p⁴
/// exceeds the remaining cofactor (then no larger prime can contribute);
/// a cofactor of at least 4096⁴ left over is factored under `budget`.
fn fourth_power_root_part(g: &BigInt, budget: &mut Budget) -> Result<BigInt> {
    let mut g = g.abs();
    let mut d = BigInt::one();
    if g.is_zero() {
        return Ok(d);
    }
    let primes = trial_primes();
    let mut next = 0;
    while next < primes.len() {
        if let Some(gs) = g.to_u128() {
            // Finish the trial division in machine words.
            let (ds, rest, complete) = trial_fourth_powers(gs, &primes[next..]);
            d *= BigInt::from(ds);
            if complete {
                return Ok(d);
            }
            g = BigInt::from(rest);
            break;
        }
        let pb = BigInt::from(primes[next]);
        next += 1;
        let mut e = 0u32;
        while (&g % &pb).is_zero() {
            g /= &pb;
            e += 1;
        }
        for _ in 0..e / 4 {
            d *= &pb;
        }
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

/// Trial division of g by `primes` (ascending): returns (D, the cofactor,
/// whether the division is complete), with D⁴ the largest fourth power
/// dividing g built from these primes. Stops early (complete) once p⁴
/// exceeds the cofactor, since then no larger prime has p⁴ | cofactor;
/// otherwise complete iff the cofactor is below [`TRIAL`]⁴.
fn trial_fourth_powers(mut g: u128, primes: &[u32]) -> (u128, u128, bool) {
    let mut d: u128 = 1;
    for &p in primes {
        let p = p as u128;
        if p * p * p * p > g {
            return (d, g, true);
        }
        let mut e = 0u32;
        while g % p == 0 {
            g /= p;
            e += 1;
        }
        // D⁴ | g < 2^128 keeps D < 2^32.
        d *= p.pow(e / 4);
    }
    let t = TRIAL as u128;
    (d, g, g < t * t * t * t)
}

/// Trial-division limit of [`fourth_power_root_part`].
const TRIAL: u32 = 4096;

/// The primes below [`TRIAL`], built once (sieve of Eratosthenes).
fn trial_primes() -> &'static [u32] {
    static PRIMES: OnceLock<Vec<u32>> = OnceLock::new();
    PRIMES.get_or_init(|| {
        let n = TRIAL as usize;
        let mut composite = vec![false; n];
        let mut out = Vec::new();
        for i in 2..n {
            if !composite[i] {
                out.push(i as u32);
                let mut j = i * i;
                while j < n {
                    composite[j] = true;
                    j += i;
                }
            }
        }
        out
    })
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
            (m.a().clone(), m.b().clone()),
            (BigInt::from(2), BigInt::from(-3))
        );
        assert_eq!(m.change().apply_to_curve(&e), *m.curve());
    }
}
