//! Layer 8: the descent end to end — exact-sequence bookkeeping, rank
//! bounds, points on the input model, and reports.
//!
//! [`descend`] takes any Weierstrass model over Q with a rational point of
//! order 2 and, for each rational 2-torsion point T:
//! 1. moves T to (0, 0) on an integral y² = x³ + a x² + b x
//!    ([`crate::curve::two_torsion_model`]) and forms the 2-isogenous
//!    E': y² = x³ − 2a x² + (a² − 4b) x;
//! 2. factors b and a² − 4b (the bad primes of both sides, since
//!    a'² − 4b' = 16 b); a number whose primes are all among those already
//!    found for the curve, and which factoring would have split without
//!    spending budget, is not factored again (`KnownPrimes`);
//! 3. computes both Selmer groups from local images at R, 2 and every bad
//!    prime (`isogeny_side::compute_side`) and searches their homogeneous spaces;
//! 4. combines both sides by the exact sequence (`exact_sequence`).
//!
//! With three rational 2-torsion points it does this for each of the three
//! isogenies and reports the sharpest bounds: max of the lower bounds, min
//! of the upper bounds — each isogeny's bounds are proven, so both are.
//!
//! # Independent points
//! If P_1, …, P_m ∈ E(Q) have α-images independent modulo α(E(Q)_tors),
//! and Q_1, …, Q_n ∈ E'(Q) have α'-images independent modulo
//! α'(E'(Q)_tors), then P_1, …, P_m, φ̂(Q_1), …, φ̂(Q_n) are independent in
//! E(Q)/E(Q)_tors. (Proof: in a relation with some odd coefficient, α kills
//! the φ̂-terms, so every a_i is even; writing 2P = φ̂(φ(P)), the rest is
//! φ̂ of a torsion point, and α' then forces every b_j even.) Since
//! dim α(E(Q)_tors) + dim α'(E'(Q)_tors) = 2, their number is exactly the
//! lower bound k + k' − 2. Independence is certified by the F2 images, not
//! by heights.
//!
//! # Missing points
//! When the bounds stay apart, [`search_missing_points`] hunts further on
//! the undecided classes (deeper searches, 4-coverings of the second
//! descent); its design and measured yield are in `docs/deep_search.md`,
//! included below.
//!
#![doc = include_str!("../../docs/deep_search.md")]

#[cfg(test)]
mod checks;
pub(crate) mod deep_search;
pub(crate) mod exact_sequence;
pub(crate) mod global;
pub(crate) mod isogeny_side;
pub(crate) mod options;
pub(crate) mod report;
pub(crate) mod verify;

use std::time::Instant;

use num_bigint::BigInt;

pub use deep_search::{complete_report_points, search_missing_points, DeepSearchOptions};
pub use global::{PointOrigin, RankProof};
pub use isogeny_side::{
    ClassStatus, CoveringObstruction, CoveringRun, CoveringVerdict, SearchRecord, SelmerElement,
    SelmerSide,
};
use options::DescentContext;
pub use options::DescentOptions;
pub use report::{Completion, DescentReport, Generators, RankBounds};
pub use verify::{verify_report, verify_report_default, Check, Verification, DEFAULT_VERIFY_UNITS};

use crate::arith::factor;
use crate::curve::tate::{global_local_data_with, GlobalLocalData};
use crate::curve::{
    torsion, two_torsion_model_with_budget, two_torsion_points_with_budget, Curve, Point,
    TorsionGroup, TwoIsogeny, TwoTorsionModel,
};
use crate::error::{Error, Result};
use crate::local::known_primes::KnownPrimes;
use crate::local::Prime;

/// The descent for one 2-isogeny φ: E → E' (E the reduced model of the
/// input curve with the chosen 2-torsion point at (0, 0)).
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct IsogenyDescent {
    /// The point of order 2 on the input model generating ker φ.
    kernel_point: Point,
    /// The reduced model y² = x³ + a x² + b x and its change of model.
    model: TwoTorsionModel,
    /// The isogeny φ and its codomain.
    isogeny: TwoIsogeny,
    /// The Selmer group on E's side (classes d of C_d over E).
    domain: SelmerSide,
    /// The Selmer group on E''s side.
    codomain: SelmerSide,
    /// Proven lower bound for the rank from this isogeny.
    rank_lower: usize,
    /// Proven upper bound for the rank from this isogeny.
    rank_upper: usize,
    /// Independent points of infinite order on the input model, as many
    /// as `rank_lower`.
    pub points: Vec<Point>,
}

impl IsogenyDescent {
    /// The point of order 2 on the input model generating ker φ.
    pub(crate) fn kernel_point(&self) -> &Point {
        &self.kernel_point
    }

    /// The reduced model y² = x³ + a x² + b x and its change of model.
    pub fn model(&self) -> &TwoTorsionModel {
        &self.model
    }

    /// The isogeny φ and its codomain.
    pub fn isogeny(&self) -> &TwoIsogeny {
        &self.isogeny
    }

    /// The Selmer group on E's side (classes d of C_d over E).
    pub fn domain(&self) -> &SelmerSide {
        &self.domain
    }

    /// The Selmer group on E''s side.
    pub fn codomain(&self) -> &SelmerSide {
        &self.codomain
    }

    /// The rank bounds this isogeny proves on its own.
    pub fn rank_bounds(&self) -> RankBounds {
        RankBounds {
            lower: self.rank_lower,
            upper: self.rank_upper,
        }
    }

    /// Proven lower bound for the rank from this isogeny.
    pub(crate) fn rank_lower(&self) -> usize {
        self.rank_lower
    }

    /// Proven upper bound for the rank from this isogeny.
    pub(crate) fn rank_upper(&self) -> usize {
        self.rank_upper
    }

    /// Bounds (lower, upper) for the F2-dimension of the part of the
    /// Tate–Shafarevich group seen on E's side, Sel / α(E(Q)), and on E''s
    /// side.
    pub(crate) fn sha_bounds(&self) -> ((usize, usize), (usize, usize)) {
        let f = |s: &SelmerSide| {
            (
                s.dimension() - s.image_upper.min(s.dimension()),
                s.dimension() - s.image_lower(),
            )
        };
        (f(&self.domain), f(&self.codomain))
    }

    /// dim_F2 Sel²(E/Q) of the reduced model E (isomorphic to the input
    /// curve), torsion included, from the exact sequence of
    /// `exact_sequence::selmer2_dimension`: dim Sel^φ(E) (this descent's E'
    /// side) − t + dim I (the liftable subgroup on E's side). `None` when
    /// the pairing on E's side was not computed (budget).
    pub fn selmer2_rank(&self) -> Option<usize> {
        let liftable = self.domain.liftable_dim()?;
        let full = is_square(&self.model.reduced().quadratic_discriminant());
        Some(exact_sequence::selmer2_dimension(
            self.codomain.dimension(),
            liftable,
            full,
        ))
    }

    /// The upper bounds for the rank that the 2-Selmer data of this
    /// isogeny prove on their own, whichever steps ran: the smallest of
    /// * dim Sel²(E) − dim E(Q)\[2\] and dim Sel²(E') − dim E'(Q)\[2\]
    ///   (E(Q)/2E(Q), of dimension r + dim E(Q)\[2\], embeds in Sel²(E);
    ///   [Sil86, X.4]; E and E' are isogenous, so have the same rank), and
    /// * dim I + dim I' − 2, I and I' the liftable subgroups of both sides,
    ///   which contain the images α(E(Q)) and α'(E'(Q)) (the exact sequence
    ///   of `exact_sequence`).
    ///
    /// Here `selmer2_rank` counts the torsion (see
    /// `exact_sequence::selmer2_dimension`), and dim E(Q)\[2\] is 2 when
    /// a² − 4b is a square, else 1 (for E', 2 when b is a square). `None`
    /// when neither pairing was computed.
    pub(crate) fn selmer_rank_bound(&self) -> Option<usize> {
        let two_e = if is_square(&self.model.reduced().quadratic_discriminant()) {
            2
        } else {
            1
        };
        let two_e2 = if is_square(self.model.b()) { 2 } else { 1 };
        let from_e = self.selmer2_rank().map(|s| s.saturating_sub(two_e));
        let from_e2 = self
            .selmer2_rank_codomain()
            .map(|s| s.saturating_sub(two_e2));
        let from_i = match (self.domain.liftable_dim(), self.codomain.liftable_dim()) {
            (Some(i), Some(j)) => Some((i + j).saturating_sub(2)),
            _ => None,
        };
        [from_e, from_e2, from_i].into_iter().flatten().min()
    }

    /// dim_F2 Sel²(E'/Q) of the isogenous curve E', torsion included
    /// (the same sequence for the dual isogeny; E'\[2\] is rational iff b is
    /// a square).
    pub(crate) fn selmer2_rank_codomain(&self) -> Option<usize> {
        let liftable = self.codomain.liftable_dim()?;
        let full = is_square(self.model.b());
        Some(exact_sequence::selmer2_dimension(
            self.domain.dimension(),
            liftable,
            full,
        ))
    }
}

/// dim_F2 Sel²(E/Q) of the curve of a descent, torsion included: the value
/// of the first isogeny whose pairing was computed (with E\[2\] rational all
/// three isogenies give the same number; the tests check it).
pub fn selmer2_rank(isogenies: &[IsogenyDescent]) -> Option<usize> {
    isogenies.iter().find_map(IsogenyDescent::selmer2_rank)
}

fn is_square(n: &BigInt) -> bool {
    !num_traits::Signed::is_negative(n) && crate::arith::is_perfect_square(n)
}

/// Appends the primes of n to `into`: read off `known` when that is
/// exact and free ([`KnownPrimes::primes_of`]), else by factoring n under
/// its own budget (the primes found join `known`).
fn primes_of(
    n: &BigInt,
    ctx: &DescentContext<'_>,
    known: &mut KnownPrimes,
    into: &mut Vec<Prime>,
) -> Result<()> {
    if let Some(ps) = known.primes_of(n) {
        into.extend(ps.into_iter().map(Prime::certified));
        return Ok(());
    }
    let mut budget = ctx.factor_budget(n.bits());
    let f = factor(n, &mut budget)?;
    known.add(f.primes());
    for p in f.primes() {
        into.push(Prime::certified(p.clone()));
    }
    Ok(())
}

/// The reduced model for the kernel point `t`, under the factoring budget
/// of [`descend_isogeny_with_torsion`] (a fresh one per call, so the
/// result does not depend on when it is computed).
fn reduced_model_for(
    curve: &Curve,
    t: &Point,
    ctx: &DescentContext<'_>,
) -> Result<TwoTorsionModel> {
    let size = curve
        .coefficients()
        .iter()
        .map(|c| c.numer().bits() + c.denom().bits())
        .max()
        .unwrap_or(0);
    let mut reduction_budget = ctx.factor_budget(4 * size);
    two_torsion_model_with_budget(curve, t, &mut reduction_budget)
}

/// Before the discriminant is factored: the reduced model of the first
/// kernel point and the primes of its b and a² − 4b when both are below
/// 2^64 (factored completely and free of charge, so nothing here can fail
/// or spend a budget). Δ of the input is 16 b² (a² − 4b) up to a change of
/// scale, so these primes usually account for all of Δ.
fn first_model_and_primes(
    curve: &Curve,
    t: &Point,
    ctx: &DescentContext<'_>,
    known: &mut KnownPrimes,
) -> Option<TwoTorsionModel> {
    let model = reduced_model_for(curve, t, ctx).ok()?;
    let b = model.b();
    let a = model.a();
    let disc: BigInt = a * a - b * 4;
    for n in [b, &disc] {
        if n.magnitude().bits() <= 64 && known.primes_of(n).is_none() {
            let mut budget = ctx.factor_budget(n.bits());
            if let Ok(f) = factor(n, &mut budget) {
                known.add(f.primes());
            }
        }
    }
    Some(model)
}

/// Runs the descent for the isogeny with kernel generated by `t`.
///
/// # Errors
/// [`Error::PointNotOnCurve`] if `t` is not a point of order 2 on `curve`;
/// budget errors from factoring and local tests.
pub fn descend_isogeny(
    curve: &Curve,
    t: &Point,
    options: &DescentOptions,
) -> Result<IsogenyDescent> {
    let ctx = DescentContext::new(options, Instant::now());
    let torsion = torsion(curve);
    descend_isogeny_with_torsion(curve, t, &torsion, &ctx, None, &mut KnownPrimes::default())
}

/// [`descend_isogeny`] with the torsion subgroup of `curve` supplied, the
/// reduced model for `t` if already computed (by [`reduced_model_for`]),
/// and the primes known so far for this curve.
fn descend_isogeny_with_torsion(
    curve: &Curve,
    t: &Point,
    torsion: &TorsionGroup,
    ctx: &DescentContext<'_>,
    model: Option<&TwoTorsionModel>,
    known: &mut KnownPrimes,
) -> Result<IsogenyDescent> {
    let model = match model {
        Some(m) => m.clone(),
        None => reduced_model_for(curve, t, ctx)?,
    };
    let isogeny = TwoIsogeny::from_model(&model)?;
    let mut primes = vec![Prime::two()];
    primes_of(model.b(), ctx, known, &mut primes)?;
    primes_of(isogeny.codomain_model().b(), ctx, known, &mut primes)?;
    primes.sort();
    primes.dedup();

    let torsion_e: Vec<Point> = torsion
        .points()
        .iter()
        .map(|p| model.from_input(p))
        .collect();
    // E′(Q)_tors has the odd part of E(Q)_tors (module `curve::torsion`):
    // when that is trivial, the 2-primary part by halving is all of it.
    let torsion_e2 = if torsion.points().len().is_power_of_two() {
        crate::curve::torsion::two_group_torsion_points(isogeny.codomain())
    } else {
        crate::curve::torsion(isogeny.codomain()).points().to_vec()
    };

    let domain = isogeny_side::compute_side(model.reduced(), &primes, &torsion_e, None, ctx)?;
    // The domain's local images fix the order of the codomain's.
    let codomain = isogeny_side::compute_side(
        isogeny.codomain_model(),
        &primes,
        &torsion_e2,
        Some(&domain.local_images),
        ctx,
    )?;
    if domain.torsion_dim + codomain.torsion_dim != 2 {
        return Err(Error::Internal {
            check: format!(
                "torsion images have dimensions {} + {} ≠ 2",
                domain.torsion_dim, codomain.torsion_dim
            ),
        });
    }
    let (rank_lower, rank_upper) = exact_sequence::rank_bounds(
        (domain.image_lower(), codomain.image_lower()),
        (domain.image_upper, codomain.image_upper),
    );
    let mut points: Vec<Point> = domain.points.iter().map(|p| model.to_input(p)).collect();
    points.extend(
        codomain
            .points
            .iter()
            .map(|q| model.to_input(&isogeny.dual_image(q))),
    );
    Ok(IsogenyDescent {
        kernel_point: t.clone(),
        model,
        isogeny,
        domain,
        codomain,
        rank_lower,
        rank_upper,
        points,
    })
}

/// Mordell–Weil information for a curve with a rational point of order 2.
///
/// Runs [`descend_isogeny`] for every rational 2-torsion point and keeps
/// the sharpest bounds (the largest lower bound, the smallest upper bound)
/// and the points of an isogeny attaining the lower bound.
///
/// # Errors
/// [`Error::NoTwoTorsion`] when the curve has no rational point of order 2;
/// budget errors ([`Error::FactorBudgetExhausted`],
/// [`Error::BudgetExhausted`]) when a budget in `options` runs out.
pub fn descend(curve: &Curve, options: &DescentOptions) -> Result<DescentReport> {
    let started = Instant::now();
    let ctx = DescentContext::new(options, started);
    let mut root_budget = ctx.budget(options.factor_units);
    let ts = two_torsion_points_with_budget(curve, &mut root_budget)?;
    if ts.is_empty() {
        return Err(Error::NoTwoTorsion);
    }
    let torsion = torsion(curve);
    // Primes shared by the numbers factored below (the discriminant, b and
    // a² − 4b of each reduced model): each is factored at most once, and
    // only where factoring would have been free is a number's list read
    // off the primes already found (`KnownPrimes`), so every budget
    // behaves as if each number were factored on its own.
    let mut known = KnownPrimes::default();
    let first_model = ts
        .first()
        .and_then(|t| first_model_and_primes(curve, t, &ctx, &mut known));
    let mut completion = Completion::Complete;
    let local_data = local_data_or_cut(curve, &ctx, &mut known, &mut completion)?;
    let run = IsogenyRun {
        curve,
        ts: &ts,
        torsion: &torsion,
        first_model: first_model.as_ref(),
        options,
        started,
    };
    let (isogenies, first_error) = run.each_isogeny(&ctx, &mut known, &mut completion)?;
    if isogenies.is_empty() {
        let upper = run.divisor_bound_after(first_error, &mut known, &mut completion)?;
        let mut report =
            DescentReport::new(curve.clone(), torsion, local_data, Vec::new(), completion);
        report.bounds = RankBounds { lower: 0, upper };
        report.descent_bounds = report.bounds;
        global::complete(&mut report, options, ctx.deadline);
        return Ok(report);
    }
    // A step inside an isogeny's descent that a budget cut short (a search
    // that gave up, a class of the 4-covering route not run) also makes
    // the report partial: its classes lost evidence.
    if completion.is_complete() {
        if let Some(cut) = first_cut_inside(&isogenies) {
            completion = cut;
        }
    }
    let mut report = DescentReport::new(curve.clone(), torsion, local_data, isogenies, completion);
    global::complete(&mut report, options, ctx.deadline);
    Ok(report)
}

/// Tate's algorithm on the input model. It reads the clock: on a huge
/// model it may be cut, and the descent still runs (the report is then
/// partial, without local data).
fn local_data_or_cut(
    curve: &Curve,
    ctx: &DescentContext<'_>,
    known: &mut KnownPrimes,
    completion: &mut Completion,
) -> Result<Option<GlobalLocalData>> {
    let disc = curve.discriminant();
    let mut budget = ctx.factor_budget(disc.numer().bits() + disc.denom().bits());
    match global_local_data_with(curve.coefficients(), &mut budget, known) {
        Ok(l) => Ok(Some(l)),
        Err(e) if is_budget_error(&e) => {
            *completion = Completion::Partial {
                step: "local data (Tate's algorithm)".into(),
                reason: e.to_string(),
            };
            Ok(None)
        }
        Err(e) => Err(e),
    }
}

/// The descents via each rational 2-torsion point of one curve.
struct IsogenyRun<'a> {
    curve: &'a Curve,
    /// The rational points of order 2.
    ts: &'a [Point],
    torsion: &'a TorsionGroup,
    /// The reduced model of the first point, found while factoring.
    first_model: Option<&'a TwoTorsionModel>,
    options: &'a DescentOptions,
    started: Instant,
}

impl IsogenyRun<'_> {
    /// The context of the fallback: the first descent alone (no search, no
    /// 4-coverings), with a short grace period of its own, since the local
    /// images are cheap next to what ran out.
    fn fallback(&self) -> DescentOptions {
        self.options.clone().local_conditions_only()
    }

    /// The descent via every 2-torsion point; one whose budget runs out
    /// falls back to the first descent alone and marks the report partial.
    /// Returns the descents that ran and the first error of a fallback.
    fn each_isogeny(
        &self,
        ctx: &DescentContext<'_>,
        known: &mut KnownPrimes,
        completion: &mut Completion,
    ) -> Result<(Vec<IsogenyDescent>, Option<Error>)> {
        let mut isogenies = Vec::with_capacity(self.ts.len());
        let mut first_error = None;
        for (i, t) in self.ts.iter().enumerate() {
            let cached = if i == 0 { self.first_model } else { None };
            match descend_isogeny_with_torsion(self.curve, t, self.torsion, ctx, cached, known) {
                Ok(d) => isogenies.push(d),
                Err(e) if is_budget_error(&e) => {
                    let fallback = self.fallback();
                    let grace = fallback_deadline(self.options, self.started);
                    if completion.is_complete() {
                        *completion = Completion::Partial {
                            step: format!("isogeny {}", i + 1),
                            reason: e.to_string(),
                        };
                    }
                    let fallback_ctx =
                        DescentContext::new(&fallback, self.started).with_deadline(grace);
                    match descend_isogeny_with_torsion(
                        self.curve,
                        t,
                        self.torsion,
                        &fallback_ctx,
                        cached,
                        known,
                    ) {
                        Ok(d) => isogenies.push(d),
                        Err(e2) => {
                            first_error.get_or_insert(e2);
                        }
                    }
                }
                Err(e) => return Err(e),
            }
        }
        Ok((isogenies, first_error))
    }

    /// Every first descent stopped (local tests on very many primes, say).
    /// If the primes of b and a² − 4b are known, the classes' supports
    /// still bound the rank (`divisor_rank_bound`): the smallest such
    /// bound over the isogenies, with the report marked partial.
    fn divisor_bound_after(
        &self,
        first_error: Option<Error>,
        known: &mut KnownPrimes,
        completion: &mut Completion,
    ) -> Result<usize> {
        let e = first_error.unwrap_or(Error::BudgetExhausted {
            stage: "every isogeny of the descent".to_string(),
        });
        if !matches!(e, Error::BudgetExhausted { .. }) {
            return Err(e);
        }
        let fallback = self.fallback();
        let grace = fallback_deadline(self.options, self.started);
        let fallback_ctx = DescentContext::new(&fallback, self.started).with_deadline(grace);
        let mut upper = usize::MAX;
        for (i, t) in self.ts.iter().enumerate() {
            let cached = if i == 0 { self.first_model } else { None };
            let model = match cached {
                Some(m) => m.clone(),
                None => match reduced_model_for(self.curve, t, &fallback_ctx) {
                    Ok(m) => m,
                    Err(_) => continue,
                },
            };
            if let Ok(u) = divisor_rank_bound(&model, &fallback_ctx, known) {
                upper = upper.min(u);
            }
        }
        if upper == usize::MAX {
            return Err(e);
        }
        if completion.is_complete() {
            *completion = Completion::Partial {
                step: "isogeny 1".into(),
                reason: e.to_string(),
            };
        }
        Ok(upper)
    }
}

/// The first step inside an isogeny's descent that a budget cut short, as
/// a partial completion.
fn first_cut_inside(isogenies: &[IsogenyDescent]) -> Option<Completion> {
    for (i, d) in isogenies.iter().enumerate() {
        for side in [&d.domain, &d.codomain] {
            if let Some((step, reason)) = side.cut_short() {
                return Some(Completion::Partial {
                    step: format!("isogeny {}: {step}", i + 1),
                    reason,
                });
            }
        }
    }
    None
}

/// The rank bound from the supports of the classes alone, for the
/// isogeny of the reduced model y² = x³ + a x² + b x: α(E(Q)) lies in the
/// group generated by −1 and the primes of b, of dimension 1 + ω(b), and
/// α'(E'(Q)) in that of −1 and the primes of a² − 4b; with
/// 2^r = |α(E(Q))|·|α'(E'(Q))|/4 ([SilvermanTate92, III.6]) this gives
/// r ≤ ω(b) + ω(a² − 4b). Used when every first descent stopped; needs
/// only the two factorisations (read off `known` when free).
pub(crate) fn divisor_rank_bound(
    model: &TwoTorsionModel,
    ctx: &DescentContext<'_>,
    known: &mut KnownPrimes,
) -> Result<usize> {
    let b = model.b();
    let a = model.a();
    let disc: BigInt = a * a - b * 4;
    let mut pb = Vec::new();
    primes_of(b, ctx, known, &mut pb)?;
    let mut pd = Vec::new();
    primes_of(&disc, ctx, known, &mut pd)?;
    pb.sort();
    pb.dedup();
    pd.sort();
    pd.dedup();
    Ok(pb.len() + pd.len())
}

/// True for the errors that mean "a budget or the clock ran out", after
/// which a cheaper run can still prove something.
fn is_budget_error(e: &Error) -> bool {
    matches!(
        e,
        Error::BudgetExhausted { .. } | Error::FactorBudgetExhausted { .. }
    )
}

/// The deadline of the first-descent fallback: nine tenths of the grace
/// period max(limit/4, 1 s) after the limit itself (the last tenth is kept
/// for what follows: the bound from the classes' supports, the report),
/// or none without a limit.
fn fallback_deadline(options: &DescentOptions, started: Instant) -> Option<Instant> {
    options.time_limit.and_then(|d| {
        let grace = (d / 4).max(std::time::Duration::from_secs(1)) * 9 / 10;
        started.checked_add(d.saturating_add(grace))
    })
}
