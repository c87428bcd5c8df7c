//! Options for a descent, with defaults that decide most curves with small
//! coefficients in milliseconds.

use std::time::{Duration, Instant};

use super::deep_search::DeepSearchOptions;
use crate::analytic::AnalyticOptions;
use crate::budget::Budget;
use crate::heegner::HeegnerOptions;
use crate::height::SaturationOptions;

/// Knobs for [`crate::descent::descend`]. Every budget is counted in the
/// deterministic units of [`crate::Budget`], so the same input and the same
/// options always give the same report.
#[derive(Clone, Debug, PartialEq)]
#[non_exhaustive]
pub struct DescentOptions {
    /// Height bound H for the search on each homogeneous space: all coprime
    /// (M, e) with max(|M|, |e|) ≤ H are tried (about 1.2·H² pairs).
    pub search_height: u64,
    /// Work units for one factorisation of a number of up to 128 bits
    /// (b, a² − 4b, the discriminant, the gcd in the reduced model). A
    /// unit on a larger number costs more (multi-word arithmetic), so a
    /// number of `bits` > 128 bits gets `factor_units · (128/bits)²`
    /// units: out-of-reach factorisations of huge inputs then end in about
    /// the same time as on small ones.
    pub factor_units: u64,
    /// Work units for all local-solvability tests of one side. A class
    /// that the subgroup property of a local image already places outside
    /// it is not tested and costs nothing.
    pub local_units: u64,
    /// Work units for the point search on one homogeneous space.
    pub search_units: u64,
    /// Most cosets of (Selmer group / known images) searched per side; the
    /// rest stay undecided.
    pub max_classes_searched: usize,
    /// Most representatives searched inside one coset.
    pub representatives_per_class: usize,
    /// Run the second descent on classes the first one leaves undecided:
    /// the lifting pairing (the exact bound) and, for a few classes, the
    /// 4-coverings (points and re-checkable evidence).
    pub four_coverings: bool,
    /// Compute the lifting pairing on each Selmer group (the second
    /// descent as linear algebra): its kernel bounds the image of E(Q) and
    /// gives dim Sel²(E/Q). Default true (also under
    /// [`DescentOptions::local_conditions_only`], since Sel² is local data);
    /// off, each side costs only its local images and linear algebra.
    pub lifting_pairing: bool,
    /// Height bound for the searches on the 4-coverings of the second descent.
    pub covering_search_height: u64,
    /// Work units for the whole second descent of one side (all its classes).
    pub covering_units: u64,
    /// Optional wall-clock limit for one curve, on top of the unit budgets.
    /// A run that hits it is, by nature, not reproducible; `None` (the
    /// default) keeps every result deterministic.
    pub time_limit: Option<Duration>,
    /// The analytic side (`None`: off): root number, certified L-values,
    /// ranks settled by theorem and the Birch–Swinnerton-Dyer ledger, for
    /// curves with conductor up to the options' limit (default 10¹⁰, and
    /// 10¹³ for quadratic twists of y² = x³ − x such as the congruent-number
    /// curves and for curves with j = 0; see
    /// `AnalyticOptions::conductor_limit_for`).
    pub analytic: Option<AnalyticOptions>,
    /// Saturation of the points into generators with heights and the
    /// regulator, when the rank is decided (`None`: off).
    pub saturation: Option<SaturationOptions>,
    /// When the rank is known (for example from the analytic side) to
    /// exceed the number of independent points found, search the
    /// 4-coverings of the classes that must hold points to a larger height
    /// (`None`: off).
    pub deep_search: Option<DeepSearchOptions>,
    /// When the rank is proven 1 by the analytic side and no point is
    /// known, look for a Heegner point ([`crate::heegner`]; `None`: off).
    /// Runs inside the time limit and `global_units`.
    pub heegner: Option<HeegnerOptions>,
    /// Work units for the analytic side, the deep search, the Heegner
    /// point and saturation (each).
    pub global_units: u64,
}

impl Default for DescentOptions {
    fn default() -> Self {
        DescentOptions {
            search_height: 128,
            factor_units: 50_000_000,
            local_units: 50_000_000,
            search_units: 200_000_000,
            max_classes_searched: 64,
            representatives_per_class: 4,
            four_coverings: true,
            lifting_pairing: true,
            covering_search_height: 64,
            covering_units: 100_000_000,
            time_limit: None,
            analytic: Some(AnalyticOptions::default()),
            saturation: Some(SaturationOptions::default()),
            deep_search: Some(DeepSearchOptions::default()),
            heegner: Some(HeegnerOptions::default()),
            global_units: 2_000_000_000,
        }
    }
}

impl DescentOptions {
    /// These options with the point search, the second descent, the
    /// analytic side and saturation off: only the local conditions (the
    /// first descent) are computed. Rank bounds are then
    /// k + k' − 2 ≤ r ≤ dim Sel + dim Sel' − 2 with k, k' the
    /// torsion-image dimensions.
    pub fn local_conditions_only(mut self) -> Self {
        self.max_classes_searched = 0;
        self.four_coverings = false;
        self.analytic = None;
        self.saturation = None;
        self.deep_search = None;
        self.heegner = None;
        self
    }

    /// These options without the analytic side and without saturation:
    /// the descent alone.
    pub fn descent_only(mut self) -> Self {
        self.analytic = None;
        self.saturation = None;
        self.deep_search = None;
        self.heegner = None;
        self
    }

    /// A budget of `units` with this run's deadline (if any) attached.
    pub(crate) fn budget(&self, units: u64, deadline: Option<Instant>) -> Budget {
        let b = Budget::with_units(units);
        match deadline {
            Some(d) => b.with_deadline(d),
            None => b,
        }
    }

    /// The factoring budget for a number `n` (see [`DescentOptions::factor_units`]).
    pub(crate) fn factor_budget(&self, n_bits: u64, deadline: Option<Instant>) -> Budget {
        let units = if n_bits <= 128 {
            self.factor_units
        } else {
            let scaled =
                (self.factor_units as u128) * 128 * 128 / (n_bits as u128 * n_bits as u128);
            scaled.max(1) as u64
        };
        self.budget(units, deadline)
    }
}

/// The options of one descent and its wall-clock deadline (fixed when the
/// descent starts), travelling together through the layers of the descent.
#[derive(Clone, Copy, Debug)]
pub(crate) struct DescentContext<'a> {
    /// The caller's options.
    pub(crate) options: &'a DescentOptions,
    /// `started + time_limit`, if there is a time limit.
    pub(crate) deadline: Option<Instant>,
}

impl<'a> DescentContext<'a> {
    /// The context of a descent started at `started`.
    pub(crate) fn new(options: &'a DescentOptions, started: Instant) -> Self {
        DescentContext {
            options,
            // A limit too far away to represent (`Duration::MAX`, say) is
            // no limit at all.
            deadline: options.time_limit.and_then(|d| started.checked_add(d)),
        }
    }

    /// The same options with another deadline.
    pub(crate) fn with_deadline(self, deadline: Option<Instant>) -> Self {
        DescentContext { deadline, ..self }
    }

    /// A budget of `units` that also stops at the deadline.
    pub(crate) fn budget(&self, units: u64) -> Budget {
        self.options.budget(units, self.deadline)
    }

    /// The factoring budget for an `n_bits`-bit number (see
    /// `DescentOptions::factor_budget`), stopping at the deadline.
    pub(crate) fn factor_budget(&self, n_bits: u64) -> Budget {
        self.options.factor_budget(n_bits, self.deadline)
    }
}
