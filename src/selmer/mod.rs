//! Layer 6: Selmer groups as F2 vector spaces.
//!
//! `f2` holds bit-packed linear algebra over F2; `qs2` the group
//! Q(S, 2) of classes of Q*/Q*^2 unramified outside S, with basis {−1} ∪ S;
//! `assemble` the Selmer group of one side from its local images, with
//! the torsion images inside it; `group` the Selmer group of one side of a
//! 2-isogeny as the preimage of the product of local images under the
//! localisation map; `image_size` the sizes of the local images predicted
//! from Tamagawa numbers (a cross-check). Which Selmer classes lift further
//! is the question of the layer above (module `second`).
//!
//! ---
//!
//! The guide below is `docs/image_size.md`, included verbatim.
#![doc = include_str!("../../docs/image_size.md")]

pub(crate) mod assemble;
#[allow(dead_code)]
pub(crate) mod f2;
pub(crate) mod group;
// Cross-check functions: used by debug assertions and the unit tests in `checks`.
#[allow(dead_code)]
pub(crate) mod image_size;
pub(crate) mod qs2;

pub use f2::{BitVec, Subspace};
pub use group::LocalCondition;
pub use qs2::QS2;
