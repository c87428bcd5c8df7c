//! Exact-sequence bookkeeping: from images and Selmer groups to rank bounds.
//!
//! For the 2-isogeny φ: E → E' with dual φ̂, and the connecting maps
//! α: E(Q) → Sel(E) ⊆ Q*/Q*², α': E'(Q) → Sel(E') ⊆ Q*/Q*²,
//!
//! 2^r = |α(E(Q))| · |α'(E'(Q))| / 4          ([SilvermanTate92, III.6])
//!
//! so with k ≤ dim α(E(Q)) ≤ u and k' ≤ dim α'(E'(Q)) ≤ u' we get
//! k + k' − 2 ≤ r ≤ u + u' − 2. Here k is the dimension of the span of
//! the images of torsion and of the points found, and u is the dimension
//! of the subgroup I ⊆ Sel of classes that lift to everywhere locally
//! soluble 2-coverings (the second descent, [`crate::second::pairing`]),
//! or dim Sel without it. The quotient Sel/α(E(Q)) is the φ'-part of the
//! Tate–Shafarevich group's 2-torsion seen by this descent, so its
//! dimension lies between dim Sel − u and dim Sel − k.

/// dim Sel²(E/Q) from one 2-isogeny φ: E → E' (torsion included).
///
/// The exact sequence (common practice: the long exact Galois cohomology
/// sequence of 0 → E[φ] → E[2] → E'[φ̂] → 0, restricted to Selmer groups;
/// see docs/second_descent.md, §8)
///
/// 0 → E'(Q)[φ̂]/φ(E(Q)[2]) → Sel^φ(E) → Sel²(E) → Sel^φ̂(E')
///
/// gives dim Sel²(E) = dim Sel^φ(E) − t + dim I, where I is the image of
/// the last map — the classes of Sel^φ̂(E') that lift to everywhere locally
/// soluble 2-coverings of E, computed by [`crate::second::pairing`] — and
/// t = dim E'(Q)[φ̂]/φ(E(Q)[2]) is 0 when E[2] is rational (then φ maps
/// E[2] onto E'[φ̂]) and 1 otherwise.
///
/// `phi_selmer_dim` = dim Sel^φ(E) (the side of E' in this crate: classes
/// of E'(Q)/φ(E(Q))), `liftable_dim` = dim I on the side of E.
pub fn selmer2_dimension(
    phi_selmer_dim: usize,
    liftable_dim: usize,
    full_two_torsion: bool,
) -> usize {
    (phi_selmer_dim + liftable_dim).saturating_sub(usize::from(!full_two_torsion))
}

/// Rank bounds from the two sides of one isogeny.
///
/// `lower_dims` = (k, k'), `upper_dims` = (u, u'). The lower bound is
/// clamped at 0 (k + k' ≥ 2 always holds, because the images of torsion
/// alone have dimensions adding up to 2, but the clamp keeps the function
/// total).
pub fn rank_bounds(lower_dims: (usize, usize), upper_dims: (usize, usize)) -> (usize, usize) {
    let lo = (lower_dims.0 + lower_dims.1).saturating_sub(2);
    let hi = (upper_dims.0 + upper_dims.1).saturating_sub(2);
    (lo, hi.max(lo))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_two_selmer_dimension_drops_the_torsion_image_only_without_full_two_torsion() {
        // Invented dimensions: with E[2] rational nothing is subtracted;
        // without it the image of E'(Q)[φ̂] takes one dimension of Sel^φ(E).
        assert_eq!(selmer2_dimension(1, 1, true), 2);
        assert_eq!(selmer2_dimension(1, 1, false), 1);
        assert_eq!(selmer2_dimension(0, 0, false), 0);
    }

    #[test]
    fn bounds_follow_the_exact_sequence() {
        assert_eq!(rank_bounds((1, 1), (1, 1)), (0, 0));
        assert_eq!(rank_bounds((2, 1), (2, 3)), (1, 3));
    }
}
