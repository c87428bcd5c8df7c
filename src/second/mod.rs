//! Layer 7: the second descent — which classes of a 2-isogeny Selmer group
//! come from rational points, decided one level further down.
//!
//! Above the Selmer groups (layer 6) and below the descent that assembles
//! rank bounds (layer 8). Two routes, both for `E: y² = x³ + ax² + bx`
//! given as a checked [`ReducedModel`](crate::curve::ReducedModel):
//!
//! * the lifting pairing (module `pairing`): which classes `d` of `Sel`
//!   lift to everywhere locally soluble 2-coverings, by linear algebra over
//!   F2 ([`lift_pairing`]); for one class, its local lift values and the
//!   twists that can lift it (`class_lift`, `soluble_twists`, crate-private);
//! * the 4-coverings (module `covering`): for one class `d`, the finite set
//!   of twists `λ` of the conic of `C_d`, the quartic 4-covering of each,
//!   its local tests, a point search on the survivors
//!   ([`second_descent`]) and the
//!   obstructions that prove a class is not the image of a point
//!   ([`TwistObstruction`], re-checked by [`verify_obstruction`]).
//!
//! The derivations are in `docs/second_descent.md`, included below.
//!
#![doc = include_str!("../../docs/second_descent.md")]

pub(crate) mod covering;
pub(crate) mod pairing;

pub use covering::{
    second_descent, verify_obstruction, ConicSide, NoPointEvidence, ObstructedCurve,
    SecondDescentOptions, SecondDescentOutcome, SurvivingCovering, TwistObstruction,
};
#[cfg(test)]
pub(crate) use pairing::{class_lift, soluble_twists};
pub use pairing::{lift_pairing, verify_class_lift, ClassLift, LiftPairing, LocalLiftValue};
