//! Layer 6: Selmer groups as F2 vector spaces.
//!
//! [`f2`] holds bit-packed linear algebra over F2; [`qs2`] the group
//! Q(S, 2) of classes of Q*/Q*^2 unramified outside S, with basis {−1} ∪ S;
//! [`group`] the Selmer group of one side of a 2-isogeny as the preimage of
//! the product of local images under the localisation map; [`pairing`] the
//! subgroup of classes that lift to everywhere locally soluble 2-coverings
//! (the second descent as linear algebra).

pub mod f2;
pub mod group;
pub mod local_count;
pub mod pairing;
pub mod qs2;
