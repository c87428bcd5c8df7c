//! Which places can obstruct `C_d`, and the local images `W_v`.
//!
//! # Good places [SilvermanTate92, III.6], [Silverman09, X.4]
//!
//! Let `E: y² = x³ + ax² + bx` with `b(a² − 4b) ≠ 0` and `C_d` the quartic of
//! [`Quartic::two_isogeny_space`]. Let `p` be an odd prime with
//! `p ∤ d·b·(a² − 4b)`. The integral model of `C_d` is
//! `[d·d₁², 0, a·d₁², 0, (b/h)·d₁]` with `d₁ | d`, a `p`-unit, and its
//! discriminant `16·d₁¹²·b·(a² − 4b)²` is a `p`-unit. So `C_d` reduces mod `p`
//! to a smooth curve of genus one, which has at least
//! `p + 1 − 2√p > 0` points over `F_p` by the Hasse–Weil bound
//! [Silverman09, V.1.1]; a smooth `F_p`-point lifts to a `Q_p`-point by
//! Hensel's lemma. Hence only `R`, `2`, the primes of `b(a² − 4b)` and the
//! primes of `d` (when `d ∤ b`) can obstruct, which is what
//! [`relevant_places`] returns. Any other place may still be asked.
//!
//! # Local images
//!
//! `W_v = {d ∈ Q_v*/Q_v*² : C_d(Q_v) ≠ ∅}` is the image of the connecting
//! map `E(Q_v) → Q_v*/Q_v*²`, `(x, y) ↦ x` (`(0, 0) ↦ b`), a subgroup
//! isomorphic to `E(Q_v)/ψ(E'(Q_v))` with `ψ: E' → E` the dual isogeny
//! [SilvermanTate92, III.5]. Facts used in the tests (all derived from the
//! exact sequence
//! `0 → E'[ψ](K)/φ(E[2](K)) → E'(K)/φE(K) → E(K)/2E(K) → E(K)/ψE'(K) → 0`
//! and `|E(K)/2E(K)| = |E(K)[2]|·|2|_K^{−1}` for p-adic `K`,
//! `= |E(R)[2]|/2` for `K = R` [Schaefer96, Lemma 3.8]):
//!
//! * `|W_v(E)|·|W_v(E')| = 2` at `R`, `4` at odd `p`, `8` at `p = 2`, where
//!   `E': y² = x³ − 2ax² + (a² − 4b)x`;
//! * at odd `p ∤ b(a² − 4b)`, `W_p = {1, u}` (the unramified classes): the
//!   image lies in the unramified classes [Silverman09, X.4.1] and has order
//!   `|E'(Q_p)[ψ]| = 2`;
//! * at `R`: `−1 ∈ W_R` iff `−t² + at − b ≥ 0` for some real `t ≥ 0`, iff
//!   `b < 0`, or `a > 0` and `a² > 4b` (elementary).

use super::form::Quartic;
use super::image_word;
use super::solubility::{
    finish_word_coeffs, locally_soluble, padic_sqrt_of, LocalPoint, LocalSolubility,
};
use super::{fp, padic};
use crate::arith::word::word_paths_enabled;
use crate::budget::Budget;
use crate::curve::ReducedModel;
use crate::error::{Error, Result};
use crate::local::kummer::{odd_image_members, DirectWitness, OddWitnesses};
use crate::local::{class_dimension, class_representatives, Place, Prime};
use num_bigint::BigInt;
use num_traits::ToPrimitive;
// Used by `relevant_places`, which only the unit tests call.
#[cfg(test)]
use {
    num_integer::Integer,
    num_traits::{One, Signed, Zero},
};

#[cfg(test)]
/// The places where `C_d` can fail to have points: `R`, `2`, and those of
/// the caller's primes that divide `d·b·(a² − 4b)` (see the module docs for
/// why no other place can obstruct). Sorted (`R` first, then primes
/// ascending), without repetitions.
///
/// `primes` must contain every prime factor of `b·(a² − 4b)`, and of `d`
/// when `d ∤ b` — this function does not factor; it checks completeness
/// by dividing them out of `|d·b·(a² − 4b)|` and requiring the cofactor `1`.
///
/// The model is checked ([`ReducedModel`]: `b(a² − 4b) ≠ 0`).
///
/// # Errors
/// [`Error::Zero`] for `d = 0`; [`Error::InvalidArgument`] when `primes`
/// misses a prime factor (the cofactor is named).
///
/// Example: `a = 0, b = −17, d = −1` with primes `[2, 17]`
/// (`b(a² − 4b) = −17·68`) gives `[R, 2, 17]`.
pub fn relevant_places(model: &ReducedModel, d: &BigInt, primes: &[Prime]) -> Result<Vec<Place>> {
    if d.is_zero() {
        return Err(Error::Zero { what: "d".into() });
    }
    let disc = model.b() * model.quadratic_discriminant();
    let mut n = (&disc * d).abs();
    let mut places = vec![Place::Real, Place::Finite(Prime::two())];
    for p in primes {
        if n.is_multiple_of(p.get()) {
            while n.is_multiple_of(p.get()) {
                n /= p.get();
            }
            places.push(Place::Finite(p.clone()));
        }
    }
    if !n.is_one() {
        return Err(Error::InvalidArgument {
            reason: format!("the primes given do not cover d·b·(a² − 4b): cofactor {n} is left"),
        });
    }
    places.sort();
    places.dedup();
    Ok(places)
}

/// The evidence for one square class in a [`LocalImage`].
#[derive(Debug, Clone, PartialEq, Eq)]
#[non_exhaustive]
pub struct ClassEvidence {
    /// The class, as a bit mask in the basis of `crate::local::square_class`.
    pub mask: u8,
    /// The representative `d` that was tested (from `class_representatives`).
    pub representative: BigInt,
    /// The local solubility of `C_d` at the place, with its witness.
    pub solubility: LocalSolubility,
}

/// The local image `W_v ⊆ Q_v*/Q_v*²` of the 2-isogeny descent on
/// `y² = x³ + ax² + bx` at one place, with evidence per class.
#[derive(Debug, Clone, PartialEq, Eq)]
#[non_exhaustive]
pub struct LocalImage {
    /// The place `v`.
    pub place: Place,
    /// The masks of the classes `d` with `C_d(Q_v) ≠ ∅`, ascending.
    pub members: Vec<u8>,
    /// A basis of `members` in reduced echelon form (F₂-row reduction).
    pub basis: Vec<u8>,
    /// `dim_F₂ W_v = basis.len()`.
    pub dimension: usize,
    /// One entry per class of `Q_v*/Q_v*²`, in mask order.
    pub evidence: Vec<ClassEvidence>,
}

impl LocalImage {
    /// True iff `members` is closed under the group law (XOR of masks) and
    /// contains the trivial class — it always should be (it is the image of
    /// a homomorphism); exposed so callers and tests can check.
    pub fn is_subgroup(&self) -> bool {
        self.members.contains(&0)
            && self.members.iter().all(|x| {
                self.members
                    .iter()
                    .all(|y| self.members.binary_search(&(x ^ y)).is_ok())
            })
    }

    /// True iff the class with this mask lies in `W_v`.
    pub fn contains(&self, mask: u8) -> bool {
        self.members.binary_search(&mask).is_ok()
    }
}

/// Reduced row echelon basis of the span of `masks` over F₂.
fn f2_basis(masks: &[u8]) -> Vec<u8> {
    let mut basis: Vec<u8> = Vec::new();
    for &m in masks {
        let mut x = m;
        for &b in &basis {
            let top = 7 - b.leading_zeros();
            if x >> top & 1 == 1 {
                x ^= b;
            }
        }
        if x != 0 {
            let top = 7 - x.leading_zeros();
            for b in basis.iter_mut() {
                if *b >> top & 1 == 1 {
                    *b ^= x;
                }
            }
            basis.push(x);
        }
    }
    basis.sort_unstable_by(|a, b| b.cmp(a));
    basis
}

/// The local image `W_v` for `E: y² = x³ + ax² + bx` at `place`: every class
/// `d ∈ Q_v*/Q_v*²` is tested through its representative from
/// `crate::local::class_representatives` by deciding `C_d(Q_v) ≠ ∅` with
/// [`locally_soluble`]; the members are returned as masks in the fixed
/// square-class basis of the `local` layer (R: sign; odd p: `{p, n}`;
/// 2: `{2, −1, 5}`), with a basis, the dimension, and the evidence.
///
/// # Errors
/// [`Error::Degenerate`] when `b(a² − 4b) = 0`;
/// [`Error::BudgetExhausted`].
///
/// Cost: at most 2, 4 or 8 local solubility tests (a class is skipped
/// when the subgroup property already rules it out, see
/// `local_image_with`); under the word paths they run on the
/// coefficients of `C_d` in machine words (module `image_word`). At an
/// odd prime the witness of a class is first built from the closed form
/// of `crate::local::kummer` (`OddWitnesses::witness`: a point with
/// `x = d·s²` for a small `s`, checked exactly), and the class tree runs
/// only for the classes that construction does not reach; the witness is
/// then a point of `C_d` of the same kind ([`LocalPoint`], re-checked by
/// [`LocalPoint::verify`]), not necessarily the one the tree would find.
///
/// Example: for `y² = x³ − x` (`a = 0, b = −1`) at `R`: `C_{−1}` is
/// `N² = −M⁴ + e⁴`, soluble, so `W_R = {1, −1}`, masks `[0, 1]`.
pub fn local_image(model: &ReducedModel, place: &Place, budget: &mut Budget) -> Result<LocalImage> {
    local_image_with(model, place, budget, true, None)
}

/// [`local_image`]; with `by_closure` false every class is tested, with
/// `by_closure` true a class `c` is reported insoluble without its test
/// when some class `m` already found in `W_v` has `c ⊕ m` already found
/// outside `W_v` (then `c ∈ W_v` would put `c ⊕ m` in the subgroup `W_v`),
/// or, at an odd prime, when the closed form of `crate::local::kummer`
/// puts `c` outside `W_v`, or, with `size` the order of `W_v` known
/// beforehand, when that many members have been found (`W_v` is then
/// complete).
///
/// `size` comes from the partner of a 2-isogeny: `|W_v(E)|·|W_v(E′)|` is
/// the number of classes of `Q_v*/Q_v*²` (2 at `R`, 4 at odd `p`, 8 at 2;
/// module docs, [Schaefer96, Lemma 3.8]), so the image of one side fixes
/// the order of the other's.
/// Both give the same image and evidence (the test
/// `closure_skips_change_no_image` compares them over families); the
/// skipped tests are not charged to the budget.
pub(crate) fn local_image_with(
    model: &ReducedModel,
    place: &Place,
    budget: &mut Budget,
    by_closure: bool,
    size: Option<usize>,
) -> Result<LocalImage> {
    let (a, b) = (model.a(), model.b());
    let reps = class_representatives(place);
    debug_assert_eq!(reps.len(), 1 << class_dimension(place));
    let mut members = Vec::new();
    let mut evidence = Vec::with_capacity(reps.len());
    // The word route (module `image_word`) when a and b fit in i128; per
    // class, the BigInt route whenever the words do not cover the case.
    let words = if word_paths_enabled() {
        a.to_i128()
            .zip(b.to_i128())
            .and_then(|(aw, bw)| image_word::SpaceWords::new(aw, bw))
    } else {
        None
    };
    // a and b in words for the witnesses of `OddWitnesses` (with or
    // without the word paths, so that both give the same evidence).
    let odd_witnesses = match (place, a.to_i128().zip(b.to_i128())) {
        (Place::Finite(p), Some((aw, bw))) if !p.is_two() => {
            p.to_u64().and_then(|pw| OddWitnesses::new(aw, bw, pw))
        }
        _ => None,
    };
    // At an odd prime, the closed form of `crate::local::kummer` names the
    // members; the classes outside are reported insoluble without a test
    // (the members are still tested, for their witnesses).
    let closed = match (place, words) {
        (Place::Finite(p), Some(w)) if by_closure && !p.is_two() => {
            p.to_u64().and_then(|p| odd_image_members(w.a(), w.b(), p))
        }
        _ => None,
    };
    // Bit m of `inside` / `outside`: class m tested and found in / not in
    // W_v (masks are below 8).
    let (mut inside, mut outside) = (0u8, 0u8);
    for (mask, d) in reps.into_iter().enumerate() {
        let mask = mask as u8;
        let known_outside = closed.is_some_and(|set| set >> mask & 1 == 0)
            || by_closure && size.is_some_and(|s| members.len() >= s)
            || by_closure
                && (0..8u8).any(|m| inside >> m & 1 == 1 && outside >> (m ^ mask) & 1 == 1);
        if known_outside {
            outside |= 1 << mask;
            evidence.push(ClassEvidence {
                mask,
                representative: d,
                solubility: LocalSolubility::Insoluble {
                    place: place.clone(),
                },
            });
            continue;
        }
        // At an odd prime, a witness from the closed form first (no class
        // tree); the class tree when it finds none.
        let direct = odd_witnesses.and_then(|o| o.witness(d.to_i128()?));
        let direct = match (place, direct) {
            (Place::Finite(p), Some(w)) => direct_point(words, &d, model, p, w, budget)?,
            _ => None,
        };
        let fast = if direct.is_some() {
            None
        } else {
            words
                .and_then(|w| w.coeffs(&d))
                .and_then(|c| image_word::soluble_words(&c, place, budget))
        };
        let solubility = match (direct, fast) {
            (Some(s), _) => s,
            (None, Some(s)) => s?,
            (None, None) => {
                // Building the quartic is not charged (O(1) products), but
                // on huge models it is slow: read the clock first.
                budget
                    .check_deadline()
                    .map_err(|_| Error::BudgetExhausted {
                        stage: "local image".into(),
                    })?;
                let q = Quartic::two_isogeny_space(&d, a, b)?;
                locally_soluble(&q, place, budget)?
            }
        };
        if solubility.is_soluble() {
            members.push(mask);
            inside |= 1 << mask;
        } else {
            outside |= 1 << mask;
        }
        evidence.push(ClassEvidence {
            mask,
            representative: d,
            solubility,
        });
    }
    members.sort_unstable();
    let basis = f2_basis(&members);
    Ok(LocalImage {
        place: place.clone(),
        dimension: basis.len(),
        members,
        basis,
        evidence,
    })
}

/// The evidence for a witness `(X, Z)` of `C_d` at the odd prime `p` from
/// `OddWitnesses::witness` (`tries` residues tried, charged to the budget like
/// the class tree's tests): `y` as `solubility::finish` computes it (in
/// words when the coefficients of `C_d` allow, else in `BigInt`, the same
/// root either way), after an exact check that `g(X, Z)` is a non-zero
/// square in `Q_p`. `None` when the check fails; the caller then runs
/// the class tree.
fn direct_point(
    words: Option<image_word::SpaceWords>,
    d: &BigInt,
    model: &ReducedModel,
    p: &Prime,
    w: DirectWitness,
    budget: &mut Budget,
) -> Result<Option<LocalSolubility>> {
    let (xw, zw) = w.point;
    fp::charge(budget, w.tries, padic::ODD_STAGE)?;
    let place = Place::Finite(p.clone());
    let (x, z) = (BigInt::from(xw), BigInt::from(zw));
    if let Some(c) = words.and_then(|w| w.coeffs(d)) {
        if let Some((y, precision)) = finish_word_coeffs(&c, p, &x, &z) {
            return Ok(Some(LocalSolubility::Soluble(LocalPoint::new(
                place, x, z, y, precision,
            ))));
        }
    }
    let q = Quartic::two_isogeny_space(d, model.a(), model.b())?;
    let g = q.eval(&x, &z);
    if !padic::is_padic_square(&g, p) {
        return Ok(None);
    }
    let (y, precision) = padic_sqrt_of(&g, p, &x, &z)?;
    Ok(Some(LocalSolubility::Soluble(LocalPoint::new(
        place, x, z, y, precision,
    ))))
}
