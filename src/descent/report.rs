//! The typed report of a descent, read through accessors. Its text and JSON
//! forms live in [`crate::output`].

use super::global::{GlobalFacts, PointOrigin, RankProof, ShaTwoPart};
use super::IsogenyDescent;
use crate::analytic::{AnalyticData, ShaLedger};
use crate::curve::tate::GlobalLocalData;
use crate::curve::{Curve, Point, TorsionGroup};
use crate::height::Saturation;

/// Whether every step of the descent ran to its end.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum Completion {
    /// Every step ran; the bounds are the best these options give.
    Complete,
    /// A budget or the wall-clock limit stopped a step. Everything in the
    /// report is still proven; the bounds are those of the steps that ran.
    Partial {
        /// The step that stopped (for example "isogeny 2: local solubility").
        step: String,
        /// Why it stopped (the budget error's message).
        reason: String,
    },
}

impl Completion {
    /// True for [`Completion::Complete`].
    pub fn is_complete(&self) -> bool {
        matches!(self, Completion::Complete)
    }
}

/// Proven bounds `lower ≤ rank E(Q) ≤ upper` (the fields are private so
/// that `lower ≤ upper` always holds; read them with
/// [`RankBounds::lower`] and [`RankBounds::upper`]).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct RankBounds {
    /// Proven lower bound.
    pub(crate) lower: usize,
    /// Proven upper bound.
    pub(crate) upper: usize,
}

impl RankBounds {
    /// The bounds `lower ≤ rank ≤ upper`.
    ///
    /// # Errors
    /// [`Error::InvalidArgument`](crate::Error::InvalidArgument) when
    /// `lower > upper`.
    pub fn new(lower: usize, upper: usize) -> crate::Result<RankBounds> {
        if lower > upper {
            return Err(crate::Error::InvalidArgument {
                reason: format!("rank bounds need lower ≤ upper, got [{lower}, {upper}]"),
            });
        }
        Ok(RankBounds { lower, upper })
    }

    /// The proven lower bound.
    pub fn lower(&self) -> usize {
        self.lower
    }

    /// The proven upper bound.
    pub fn upper(&self) -> usize {
        self.upper
    }

    /// True when the bounds meet.
    pub fn is_decided(&self) -> bool {
        self.lower == self.upper
    }
}

/// Everything a descent found about one curve.
///
/// Invariants: `rank_lower() ≤ rank_upper()`; `points()` holds
/// `descent_bounds().lower()` points of the input curve, independent modulo
/// torsion (fewer than `rank_lower()` when an analytic theorem raised the
/// lower bound and the search has not found the points);
/// `isogenies()` holds one descent per rational 2-torsion point that ran
/// (all of them when [`DescentReport::completion`] is complete).
#[derive(Clone, Debug, PartialEq)]
#[non_exhaustive]
pub struct DescentReport {
    pub(crate) curve: Curve,
    pub(crate) torsion: TorsionGroup,
    pub(crate) local_data: Option<GlobalLocalData>,
    pub(crate) isogenies: Vec<IsogenyDescent>,
    pub(crate) deciding: Option<usize>,
    pub(crate) bounds: RankBounds,
    pub(crate) points: Vec<Point>,
    pub(crate) completion: Completion,
    pub(crate) selmer2_rank: Option<usize>,
    pub(crate) descent_bounds: RankBounds,
    pub(crate) global: GlobalFacts,
}

impl DescentReport {
    /// Combines the descents for the rational 2-torsion points: the largest
    /// lower bound and the smallest upper bound (each is proven), and the
    /// points of an isogeny attaining the lower bound.
    pub(crate) fn new(
        curve: Curve,
        torsion: TorsionGroup,
        local_data: Option<GlobalLocalData>,
        isogenies: Vec<IsogenyDescent>,
        completion: Completion,
    ) -> Self {
        let best = isogenies
            .iter()
            .enumerate()
            .max_by_key(|(i, d)| (d.rank_lower, std::cmp::Reverse(*i)))
            .map(|(i, _)| i);
        let lower = isogenies.iter().map(|d| d.rank_lower).max().unwrap_or(0);
        let upper = isogenies
            .iter()
            .map(|d| {
                d.rank_upper
                    .min(d.selmer_rank_bound().unwrap_or(usize::MAX))
            })
            .min()
            .unwrap_or(usize::MAX)
            .max(lower);
        // The isogeny that decides the rank: the first whose own bounds
        // are the final ones; else the first giving the upper bound.
        let deciding = isogenies
            .iter()
            .position(|d| d.rank_lower == lower && d.rank_upper == upper)
            .or_else(|| isogenies.iter().position(|d| d.rank_upper == upper))
            .or_else(|| {
                isogenies
                    .iter()
                    .position(|d| d.selmer_rank_bound() == Some(upper))
            });
        let points = best
            .and_then(|i| isogenies.get(i))
            .map(|d| d.points.clone())
            .unwrap_or_default();
        let selmer2_rank = super::selmer2_rank(&isogenies);
        DescentReport {
            selmer2_rank,
            descent_bounds: RankBounds { lower, upper },
            global: GlobalFacts::default(),
            curve,
            torsion,
            local_data,
            isogenies,
            deciding,
            bounds: RankBounds { lower, upper },
            points,
            completion,
        }
    }

    /// The curve as given.
    pub fn curve(&self) -> &Curve {
        &self.curve
    }

    /// The torsion subgroup of E(Q), with generators.
    pub fn torsion(&self) -> &TorsionGroup {
        &self.torsion
    }

    /// Global minimal model, conductor and Tate's algorithm at every bad
    /// prime; `None` when a budget or the clock stopped Tate's algorithm
    /// (the report is then partial).
    pub fn tate_data(&self) -> Option<&GlobalLocalData> {
        self.local_data.as_ref()
    }

    /// One descent per rational 2-torsion point (in the order of
    /// [`crate::curve::two_torsion_points`]).
    pub fn isogenies(&self) -> &[IsogenyDescent] {
        &self.isogenies
    }

    /// The index in [`DescentReport::isogenies`] of the isogeny whose bounds
    /// are the final ones (or that gives the upper bound).
    pub(crate) fn deciding_isogeny(&self) -> Option<usize> {
        self.deciding
    }

    /// The proven rank bounds.
    pub fn rank_bounds(&self) -> RankBounds {
        self.bounds
    }

    /// The bounds the descent alone proves (equal to
    /// [`DescentReport::rank_bounds`] unless an analytic theorem settled
    /// the rank).
    pub fn descent_bounds(&self) -> RankBounds {
        self.descent_bounds
    }

    /// What settled the rank, if it is settled.
    pub fn rank_settled_by(&self) -> Option<RankProof> {
        self.global.settled_by
    }

    /// The analytic data (root number, period, certified L-values), when
    /// the analytic side ran.
    pub fn analytic(&self) -> Option<&AnalyticData> {
        self.global.analytic.as_ref()
    }

    /// Generators of E(Q)/E(Q)_tors with heights, the regulator and the
    /// index certificate, when saturation ran (it runs when the rank is
    /// decided and as many independent points are known). They generate
    /// exactly when `proven_saturated` is true.
    pub fn saturation(&self) -> Option<&Saturation> {
        self.global.saturation.as_ref()
    }

    /// True when the returned points are proven to generate E(Q) modulo
    /// torsion.
    pub(crate) fn points_generate(&self) -> bool {
        self.global
            .saturation
            .as_ref()
            .is_some_and(|s| s.proven_saturated && s.generators.len() == self.bounds.lower)
            || (self.bounds.upper == 0 && self.global.conflict.is_none())
    }

    /// A generator set of E(Q) modulo torsion with its certificate, when
    /// one is proven: saturation proved that [`DescentReport::points`]
    /// generate, or the rank is proven 0 and no conflict was found. `None`
    /// when the points are only known to be independent.
    pub fn generators(&self) -> Option<Generators> {
        if !self.points_generate() {
            return None;
        }
        Some(Generators {
            points: self.points().to_vec(),
            heights: self.point_heights().to_vec(),
            regulator: self.regulator(),
            certificate: self.global.saturation.clone(),
        })
    }

    /// The points a caller should use: the saturated, LLL-reduced basis
    /// when saturation ran, else the descent's independent points. They
    /// are independent modulo torsion; they generate E(Q) modulo torsion
    /// only when [`DescentReport::generators`] is `Some`.
    pub fn points(&self) -> &[Point] {
        match &self.global.saturation {
            Some(s) => &s.generators,
            None => &self.points,
        }
    }

    /// ĥ of each of [`DescentReport::points`], in the same order,
    /// certified (normalisation of [`crate::height`]); empty when a height
    /// could not be computed.
    pub(crate) fn point_heights(&self) -> &[crate::arith::Certified] {
        match &self.global.saturation {
            Some(s) => &s.heights,
            None => &self.global.point_heights,
        }
    }

    /// The regulator of the returned points, when saturation ran (1 for
    /// rank 0 is not reported here).
    pub(crate) fn regulator(&self) -> Option<crate::arith::Certified> {
        self.global.saturation.as_ref().map(|s| s.regulator)
    }

    /// The Birch–Swinnerton-Dyer ledger (the analytic order of Sha), when
    /// every ingredient is proven.
    pub fn sha_ledger(&self) -> Option<&ShaLedger> {
        self.global.ledger.as_ref()
    }

    /// How [`DescentReport::points`] were obtained (search, deep search or
    /// a Heegner point with its discriminant and class number).
    pub fn points_origin(&self) -> &PointOrigin {
        &self.global.origin
    }

    /// What the Heegner step found, when it ran (also when it found no
    /// point: the outcome says why).
    pub fn heegner(&self) -> Option<&crate::heegner::HeegnerOutcome> {
        self.global.heegner.as_ref()
    }

    /// The ledger's comparison with the 2-part of Sha the descent proves.
    pub(crate) fn sha_two_part(&self) -> Option<ShaTwoPart> {
        self.global.sha_two_part
    }

    /// A disagreement between the descent and the analytic side — a bug in
    /// one of them, reported loudly and never resolved silently.
    pub fn conflict(&self) -> Option<&str> {
        self.global.conflict.as_deref()
    }

    /// Proven lower bound for the rank of E(Q).
    pub(crate) fn rank_lower(&self) -> usize {
        self.bounds.lower
    }

    /// Proven upper bound for the rank of E(Q).
    pub(crate) fn rank_upper(&self) -> usize {
        self.bounds.upper
    }

    /// Points of infinite order on the input model as the descent found
    /// them, independent modulo torsion (before saturation and LLL
    /// reduction; [`DescentReport::points`] gives the points to use).
    pub fn descent_points(&self) -> &[Point] {
        &self.points
    }

    /// dim_F2 Sel²(E/Q), torsion included (so at least dim E(Q)\[2\]), from
    /// the exact sequence of the 2-isogeny descent and the lifting pairing;
    /// `None` when a budget stopped the pairing.
    pub fn selmer2_rank(&self) -> Option<usize> {
        self.selmer2_rank
    }

    /// Whether every step ran, or which one stopped.
    pub fn completion(&self) -> &Completion {
        &self.completion
    }
}

/// Points proven to generate E(Q) modulo torsion, with the certificate
/// that proves it ([`DescentReport::generators`]).
#[derive(Clone, Debug, PartialEq)]
pub struct Generators {
    points: Vec<Point>,
    heights: Vec<crate::height::Certified>,
    regulator: Option<crate::height::Certified>,
    certificate: Option<Saturation>,
}

impl Generators {
    /// The generators, on the input model (empty when the rank is 0).
    pub fn points(&self) -> &[Point] {
        &self.points
    }

    /// Their canonical heights, in the same order (empty when not
    /// computed).
    pub fn heights(&self) -> &[crate::height::Certified] {
        &self.heights
    }

    /// The regulator of the generators (`None` for rank 0, where it is 1
    /// by convention, or when saturation did not run).
    pub fn regulator(&self) -> Option<crate::height::Certified> {
        self.regulator
    }

    /// The saturation that proved they generate: the index bound and the
    /// primes p for which p-saturation was proven. `None` when the rank
    /// is proven 0 and the empty set generates.
    pub fn certificate(&self) -> Option<&Saturation> {
        self.certificate.as_ref()
    }
}
