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
//!   the local formulas where those apply ([`RootNumberRoute`]);
//! * `w = +1` and `L(E,1) ≠ 0` (certified) imply rank 0, and `w = −1` and
//!   `L'(E,1) ≠ 0` imply rank 1 (Gross–Zagier 1986 and Kolyvagin 1990; for
//!   rank 0 and CM curves also Coates–Wiles 1977) — see [`RankTheorem`];
//! * [`AnalyticData::analytic_rank`] is the smallest `r ≤ 3` of the
//!   parity of `w` with `L^{(r)}(E,1)` certified non-zero. For 0 and 1 it
//!   is the order of vanishing; for 2 and 3 it is only an upper bound for
//!   the order of vanishing (the lower derivatives of that parity are
//!   small but not proven to vanish).
//!
//! The default options skip curves with conductor above
//! [`DEFAULT_CONDUCTOR_LIMIT`]; see `docs/analytic.md`.

mod bsgs;
mod cm;
pub(crate) mod coefficients;
pub(crate) mod ledger;
pub(crate) mod period;
pub(crate) mod root_number;
pub(crate) mod series;

use num_bigint::BigInt;
use num_traits::{One, ToPrimitive};

use crate::arith::Certified;
pub use coefficients::{an_list, ap, ApTable};
pub use ledger::{sha_analytic, ShaLedger};
pub use period::{real_period, RealPeriod};
pub use root_number::{local_root_number, root_number_by_formula};
pub use series::Series;

use crate::budget::Budget;
use crate::curve::tate::GlobalLocalData;
use crate::curve::Curve;
use crate::error::Result;

/// Conductors above this are skipped under the default options.
pub const DEFAULT_CONDUCTOR_LIMIT: u64 = 10_000_000_000;

/// At most this many series terms under the default options.
pub const DEFAULT_MAX_TERMS: u64 = 4_000_000;

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
    /// [`DEFAULT_CONDUCTOR_LIMIT`] = 10¹⁰).
    pub conductor_limit: u64,
    /// At most this many terms `a_n` (default [`DEFAULT_MAX_TERMS`];
    /// memory is about 12 bytes per term). With too few terms the error
    /// bounds grow and fewer values are certified; nothing is guessed.
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
            max_terms: DEFAULT_MAX_TERMS,
            tolerance: TRUNCATION_TARGET,
        }
    }
}

impl AnalyticOptions {
    /// The options with another conductor limit.
    pub fn with_conductor_limit(mut self, limit: u64) -> Self {
        self.conductor_limit = limit;
        self
    }

    /// The options with another truncation target (see
    /// [`AnalyticOptions::tolerance`]).
    pub fn with_tolerance(mut self, tolerance: f64) -> Self {
        self.tolerance = tolerance;
        self
    }

    /// The options with another term limit.
    pub fn with_max_terms(mut self, terms: u64) -> Self {
        self.max_terms = terms;
        self
    }
}

/// How the root number was determined.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum RootNumberRoute {
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
    analytic_rank: Option<usize>,
    rank_proven: Option<(usize, RankTheorem)>,
    terms_used: u64,
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
    pub fn root_number_route(&self) -> Option<RootNumberRoute> {
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
    pub fn real_components(&self) -> Option<u8> {
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

    /// The smallest `r ≤ 3` of the parity of `w` with `L^{(r)}(E,1)`
    /// certified non-zero (see the module docs for its meaning above 1).
    pub fn analytic_rank(&self) -> Option<usize> {
        self.analytic_rank
    }

    /// The rank, when a theorem settles it, with the theorem.
    pub fn rank_proven(&self) -> Option<(usize, RankTheorem)> {
        self.rank_proven
    }

    /// The number of terms `a_n` used.
    pub fn terms_used(&self) -> u64 {
        self.terms_used
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

/// The root number by the test `F(1/t) = w·t²·F(t)`: `Ok(Some(w))` when
/// one sign is excluded and the other is not, `Ok(None)` when
/// inconclusive at every `t` tried, `Err(())`-like `Some(0)` when both
/// signs are excluded (inconsistent data).
fn root_number_by_theta(s: &Series<'_>, budget: &mut Budget) -> Result<Option<i8>> {
    for t in THETA_POINTS {
        let f = s.theta(t, budget)?;
        let g = s.theta(1.0 / t, budget)?;
        let tf = f.scale(t * t);
        let plus = g.minus(&tf).may_be_zero();
        let minus = g.add(&tf).may_be_zero();
        match (plus, minus) {
            (true, false) => return Ok(Some(1)),
            (false, true) => return Ok(Some(-1)),
            (false, false) => return Ok(Some(0)),
            (true, true) => {}
        }
    }
    Ok(None)
}

/// The analytic data of a curve: root number, real period, `L^{(r)}(E,1)`
/// with certified bounds, the analytic rank bound and, where a theorem
/// applies, the proven rank.
///
/// `local` must be the curve's own local data ([`Curve::local_data`]).
///
/// # Example
/// ```
/// use isodescent::analytic::{analyse, AnalyticOptions, RankTheorem};
/// use isodescent::curve::Curve;
/// use isodescent::Budget;
///
/// let e: Curve = "0 0 1 -1 0".parse().unwrap(); // conductor 37
/// let mut budget = Budget::unlimited();
/// let local = e.local_data(&mut budget).unwrap();
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
        analytic_rank: None,
        rank_proven: None,
        terms_used: 0,
        split_check: None,
        skipped: None,
    };
    let n = match local.conductor.to_u64() {
        Some(n) if n <= options.conductor_limit && n <= 1 << 53 => n,
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
    let an = an_list(local, m, budget)?;
    data.terms_used = m;
    let s = Series::new(&an, n)?;

    // Root number.
    let by_test = match root_number_by_theta(&s, budget)? {
        Some(0) => {
            data.skipped = Some(Skip::Inconsistent);
            return Ok(data);
        }
        other => other,
    };
    data.by_test = by_test;
    let (w, route) = match (by_test, by_formula) {
        (Some(a), Some(b)) if a != b => {
            data.skipped = Some(Skip::Inconsistent);
            return Ok(data);
        }
        (Some(a), Some(_)) => (a, RootNumberRoute::FunctionalEquationAndFormula),
        (Some(a), None) => (a, RootNumberRoute::FunctionalEquation),
        (None, Some(b)) => (b, RootNumberRoute::Formula),
        (None, None) => {
            data.skipped = Some(Skip::RootNumberUndecided);
            return Ok(data);
        }
    };
    data.root_number = Some(w);
    data.route = Some(route);

    // Λ^{(k)}(1), k ≤ 3: the parity opposite to w vanishes exactly.
    let h = series::h_derivatives(&c);
    let zero = Certified::exact(0.0);
    let mut lambda = [zero; 4];
    let first = if w == 1 { 0 } else { 1 };
    lambda[first] = s.g_sum(first, budget)?.scale(2.0);

    // The split check of Λ(1).
    let split = s.completed_value_split(w, SPLIT, budget)?;
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
        data.analytic_rank = Some(first);
        let theorem = if first == 0 && has_cm_by_maximal_order(curve) {
            RankTheorem::CoatesWiles
        } else {
            RankTheorem::GrossZagierKolyvagin
        };
        data.rank_proven = Some((first, theorem));
        return Ok(data);
    }
    let second = first + 2;
    lambda[second] = s.g_sum(second, budget)?.scale(2.0);
    let v2 = series::l_derivative(second, &h, &lambda);
    data.l_values.push((second, v2));
    if !v2.may_be_zero() {
        data.analytic_rank = Some(second);
    }
    Ok(data)
}
