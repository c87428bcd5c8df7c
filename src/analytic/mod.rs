//! Layer 3a: the analytic side — the L-series `L(E, s) = Σ a_n n^{−s}` of an elliptic
//! curve over Q, its root number, the real period, the values
//! `L^{(r)}(E, 1)` for `r ≤ 3` with proven error bounds, ranks settled by
//! theorem, and the Birch–Swinnerton-Dyer ledger.
//!
//! # Overview
//! * `coefficients`: `a_p` (closed forms for `j = 1728` and `j = 0` in
//!   `cm`, else direct counts, baby-step giant-step on the curve and its
//!   twist), `a_n` by multiplicativity.
//! * `root_number`: `w(E) = −∏ w_p` where every `w_p` has a closed
//!   formula (all primes unless additive at 2 or 3).
//! * `period`: the real period by the AGM, with the number of real
//!   components.
//! * `series`: the rapidly converging series for `Λ^{(r)}(1)` and
//!   `L^{(r)}(E, 1)`, the theta function `F(t)` of the functional
//!   equation, and the value of `Λ(1)` with any splitting parameter.
//! * `ledger`: the analytic order of Sha.
//! * [`Certified`]: a binary64 midpoint with a proven error radius; every
//!   number this module hands out is one.
//!
//! # What is proven, and by which theorem
//! All curves over Q are modular (Wiles 1995; Taylor–Wiles 1995;
//! Breuil–Conrad–Diamond–Taylor 2001), so `Λ(s) = wΛ(2 − s)` with
//! `w = ±1` and the conductor `N` from Tate's algorithm. Hence:
//! * the root number is decided by the certified test
//!   `F(1/t) = w·t²·F(t)` (exactly one sign can hold; the other is excluded
//!   when `|F(1/t) ∓ t²F(t)|` exceeds its error bound), cross-checked against
//!   the local formulas where those apply (the route is printed with the value);
//! * `w = +1` and `L(E,1) ≠ 0` (certified) imply rank 0, and `w = −1` and
//!   `L'(E,1) ≠ 0` imply rank 1 (Gross–Zagier 1986 and Kolyvagin 1990; for
//!   rank 0 and CM curves also Coates–Wiles 1977) — see [`RankTheorem`];
//! * [`AnalyticData::analytic_order`] comes from the smallest `r ≤ 3` of
//!   the parity of `w` with `L^{(r)}(E,1)` certified non-zero. For 0 and 1
//!   it is the order of vanishing ([`AnalyticOrder::Exact`], also given by
//!   [`AnalyticData::analytic_rank`]); for 2 and 3 it is only an upper
//!   bound ([`AnalyticOrder::AtMost`]: the lower derivatives of that
//!   parity are small but not proven to vanish).
//!
//! The default options skip curves with conductor above
//! 10¹⁰ ([`AnalyticOptions::conductor_limit`]); see `docs/analytic.md`,
//! included below.
//!
#![doc = include_str!("../../docs/analytic.md")]

mod bsgs;
mod cm;
pub(crate) mod coefficients;
pub(crate) mod ledger;
pub(crate) mod period;
pub(crate) mod root_number;
pub(crate) mod series;
mod stream;

#[cfg(test)]
mod tests;

use num_bigint::BigInt;
use num_traits::{One, ToPrimitive};

pub(crate) use crate::arith::Certified;
pub use coefficients::{dirichlet_coefficients, frobenius_trace, ApTable};
pub use ledger::{sha_analytic, ShaLedger};
pub use period::{real_period, RealPeriod};
pub(crate) use root_number::root_number_by_formula;
pub(crate) use series::Series;

use crate::budget::Budget;
use crate::curve::tate::GlobalLocalData;
use crate::curve::Curve;
use crate::error::Result;

/// Conductors above this are skipped under the default options, except
/// for quadratic twists of `y² = x³ − x` and curves with `j = 0` (see
/// `DEFAULT_TWIST_CONDUCTOR_LIMIT`). Up to it the stored route is used.
pub(crate) const DEFAULT_CONDUCTOR_LIMIT: u64 = 10_000_000_000;

/// The conductor limit under the default options for quadratic twists of
/// `y² = x³ − x` (among them every congruent-number curve `y² = x³ − n²x`),
/// whose coefficients come from a sieve ([`SeriesRoute::StreamedTwist`]),
/// and for the curves `y² = x³ + k` (`j = 0`), whose `a_p` come from the
/// sextic residue symbol (module `cm`).
pub(crate) const DEFAULT_TWIST_CONDUCTOR_LIMIT: u64 = 10_000_000_000_000;

/// Quadratic twists of `y² = x³ − x` with conductor above this take the
/// streamed twist route under the default options (measured in
/// `docs/performance.md`, issue 25: below it the stored route is as fast
/// or faster).
pub(crate) const DEFAULT_TWIST_STREAMED_ABOVE: u64 = 1_000_000;

/// At most this many series terms under the default options (the stored
/// route needs about 12 bytes per term, the streamed route about 4).
pub(crate) const DEFAULT_MAX_TERMS: u64 = 30_000_000;

/// `L^{(r)}(E,1)` for `r ≥ 2` is computed only with at most this many terms
/// (by the stored route, about 12 bytes per term).
const HIGHER_DERIVATIVE_TERMS: u64 = 4_000_000;

/// Target for the truncation error of `L^{(r)}(E,1)`, `r ≤ 1`.
const TRUNCATION_TARGET: f64 = 1e-13;

/// The values of `t` tried in the functional-equation test (the number
/// of terms is chosen for the first; later ones carry larger bounds).
const THETA_POINTS: [f64; 3] = [1.1, 1.05, 1.2];

/// The splitting parameter of the consistency check of `Λ(1)`.
const SPLIT: f64 = 1.1;

/// Options of [`analyse`].
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub struct AnalyticOptions {
    /// Curves whose conductor exceeds this are skipped (default
    /// 10¹⁰), unless they are quadratic twists
    /// of `y² = x³ − x` or curves with `j = 0` below
    /// [`AnalyticOptions::twist_conductor_limit`].
    pub conductor_limit: u64,
    /// The conductor limit for quadratic twists of `y² = x³ − x`, whose
    /// `a_p` come from a sieve rather than prime by prime, and for the
    /// curves with `j = 0` (sextic twists of `y² = x³ + 1`), whose `a_p`
    /// come from a closed form (the sextic residue symbol) rather than a
    /// point count (default 10¹³). The
    /// larger of the two limits applies to them.
    pub twist_conductor_limit: u64,
    /// Conductors above this use the streamed route (coefficients in
    /// machine words, sums in binary64 with one error bound per sum; see
    /// [`SeriesRoute`]); up to it the stored route (default 10¹⁰, so that values below it are printed
    /// exactly as before).
    pub streamed_above: u64,
    /// Quadratic twists of `y² = x³ − x` with conductor above this take
    /// the streamed twist route ([`SeriesRoute::StreamedTwist`]) even below
    /// [`AnalyticOptions::streamed_above`] (default
    /// 10⁶, where that route is the faster one).
    pub twist_streamed_above: u64,
    /// At most this many terms `a_n` (default 3·10⁷;
    /// memory is about 12 bytes per term on the stored route and 4 on the
    /// streamed one). With too few terms the error bounds grow and fewer
    /// values are certified; nothing is guessed.
    pub max_terms: u64,
    /// The truncation error aimed at for `L(E,1)` and `L'(E,1)` (default
    /// 10⁻¹³); the functional-equation test aims at 10⁷ times this, at most
    /// 10⁻⁶. Only
    /// the number of terms depends on it: every value still carries its
    /// proven bound.
    pub tolerance: f64,
}

impl Default for AnalyticOptions {
    fn default() -> Self {
        AnalyticOptions {
            conductor_limit: DEFAULT_CONDUCTOR_LIMIT,
            twist_conductor_limit: DEFAULT_TWIST_CONDUCTOR_LIMIT,
            streamed_above: DEFAULT_CONDUCTOR_LIMIT,
            twist_streamed_above: DEFAULT_TWIST_STREAMED_ABOVE,
            max_terms: DEFAULT_MAX_TERMS,
            tolerance: TRUNCATION_TARGET,
        }
    }
}

impl AnalyticOptions {
    /// The options with the streamed route above another conductor (0:
    /// always streamed; `u64::MAX`: never), for every curve: this sets
    /// [`AnalyticOptions::twist_streamed_above`] as well.
    pub fn with_streamed_above(mut self, conductor: u64) -> Self {
        self.streamed_above = conductor;
        self.twist_streamed_above = conductor;
        self
    }

    /// The conductor limit that applies to a curve: the larger of the two
    /// limits for quadratic twists of `y² = x³ − x` and for curves with
    /// `j = 0` (`closed_form_family`), else
    /// [`AnalyticOptions::conductor_limit`].
    pub fn conductor_limit_for(&self, closed_form_family: bool) -> u64 {
        if closed_form_family {
            self.conductor_limit.max(self.twist_conductor_limit)
        } else {
            self.conductor_limit
        }
    }
}

/// How the root number was determined.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub(crate) enum RootNumberRoute {
    /// By the certified functional-equation test, and the local formulas
    /// gave the same sign.
    FunctionalEquationAndFormula,
    /// By the certified functional-equation test alone (additive reduction
    /// at 2 or 3, where no local formula is used).
    FunctionalEquation,
    /// By the local formulas alone (the test was inconclusive at every
    /// `t` tried, for example with too few terms).
    Formula,
}

/// How the series were summed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum SeriesRoute {
    /// `a_n` stored as 64-bit integers, every sum in midpoint–radius
    /// arithmetic term by term.
    Stored,
    /// `a_n` prime by prime into 32-bit words, the sums in binary64 with
    /// compensated accumulation and one proven error bound per sum.
    Streamed,
    /// As `Streamed`, for a quadratic twist of `y² = x³ − x`: `a_p` from
    /// the sums of two squares `p = a² + b²` (one sieve) times the quadratic
    /// character of the twist.
    StreamedTwist,
}

/// The theorem that settles a rank.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum RankTheorem {
    /// `L(E,1) ≠ 0 ⇒` rank 0, `L(E,1) = 0 ≠ L'(E,1) ⇒` rank 1:
    /// Gross–Zagier 1986 and Kolyvagin 1990, with modularity (Wiles 1995;
    /// Breuil–Conrad–Diamond–Taylor 2001).
    GrossZagierKolyvagin,
    /// `L(E,1) ≠ 0 ⇒` rank 0 for curves with complex multiplication by
    /// the ring of integers of an imaginary quadratic field: Coates–Wiles
    /// 1977.
    CoatesWiles,
}

impl RankTheorem {
    /// The theorem's name, for reports.
    pub fn name(&self) -> &'static str {
        match self {
            RankTheorem::GrossZagierKolyvagin => {
                "Gross-Zagier (1986) and Kolyvagin (1990), with modularity (Wiles 1995; Breuil-Conrad-Diamond-Taylor 2001)"
            }
            RankTheorem::CoatesWiles => "Coates-Wiles (1977), complex multiplication",
        }
    }
}

/// Why no L-values were computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum Skip {
    /// The conductor is above the limit of the options.
    ConductorAboveLimit,
    /// The root number could not be decided (too few terms allowed).
    RootNumberUndecided,
    /// The root number tests disagree, or `Λ(1)` differs between two
    /// splitting parameters: a defect; no conclusion is drawn.
    Inconsistent,
}

/// The consistency check of `Λ(1)` with two splitting parameters.
#[derive(Debug, Clone, Copy, PartialEq)]
#[non_exhaustive]
pub struct SplitCheck {
    /// The second splitting parameter (the first is 1).
    pub parameter: f64,
    /// `Λ(1)` with splitting parameter `parameter` minus `Λ(1)` with 1.
    pub difference: Certified,
    /// True when the difference is zero within its bound.
    pub passed: bool,
}

/// The order of vanishing of `L(E, s)` at `s = 1`, as far as it is proven.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[non_exhaustive]
pub enum AnalyticOrder {
    /// Proven: `L^{(r)}(E,1)` is certified non-zero and the lower
    /// derivatives vanish (`r ≤ 1`; for `r = 1` the functional equation
    /// with `w = −1` gives `L(E,1) = 0`).
    Exact(usize),
    /// `L^{(r)}(E,1)` is certified non-zero, so the order is at most `r`
    /// (and of the parity of `w`); the lower derivatives of that parity
    /// are small but not proven to vanish.
    AtMost(usize),
}

impl AnalyticOrder {
    /// The order, or its upper bound.
    pub fn order(self) -> usize {
        match self {
            AnalyticOrder::Exact(r) | AnalyticOrder::AtMost(r) => r,
        }
    }

    /// True when the order is proven exactly.
    pub(crate) fn is_exact(self) -> bool {
        matches!(self, AnalyticOrder::Exact(_))
    }
}

/// Everything [`analyse`] finds.
#[derive(Debug, Clone, PartialEq)]
pub struct AnalyticData {
    conductor: BigInt,
    root_number: Option<i8>,
    route: Option<RootNumberRoute>,
    by_formula: Option<i8>,
    by_test: Option<i8>,
    period: Option<RealPeriod>,
    l_values: Vec<(usize, Certified)>,
    analytic_order: Option<AnalyticOrder>,
    rank_proven: Option<(usize, RankTheorem)>,
    terms_used: u64,
    series_route: Option<SeriesRoute>,
    split_check: Option<SplitCheck>,
    skipped: Option<Skip>,
}

impl AnalyticData {
    /// The conductor `N`.
    pub fn conductor(&self) -> &BigInt {
        &self.conductor
    }

    /// The root number `w = ±1`, when decided.
    pub fn root_number(&self) -> Option<i8> {
        self.root_number
    }

    /// How the root number was decided.
    pub(crate) fn root_number_route(&self) -> Option<RootNumberRoute> {
        self.route
    }

    /// The root number by the local formulas (`None` when additive at 2
    /// or 3).
    pub fn root_number_by_formula(&self) -> Option<i8> {
        self.by_formula
    }

    /// The root number by the functional-equation test (`None` when
    /// inconclusive or not run).
    pub fn root_number_by_test(&self) -> Option<i8> {
        self.by_test
    }

    /// `Ω`: the least positive real period of the global minimal model
    /// times the number of real components, as in the BSD formula.
    pub fn real_period(&self) -> Option<Certified> {
        self.period.map(|p| p.omega)
    }

    /// The least positive real period `ω₁` of the global minimal model.
    pub fn least_real_period(&self) -> Option<Certified> {
        self.period.map(|p| p.least)
    }

    /// The number of connected components of `E(R)`.
    pub(crate) fn real_component_count(&self) -> Option<u8> {
        self.period.map(|p| p.components)
    }

    /// The values `(r, L^{(r)}(E,1))` computed, certified. Those of the
    /// parity opposite to `w` are exactly 0 and listed only for `r = 0`.
    pub fn l_values(&self) -> &[(usize, Certified)] {
        &self.l_values
    }

    /// `L^{(r)}(E,1)` if computed.
    pub fn l_value(&self, r: usize) -> Option<Certified> {
        self.l_values.iter().find(|(k, _)| *k == r).map(|(_, v)| *v)
    }

    /// The order of vanishing at `s = 1` when it is proven exactly (0 or
    /// 1); `None` otherwise, in particular when only an upper bound is
    /// known (see [`AnalyticData::analytic_order`]).
    pub fn analytic_rank(&self) -> Option<usize> {
        match self.analytic_order {
            Some(AnalyticOrder::Exact(r)) => Some(r),
            _ => None,
        }
    }

    /// The order of vanishing at `s = 1`: exact, or an upper bound, from
    /// the smallest `r ≤ 3` of the parity of `w` with `L^{(r)}(E,1)`
    /// certified non-zero; `None` when no such `r` was found.
    pub fn analytic_order(&self) -> Option<AnalyticOrder> {
        self.analytic_order
    }

    /// The rank, when a theorem settles it, with the theorem.
    pub fn rank_proven(&self) -> Option<(usize, RankTheorem)> {
        self.rank_proven
    }

    /// The number of terms `a_n` used.
    pub fn terms_used(&self) -> u64 {
        self.terms_used
    }

    /// How the series were summed (`None` when no terms were used).
    pub fn series_route(&self) -> Option<SeriesRoute> {
        self.series_route
    }

    /// The check of `Λ(1)` with two splitting parameters.
    pub fn split_check(&self) -> Option<SplitCheck> {
        self.split_check
    }

    /// Why the L-values are missing, if they are.
    pub fn skipped(&self) -> Option<Skip> {
        self.skipped
    }
}

/// The j-invariants of the curves over Q with complex multiplication by
/// the full ring of integers of an imaginary quadratic field (discriminants
/// −3, −4, −7, −8, −11, −19, −43, −67, −163) [Sil94, App. A.3] (from
/// memory). The four j-invariants of CM by a non-maximal order (54000,
/// 287496, −12288000, 16581375) are left out: for them the report names
/// Gross–Zagier–Kolyvagin, which covers every curve.
const CM_MAXIMAL_J: [i64; 8] = [
    0,
    1728,
    -3375,
    8000,
    -32768,
    -884_736,
    -884_736_000,
    -147_197_952_000,
];

/// True when `j(E)` is one of [`CM_MAXIMAL_J`] or `−640320³`.
fn has_cm_by_maximal_order(curve: &Curve) -> bool {
    let j = curve.j_invariant();
    if !j.denom().is_one() {
        return false;
    }
    let n = j.numer();
    let d163 = -BigInt::from(640_320i64).pow(3);
    *n == d163 || CM_MAXIMAL_J.iter().any(|&v| *n == BigInt::from(v))
}

/// The sign decided by `F(1/t) = w·t²·F(t)` from enclosures of `F(t)` and
/// `F(1/t)`: `Some(w)` when one sign is excluded and the other is not,
/// `Some(0)` when both are excluded (inconsistent data), `None` when
/// neither is.
fn theta_sign(f: &Certified, g: &Certified, t: f64) -> Option<i8> {
    let tf = f.scale(t * t);
    let plus = g.minus(&tf).may_be_zero();
    let minus = g.add(&tf).may_be_zero();
    match (plus, minus) {
        (true, false) => Some(1),
        (false, true) => Some(-1),
        (false, false) => Some(0),
        (true, true) => None,
    }
}

/// The root number by the test at every `t` of [`THETA_POINTS`] in turn;
/// `pair(t)` returns `(F(t), F(1/t))`. `Some(0)` when both signs are
/// excluded (inconsistent data), `None` when inconclusive at every `t`.
fn root_number_by_theta(
    mut pair: impl FnMut(f64) -> Result<(Certified, Certified)>,
) -> Result<Option<i8>> {
    for t in THETA_POINTS {
        let (f, g) = pair(t)?;
        if let Some(w) = theta_sign(&f, &g, t) {
            return Ok(Some(w));
        }
    }
    Ok(None)
}

/// The analytic data of a curve: root number, real period, `L^{(r)}(E,1)`
/// with certified bounds, the analytic rank bound and, where a theorem
/// applies, the proven rank.
///
/// `local` must be the curve's own local data ([`Curve::tate_data`]).
///
/// # Example
/// ```
/// use isodescent::analytic::{analyse, AnalyticOptions, RankTheorem};
/// use isodescent::curve::Curve;
/// use isodescent::Budget;
///
/// let e: Curve = "0 0 1 -1 0".parse().unwrap(); // conductor 37
/// let mut budget = Budget::unlimited();
/// let local = e.tate_data(&mut budget).unwrap();
/// let data = analyse(&e, &local, &AnalyticOptions::default(), &mut budget).unwrap();
/// assert_eq!(data.root_number(), Some(-1));
/// let d1 = data.l_value(1).unwrap(); // L'(E,1) = 0.3059997738…
/// assert!((d1.value() - 0.305_999_773_834).abs() < 1e-11 && d1.error() < 1e-12);
/// assert_eq!(data.rank_proven(), Some((1, RankTheorem::GrossZagierKolyvagin)));
/// ```
///
/// # Errors
/// [`crate::Error::BudgetExhausted`] when the budget runs out;
/// [`crate::Error::InvalidArgument`] for options out of range (0 or more
/// than 2³² terms, a tolerance outside (0, 1)).
pub fn analyse(
    curve: &Curve,
    local: &GlobalLocalData,
    options: &AnalyticOptions,
    budget: &mut Budget,
) -> Result<AnalyticData> {
    if options.max_terms == 0 || options.max_terms > u64::from(u32::MAX) {
        return Err(crate::Error::InvalidArgument {
            reason: format!("max_terms must lie in 1..2^32, got {}", options.max_terms),
        });
    }
    if !(options.tolerance > 0.0 && options.tolerance < 1.0) {
        return Err(crate::Error::InvalidArgument {
            reason: format!("tolerance must lie in (0, 1), got {}", options.tolerance),
        });
    }
    let by_formula = root_number_by_formula(local);
    let mut data = AnalyticData {
        conductor: local.conductor.clone(),
        root_number: None,
        route: None,
        by_formula,
        by_test: None,
        period: real_period(&local.minimal_model),
        l_values: Vec::new(),
        analytic_order: None,
        rank_proven: None,
        terms_used: 0,
        series_route: None,
        split_check: None,
        skipped: None,
    };
    let twist = stream::twist_of_x3_minus_x(local);
    let limit = options.conductor_limit_for(twist.is_some() || cm::has_j_zero(local));
    let n = match local.conductor.to_u64() {
        Some(n) if n <= limit && n <= 1 << 53 => n,
        _ => {
            data.skipped = Some(Skip::ConductorAboveLimit);
            return Ok(data);
        }
    };
    // Terms: enough for L^{(r)}, r ≤ 1, to the target, for F(1/t) at the
    // largest t tried and for the split check.
    let probe = Series::new(&[0, 1], n)?;
    let c = probe.step();
    let m_l = series::terms_needed(&c, 0, options.tolerance).max(series::terms_needed(
        &c,
        1,
        options.tolerance,
    ));
    let tmax = THETA_POINTS[0].max(SPLIT);
    let m_t = series::smallest_terms(
        |m| {
            let q = c.scale(1.0 / tmax).neg().exp();
            let qm = c.scale((m + 1) as f64 / tmax).neg().exp();
            let one_q = Certified::exact(1.0).minus(&q);
            qm.scale(2.0)
                .mul(&one_q.scale((m + 1) as f64).add(&q))
                .div(&one_q.mul(&one_q))
                .upper()
        },
        (options.tolerance * 1e7).min(1e-6),
    );
    let m = m_l.max(m_t).min(options.max_terms);
    let streamed_above = if twist.is_some() {
        options.streamed_above.min(options.twist_streamed_above)
    } else {
        options.streamed_above
    };
    if n > streamed_above {
        return analyse_streamed(curve, local, data, n, m, twist, budget);
    }
    let an = dirichlet_coefficients(local, m, budget)?;
    data.terms_used = m;
    data.series_route = Some(SeriesRoute::Stored);
    let s = Series::new(&an, n)?;

    // Root number.
    let by_test = root_number_by_theta(|t| Ok((s.theta(t, budget)?, s.theta(1.0 / t, budget)?)))?;
    let Some(w) = settle_root_number(&mut data, by_test) else {
        return Ok(data);
    };

    // Λ^{(k)}(1), k ≤ 3: the parity opposite to w vanishes exactly.
    let first = if w == 1 { 0 } else { 1 };
    let lambda_first = s.g_sum(first, budget)?.scale(2.0);
    let split = s.completed_value_split(w, SPLIT, budget)?;
    let higher = |r: usize, budget: &mut Budget| s.g_sum(r, budget);
    let at_one = AtOne {
        c,
        w,
        lambda_first,
        split,
    };
    finish(curve, data, at_one, Some(higher), budget)
}

/// Records the root number from the test and the formula; `None` (with
/// the reason recorded) when it is undecided or the two disagree.
fn settle_root_number(data: &mut AnalyticData, by_test: Option<i8>) -> Option<i8> {
    if by_test == Some(0) {
        data.skipped = Some(Skip::Inconsistent);
        return None;
    }
    data.by_test = by_test;
    let (w, route) = match (by_test, data.by_formula) {
        (Some(a), Some(b)) if a != b => {
            data.skipped = Some(Skip::Inconsistent);
            return None;
        }
        (Some(a), Some(_)) => (a, RootNumberRoute::FunctionalEquationAndFormula),
        (Some(a), None) => (a, RootNumberRoute::FunctionalEquation),
        (None, Some(b)) => (b, RootNumberRoute::Formula),
        (None, None) => {
            data.skipped = Some(Skip::RootNumberUndecided);
            return None;
        }
    };
    data.root_number = Some(w);
    data.route = Some(route);
    Some(w)
}

/// What either route (stored or streamed) computed at `s = 1`, handed to
/// [`finish`].
struct AtOne {
    /// `c = 2π/√N`, the scale of the completed L-function.
    c: Certified,
    /// The root number, already settled.
    w: i8,
    /// `Λ^{(first)}(1)`, `first` = 0 when `w = 1`, else 1.
    lambda_first: Certified,
    /// `Λ(1)` by the split form at [`SPLIT`], for the consistency check.
    split: Certified,
}

/// The split check, `L^{(first)}(E,1)`, the proven rank and, when the
/// first value may vanish, the next derivative of the same parity (by
/// `higher(r)` = `Σ a_n G_r(x_n)` with its bounds, when given).
fn finish(
    curve: &Curve,
    mut data: AnalyticData,
    at_one: AtOne,
    higher: Option<impl Fn(usize, &mut Budget) -> Result<Certified>>,
    budget: &mut Budget,
) -> Result<AnalyticData> {
    let AtOne {
        c,
        w,
        lambda_first,
        split,
    } = at_one;
    let h = series::h_derivatives(&c);
    let zero = Certified::exact(0.0);
    let mut lambda = [zero; 4];
    let first = if w == 1 { 0 } else { 1 };
    lambda[first] = lambda_first;

    // The split check of Λ(1).
    let difference = split.minus(&lambda[0]);
    let passed = difference.may_be_zero();
    data.split_check = Some(SplitCheck {
        parameter: SPLIT,
        difference,
        passed,
    });
    if !passed {
        data.skipped = Some(Skip::Inconsistent);
        return Ok(data);
    }

    if w == -1 {
        data.l_values.push((0, zero));
    }
    let v = series::l_derivative(first, &h, &lambda);
    data.l_values.push((first, v));
    if !v.may_be_zero() {
        data.analytic_order = Some(AnalyticOrder::Exact(first));
        let theorem = if first == 0 && has_cm_by_maximal_order(curve) {
            RankTheorem::CoatesWiles
        } else {
            RankTheorem::GrossZagierKolyvagin
        };
        data.rank_proven = Some((first, theorem));
        return Ok(data);
    }
    let Some(higher) = higher else {
        return Ok(data);
    };
    let second = first + 2;
    lambda[second] = higher(second, budget)?.scale(2.0);
    let v2 = series::l_derivative(second, &h, &lambda);
    data.l_values.push((second, v2));
    if !v2.may_be_zero() {
        data.analytic_order = Some(AnalyticOrder::AtMost(second));
    }
    Ok(data)
}

/// The streamed route (see [`SeriesRoute`] and `stream`): one pass for the
/// theta test at the first `t`, `Λ(1)` and the split check; a second for
/// `Λ'(1)` when `w = −1`.
fn analyse_streamed(
    curve: &Curve,
    local: &GlobalLocalData,
    mut data: AnalyticData,
    n: u64,
    m: u64,
    twist: Option<u64>,
    budget: &mut Budget,
) -> Result<AnalyticData> {
    use stream::PowerSum;
    let m = m.min(stream::MAX_STREAMED_TERMS);
    let an = stream::coefficients(local, m, twist, budget)?;
    data.terms_used = m;
    data.series_route = Some(if twist.is_some() {
        SeriesRoute::StreamedTwist
    } else {
        SeriesRoute::Streamed
    });
    let c = Series::new(&[0, 1], n)?.step();
    let mu = m as usize;
    let t0 = THETA_POINTS[0];
    let power = |t: f64, over_n: bool| PowerSum { t, over_n };
    let first_pass = stream::power_sums(
        &an,
        &c,
        &[
            power(t0, false),
            power(1.0 / t0, false),
            power(1.0, true),
            power(SPLIT, true),
            power(1.0 / SPLIT, true),
        ],
        budget,
    )?;
    let theta = |s: Certified, t: f64| series::widen(s, series::theta_tail(&c, t, mu));
    let mut pending = Some((theta(first_pass[0], t0), theta(first_pass[1], 1.0 / t0)));
    let by_test = root_number_by_theta(|t| {
        if let Some(p) = pending.take() {
            return Ok(p);
        }
        let s = stream::power_sums(&an, &c, &[power(t, false), power(1.0 / t, false)], budget)?;
        Ok((theta(s[0], t), theta(s[1], 1.0 / t)))
    })?;
    let Some(w) = settle_root_number(&mut data, by_test) else {
        return Ok(data);
    };
    let lambda_first = if w == 1 {
        series::widen(first_pass[2].div(&c), series::tail_bound(&c, 0, mu))
    } else {
        series::widen(
            stream::g1_sum(&an, &c, budget)?,
            series::tail_bound(&c, 1, mu),
        )
    }
    .scale(2.0);
    let split = series::widen(
        first_pass[3].add(&first_pass[4].scale(f64::from(w))),
        series::split_tail(&c, SPLIT, mu),
    )
    .div(&c);
    // L^{(r)}, r ≥ 2, by the stored route on a copy, when small enough.
    let wide: Option<Vec<i64>> =
        (m <= HIGHER_DERIVATIVE_TERMS).then(|| an.iter().map(|&v| i64::from(v)).collect());
    drop(an);
    let stored = match &wide {
        Some(v) => Some(Series::new(v, n)?),
        None => None,
    };
    let higher = stored
        .as_ref()
        .map(|s| move |r: usize, b: &mut Budget| s.g_sum(r, b));
    let at_one = AtOne {
        c,
        w,
        lambda_first,
        split,
    };
    finish(curve, data, at_one, higher, budget)
}
