//! Layer 3: elliptic curves over Q — Weierstrass models, points and the
//! group law, changes of model, rational 2-torsion, the reduced model
//! y² = x³ + ax² + bx for descent, 2-isogenies and the torsion subgroup.
//!
//! # Overview
//! * `weierstrass`: the [`Curve`] type, a general Weierstrass model
//!   y² + a1xy + a3y = x³ + a2x² + a4x + a6 over Q with its invariants
//!   b2, b4, b6, b8, c4, c6, Δ, j [Sil09, III.1]; parsing from an equation or
//!   from `a1 a2 a3 a4 a6`.
//! * `equation`: curves and homogeneous spaces written as equations.
//! * `point`: [`Point`] and the exact chord-and-tangent group law
//!   [Sil09, III.2.3], scalar multiplication, naive height.
//! * `model`: [`ModelChange`] (u, r, s, t) acting on curves and points,
//!   composition, inverse [Sil09, III.1, Table 3.1]; [`clear_denominators`].
//! * `two_torsion`: the rational points of order 2 and the reduced model
//!   [`TwoTorsionModel`] y² = x³ + ax² + bx with T = (0, 0), a, b ∈ Z and no
//!   prime p with p² | a, p⁴ | b.
//! * `reduced`: [`ReducedModel`], the checked pair (a, b) with
//!   b(a² − 4b) ≠ 0 that every layer below the descent takes.
//! * `isogeny`: [`TwoIsogeny`] φ: E → E′, y² = x³ − 2ax² + (a² − 4b)x,
//!   and its dual φ̂, with φ̂ ∘ φ = \[2\] [ST92, III.4].
//! * `torsion`: [`torsion`], exact, by point counts at good primes
//!   (reduction is injective on torsion [Sil09, VII.3.1]), with an early
//!   exit when the points of order 2 already account for the bound,
//!   Nagell–Lutz integrality [Sil09, VIII.7.2], halving for the 2-primary
//!   part and integer roots of division polynomials for odd primes.
//!
//! Integral models are handled in integers throughout (machine words where
//! nothing overflows); j is reduced to lowest terms only when asked for.
//!
//! Integer roots of integer polynomials — the one root-finding tool behind
//! 2-torsion and torsion — are computed exactly by p-adic (Hensel) lifting
//! from a prime of squarefree reduction (crate-internal `poly` module).

pub(crate) mod equation;
pub(crate) mod isogeny;
pub(crate) mod model;
pub(crate) mod point;
mod poly;
pub(crate) mod reduced;
pub(crate) mod tate;
mod tate_word;
pub(crate) mod torsion;
pub(crate) mod two_torsion;
pub(crate) mod weierstrass;

#[cfg(test)]
mod tests;

pub use isogeny::TwoIsogeny;
pub use model::{clear_denominators, ModelChange};
pub use point::Point;
pub use reduced::ReducedModel;
pub use tate::{
    global_local_data, local_reduction, local_reduction_rational, GlobalLocalData, Kodaira,
    LocalReduction, ReductionKind,
};
pub use torsion::{torsion, TorsionGroup};
pub use two_torsion::{
    first_two_torsion_model, two_torsion_model, two_torsion_points, two_torsion_points_with_budget,
    TwoTorsionModel,
};
pub(crate) use two_torsion::{short_integral_model, two_torsion_model_with_budget};
pub use weierstrass::{
    weierstrass_invariants, Curve, WeierstrassInvariants, MAX_COEFFICIENT_DIGITS,
};
