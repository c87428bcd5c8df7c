//! The typed report of a descent, read through accessors. Its text and JSON
//! forms live in [`crate::output`].

use super::IsogenyDescent;
use crate::curve::tate::GlobalLocalData;
use crate::curve::{Curve, Point, TorsionGroup};

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

/// Proven bounds `lower ≤ rank E(Q) ≤ upper`.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct RankBounds {
    /// Proven lower bound.
    pub lower: usize,
    /// Proven upper bound.
    pub upper: usize,
}

impl RankBounds {
    /// True when the bounds meet.
    pub fn is_decided(&self) -> bool {
        self.lower == self.upper
    }
}

/// Everything a descent found about one curve.
///
/// Invariants: `rank_lower() ≤ rank_upper()`; `points()` holds
/// `rank_lower()` points of the input curve, independent modulo torsion;
/// `isogenies()` holds one descent per rational 2-torsion point that ran
/// (all of them when [`DescentReport::completion`] is complete).
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct DescentReport {
    pub(crate) curve: Curve,
    pub(crate) torsion: TorsionGroup,
    pub(crate) local_data: GlobalLocalData,
    pub(crate) isogenies: Vec<IsogenyDescent>,
    pub(crate) deciding: Option<usize>,
    pub(crate) bounds: RankBounds,
    pub(crate) points: Vec<Point>,
    pub(crate) completion: Completion,
    pub(crate) selmer2_rank: Option<usize>,
}

impl DescentReport {
    /// Combines the descents for the rational 2-torsion points: the largest
    /// lower bound and the smallest upper bound (each is proven), and the
    /// points of an isogeny attaining the lower bound.
    pub(crate) fn new(
        curve: Curve,
        torsion: TorsionGroup,
        local_data: GlobalLocalData,
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
            .map(|d| d.rank_upper)
            .min()
            .unwrap_or(usize::MAX)
            .max(lower);
        // The isogeny that decides the rank: the first whose own bounds
        // are the final ones; else the first giving the upper bound.
        let deciding = isogenies
            .iter()
            .position(|d| d.rank_lower == lower && d.rank_upper == upper)
            .or_else(|| isogenies.iter().position(|d| d.rank_upper == upper));
        let points = best
            .and_then(|i| isogenies.get(i))
            .map(|d| d.points.clone())
            .unwrap_or_default();
        let selmer2_rank = super::selmer2_rank(&isogenies);
        DescentReport {
            selmer2_rank,
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
    /// prime.
    pub fn local_data(&self) -> &GlobalLocalData {
        &self.local_data
    }

    /// One descent per rational 2-torsion point (in the order of
    /// [`crate::curve::two_torsion_points`]).
    pub fn isogenies(&self) -> &[IsogenyDescent] {
        &self.isogenies
    }

    /// The index in [`DescentReport::isogenies`] of the isogeny whose bounds
    /// are the final ones (or that gives the upper bound).
    pub fn deciding_isogeny(&self) -> Option<usize> {
        self.deciding
    }

    /// The proven rank bounds.
    pub fn rank_bounds(&self) -> RankBounds {
        self.bounds
    }

    /// Proven lower bound for the rank of E(Q).
    pub fn rank_lower(&self) -> usize {
        self.bounds.lower
    }

    /// Proven upper bound for the rank of E(Q).
    pub fn rank_upper(&self) -> usize {
        self.bounds.upper
    }

    /// Points of infinite order on the input model, independent modulo
    /// torsion (`rank_lower()` of them). They are not claimed to generate.
    pub fn points(&self) -> &[Point] {
        &self.points
    }

    /// True when the bounds meet.
    pub fn is_decided(&self) -> bool {
        self.bounds.is_decided()
    }

    /// dim_F2 Sel²(E/Q), torsion included (so at least dim E(Q)[2]), from
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
