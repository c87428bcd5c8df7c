//! The Selmer group of one side of a 2-isogeny, by linear algebra.
//!
//! Let E: y² = x³ + a x² + b x and S the primes dividing 2·b·(a² − 4b).
//! The connecting map α: E(Q) → Q*/Q*², (x, y) ↦ x, (0, 0) ↦ b, O ↦ 1
//! ([SilvermanTate92, III.5]) lands in Q(S, 2), and its image lies in the
//! Selmer group
//!
//! Sel = { d ∈ Q(S, 2) : loc_v(d) ∈ W_v for every place v ∈ S ∪ {∞} },
//!
//! where W_v ⊆ Q_v*/Q_v*² is the local image: the classes d for which the
//! homogeneous space C_d: N² = d M⁴ + a M² e² + (b/d) e⁴ has a Q_v-point
//! ([Silverman09, X.4.9]). At places outside S every element of Q(S, 2) is
//! locally an image (good reduction, unit class), so S ∪ {∞} suffices.
//!
//! Each loc_v is a linear map F2^(1+|S|) → F2^(dim_v); each W_v is cut out
//! by its annihilator. Stacking the functionals f ∘ loc_v for f in ann(W_v)
//! over all v gives a matrix whose kernel is Sel. Cost: O(|S|²) word
//! operations after the local images are known — never 2^|S| classes.

use num_bigint::BigInt;

use super::f2::{BitVec, LinearMap, Subspace};
use super::qs2::QS2;
use crate::error::Result;
use crate::local::{class_dimension, square_class_int, Place};

/// The local image W_v at one place, as a subspace of Q_v*/Q_v*² in the
/// square-class basis of [`crate::local`].
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct LocalCondition {
    /// The place v.
    pub place: Place,
    /// W_v ⊆ F2^(dim_v).
    pub image: Subspace,
}

impl LocalCondition {
    /// W_v from the list of its member classes (bit masks).
    pub fn from_masks(place: Place, masks: &[u8]) -> Self {
        let n = class_dimension(&place);
        let image = Subspace::span(n, masks.iter().map(|&m| BitVec::from_u64(n, m as u64)));
        LocalCondition { place, image }
    }

    /// The member classes of W_v as bit masks, ascending.
    pub fn masks(&self) -> Vec<u8> {
        let mut out: Vec<u8> = self
            .image
            .elements()
            .unwrap_or_default()
            .iter()
            .map(|v| v.ones().fold(0u8, |m, i| m | (1u8 << i)))
            .collect();
        out.sort_unstable();
        out
    }
}

/// The localisation map Q(S, 2) → Q_v*/Q_v*² as an F2 matrix.
///
/// # Errors
/// Only if a basis element is 0, which cannot happen for a valid [`QS2`].
pub fn localisation(qs2: &QS2, place: &Place) -> Result<LinearMap> {
    let target = class_dimension(place);
    let mut columns = Vec::with_capacity(qs2.dim());
    for i in 0..qs2.dim() {
        let e = qs2.basis_element(i).unwrap_or_else(|| BigInt::from(1));
        let mask = square_class_int(&e, place)?;
        columns.push(BitVec::from_u64(target, mask as u64));
    }
    Ok(LinearMap::from_columns(target, &columns))
}

/// Sel = ⋂_v loc_v^{-1}(W_v) inside Q(S, 2).
///
/// # Errors
/// Propagates errors of `localisation`.
pub fn selmer_from_local_images(qs2: &QS2, conditions: &[LocalCondition]) -> Result<Subspace> {
    let n = qs2.dim();
    let mut rows = Vec::new();
    for c in conditions {
        let loc = localisation(qs2, &c.place)?;
        let pre = loc.preimage(&c.image);
        // rows cutting out `pre`: its annihilator
        rows.extend(pre.annihilator().basis().iter().cloned());
    }
    Ok(LinearMap::from_rows(n, rows).kernel())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::local::Prime;

    #[test]
    fn with_no_conditions_the_selmer_group_is_all_of_qs2() {
        let q = QS2::new(vec![Prime::small(2).unwrap(), Prime::small(3).unwrap()]);
        let s = selmer_from_local_images(&q, &[]).unwrap();
        assert_eq!(s.dim(), 3);
    }

    #[test]
    fn a_positivity_condition_at_the_real_place_kills_the_sign() {
        let q = QS2::new(vec![Prime::small(5).unwrap()]);
        let c = LocalCondition::from_masks(Place::Real, &[0]);
        let s = selmer_from_local_images(&q, &[c]).unwrap();
        assert_eq!(s.dim(), 1);
        assert!(s.contains(&q.vector(&BigInt::from(5)).unwrap()));
        assert!(!s.contains(&q.vector(&BigInt::from(-1)).unwrap()));
    }
}
