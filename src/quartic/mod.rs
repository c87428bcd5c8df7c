//! Layer 5: quartic homogeneous spaces `y² = g(x, z)`.
//!
//! For `E: y² = x³ + ax² + bx` and `d ≠ 0`, the homogeneous space
//! `C_d: N² = dM⁴ + aM²e² + (b/d)e⁴` has a rational point with `e ≠ 0` iff
//! `d` is the `x`-coordinate class of a rational point of `E`
//! [SilvermanTate92, III.5–6]. This layer holds
//!
//! * [`Quartic`] (module `form`): integer binary quartics of non-zero
//!   discriminant, their invariants `I, J, Δ`, and the spaces `C_d`;
//! * local solubility at every place, exact and with evidence
//!   ([`locally_soluble`], [`LocalSolubility`], [`LocalPoint`]): the real
//!   place by a Sturm-sequence root count (Lemma R, module `real`), odd `p`
//!   and `p = 2` by refinement of residue classes (Lemmas P and T, module
//!   `padic`), large `p` through Weil's bound and root finding over `F_p`
//!   (module `fp`);
//! * which places can obstruct (`relevant_places`) and the local images
//!   `W_v` of the descent map ([`local_image`]);
//! * a sieved search for rational points (module `search`).

pub(crate) mod form;
mod fp;
pub(crate) mod image;
mod image_word;
pub(crate) mod minimal;
pub(crate) mod padic;
mod padic_word;
pub(crate) mod real;
pub(crate) mod search;
pub(crate) mod solubility;

pub use form::Quartic;
pub use image::{local_image, ClassEvidence, LocalImage};
pub use search::{search, QuarticPoint, SearchOptions, SearchOutcome, MAX_HEIGHT};
pub use solubility::{locally_soluble, LocalPoint, LocalSolubility};

// For the unit tests (src/quartic/tests/): the local tests at one kind
// of place, the search variants and the congruence sieve.
#[cfg(test)]
pub(crate) use {
    image::relevant_places,
    real::real_root_count,
    search::{search_all, search_all_quartic, search_quartic, search_report, Congruence},
    solubility::{odd_prime_soluble, real_soluble, two_adic_soluble},
};

#[cfg(test)]
mod tests;
