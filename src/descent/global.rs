//! After the descent: the analytic side, generators, and the
//! Birch–Swinnerton-Dyer ledger.
//!
//! 1. [`crate::analytic::analyse`] gives the root number and certified
//!    L-values. When a theorem settles the rank — w = +1 and L(E,1) ≠ 0
//!    (rank 0), or w = −1 and L'(E,1) ≠ 0 (rank 1): Gross–Zagier (1986)
//!    and Kolyvagin (1990) with modularity, or Coates–Wiles (1977) for CM —
//!    the bounds become that rank. If the theorem's rank lies outside the
//!    descent's proven bounds, one of the two computations is wrong: the
//!    report carries the conflict, the descent's bounds stay, and nothing
//!    is settled.
//! 2. When the rank is proven 1 by the analytic side and no point is
//!    known, a Heegner point ([`crate::heegner`]) where the curve is in a
//!    family the layer covers; checked exactly, it becomes the point.
//!    When the rank is decided but fewer independent points are known,
//!    the deep search ([`super::deep_search`]) looks for the missing ones
//!    on 4-coverings at larger heights, under its own budget; while the
//!    bounds are open it aims at the rank the root number's parity gives
//!    (a target only: the bounds move with the points it proves).
//!    When the rank is decided and as many independent points are known,
//!    [`crate::height::saturate`] turns them into generators of
//!    E(Q)/E(Q)_tors, with heights, the regulator and the index
//!    certificate; "generate" is claimed only when saturation proved it.
//! 3. The ledger: Sha_an = L^(r)(E,1)/r! · |E(Q)_tors|² / (Ω · Reg · ∏ c_p)
//!    for r = 0, and for r ≥ 1 when the generators are proven; never
//!    filled with a guess. Its 2-part is compared with dim Ш(E)\[2\] =
//!    dim Sel²(E) − dim E(Q)\[2\] − r, which the descent proves once r is
//!    known: for finite Ш, #Ш is a square and 2^dim Ш(E)\[2\] divides it.

use num_bigint::BigInt;

use super::deep_search::DeepSearchOptions;
use super::options::DescentOptions;
use super::report::{Completion, DescentReport, RankBounds};
use crate::analytic::{self, AnalyticData, RankTheorem, ShaLedger};
use crate::error::Error;
use crate::heegner::{heegner_point, HeegnerOutcome, HeegnerPoint};
use crate::height::{saturate, saturate_with_context, HeightContext, Saturation};

/// How the points of a report were obtained. Every point is checked on
/// the curve in exact arithmetic whatever its origin.
#[derive(Clone, Debug, Default, PartialEq)]
#[non_exhaustive]
#[allow(clippy::large_enum_variant)]
pub enum PointOrigin {
    /// The sieved search on the homogeneous spaces of the 2-isogeny
    /// descent or on their 4-coverings (which ones: the search records of
    /// [`super::DescentReport::isogenies`]).
    #[default]
    Search,
    /// The deep search on 4-coverings at larger heights, guided by the
    /// proven rank.
    DeepSearch,
    /// A Heegner point ([`crate::heegner`]): the trace was recognised and
    /// checked on the curve exactly, and the division by its index checked
    /// by exact multiplication.
    Heegner(HeegnerPoint),
}

impl PointOrigin {
    /// The JSON word: "search", "deep_search" or "heegner".
    pub(crate) fn word(&self) -> &'static str {
        match self {
            PointOrigin::Search => "search",
            PointOrigin::DeepSearch => "deep_search",
            PointOrigin::Heegner(_) => "heegner",
        }
    }
}

/// What settled the rank.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum RankProof {
    /// The descent's bounds meet.
    Descent,
    /// An analytic theorem (the descent's bounds did not meet, or agree).
    Analytic(RankTheorem),
}

impl RankProof {
    /// The JSON word: "descent" or "analytic".
    pub(crate) fn word(&self) -> &'static str {
        match self {
            RankProof::Descent => "descent",
            RankProof::Analytic(_) => "analytic",
        }
    }
}

/// The ledger's comparison with the 2-part of Sha proven by the descent.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct ShaTwoPart {
    /// dim Ш(E)\[2\] = dim Sel²(E) − dim E(Q)\[2\] − rank (proven).
    pub descent_dimension: usize,
    /// v_2 of the nearest square to Sha_an, when Sha_an is within its
    /// error of a positive integer square.
    pub analytic_valuation: Option<u32>,
    /// True when 2^descent_dimension divides the square (consistent), or
    /// when there is no square to compare.
    pub consistent: bool,
}

/// Everything after the descent (fields of the report).
#[derive(Clone, Debug, Default, PartialEq)]
pub(crate) struct GlobalFacts {
    pub(crate) analytic: Option<AnalyticData>,
    pub(crate) saturation: Option<Saturation>,
    pub(crate) ledger: Option<ShaLedger>,
    pub(crate) sha_two_part: Option<ShaTwoPart>,
    pub(crate) settled_by: Option<RankProof>,
    pub(crate) conflict: Option<String>,
    /// Where the points came from.
    pub(crate) origin: PointOrigin,
    /// What the Heegner step found, when it ran.
    pub(crate) heegner: Option<HeegnerOutcome>,
    /// ĥ of the descent's points when saturation did not run.
    pub(crate) point_heights: Vec<crate::arith::Certified>,
}

fn note_stop(report: &mut DescentReport, step: &str, e: &Error) {
    if report.completion.is_complete() {
        report.completion = Completion::Partial {
            step: step.to_string(),
            reason: e.to_string(),
        };
    }
}

/// Runs steps 1–3 of the module docs on a finished descent report.
pub(crate) fn complete(
    report: &mut DescentReport,
    options: &DescentOptions,
    deadline: Option<std::time::Instant>,
) {
    if report.bounds.is_decided() {
        report.global.settled_by = Some(RankProof::Descent);
    }
    if let (Some(aopts), Some(local)) = (&options.analytic, &report.local_data) {
        let mut budget = options.budget(options.global_units, deadline);
        match analytic::analyse(&report.curve, local, aopts, &mut budget) {
            Ok(a) => analytic_step(report, a),
            Err(e) => note_stop(report, "analytic side", &e),
        }
    }
    // The Heegner point first: where it applies it is far cheaper than the
    // deep search, which then has nothing left to find.
    if let Some(hopts) = &options.heegner {
        heegner_step(report, hopts, options, deadline);
    }
    if let Some(dopts) = &options.deep_search {
        deep_search_step(report, dopts, options, deadline);
    }
    heights_step(report, options, deadline);
    ledger(report);
}

/// Step 1: the analytic side's rank, when proven by a theorem, settles
/// the rank inside the descent's bounds, or is a conflict outside them.
fn analytic_step(report: &mut DescentReport, a: AnalyticData) {
    if let Some((r, theorem)) = a.rank_proven() {
        let b = report.bounds;
        if r < b.lower || r > b.upper {
            report.global.conflict = Some(format!(
                "{} gives rank {r}, outside the descent's proven bounds [{}, {}]",
                theorem.name(),
                b.lower,
                b.upper
            ));
        } else if !b.is_decided() {
            report.bounds = RankBounds { lower: r, upper: r };
            report.global.settled_by = Some(RankProof::Analytic(theorem));
        }
    }
    report.global.analytic = Some(a);
}

/// Step 2c: the deep search for the points still missing below the rank
/// (the decided rank, or the parity's prediction), guided by the
/// predicted generator heights when the analytic side gives them.
fn deep_search_step(
    report: &mut DescentReport,
    dopts: &DeepSearchOptions,
    options: &DescentOptions,
    deadline: Option<std::time::Instant>,
) {
    let target = if report.bounds.is_decided() {
        Some(report.bounds.lower)
    } else {
        parity_target(report)
    };
    let Some(rank) = target.filter(|&r| report.points.len() < r) else {
        return;
    };
    let mut budget = options.budget(options.global_units, deadline);
    let guided = match predicted_generator_height(report) {
        Some((h, sha2)) if rank == 1 => dopts.guided(h, sha2),
        _ => match predicted_last_generator_height(report, rank) {
            Some((h, sha2)) => dopts.guided_rank_two(h, sha2),
            None => dopts.clone(),
        },
    };
    match super::deep_search::complete_report_points_cut(report, rank, &guided, &mut budget) {
        Ok((points, cut)) => {
            if cut {
                let e = Error::BudgetExhausted {
                    stage: "deep point search".into(),
                };
                note_stop(report, "deep search for points", &e);
            }
            if points.len() > report.bounds.upper {
                // Independent points beyond a proven upper bound:
                // one of the two computations is wrong.
                report.global.conflict = Some(format!(
                    "the deep search found {} independent points, above the proven upper bound {}",
                    points.len(),
                    report.bounds.upper
                ));
            } else if points.len() > report.points.len() {
                // Independent points (certified by their classes):
                // the descent's lower bound rises with them.
                report.descent_bounds.lower = report.descent_bounds.lower.max(points.len());
                report.bounds.lower = report.bounds.lower.max(points.len());
                report.points = points;
                report.global.origin = PointOrigin::DeepSearch;
                // The points and the Selmer bounds now prove the rank
                // without the analytic theorem (which only guided the
                // search).
                if report.descent_bounds.is_decided() {
                    report.global.settled_by = Some(RankProof::Descent);
                }
            }
        }
        Err(e) => note_stop(report, "deep search for points", &e),
    }
}

/// Step 3: saturation of the points when the rank is decided and they are
/// as many as the rank; otherwise the canonical heights of the points.
fn heights_step(
    report: &mut DescentReport,
    options: &DescentOptions,
    deadline: Option<std::time::Instant>,
) {
    let rank = report.bounds.lower;
    // One height context per curve, from the report's local data (Tate's
    // algorithm is not run again).
    let heights = match &report.local_data {
        Some(l) if !report.points.is_empty() => {
            HeightContext::from_local_data(&report.curve, l).ok()
        }
        _ => None,
    };
    if let Some(sopts) = &options.saturation {
        if report.bounds.is_decided() && rank > 0 && report.points.len() == rank {
            let mut budget = options.budget(options.global_units, deadline);
            let done = match &heights {
                Some(ctx) => saturate_with_context(ctx, &report.points, sopts, &mut budget),
                None => saturate(&report.curve, &report.points, sopts, &mut budget),
            };
            match done {
                Ok(s) => report.global.saturation = Some(s),
                Err(e) => note_stop(report, "saturation", &e),
            }
        }
    }
    if report.global.saturation.is_none() && !report.points.is_empty() {
        let mut budget = options.budget(options.global_units, deadline);
        let ctx = match heights {
            Some(c) => Some(c),
            None => HeightContext::new(&report.curve, &mut budget).ok(),
        };
        if let Some(ctx) = ctx {
            report.global.point_heights = report
                .points
                .iter()
                .map_while(|p| ctx.height(p).ok())
                .collect();
        }
    }
}

/// Step 2b: rank proven 1 by the analytic side and no point known — a
/// Heegner point, checked exactly, becomes the report's point (saturation
/// then proves or disproves generation). A trace of finite order while
/// `L'(E,1) ≠ 0` is certified contradicts Gross–Zagier: a conflict.
fn heegner_step(
    report: &mut DescentReport,
    hopts: &crate::heegner::HeegnerOptions,
    options: &DescentOptions,
    deadline: Option<std::time::Instant>,
) {
    let proven_one = report
        .global
        .analytic
        .as_ref()
        .and_then(AnalyticData::rank_proven)
        .is_some_and(|(r, _)| r == 1);
    let wanted = proven_one
        && report.bounds.is_decided()
        && report.bounds.lower == 1
        && report.points.is_empty();
    if !wanted || report.global.conflict.is_some() {
        return;
    }
    let mut budget = options.budget(options.global_units, deadline);
    let predicted = predicted_generator_height(report).map(|(h, _)| h);
    match heegner_point(&report.curve, predicted, hopts, &mut budget) {
        Ok(HeegnerOutcome::Found(h)) => {
            // Infinite order, exactly: the point is not in the torsion
            // subgroup, which the report holds in full.
            if report.torsion.points().contains(&h.point) {
                report.global.conflict = Some(format!(
                    "the Heegner point {:?} has finite order although L'(E,1) is certified non-zero",
                    h.point
                ));
                return;
            }
            report.points = vec![h.point.clone()];
            report.descent_bounds.lower = report.descent_bounds.lower.max(1);
            if report.descent_bounds.is_decided() {
                report.global.settled_by = Some(RankProof::Descent);
            }
            report.global.origin = PointOrigin::Heegner(h.clone());
            report.global.heegner = Some(HeegnerOutcome::Found(h));
        }
        Ok(HeegnerOutcome::Torsion {
            discriminant,
            class_number,
        }) => {
            // Gross–Zagier speaks for the maximal order (the route with odd
            // D = −n, level 32, where L(E0, 1) ≠ 0); a torsion trace of the
            // conductor-4 route (D = −64n) contradicts no theorem and is
            // only recorded, nor does one at the curve's own level (there
            // L(E^D, 1) may vanish).
            let twist_route = crate::heegner::congruent_model(&report.curve, &mut budget)
                .ok()
                .flatten()
                .is_some();
            if twist_route && discriminant.rem_euclid(2) == 1 {
                report.global.conflict = Some(format!(
                    "the Heegner trace for D = {discriminant} (h = {class_number}) is torsion although L'(E,1) is certified non-zero (Gross-Zagier)"
                ));
            }
            report.global.heegner = Some(HeegnerOutcome::Torsion {
                discriminant,
                class_number,
            });
        }
        Ok(other) => report.global.heegner = Some(other),
        Err(e) => note_stop(report, "Heegner point", &e),
    }
}

/// The rank the deep search aims at while the descent's bounds are open:
/// the largest `r` in `(lower, upper]` with `(−1)^r` equal to the
/// certified root number `w`, and not above the analytic order of
/// vanishing when one is known. By the parity conjecture (which follows
/// from the finiteness of Ш) this is the rank when `upper − lower ≤ 2`;
/// it is only a target for the search, never a claim: the bounds move
/// only when the points are found, and each found point is proven
/// independent by its Selmer class. `None` without a root number (the
/// search would have no reason to expect the points).
fn parity_target(report: &DescentReport) -> Option<usize> {
    let b = report.bounds;
    let a = report.global.analytic.as_ref()?;
    if report.global.conflict.is_some() {
        return None;
    }
    let w = a.root_number()?;
    let cap = a
        .analytic_order()
        .map_or(b.upper, |o| o.order().min(b.upper));
    (b.lower + 1..=cap)
        .rev()
        .find(|r| (if r % 2 == 0 { 1 } else { -1 }) == w)
}

/// For rank one: the canonical height of a generator predicted by the
/// Birch–Swinnerton-Dyer formula with `#Ш = 1`,
/// `L'(E,1)·|T|²/(Ω·∏c_p)`, and `dim Ш(E)[2]` as the descent proves it
/// (so `#Ш ≥ 2^dim`). A conjecture, used only to size the deep search.
fn predicted_generator_height(report: &DescentReport) -> Option<(f64, usize)> {
    if report.bounds.lower != 1 || !report.bounds.is_decided() {
        return None;
    }
    let a = report.global.analytic.as_ref()?;
    let l = a.l_value(1)?.value();
    let omega = a.real_period()?.value();
    let cp: f64 = report
        .local_data
        .as_ref()?
        .primes
        .iter()
        .map(|p| p.tamagawa as f64)
        .product();
    let t = f64::from(report.torsion.order());
    let h = l * t * t / (omega * cp);
    if !(h.is_finite() && h > 0.0) {
        return None;
    }
    let (_, n2) = report.torsion.structure();
    let t2 = if n2 <= 1 { 1 } else { 2 };
    let sha2 = report.selmer2_rank.map_or(0, |s| s.saturating_sub(t2 + 1));
    Some((h, sha2))
}

/// For rank `r ≥ 2` with `r − 1` independent points known: the height of
/// the missing generator that the Birch–Swinnerton-Dyer formula predicts
/// with `#Ш = 1`, `L^(r)(E,1)/r!·|T|²/(Ω·∏c_p)` divided by the regulator
/// of the known points, and `dim Ш(E)[2]` if the rank is `r` (from the
/// 2-Selmer rank). A conjecture, used only to size the deep search.
fn predicted_last_generator_height(report: &DescentReport, r: usize) -> Option<(f64, usize)> {
    if r < 2 || report.points.len() + 1 != r {
        return None;
    }
    let a = report.global.analytic.as_ref()?;
    let l = a.l_value(r)?.value();
    let omega = a.real_period()?.value();
    let cp: f64 = report
        .local_data
        .as_ref()?
        .primes
        .iter()
        .map(|p| p.tamagawa as f64)
        .product();
    let t = f64::from(report.torsion.order());
    let factorial: f64 = (1..=r).map(|k| k as f64).product();
    let reg = l / factorial * t * t / (omega * cp);
    let known = crate::height::regulator(&report.curve, &report.points).ok()?;
    let h = reg / known.value();
    if !(h.is_finite() && h > 0.0 && known.lower() > 0.0) {
        return None;
    }
    let (_, n2) = report.torsion.structure();
    let t2 = if n2 <= 1 { 1 } else { 2 };
    let sha2 = report.selmer2_rank.map_or(0, |s| s.saturating_sub(t2 + r));
    Some((h, sha2))
}

fn ledger(report: &mut DescentReport) {
    let Some(a) = &report.global.analytic else {
        return;
    };
    if !report.bounds.is_decided() || report.global.conflict.is_some() {
        return;
    }
    let rank = report.bounds.lower;
    let regulator = if rank == 0 {
        None
    } else {
        match &report.global.saturation {
            Some(s) if s.proven_saturated && s.generators.len() == rank => {
                match crate::arith::Certified::new(s.regulator.value(), s.regulator.error()) {
                    Ok(c) => Some(c),
                    Err(_) => return,
                }
            }
            _ => return,
        }
    };
    let Some(local) = &report.local_data else {
        return;
    };
    let tamagawa: BigInt = local
        .primes
        .iter()
        .map(|p| BigInt::from(p.tamagawa))
        .product();
    let Some(l) = analytic::sha_analytic(a, rank, report.torsion.order(), &tamagawa, regulator)
    else {
        return;
    };
    if let Some(s2) = report.selmer2_rank {
        let (_, n2) = report.torsion.structure();
        let t2 = if n2 <= 1 { 1 } else { 2 };
        let dim = s2.saturating_sub(t2 + rank);
        let val = l
            .nearest_square
            .filter(|&s| l.is_square_within_error && s > 0)
            .map(|s| s.trailing_zeros());
        report.global.sha_two_part = Some(ShaTwoPart {
            descent_dimension: dim,
            analytic_valuation: val,
            consistent: val.map_or(true, |v| v as usize >= dim),
        });
        if let Some(v) = val {
            if (v as usize) < dim {
                report.global.conflict = Some(format!(
                    "the descent proves dim Ш(E)[2] = {dim}, but the analytic order of Sha has 2-adic valuation {v}"
                ));
            }
        }
    }
    report.global.ledger = Some(l);
}
