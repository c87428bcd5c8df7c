//! The 2-isogeny with kernel {O, (0, 0)} and its dual.
//!
//! Let E: y² = x³ + a x² + b x with b(a² − 4b) ≠ 0, and
//! E′: y² = x³ + a′x² + b′x with a′ = −2a, b′ = a² − 4b. The map
//!
//! ```text
//! φ: E → E′,  φ(x, y) = (y²/x², y(b − x²)/x²),   φ(O) = φ((0,0)) = O
//! ```
//!
//! is an isogeny of degree 2 with kernel {O, T}, T = (0, 0)
//! [ST92, III.4], [Sil09, III.4.5]. Applying the same construction to E′
//! gives E″: y² = x³ + 4a x² + 16b x, which is E rescaled by u = 2
//! (x = 4x_E, y = 8y_E); composing φ′: E′ → E″ with that rescaling gives
//! the dual isogeny
//!
//! ```text
//! φ̂: E′ → E,  φ̂(X, Y) = (Y²/(4X²), Y(b′ − X²)/(8X²)),   φ̂(O) = φ̂((0,0)) = O,
//! ```
//!
//! and φ̂ ∘ φ = \[2\] on E, φ ∘ φ̂ = \[2\] on E′ [ST92, III.4], [Sil09, III.6.1].

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::Zero;

use super::point::Point;
use super::reduced::ReducedModel;
use super::two_torsion::TwoTorsionModel;
use super::weierstrass::Curve;
use crate::error::Result;

/// The 2-isogeny φ: E → E′ of the module docs, for E: y² = x³ + a x² + b x.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct TwoIsogeny {
    domain: ReducedModel,
    codomain: ReducedModel,
}

impl TwoIsogeny {
    /// The isogeny from a checked model (its (0, 0) generates the kernel).
    ///
    /// # Errors
    /// Only the size limit of [`Curve::new`] on the codomain.
    pub fn from_reduced(m: &ReducedModel) -> Result<TwoIsogeny> {
        Ok(TwoIsogeny {
            domain: m.clone(),
            codomain: m.isogenous()?,
        })
    }

    /// The isogeny from a reduced model (its T = (0, 0) is the kernel).
    ///
    /// # Errors
    /// As [`TwoIsogeny::from_reduced`].
    pub(crate) fn from_model(m: &TwoTorsionModel) -> Result<TwoIsogeny> {
        TwoIsogeny::from_reduced(m.reduced())
    }

    /// The checked model of the codomain E′.
    pub(crate) fn codomain_model(&self) -> &ReducedModel {
        &self.codomain
    }

    /// The domain E.
    pub fn domain(&self) -> &Curve {
        self.domain.curve()
    }

    /// The codomain E′.
    pub fn codomain(&self) -> &Curve {
        self.codomain.curve()
    }

    /// The isogeny E′ → E″ built the same way from E′ (E″ is E scaled by 2).
    pub fn next(&self) -> Result<TwoIsogeny> {
        TwoIsogeny::from_reduced(&self.codomain)
    }

    /// φ(P) for P on E.
    pub fn image(&self, p: &Point) -> Point {
        phi(p, self.domain.b())
    }

    /// φ̂(Q) for Q on E′.
    pub fn dual_image(&self, q: &Point) -> Point {
        match phi(q, self.codomain.b()) {
            Point::Infinity => Point::Infinity,
            Point::Affine { x, y } => Point::Affine {
                x: x / BigRational::from_integer(4.into()),
                y: y / BigRational::from_integer(8.into()),
            },
        }
    }
}

/// (x, y) ↦ (y²/x², y(b − x²)/x²), with O and (0, 0) going to O.
fn phi(p: &Point, b: &BigInt) -> Point {
    match p {
        Point::Infinity => Point::Infinity,
        Point::Affine { x, y } => {
            if x.is_zero() {
                return Point::Infinity;
            }
            let x2 = x * x;
            Point::Affine {
                x: y * y / &x2,
                y: y * (BigRational::from_integer(b.clone()) - &x2) / &x2,
            }
        }
    }
}
