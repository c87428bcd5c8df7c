//! Exact-sequence bookkeeping: from images and Selmer groups to rank bounds.
//!
//! For the 2-isogeny φ: E → E' with dual φ̂, and the connecting maps
//! α: E(Q) → Sel(E) ⊆ Q*/Q*², α': E'(Q) → Sel(E') ⊆ Q*/Q*²,
//!
//! 2^r = |α(E(Q))| · |α'(E'(Q))| / 4          ([SilvermanTate92, III.6])
//!
//! so with k ≤ dim α(E(Q)) ≤ u and k' ≤ dim α'(E'(Q)) ≤ u' we get
//! k + k' − 2 ≤ r ≤ u + u' − 2. Here k is the dimension of the span of
//! the images of torsion and of the points found, and u is dim Sel minus
//! what the second descent proves is not in the image (see
//! [`max_avoiding_dimension`]). The quotient Sel/α(E(Q)) is the
//! φ'-part of the Tate–Shafarevich group's 2-torsion seen by this descent,
//! so its dimension lies between dim Sel − u and dim Sel − k.

use crate::selmer::f2::{BitVec, Subspace};

/// Largest dimension of a subspace of F2^n that contains none of the
/// nonzero vectors in `forbidden`.
///
/// If the image I satisfies K ⊆ I ⊆ Sel and every vector of `forbidden`
/// (expressed in coordinates of Sel/K) is proven not to lie in I/K, then
/// dim I ≤ dim K + this number. Exact search for n ≤ 10; for larger n the
/// trivial bound n (or 0 when every nonzero vector is forbidden) is
/// returned, which is still a valid upper bound.
pub fn max_avoiding_dimension(n: usize, forbidden: &[BitVec]) -> usize {
    let forbidden: Vec<&BitVec> = forbidden.iter().filter(|v| !v.is_zero()).collect();
    if forbidden.is_empty() {
        return n;
    }
    if n > 10 {
        let all = n < 64 && forbidden.len() as u64 >= (1u64 << n) - 1;
        return if all { 0 } else { n };
    }
    let allowed: Vec<BitVec> = (1u64..(1u64 << n))
        .map(|bits| BitVec::from_u64(n, bits))
        .filter(|v| !forbidden.contains(&v))
        .collect();
    let mut best = 0;
    grow(&Subspace::zero(n), &allowed, 0, &forbidden, &mut best);
    best
}

fn grow(s: &Subspace, allowed: &[BitVec], from: usize, forbidden: &[&BitVec], best: &mut usize) {
    *best = (*best).max(s.dim());
    for (i, v) in allowed.iter().enumerate().skip(from) {
        if s.contains(v) {
            continue;
        }
        let mut t = s.clone();
        t.insert(v.clone());
        if forbidden.iter().any(|f| t.contains(f)) {
            continue;
        }
        grow(&t, allowed, i + 1, forbidden, best);
        if *best == s.ambient() {
            return;
        }
    }
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
    fn forbidding_nothing_leaves_the_whole_space() {
        assert_eq!(max_avoiding_dimension(3, &[]), 3);
    }

    #[test]
    fn forbidding_one_vector_leaves_a_hyperplane() {
        assert_eq!(max_avoiding_dimension(3, &[BitVec::from_u64(3, 0b101)]), 2);
    }

    #[test]
    fn forbidding_every_nonzero_vector_leaves_zero() {
        let all: Vec<BitVec> = (1..8).map(|b| BitVec::from_u64(3, b)).collect();
        assert_eq!(max_avoiding_dimension(3, &all), 0);
    }

    #[test]
    fn forbidding_a_basis_of_f2_squared_leaves_the_diagonal() {
        let f = [BitVec::from_u64(2, 0b01), BitVec::from_u64(2, 0b10)];
        assert_eq!(max_avoiding_dimension(2, &f), 1);
    }

    #[test]
    fn bounds_follow_the_exact_sequence() {
        assert_eq!(rank_bounds((1, 1), (1, 1)), (0, 0));
        assert_eq!(rank_bounds((2, 1), (2, 3)), (1, 3));
    }
}
