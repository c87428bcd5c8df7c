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

use super::f2::{insert_word, BitVec, LinearMap, Subspace};
use super::qs2::QS2;
use crate::budget::Budget;
use crate::error::{Error, Result};
use crate::local::square_class::basis_class;
use crate::local::{class_dimension, square_class_int, Place};

/// The local image W_v at one place, as a subspace of Q_v*/Q_v*² in the
/// square-class basis of [`crate::local`].
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct LocalCondition {
    /// The place v.
    pub place: Place,
    /// W_v ⊆ F2^(dim_v).
    pub image: Subspace,
}

impl LocalCondition {
    /// W_v from the list of its member classes (bit masks).
    pub(crate) fn from_masks(place: Place, masks: &[u8]) -> Self {
        let n = class_dimension(&place);
        // The echelon basis in words (n ≤ 3): the same canonical basis as
        // `Subspace::span` of the masks.
        let mut basis = Vec::with_capacity(n);
        for &m in masks {
            insert_word(&mut basis, u64::from(m) & ((1u64 << n) - 1));
        }
        let image = Subspace::from_echelon_words(n, &basis);
        LocalCondition { place, image }
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
    selmer_from_local_images_budgeted(qs2, conditions, &mut Budget::unlimited())
}

/// [`selmer_from_local_images`] under `budget`: on the general route
/// (dim Q(S, 2) > 64) each place is charged `n²/64` units, n = dim Q(S, 2)
/// (the word operations of its preimage and annihilator), the final
/// kernel `n·r/64` for r rows, and the deadline is read before each
/// place.
///
/// # Errors
/// As [`selmer_from_local_images`]; [`Error::BudgetExhausted`] when the
/// budget or its deadline runs out.
pub(crate) fn selmer_from_local_images_budgeted(
    qs2: &QS2,
    conditions: &[LocalCondition],
    budget: &mut Budget,
) -> Result<Subspace> {
    match selmer_in_words(qs2, conditions) {
        Some(sel) => Ok(sel),
        None => selmer_general(qs2, conditions, budget),
    }
}

/// [`selmer_from_local_images`] on `BitVec`s of any length: each
/// preimage loc_v^{-1}(W_v), its annihilator, and the kernel of their stack.
fn selmer_general(
    qs2: &QS2,
    conditions: &[LocalCondition],
    budget: &mut Budget,
) -> Result<Subspace> {
    let n = qs2.dim();
    let stop = |_| Error::BudgetExhausted {
        stage: "Selmer group from local images".into(),
    };
    let per_place = (n as u64).saturating_mul(n as u64) / 64 + 1;
    let mut rows = Vec::new();
    for c in conditions {
        budget.spend(per_place).map_err(stop)?;
        budget.check_deadline().map_err(stop)?;
        let loc = localisation(qs2, &c.place)?;
        let pre = loc.preimage(&c.image);
        // rows cutting out `pre`: its annihilator
        rows.extend(pre.annihilator().basis().iter().cloned());
    }
    budget
        .spend((n as u64).saturating_mul(rows.len() as u64) / 64 + 1)
        .map_err(stop)?;
    budget.check_deadline().map_err(stop)?;
    Ok(LinearMap::from_rows(n, rows).kernel())
}

/// [`selmer_from_local_images`] for dim Q(S, 2) ≤ 64, in machine words:
/// `None` when the dimension is larger or a condition's subspace does not
/// live in F2^(dim_v) (then the general route runs).
///
/// Sel is the kernel of the functionals f ∘ loc_v, f running over a basis
/// of ann(W_v) ⊂ F2^(dim_v) and v over the places: x ∈ loc_v^{-1}(W_v)
/// iff f(loc_v x) = 0 for all f ∈ ann(W_v), since W_v = ann(ann(W_v)).
/// The row of f ∘ loc_v has bit i = f · loc_v(e_i), e_i the i-th basis
/// element of Q(S, 2). A subspace has one reduced echelon basis, so the
/// result equals that of the general route (which takes the annihilator
/// of each preimage and the kernel of their stack: the same subspace).
fn selmer_in_words(qs2: &QS2, conditions: &[LocalCondition]) -> Option<Subspace> {
    let n = qs2.dim();
    if n > 64 {
        return None;
    }
    let mut rows: Vec<u64> = Vec::with_capacity(2 * conditions.len());
    // Scratch space reused across the places (dim_v ≤ 3).
    let mut w: Vec<u64> = Vec::with_capacity(3);
    let mut ann: Vec<u64> = Vec::with_capacity(3);
    for c in conditions {
        let d = class_dimension(&c.place);
        if c.image.ambient() != d || d > 8 {
            return None;
        }
        // W_v as masks; the annihilator: every f with f · w = 0 for all w
        // (dim_v ≤ 3, so at most 7 candidates), kept as an echelon basis.
        w.clear();
        w.extend(c.image.basis().iter().map(BitVec::low_word));
        ann.clear();
        for f in 1u64..(1 << d) {
            if w.iter().all(|&x| (f & x).count_ones() % 2 == 0) {
                insert_word(&mut ann, f);
            }
        }
        if ann.is_empty() {
            continue;
        }
        let first = rows.len();
        rows.resize(first + ann.len(), 0);
        let classes = std::iter::once(None).chain(qs2.primes().iter().map(Some));
        for (i, q) in classes.enumerate() {
            let col = u64::from(basis_class(q, &c.place));
            for (row, &f) in rows[first..].iter_mut().zip(&ann) {
                *row |= u64::from((f & col).count_ones() % 2) << i;
            }
        }
    }
    Subspace::kernel_of_word_rows(n, &rows)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::local::Prime;

    /// A deterministic generator (xorshift64*, common practice).
    struct Rng(u64);
    impl Rng {
        fn next(&mut self) -> u64 {
            self.0 ^= self.0 >> 12;
            self.0 ^= self.0 << 25;
            self.0 ^= self.0 >> 27;
            self.0.wrapping_mul(0x2545_F491_4F6C_DD1D)
        }
    }

    fn primes_from(start: u64, count: usize) -> Vec<Prime> {
        let mut out = Vec::new();
        let mut q = start;
        while out.len() < count {
            if crate::arith::is_prime_u64(q) {
                out.push(Prime::small(q).unwrap());
            }
            q = q.wrapping_add(1);
        }
        out
    }

    /// The word route and the general route give the same subspace and the
    /// same (canonical echelon) basis on random local conditions, for
    /// small primes, primes just below 2^64 and primes above 2^64.
    #[test]
    fn word_and_general_routes_agree_on_random_conditions() {
        let mut rng = Rng(0x9E37_79B9_7F4A_7C15);
        // 2^64 + 13 and 2^64 + 37, prime (sympy 1.14 isprime).
        let big: Vec<Prime> = ["18446744073709551629", "18446744073709551653"]
            .iter()
            .map(|s| Prime::new(s.parse().unwrap()).unwrap())
            .collect();
        let pools = [
            primes_from(2, 40),
            primes_from(u64::MAX - 2000, 6),
            primes_from((1 << 62) - 500, 6),
            big,
        ];
        let mut compared = 0;
        for round in 0..400 {
            let mut primes = vec![Prime::two()];
            for pool in &pools {
                for p in pool {
                    if rng.next() % 3 == 0 {
                        primes.push(p.clone());
                    }
                }
            }
            let q = QS2::new(primes);
            let mut places = vec![Place::Real];
            places.extend(q.primes().iter().cloned().map(Place::Finite));
            let mut conditions: Vec<LocalCondition> = Vec::new();
            for v in places {
                if rng.next() % 4 == 0 {
                    continue;
                }
                let d = class_dimension(&v);
                let k = (rng.next() % 3) as usize;
                let masks: Vec<u8> = (0..k).map(|_| (rng.next() % (1 << d)) as u8).collect();
                conditions.push(LocalCondition::from_masks(v, &masks));
            }
            let general = selmer_general(&q, &conditions, &mut Budget::unlimited()).unwrap();
            match selmer_in_words(&q, &conditions) {
                Some(words) => {
                    assert_eq!(words, general, "round {round}");
                    compared += 1;
                }
                None => assert!(q.dim() > 64),
            }
            assert_eq!(selmer_from_local_images(&q, &conditions).unwrap(), general);
        }
        assert!(compared > 300, "only {compared} rounds on the word route");
    }

    /// `from_masks` gives the subspace (and echelon basis) of
    /// `Subspace::span` for every set of masks at R, 2 and an odd prime,
    /// including masks with stray high bits.
    #[test]
    fn conditions_from_masks_match_the_span() {
        for place in [
            Place::Real,
            Place::Finite(Prime::two()),
            Place::Finite(Prime::small(7).unwrap()),
        ] {
            let n = class_dimension(&place);
            let classes = 1u32 << n;
            for set in 0u32..(1 << classes) {
                let masks: Vec<u8> = (0..classes)
                    .filter(|m| set >> m & 1 == 1)
                    .map(|m| (m as u8) | 0b1000_0000)
                    .collect();
                let want =
                    Subspace::span(n, masks.iter().map(|&m| BitVec::from_u64(n, u64::from(m))));
                let got = LocalCondition::from_masks(place.clone(), &masks);
                assert_eq!(got.image, want, "{place} {masks:?}");
            }
        }
    }

    /// Above 64 coordinates the general route runs (and still answers).
    #[test]
    fn more_than_64_coordinates_take_the_general_route() {
        let q = QS2::new(primes_from(2, 70));
        let c = LocalCondition::from_masks(Place::Real, &[0]);
        assert!(selmer_in_words(&q, std::slice::from_ref(&c)).is_none());
        let s = selmer_from_local_images(&q, &[c]).unwrap();
        assert_eq!(s.dim(), 70);
    }

    /// A hand check of the kernel computation (common practice): with
    /// S = {2}, W_R = {1} and W_2 = {1, −1}, the class −1 fails at R and 2
    /// fails at 2, so Sel = 0; with W_2 alone, Sel = ⟨−1⟩.
    #[test]
    fn hand_checked_intersection_of_two_conditions() {
        let q = QS2::new(vec![Prime::two()]);
        // At R: only the class 1. At 2: the classes {1, −1} (mask 0b010).
        let real = LocalCondition::from_masks(Place::Real, &[0]);
        let two = LocalCondition::from_masks(Place::Finite(Prime::two()), &[0, 0b010]);
        let s = selmer_from_local_images(&q, &[real.clone(), two.clone()]).unwrap();
        assert_eq!(s.dim(), 0);
        // At 2 alone: −1 ↦ 0b010 ∈ W_2, 2 ↦ 0b001 ∉ W_2: Sel = ⟨−1⟩.
        let s = selmer_from_local_images(&q, &[two]).unwrap();
        assert_eq!(s.dim(), 1);
        assert!(s.contains(&q.vector(&BigInt::from(-1)).unwrap()));
    }

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
