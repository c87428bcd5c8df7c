//! The checked model y² = x³ + a x² + b x on which both sides of a
//! 2-isogeny descent run.
//!
//! A [`ReducedModel`] holds integers a, b with b(a² − 4b) ≠ 0, so the
//! cubic x³ + a x² + b x = x(x² + a x + b) has three distinct roots and the
//! curve is non-singular (its discriminant is 16 b²(a² − 4b)
//! [ST92, III.4]). Every function below the descent that works with
//! "the curve y² = x³ + ax² + bx" takes this type, so none of them has to
//! re-check the invariant or can be handed a singular pair.
//!
//! The isogenous model y² = x³ − 2a x² + (a² − 4b) x ([`ReducedModel::isogenous`])
//! is again non-singular: b′ = a² − 4b ≠ 0 and a′² − 4b′ = 16b ≠ 0.

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::Zero;
use std::fmt;

use super::weierstrass::Curve;
use crate::error::{Error, Result};

/// y² = x³ + a x² + b x with a, b ∈ Z and b(a² − 4b) ≠ 0 (module docs).
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub struct ReducedModel {
    a: BigInt,
    b: BigInt,
    curve: Curve,
}

impl ReducedModel {
    /// The model y² = x³ + a x² + b x.
    ///
    /// # Errors
    /// [`Error::SingularCurve`] when b = 0 or a² − 4b = 0; the errors of
    /// [`Curve::new`] for coefficients beyond its size limit.
    pub fn new(a: BigInt, b: BigInt) -> Result<Self> {
        if b.is_zero() {
            return Err(Error::SingularCurve {
                reason: format!("y^2 = x^3 + {a}x^2 + 0x: b = 0, so x^2 divides the cubic"),
            });
        }
        let disc: BigInt = &a * &a - 4 * &b;
        if disc.is_zero() {
            return Err(Error::SingularCurve {
                reason: format!("y^2 = x^3 + {a}x^2 + {b}x: a^2 - 4b = 0, a double root"),
            });
        }
        let curve = Curve::new(weierstrass(&a, &b))?;
        Ok(ReducedModel { a, b, curve })
    }

    /// The coefficient a.
    pub fn a(&self) -> &BigInt {
        &self.a
    }

    /// The coefficient b (nonzero).
    pub fn b(&self) -> &BigInt {
        &self.b
    }

    /// a² − 4b (nonzero): the discriminant of x² + a x + b.
    pub(crate) fn quadratic_discriminant(&self) -> BigInt {
        &self.a * &self.a - 4 * &self.b
    }

    /// The model of the 2-isogenous curve, y² = x³ − 2a x² + (a² − 4b) x.
    ///
    /// # Errors
    /// Only the size limit of [`Curve::new`] (the model is non-singular).
    pub(crate) fn isogenous(&self) -> Result<ReducedModel> {
        ReducedModel::new(-2 * &self.a, self.quadratic_discriminant())
    }

    /// The curve y² = x³ + a x² + b x.
    pub fn curve(&self) -> &Curve {
        &self.curve
    }
}

/// The Weierstrass coefficients [a1, a2, a3, a4, a6] = [0, a, 0, b, 0].
fn weierstrass(a: &BigInt, b: &BigInt) -> [BigRational; 5] {
    [
        BigRational::zero(),
        BigRational::from_integer(a.clone()),
        BigRational::zero(),
        BigRational::from_integer(b.clone()),
        BigRational::zero(),
    ]
}

impl fmt::Display for ReducedModel {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.curve())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn m(a: i64, b: i64) -> Result<ReducedModel> {
        ReducedModel::new(BigInt::from(a), BigInt::from(b))
    }

    #[test]
    fn singular_pairs_are_refused_with_the_reason() {
        // b = 0 and a² = 4b are exactly the singular cases (discriminant
        // 16b²(a² − 4b), [ST92, III.4]).
        assert!(matches!(m(3, 0), Err(Error::SingularCurve { .. })));
        assert!(matches!(m(4, 4), Err(Error::SingularCurve { .. })));
        assert!(matches!(m(-6, 9), Err(Error::SingularCurve { .. })));
        assert!(m(0, -1).is_ok());
    }

    #[test]
    fn the_isogenous_model_of_the_isogenous_model_is_the_scaled_original() {
        // E″ = E scaled by u = 2: (a, b) ↦ (4a, 16b) [ST92, III.4].
        let e = m(-7, 10).unwrap();
        let e2 = e.isogenous().unwrap().isogenous().unwrap();
        assert_eq!((e2.a(), e2.b()), (&BigInt::from(-28), &BigInt::from(160)));
        assert_eq!(e.to_string(), "y^2 = x^3 - 7x^2 + 10x");
        assert_eq!(
            e.curve().discriminant(),
            &BigRational::from_integer(BigInt::from(16 * 100 * 9))
        );
    }
}
