//! The Selmer group of one side of a 2-isogeny, assembled from the local
//! images, with the images of the torsion points inside it.
//!
//! For `E: y² = x³ + a x² + b x` ([`ReducedModel`]) and `S` the primes of
//! `2·b·(a² − 4b)`: (1) the local image `W_v` at `R` and at every prime of
//! `S`, from local solvability of the homogeneous spaces (quartic layer,
//! [`crate::quartic::local_image`]); (2) the Selmer group as the preimage of
//! their product under localisation ([`super::group`]); (3) the span `K`
//! of `α(torsion)`, which must lie in it. The connecting map is
//! `α: E(Q) → Q*/Q*²`, `(x, y) ↦ x`, `(0, 0) ↦ b`, `O ↦ 1`
//! [SilvermanTate92, III.5].
//!
//! Cost: `2^{dim_v}` ≤ 8 local solvability tests per place and `O(|S|²)`
//! word operations of linear algebra; never a loop over the classes of
//! the group.

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::Zero;

use super::f2::{BitVec, Subspace};
use super::group::{selmer_from_local_images_budgeted, LocalCondition};
use super::qs2::QS2;
use crate::budget::Budget;
use crate::curve::{Point, ReducedModel};
use crate::error::{Error, Result};
use crate::local::class_dimension;
use crate::local::{Place, Prime};
use crate::quartic::image::{local_image_with, LocalImage};

/// The Selmer group of one side, with the local data it was cut out by.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) struct AssembledSelmer {
    /// Q(S, 2) with S = {2} ∪ the given primes.
    pub(crate) qs2: QS2,
    /// The local image at every place of S ∪ {R}, with its evidence.
    pub(crate) local_images: Vec<LocalImage>,
    /// The same images as subspaces, for the linear algebra.
    pub(crate) conditions: Vec<LocalCondition>,
    /// The Selmer group inside Q(S, 2).
    pub(crate) group: Subspace,
    /// The span K of the torsion images.
    pub(crate) torsion_span: Subspace,
    /// A basis of K, each vector with a torsion point mapping to it.
    pub(crate) torsion_basis: Vec<(BitVec, Point)>,
}

/// α(P) for P on y² = x³ + a x² + b x, as a nonzero rational; `None` for O.
pub fn connecting_value(b: &BigInt, p: &Point) -> Option<BigRational> {
    let x = p.x()?;
    if x.is_zero() {
        Some(BigRational::from_integer(b.clone()))
    } else {
        Some(x.clone())
    }
}

/// Steps (1)–(3) of the module docs. `primes` must be the primes of
/// `2·b·(a² − 4b)` (more are harmless); `torsion` the torsion points of
/// the model's curve; `partner`, when given, the local images of the
/// other side of the 2-isogeny (`y² = x³ − 2ax² + (a² − 4b)x`, or a model
/// of it scaled by a square), which fix the order of each `W_v` here:
/// `|W_v|·|W_v(partner)|` is the number of classes of `Q_v*/Q_v*²`
/// ([`crate::quartic::local_image`] module docs, [Schaefer96, Lemma 3.8]),
/// so the search at `v` stops once that many members are found.
///
/// # Errors
/// [`Error::BudgetExhausted`] from the local tests; [`Error::Internal`]
/// when a torsion image falls outside the Selmer group.
pub(crate) fn assemble_selmer(
    model: &ReducedModel,
    primes: &[Prime],
    torsion: &[Point],
    partner: Option<&[LocalImage]>,
    budget: &mut Budget,
) -> Result<AssembledSelmer> {
    let qs2 = QS2::new(primes.to_vec());
    let mut places = vec![Place::Real];
    places.extend(qs2.primes().iter().cloned().map(Place::Finite));
    let mut local_images = Vec::with_capacity(places.len());
    let mut conditions = Vec::with_capacity(places.len());
    for v in &places {
        let size = partner
            .and_then(|ws| ws.iter().find(|w| w.place == *v))
            .map(|w| (1usize << class_dimension(v)) >> w.dimension);
        let w = local_image_with(model, v, budget, true, size)?;
        conditions.push(LocalCondition::from_masks(v.clone(), &w.members));
        local_images.push(w);
    }
    // Independent check (debug builds): |W_v| from the Tamagawa numbers of
    // E and E' must equal the size found by the local solvability tests.
    debug_assert!(
        super::image_size::images_match_prediction(model, &local_images),
        "local image sizes disagree with Tamagawa numbers for {model}"
    );
    let group = selmer_from_local_images_budgeted(&qs2, &conditions, budget)?;
    let mut torsion_span = Subspace::zero(qs2.dim());
    let mut torsion_basis = Vec::new();
    for t in torsion {
        let Some(val) = connecting_value(model.b(), t) else {
            continue;
        };
        let v = qs2.vector_rational(&val)?;
        if !group.contains(&v) {
            return Err(Error::Internal {
                check: format!("torsion point {t} of {model} maps outside the Selmer group"),
            });
        }
        if torsion_span.insert(v.clone()) {
            torsion_basis.push((v, t.clone()));
        }
    }
    Ok(AssembledSelmer {
        qs2,
        local_images,
        conditions,
        group,
        torsion_span,
        torsion_basis,
    })
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;

    /// The order of `W_v(E′)` read off `W_v(E)` changes nothing: for the
    /// congruent-number curves `y² = x³ − n²x` (n ≤ 300 square-free, each
    /// of its three 2-torsion points moved to (0, 0)) and the box
    /// `|a|, |b| ≤ 10`, the codomain's local images with the partner sizes
    /// equal those with every class tested, at `R`, 2 and every odd prime
    /// of `2·b·(a² − 4b)` of both sides (and 3, 5, 7).
    #[test]
    fn partner_sizes_change_no_image() {
        use crate::quartic::image::local_image_with;
        let mut models: Vec<(i64, i64)> = Vec::new();
        for n in 1i64..=300 {
            if (2..=17).any(|q| n % (q * q) == 0) {
                continue;
            }
            models.extend([(0, -n * n), (3 * n, 2 * n * n), (-3 * n, 2 * n * n)]);
        }
        for a in -10i64..=10 {
            for b in -10i64..=10 {
                models.push((a, b));
            }
        }
        let (mut compared, mut stopped_early) = (0, 0);
        for (a, b) in models {
            let Ok(e) = ReducedModel::new(BigInt::from(a), BigInt::from(b)) else {
                continue;
            };
            let e2 = e.isogenous().unwrap();
            // 2, 3, 5, 7 and the primes of b and a² − 4b (those of the
            // codomain's b′ = a² − 4b and a′² − 4b′ = 16b are among them).
            let mut primes = vec![2u64, 3, 5, 7];
            for mut m in [b.unsigned_abs(), (a * a - 4 * b).unsigned_abs()] {
                let mut q = 2;
                while q * q <= m {
                    if m % q == 0 {
                        primes.push(q);
                        while m % q == 0 {
                            m /= q;
                        }
                    }
                    q += 1;
                }
                if m > 1 {
                    primes.push(m);
                }
            }
            primes.sort_unstable();
            primes.dedup();
            let mut places = vec![Place::Real];
            places.extend(
                primes
                    .into_iter()
                    .map(|p| Place::Finite(Prime::small(p).unwrap())),
            );
            for v in &places {
                let mine = local_image_with(&e, v, &mut Budget::unlimited(), false, None).unwrap();
                let size = (1usize << class_dimension(v)) >> mine.dimension;
                let (mut b1, mut b2) = (Budget::unlimited(), Budget::unlimited());
                let fast = local_image_with(&e2, v, &mut b1, true, Some(size)).unwrap();
                let full = local_image_with(&e2, v, &mut b2, false, None).unwrap();
                assert_eq!(fast, full, "a = {a}, b = {b} at {v}");
                stopped_early += usize::from(b1.spent() < b2.spent());
                compared += 1;
            }
        }
        assert!(compared > 3000, "{compared}");
        assert!(stopped_early > 500, "{stopped_early}");
    }
}
