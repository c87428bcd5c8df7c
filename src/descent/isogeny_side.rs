//! One side of a 2-isogeny: the Selmer group of y² = x³ + a x² + b x, the
//! image of the points we know, and the search for more.
//!
//! The connecting map is α: E(Q) → Q*/Q*², (x, y) ↦ x, (0, 0) ↦ b,
//! O ↦ 1 ([SilvermanTate92, III.5]); a class d lies in α(E(Q)) iff
//! C_d: N² = d M⁴ + a M² e² + (b/d) e⁴ has a rational point, and a point
//! (M, e, N) with e ≠ 0 gives (d M²/e², d M N/e³) on E with α = d.
//!
//! The computation: (1)–(3) the local images W_v at R, 2 and every prime
//! of b(a² − 4b), the Selmer group as the preimage of their product and
//! K = span of α(torsion), assembled in the Selmer layer
//! (`crate::selmer::assemble`); (4) the lifting pairing and its kernel I ⊇ α(E(Q)) (the second descent
//! as linear algebra, [`crate::second::pairing`]); (5) for at most
//! `max_classes_searched` cosets of I/K (Sel/K with the second descent
//! off), in a fixed order, search a few representatives for a point,
//! adding its class to K when found; (6) with the second descent on, the
//! 4-covering route on the soluble twists of the classes of I/K, and on a
//! few classes outside I for re-checkable evidence; (7) an adapted basis
//! of Sel: torsion images, point images, proven classes, the rest of I,
//! the rest of Sel (see docs/second_descent.md §10).

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};

use super::options::DescentContext;
use crate::budget::Budget;
use crate::curve::{Point, ReducedModel};
use crate::error::{Error, Result};
use crate::local::{Place, Prime};
use crate::quartic::image::LocalImage;
use crate::quartic::search::{search_quartic, QuarticPoint, SearchOptions, SearchOutcome};
use crate::quartic::Quartic;
use crate::second::covering::{
    second_descent, second_descent_on_twists, NoPointEvidence, ObstructedCurve,
    SecondDescentOptions, SecondDescentOutcome, TwistObstruction,
};
use crate::second::pairing::{class_lift, lift_pairing, soluble_twists, LiftPairing};
pub(crate) use crate::selmer::assemble::connecting_value;
use crate::selmer::assemble::{assemble_selmer, AssembledSelmer};
use crate::selmer::f2::{BitVec, Subspace};
use crate::selmer::group::LocalCondition;
use crate::selmer::qs2::QS2;

/// Why one twist `D_λ` of a homogeneous space has no point: a genuine
/// 4-covering insoluble at a place, or, when neither conic of `D_λ` has a
/// rational point (so no quartic model was built), the conic it maps onto
/// with no point at a place.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum CoveringObstruction {
    /// The 4-covering y² = g(u, v) (coefficients of u⁴, u³v, …, v⁴, with
    /// non-zero discriminant) has no point over `place`.
    Quartic {
        /// The covering quartic's coefficients [g4, g3, g2, g1, g0].
        covering: [BigInt; 5],
        /// A place where it has no point.
        place: Place,
    },
    /// The conic `scale·s² = A u² + B uv + C v²` (`form = [A, B, C]`), onto
    /// which `D_λ` maps, has no point over `place`: the Hilbert symbol
    /// `(hilbert[0], hilbert[1])` at `place` is −1.
    Conic {
        /// The coefficient `λ` of `s²`.
        scale: BigInt,
        /// `[A, B, C]`.
        form: [BigInt; 3],
        /// Two integers whose Hilbert symbol at `place` is −1 exactly when
        /// the conic has no point there: `(x, D)` with `x = A·λ` (or `C·λ`
        /// when `A = 0`) and `D = B² − 4AC`.
        hilbert: [BigInt; 2],
        /// The place where the conic has no point.
        place: Place,
    },
}

impl CoveringObstruction {
    /// The place where the curve has no point.
    pub fn place(&self) -> &Place {
        match self {
            CoveringObstruction::Quartic { place, .. }
            | CoveringObstruction::Conic { place, .. } => place,
        }
    }

    /// Re-checks this obstruction from its own data: a quartic has non-zero
    /// discriminant and [`crate::quartic::locally_soluble`] finds no point
    /// at the place; a conic has `hilbert` as stated (from its
    /// coefficients) and the Hilbert symbol −1 at the place. False on
    /// anything that does not check out (budget exhaustion included).
    pub fn recheck(&self, budget: &mut Budget) -> bool {
        match self {
            CoveringObstruction::Quartic { covering, place } => {
                let Ok(q) = Quartic::new(covering.clone()) else {
                    return false;
                };
                !q.discriminant().is_zero()
                    && matches!(
                        crate::quartic::locally_soluble(&q, place, budget),
                        Ok(s) if !s.is_soluble()
                    )
            }
            CoveringObstruction::Conic {
                scale,
                form,
                hilbert,
                place,
            } => {
                conic_hilbert_pair(scale, form).as_ref() == Some(hilbert)
                    && crate::local::hilbert_symbol_int(&hilbert[0], &hilbert[1], place).ok()
                        == Some(-1)
            }
        }
    }
}

/// `(x, D)` for the conic `c·s² = A u² + B uv + C v²`: `x = A·c` (or `C·c`
/// when `A = 0`), `D = B² − 4AC`. From `4A·(Au² + Buv + Cv²) = (2Au + Bv)² −
/// D v²` the conic is `X² − D Y² = 4Ac S²`, which has a point over `Q_v`
/// exactly when `(D, Ac)_v = 1` [Serre73, III.1.1 and IV.2.2]. `None` when
/// `A = C = 0` or `c·D = 0` (then the conic is not an obstruction).
pub(crate) fn conic_hilbert_pair(c: &BigInt, form: &[BigInt; 3]) -> Option<[BigInt; 2]> {
    let [a, b, cc] = form;
    let lead = if !a.is_zero() {
        a
    } else if !cc.is_zero() {
        cc
    } else {
        return None;
    };
    let d = b * b - BigInt::from(4) * a * cc;
    let x = lead * c;
    (!x.is_zero() && !d.is_zero()).then_some([x, d])
}

/// What is known about one basis element of a Selmer group.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum ClassStatus {
    /// α of a torsion point (the point is on this side's curve).
    TorsionImage {
        /// The torsion point.
        point: Point,
    },
    /// α of a point of infinite order found by the search.
    PointImage {
        /// The point on this side's curve y² = x³ + a x² + b x.
        point: Point,
        /// The class d whose homogeneous space held the point.
        space: BigInt,
        /// The point (M, e, N) on that space.
        on_space: QuarticPoint,
    },
    /// Locally soluble everywhere, and no point was found.
    Undecided,
    /// Every 4-covering of C_d is locally insoluble somewhere, so no element
    /// of the coset d·K is an image.
    ProvenNotImage {
        /// The class d whose homogeneous space was proven to have no point.
        space: BigInt,
        /// One obstruction per twist D_λ: a 4-covering, or the conic D_λ
        /// maps onto when no quartic model was built.
        obstructions: Vec<CoveringObstruction>,
        /// The complete evidence, re-checkable with
        /// [`crate::second::covering::verify_obstruction`].
        evidence: Box<NoPointEvidence>,
    },
}

impl ClassStatus {
    /// The contract's status word: "torsion_image", "point_image",
    /// "undecided" or "proven_not_image".
    pub(crate) fn word(&self) -> &'static str {
        match self {
            ClassStatus::TorsionImage { .. } => "torsion_image",
            ClassStatus::PointImage { .. } => "point_image",
            ClassStatus::Undecided => "undecided",
            ClassStatus::ProvenNotImage { .. } => "proven_not_image",
        }
    }
}

/// A basis element of a Selmer group with its status.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct SelmerElement {
    /// The square-free integer representing the class.
    pub class: BigInt,
    /// What is known about it.
    pub status: ClassStatus,
}

/// One search of a homogeneous space C_d, kept as evidence.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct SearchRecord {
    /// The class d.
    pub class: BigInt,
    /// The quartic searched, [d, 0, a, 0, b/d] (or its integral form).
    pub quartic: [BigInt; 5],
    /// What the search found.
    pub outcome: SearchOutcome,
}

/// The Selmer group of y² = x³ + a x² + b x for the isogeny with kernel
/// generated by (0, 0)'s partner, with everything known about its elements.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct SelmerSide {
    /// The checked model y² = x³ + a x² + b x of this side.
    pub(super) model: ReducedModel,
    /// Q(S, 2) with S = {2} ∪ primes of b(a² − 4b).
    pub(super) qs2: QS2,
    /// The local image at every place of S ∪ {R}, with its evidence.
    pub(super) local_images: Vec<LocalImage>,
    /// The Selmer group inside Q(S, 2).
    pub(super) group: Subspace,
    /// The span of the known images (torsion and points found).
    pub(super) known: Subspace,
    /// dim of the image of torsion.
    pub(super) torsion_dim: usize,
    /// An upper bound for dim α(E(Q)) (dim Sel minus what the second
    /// descent proved).
    pub(super) image_upper: usize,
    /// An adapted basis of the Selmer group with statuses: torsion images
    /// first, then point images, then the rest.
    pub(super) elements: Vec<SelmerElement>,
    /// Every search run, in order.
    pub(super) searches: Vec<SearchRecord>,
    /// Points of infinite order found on this side, with classes
    /// independent modulo the torsion image.
    pub(super) points: Vec<Point>,
    /// Classes handed to the 4-covering route, in order, with what it
    /// concluded.
    pub(super) covering_runs: Vec<CoveringRun>,
    /// The lifting pairing on the Selmer group and its kernel I, the
    /// classes that lift to everywhere locally soluble 2-coverings of the
    /// curve (`crate::second::pairing`); `None` if it was not asked for
    /// (the first descent alone) or its budget ran out (then
    /// `pairing_error` says why).
    pub(super) pairing: Option<LiftPairing>,
    /// Why the pairing is missing, if its budget ran out.
    pub pairing_error: Option<Error>,
}

/// What the 4-covering route concluded for one class d.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum CoveringVerdict {
    /// A 4-covering had a point: d is the image of a point found.
    PointImage,
    /// Every 4-covering is insoluble somewhere: C_d has no rational point.
    ProvenNotImage,
    /// Some 4-covering is everywhere locally soluble and its search found
    /// nothing.
    Undecided,
    /// Not run: the side's 4-covering budget was already spent.
    BudgetSpent,
    /// Stopped by an error (a budget inside the route, say).
    GaveUp(Error),
}

impl CoveringVerdict {
    /// A short word for reports: "point_image", "proven_not_image",
    /// "undecided", "budget_spent" or "gave_up".
    pub fn word(&self) -> &'static str {
        match self {
            CoveringVerdict::PointImage => "point_image",
            CoveringVerdict::ProvenNotImage => "proven_not_image",
            CoveringVerdict::Undecided => "undecided",
            CoveringVerdict::BudgetSpent => "budget_spent",
            CoveringVerdict::GaveUp(_) => "gave_up",
        }
    }
}

/// One class handed to the 4-covering route and what came of it.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct CoveringRun {
    /// The class d (a square-free integer).
    pub class: BigInt,
    /// What the route concluded.
    pub verdict: CoveringVerdict,
}

impl SelmerSide {
    /// The checked model y² = x³ + a x² + b x of this side.
    pub fn model(&self) -> &ReducedModel {
        &self.model
    }

    /// Q(S, 2) with S = {2} ∪ primes of b(a² − 4b).
    pub fn qs2(&self) -> &QS2 {
        &self.qs2
    }

    /// The local image at every place of S ∪ {R}, with its evidence.
    pub(crate) fn local_images(&self) -> &[LocalImage] {
        &self.local_images
    }

    /// The Selmer group inside Q(S, 2).
    pub fn group(&self) -> &Subspace {
        &self.group
    }

    /// The span of the known images (torsion and points found).
    pub fn known(&self) -> &Subspace {
        &self.known
    }

    /// dim of the image of torsion.
    pub fn torsion_dim(&self) -> usize {
        self.torsion_dim
    }

    /// An upper bound for dim α(E(Q)) (dim Sel minus what the second
    /// descent proved).
    pub(crate) fn image_upper(&self) -> usize {
        self.image_upper
    }

    /// An adapted basis of the Selmer group with statuses: torsion images
    /// first, then point images, then the rest.
    pub fn elements(&self) -> &[SelmerElement] {
        &self.elements
    }

    /// Every search run, in order.
    pub fn searches(&self) -> &[SearchRecord] {
        &self.searches
    }

    /// Points of infinite order found on this side, with classes
    /// independent modulo the torsion image.
    pub fn points(&self) -> &[Point] {
        &self.points
    }

    /// Classes handed to the 4-covering route, in order, with what it
    /// concluded.
    pub fn covering_runs(&self) -> &[CoveringRun] {
        &self.covering_runs
    }

    /// The lifting pairing on the Selmer group and its kernel I, the
    /// classes that lift to everywhere locally soluble 2-coverings of the
    /// curve (`crate::second::pairing`); `None` if it was not asked for
    /// (the first descent alone) or its budget ran out (then
    /// `pairing_error` says why).
    pub fn pairing(&self) -> Option<&LiftPairing> {
        self.pairing.as_ref()
    }

    /// a of y² = x³ + a x² + b x.
    pub(crate) fn a(&self) -> &BigInt {
        self.model.a()
    }
    /// b of y² = x³ + a x² + b x.
    pub(crate) fn b(&self) -> &BigInt {
        self.model.b()
    }

    /// dim Sel.
    pub(crate) fn dimension(&self) -> usize {
        self.group.dim()
    }

    /// dim of the span of known images (a lower bound for dim α(E(Q))).
    pub(crate) fn image_lower(&self) -> usize {
        self.known.dim()
    }

    /// The subgroup I of classes lifting to everywhere locally soluble
    /// 2-coverings (it contains α(E(Q))), if the pairing was computed.
    pub(crate) fn liftable(&self) -> Option<&Subspace> {
        self.pairing.as_ref().map(|p| &p.liftable)
    }

    /// dim I, if the pairing was computed.
    pub(crate) fn liftable_dim(&self) -> Option<usize> {
        self.liftable().map(Subspace::dim)
    }

    /// The first step of this side that a budget or the clock cut short,
    /// as (step, reason): the lifting pairing, a point search that gave
    /// up, or a class of the 4-covering route that was not run or stopped
    /// (and so lost its evidence). `None` when every step ran to its end.
    pub(crate) fn cut_short(&self) -> Option<(String, String)> {
        if let Some(e) = self.pairing_error.as_ref().filter(|e| is_budget_error(e)) {
            return Some(("lifting pairing".into(), e.to_string()));
        }
        if let Some(r) = self
            .searches
            .iter()
            .find(|r| matches!(r.outcome, SearchOutcome::GaveUp { .. }))
        {
            return Some((
                "point search".into(),
                format!("search budget ran out on the space of class {}", r.class),
            ));
        }
        for run in &self.covering_runs {
            match &run.verdict {
                CoveringVerdict::BudgetSpent => {
                    return Some((
                        "4-covering route".into(),
                        format!(
                            "the 4-covering budget was spent before class {} was examined",
                            run.class
                        ),
                    ))
                }
                CoveringVerdict::GaveUp(e) if is_budget_error(e) => {
                    return Some((
                        "4-covering route".into(),
                        format!("class {}: {e}", run.class),
                    ))
                }
                _ => {}
            }
        }
        None
    }
}

fn is_budget_error(e: &Error) -> bool {
    matches!(
        e,
        Error::BudgetExhausted { .. } | Error::FactorBudgetExhausted { .. }
    )
}

/// The search quartic for class d and the factor f with y = f·N.
fn space_for(d: &BigInt, model: &ReducedModel) -> Result<(Quartic, BigInt)> {
    let q = Quartic::two_isogeny_space(d, model.a(), model.b())?;
    let h = d.gcd(model.b());
    let d1 = d / &h;
    let f = if d1.is_negative() { -d1 } else { d1 };
    Ok((q, f))
}

/// The point of E from a point (M, e, y) of the search quartic for d.
fn point_from_space(d: &BigInt, f: &BigInt, qp: &QuarticPoint) -> Option<Point> {
    if qp.z.is_zero() {
        return None;
    }
    let m = BigRational::from_integer(qp.x.clone());
    let e = BigRational::from_integer(qp.z.clone());
    let n = BigRational::new(qp.y.clone(), f.clone());
    let dq = BigRational::from_integer(d.clone());
    let x = &dq * &m * &m / (&e * &e);
    let y = &dq * &m * &n / (&e * &e * &e);
    Some(Point::new(x, y))
}

/// Most classes outside the liftable subgroup handed to the 4-covering
/// route per side, for re-checkable evidence (and as a cross-check of the
/// pairing): each such class must come back `NoPoint`.
pub const EVIDENCE_CLASSES: usize = 2;

/// Most twists λ one 4-covering run of the descent may examine (the
/// routine's own default is larger; the descent keeps each run short).
pub const DESCENT_MAX_TWISTS: usize = 1 << 6;

/// Most twists searched per class on the point route (the soluble twists
/// form a coset computed by linear algebra; a few of them are searched).
pub const TWISTS_PER_CLASS: usize = 8;

/// Runs the first descent on one side.
///
/// `primes` must be the primes dividing 2·b·(a² − 4b); `torsion` the
/// torsion points of the model's curve.
///
/// Steps, each polynomial in |S| and dim Sel: the local images and the
/// Selmer group (`crate::selmer::assemble`); the lifting pairing
/// ([`crate::second::pairing`]) and its kernel I (the classes lifting to
/// everywhere locally soluble 2-coverings), unless the options ask for the
/// local conditions only; the point search on at most
/// `max_classes_searched` cosets of (I or Sel)/K in a fixed order (basis
/// first, then sums of two, …); with the 4-coverings on, the 4-covering
/// route on the complement basis of K in I (for points) and on at most
/// [`EVIDENCE_CLASSES`] classes outside I (for evidence). The upper bound
/// for dim α(E(Q)) is dim I when the pairing was computed and the
/// 4-coverings are on.
///
/// # Errors
/// Budget exhaustion in the local tests ([`Error::BudgetExhausted`]);
/// [`Error::Internal`] when two independent computations disagree (the
/// pairing and the 4-covering route, say).
pub(crate) fn compute_side(
    model: &ReducedModel,
    primes: &[Prime],
    torsion: &[Point],
    partner: Option<&[LocalImage]>,
    ctx: &DescentContext<'_>,
) -> Result<SelmerSide> {
    let options = ctx.options;
    let mut budget = ctx.budget(options.local_units);
    let AssembledSelmer {
        qs2,
        local_images,
        conditions,
        group,
        torsion_span,
        torsion_basis,
    } = assemble_selmer(model, primes, torsion, partner, &mut budget)?;
    let mut progress = Progress {
        elements: torsion_basis
            .into_iter()
            .map(|(v, t)| SelmerElement {
                class: qs2.integer(&v),
                status: ClassStatus::TorsionImage { point: t },
            })
            .collect(),
        known: torsion_span,
        points: Vec::new(),
        searches: Vec::new(),
    };
    let torsion_dim = progress.known.dim();
    let (pairing, pairing_error) = side_pairing(model, &qs2, &group, &progress.known, ctx)?;
    let use_pairing = options.four_coverings && pairing.is_some();
    let space = match (&pairing, use_pairing) {
        (Some(p), true) => p.liftable.clone(),
        _ => group.clone(),
    };

    let mut work = ctx.budget(u64::MAX);
    search_cosets(model, &qs2, &space, &mut progress, ctx, &mut work)?;
    let route = if options.four_coverings {
        let side = SideSpaces {
            model,
            qs2: &qs2,
            group: &group,
            space: &space,
            pairing: pairing.as_ref(),
            conditions: &conditions,
        };
        run_second_descent(&side, &mut progress, ctx)?
    } else {
        CoveringRoute::default()
    };
    let Progress {
        known,
        mut elements,
        points,
        searches,
    } = progress;
    let spaces = [&known, &space, &group];
    complete_basis(&qs2, spaces, &route, &mut elements, &mut work)?;
    let image_upper = if use_pairing {
        space.dim()
    } else if options.four_coverings && !route.proven.is_empty() {
        // A proven class v ∉ K is outside the image with its whole coset
        // v + K, so the image mod K is a proper subspace of Sel/K.
        group.dim().saturating_sub(1)
    } else {
        group.dim()
    };
    Ok(SelmerSide {
        model: model.clone(),
        qs2,
        local_images,
        group,
        known,
        torsion_dim,
        image_upper,
        elements,
        searches,
        points,
        covering_runs: route.runs,
        pairing,
        pairing_error,
    })
}

/// The lifting pairing of one side, when the options ask for it: its own
/// budget, so a failure (returned beside it) leaves the first descent
/// intact. Every torsion image must lie in its kernel.
fn side_pairing(
    model: &ReducedModel,
    qs2: &QS2,
    group: &Subspace,
    known: &Subspace,
    ctx: &DescentContext<'_>,
) -> Result<(Option<LiftPairing>, Option<Error>)> {
    let options = ctx.options;
    let (pairing, pairing_error) = if options.lifting_pairing {
        let mut pairing_budget = ctx.budget(options.local_units);
        match lift_pairing(model, qs2, group, known, &mut pairing_budget) {
            Ok(p) => (Some(p), None),
            Err(e) => (None, Some(e)),
        }
    } else {
        (None, None)
    };
    if let Some(p) = &pairing {
        if !known.basis().iter().all(|v| p.liftable.contains(v)) {
            return Err(Error::Internal {
                check: format!("a torsion image of {model} lies outside the liftable subgroup"),
            });
        }
    }
    Ok((pairing, pairing_error))
}

/// Completes the adapted basis: after the known images (already in
/// `elements`), the proven classes (independent mod K), then the rest of
/// the search space, then the rest of Sel. `spaces` is `[K, space, Sel]`.
fn complete_basis(
    qs2: &QS2,
    spaces: [&Subspace; 3],
    route: &CoveringRoute,
    elements: &mut Vec<SelmerElement>,
    work: &mut Budget,
) -> Result<()> {
    let [known, space, group] = spaces;
    let mut span = known.clone();
    for (v, status) in &route.proven {
        if span.try_insert(v.clone(), work).map_err(|_| exhausted())? {
            elements.push(SelmerElement {
                class: qs2.integer(v),
                status: status.clone(),
            });
        }
    }
    let inside = span.sum(space);
    for v in span.complement_in(&inside) {
        span.insert(v.clone());
        elements.push(SelmerElement {
            class: qs2.integer(&v),
            status: ClassStatus::Undecided,
        });
    }
    for v in span.complement_in(group) {
        elements.push(SelmerElement {
            class: qs2.integer(&v),
            status: ClassStatus::Undecided,
        });
    }
    Ok(())
}

/// What one side has learnt so far: the span K of known images, the
/// adapted basis being built, the points found and every search run.
struct Progress {
    known: Subspace,
    elements: Vec<SelmerElement>,
    points: Vec<Point>,
    searches: Vec<SearchRecord>,
}

impl Progress {
    /// Records a point found on the space of class `v`.
    /// (One insertion into K: O(dim²) word operations, dim ≤ |S| + 1.)
    fn add_point(&mut self, qs2: &QS2, v: BitVec, found: FoundPoint) {
        self.known.insert(v.clone());
        self.elements.push(SelmerElement {
            class: qs2.integer(&v),
            status: ClassStatus::PointImage {
                point: found.point.clone(),
                space: found.space,
                on_space: found.on_space,
            },
        });
        self.points.push(found.point);
    }
}

/// The fixed data of one side that the 4-covering route reads.
struct SideSpaces<'a> {
    model: &'a ReducedModel,
    qs2: &'a QS2,
    group: &'a Subspace,
    space: &'a Subspace,
    pairing: Option<&'a LiftPairing>,
    conditions: &'a [LocalCondition],
}

/// What the 4-covering route of one side returns: a run record per class,
/// and the classes proven not to be images with their evidence.
#[derive(Default)]
struct CoveringRoute {
    runs: Vec<CoveringRun>,
    proven: Vec<(BitVec, ClassStatus)>,
}

fn exhausted() -> Error {
    Error::BudgetExhausted {
        stage: "linear algebra on a Selmer group".into(),
    }
}

/// The index sets of {0, …, u−1} by increasing size, lexicographic within
/// a size: the fixed order in which cosets are visited. Lazy; the caller
/// stops it.
struct Combinations {
    u: usize,
    current: Vec<usize>,
}

impl Combinations {
    fn new(u: usize) -> Self {
        Combinations {
            u,
            current: Vec::new(),
        }
    }
}

impl Iterator for Combinations {
    type Item = Vec<usize>;
    fn next(&mut self) -> Option<Vec<usize>> {
        let u = self.u;
        let k = self.current.len();
        // advance within size k
        let mut i = k;
        while i > 0 {
            i -= 1;
            if self.current[i] < u - (k - i) {
                self.current[i] += 1;
                for j in i + 1..k {
                    self.current[j] = self.current[j - 1] + 1;
                }
                return Some(self.current.clone());
            }
        }
        // next size
        if k < u {
            self.current = (0..=k).collect();
            return Some(self.current.clone());
        }
        None
    }
}

/// The point search on the cosets of `space`/K: at most
/// `max_classes_searched` cosets, in the order of [`Combinations`] on a
/// complement basis; after each point found, K grows and the order
/// restarts on the new complement (classes already searched are skipped).
fn search_cosets(
    model: &ReducedModel,
    qs2: &QS2,
    space: &Subspace,
    progress: &mut Progress,
    ctx: &DescentContext<'_>,
    work: &mut Budget,
) -> Result<()> {
    let mut tried = 0usize;
    let mut seen: Vec<BitVec> = Vec::new();
    'restart: loop {
        let rest = progress.known.complement_in(space);
        if rest.is_empty() {
            return Ok(());
        }
        for combo in Combinations::new(rest.len()) {
            if tried >= ctx.options.max_classes_searched {
                return Ok(());
            }
            let mut x = BitVec::zeros(qs2.dim());
            for &i in &combo {
                x.add_assign(&rest[i]);
            }
            let key = progress
                .known
                .try_reduce(&x, work)
                .map_err(|_| exhausted())?;
            if key.is_zero() || seen.contains(&key) {
                continue;
            }
            seen.push(key);
            tried += 1;
            if let Some((v, found)) = search_coset(model, qs2, &x, progress, ctx)? {
                progress.add_point(qs2, v, found);
                seen = seen
                    .iter()
                    .map(|s| progress.known.reduce(s))
                    .filter(|s| !s.is_zero())
                    .collect();
                continue 'restart;
            }
        }
        return Ok(());
    }
}

/// The 4-covering route: on the complement basis of K in `space` (points),
/// and on at most [`EVIDENCE_CLASSES`] basis classes outside `liftable`
/// (evidence that they are not images; by the theory each such run must
/// end `NoPoint`, which is checked). Without a pairing, on the complement
/// basis of K in Sel.
fn run_second_descent(
    side: &SideSpaces<'_>,
    progress: &mut Progress,
    ctx: &DescentContext<'_>,
) -> Result<CoveringRoute> {
    let options = ctx.options;
    let mut sd_options =
        SecondDescentOptions::default().with_search_height(options.covering_search_height);
    sd_options.max_twists = sd_options.max_twists.min(DESCENT_MAX_TWISTS);
    // One budget for the whole side, so the cost cannot grow with the
    // number of classes.
    let mut budget = ctx.budget(options.covering_units);
    let mut route = CoveringRoute::default();
    let run = CoveringRunner {
        side,
        options: &sd_options,
        max_classes: options.max_classes_searched,
    };
    run.points(progress, &mut budget, &mut route)?;
    // Evidence: a few classes outside the liftable subgroup.
    if let Some(pairing) = side.pairing {
        run.evidence(&pairing.liftable, &mut budget, &mut route)?;
    }
    Ok(route)
}

/// The fixed inputs of the 4-covering route of one side.
struct CoveringRunner<'a> {
    side: &'a SideSpaces<'a>,
    options: &'a SecondDescentOptions,
    max_classes: usize,
}

impl CoveringRunner<'_> {
    /// Points: basis classes of space / K, restarting after each point.
    fn points(
        &self,
        progress: &mut Progress,
        budget: &mut Budget,
        route: &mut CoveringRoute,
    ) -> Result<()> {
        let side = self.side;
        let (model, qs2) = (side.model, side.qs2);
        let liftable = side.pairing.map(|p| &p.liftable);
        let mut tried = 0usize;
        let mut done: Vec<BigInt> = Vec::new();
        'restart: loop {
            for x in progress.known.complement_in(side.space) {
                if tried >= self.max_classes {
                    break 'restart;
                }
                let Some((d, v)) = coset_representatives(qs2, &x, &progress.known)
                    .into_iter()
                    .next()
                else {
                    continue;
                };
                if done.contains(&d) {
                    continue;
                }
                done.push(d.clone());
                tried += 1;
                if budget.is_exhausted() {
                    route.record(d, CoveringVerdict::BudgetSpent);
                    break 'restart;
                }
                let outcome = if side.pairing.is_some() {
                    targeted(model, &d, qs2, side.conditions, self.options, budget)
                } else {
                    second_descent(model, &d, self.options, budget)
                };
                match outcome {
                    Ok(SecondDescentOutcome::Point {
                        space_point,
                        point_x,
                        point_y,
                        ..
                    }) => {
                        let p = Point::new(point_x, point_y);
                        if !model.curve().contains(&p) {
                            return Err(Error::Internal {
                                check: format!(
                                    "the 4-covering point for C_{d} of {model} is not on the curve"
                                ),
                            });
                        }
                        if liftable.is_some_and(|l| !l.contains(&v)) {
                            return Err(Error::Internal {
                                check: format!(
                                    "class {d} of {model} has a point but pairs nontrivially"
                                ),
                            });
                        }
                        route.record(d.clone(), CoveringVerdict::PointImage);
                        let found = FoundPoint {
                            point: p,
                            space: d,
                            on_space: space_point,
                        };
                        progress.add_point(qs2, v, found);
                        continue 'restart;
                    }
                    Ok(SecondDescentOutcome::NoPoint(evidence)) => {
                        if liftable.is_some() {
                            return Err(Error::Internal {
                                check: format!(
                                    "class {d} of {model} lies in the liftable subgroup but every 4-covering is insoluble"
                                ),
                            });
                        }
                        route.record(d.clone(), CoveringVerdict::ProvenNotImage);
                        route.proven.push((v, not_image(d, evidence)?));
                    }
                    Ok(SecondDescentOutcome::Undecided { .. }) => {
                        route.record(d, CoveringVerdict::Undecided);
                    }
                    Err(e @ Error::Internal { .. }) => return Err(e),
                    Err(e) => route.record(d, CoveringVerdict::GaveUp(e)),
                }
            }
            break;
        }
        Ok(())
    }

    /// Evidence: at most [`EVIDENCE_CLASSES`] basis classes outside
    /// `liftable`; by the theory each run must end `NoPoint` (checked).
    fn evidence(
        &self,
        liftable: &Subspace,
        budget: &mut Budget,
        route: &mut CoveringRoute,
    ) -> Result<()> {
        let (model, qs2) = (self.side.model, self.side.qs2);
        let outside = liftable.complement_in(self.side.group);
        for x in outside.into_iter().take(EVIDENCE_CLASSES) {
            let Some((d, v)) = coset_representatives(qs2, &x, liftable).into_iter().next() else {
                continue;
            };
            if budget.is_exhausted() {
                route.record(d, CoveringVerdict::BudgetSpent);
                break;
            }
            match second_descent(model, &d, self.options, budget) {
                Ok(SecondDescentOutcome::NoPoint(evidence)) => {
                    route.record(d.clone(), CoveringVerdict::ProvenNotImage);
                    route.proven.push((v, not_image(d, evidence)?));
                }
                Ok(other) => {
                    return Err(Error::Internal {
                        check: format!(
                            "class {d} of {model} pairs nontrivially but the 4-covering route says {}",
                            other.word()
                        ),
                    });
                }
                Err(e @ Error::Internal { .. }) => return Err(e),
                Err(e) => route.record(d, CoveringVerdict::GaveUp(e)),
            }
        }
        Ok(())
    }
}

impl CoveringRoute {
    fn record(&mut self, class: BigInt, verdict: CoveringVerdict) {
        self.runs.push(CoveringRun { class, verdict });
    }
}

/// The 4-covering route on the soluble twists of a class d in I only:
/// the pairing data of d, the coset of twists by linear algebra, at most
/// [`TWISTS_PER_CLASS`] of them searched.
fn targeted(
    model: &ReducedModel,
    d: &BigInt,
    qs2: &QS2,
    conditions: &[LocalCondition],
    sd_options: &SecondDescentOptions,
    budget: &mut Budget,
) -> Result<SecondDescentOutcome> {
    let lift = class_lift(model, d, qs2, budget)?;
    let twists = soluble_twists(&lift, qs2, conditions, TWISTS_PER_CLASS, budget)?;
    if twists.is_empty() {
        return Err(Error::Internal {
            check: format!(
                "class {d} of {model} lies in the liftable subgroup but has no soluble twist"
            ),
        });
    }
    second_descent_on_twists(model, d, &lift.conic_point, &twists, sd_options, budget)
}

fn not_image(d: BigInt, evidence: NoPointEvidence) -> Result<ClassStatus> {
    let obstructions = evidence
        .obstructions
        .iter()
        .map(covering_obstruction)
        .collect::<Result<Vec<_>>>()?;
    Ok(ClassStatus::ProvenNotImage {
        space: d,
        obstructions,
        evidence: Box::new(evidence),
    })
}

/// The printed form of one twist's obstruction: the quartic model, or the
/// conic with its Hilbert symbol pair when no quartic model was built.
pub(crate) fn covering_obstruction(o: &TwistObstruction) -> Result<CoveringObstruction> {
    Ok(match &o.curve {
        ObstructedCurve::Quartic { coeffs, .. } => CoveringObstruction::Quartic {
            covering: coeffs.clone(),
            place: o.place.clone(),
        },
        ObstructedCurve::Conic { scale, form } => CoveringObstruction::Conic {
            scale: scale.clone(),
            form: form.clone(),
            hilbert: conic_hilbert_pair(scale, form).ok_or_else(|| Error::Internal {
                check: format!("the obstructing conic {scale}·s² = {form:?} is non-degenerate"),
            })?,
            place: o.place.clone(),
        },
    })
}

/// x moved greedily inside x + K towards a class of small |d|: add a basis
/// vector of K while that lowers |d| (each step lowers |d|; at most
/// 4·dim K + 4 passes).
pub(crate) fn smallest_in_coset(qs2: &QS2, x: &BitVec, known: &Subspace) -> BitVec {
    let basis = known.basis();
    let mut y = x.clone();
    let mut dy = qs2.integer(&y).abs();
    for _ in 0..(4 * basis.len() + 4) {
        let mut improved = false;
        for k in basis {
            let z = y.add(k);
            let dz = qs2.integer(&z).abs();
            if dz < dy {
                y = z;
                dy = dz;
                improved = true;
            }
        }
        if !improved {
            break;
        }
    }
    y
}

/// Representatives of the coset x + K, smallest |d| first: x is first
/// moved greedily (add a basis vector of K while that lowers |d|; each
/// step lowers |d|, at most 4·dim K + 4 passes), then the result y, the
/// y + k and the y + k + k' (k, k' basis vectors of K) are sorted — at most
/// 1 + m + m(m−1)/2 classes for m = dim K, never 2^m.
fn coset_representatives(qs2: &QS2, x: &BitVec, known: &Subspace) -> Vec<(BigInt, BitVec)> {
    let basis = known.basis();
    let y = smallest_in_coset(qs2, x, known);
    let mut reps = vec![(qs2.integer(&y), y.clone())];
    for (i, k) in basis.iter().enumerate() {
        let v = y.add(k);
        reps.push((qs2.integer(&v), v.clone()));
        for k2 in &basis[i + 1..] {
            let w = v.add(k2);
            reps.push((qs2.integer(&w), w));
        }
    }
    reps.sort_by(|p, q| p.0.abs().cmp(&q.0.abs()).then(p.0.cmp(&q.0)));
    reps
}

/// A point found on a homogeneous space: the point of E, the class d of
/// the space and the point (M, e, N) on it.
struct FoundPoint {
    point: Point,
    space: BigInt,
    on_space: QuarticPoint,
}

/// Searches a few representatives of the coset x + K, smallest |d| first.
fn search_coset(
    model: &ReducedModel,
    qs2: &QS2,
    x: &BitVec,
    progress: &mut Progress,
    ctx: &DescentContext<'_>,
) -> Result<Option<(BitVec, FoundPoint)>> {
    let options = ctx.options;
    for (d, v) in coset_representatives(qs2, x, &progress.known)
        .into_iter()
        .take(options.representatives_per_class.max(1))
    {
        if d.is_one() {
            continue;
        }
        let (space, f) = space_for(&d, model)?;
        let mut budget = ctx.budget(options.search_units);
        let outcome = search_quartic(
            &space,
            &SearchOptions::up_to(options.search_height),
            &mut budget,
        )?;
        let found = match &outcome {
            SearchOutcome::Found(qp) => point_from_space(&d, &f, qp).map(|p| (p, qp.clone())),
            _ => None,
        };
        progress.searches.push(SearchRecord {
            class: d.clone(),
            quartic: space.coeffs().clone(),
            outcome,
        });
        if let Some((point, on_space)) = found {
            if model.curve().contains(&point) {
                let found = FoundPoint {
                    point,
                    space: d,
                    on_space,
                };
                return Ok(Some((v, found)));
            }
            return Err(Error::Internal {
                check: format!("the point from C_{d} is not on {model}"),
            });
        }
    }
    Ok(None)
}

#[cfg(test)]
mod tests {
    use super::Combinations;

    #[test]
    fn cosets_are_visited_by_size_then_lexicographically_and_all_once() {
        let all: Vec<Vec<usize>> = Combinations::new(4).collect();
        assert_eq!(all.len(), 15); // 2^4 − 1 nonempty subsets (common practice)
        assert_eq!(&all[..5], &[vec![0], vec![1], vec![2], vec![3], vec![0, 1]]);
        assert_eq!(all.last(), Some(&vec![0, 1, 2, 3]));
        let mut sorted = all.clone();
        sorted.sort();
        sorted.dedup();
        assert_eq!(sorted.len(), 15);
        assert_eq!(Combinations::new(0).count(), 0);
    }
}
