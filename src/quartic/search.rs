//! A sieved search for global points on quartics `y² = g(x, z)`.
//!
//! # The problem
//! Let `g(x, z) = c4·x⁴ + c3·x³z + c2·x²z² + c1·xz³ + c0·z⁴` be a binary
//! quartic form with integer coefficients and non-zero discriminant. A
//! *point* of the curve `C: y² = g(x, z)` (in the weighted projective plane
//! with weights 1, 2, 1) is a triple of integers `(x, z, y)` with
//! `gcd(x, z) = 1` and `y² = g(x, z)`. Since `g(−x, −z) = g(x, z)`, every
//! rational point has a unique normalised representative with `z > 0`, or
//! `z = 0` and `x = 1`, and `y ≥ 0` (the sign of `y` is the involution
//! `y ↦ −y`). The *height* of `(x, z)` is `max(|x|, z)`.
//!
//! [`search`] and [`search_all`] visit every normalised coprime pair of
//! height at most `H` and report those where `g(x, z)` is a perfect square.
//! Finding a point proves `C(Q) ≠ ∅`; finding none proves only that there is
//! no point of height `≤ H` (the curve may still have points, as the
//! Lind–Reichardt curve shows in the other direction: it has points over
//! every completion of Q and none over Q [Lind40; Reichardt42]).
//!
//! # Order
//! Points are reported in the *search order*: by increasing height, then by
//! increasing `z`, then by increasing `x`. [`search`] returns the first point
//! in this order, so the point it returns has the least possible height.
//! Internally the pairs are visited in height blocks `(h₀, h₁]` with
//! `h₁ ≈ 3h₀/2` (the first block is `(0, 32]`); inside a block the pairs are
//! sieved row by row (fixed `z`) and the points of the block are sorted
//! before they are reported. A search that stops at the first point thus
//! does at most about `(3/2)² ≈ 2.3` times the work of a search up to the
//! height of that point.
//!
//! # The sieve
//! For a modulus `m` and a row `z`, let `S(m, z) ⊆ Z/m` be the set of residues
//! `x mod m` for which `g(x, z) mod m` is a square modulo `m` (0 included)
//! and, when `m` is a power of the prime `p`, not both `p | x` and `p | z`.
//! If `g(x, z)` is a square and `gcd(x, z) = 1`, then `x mod m ∈ S(m, z)` for
//! every `m`; this is the classical necessary condition behind every sieve
//! for squares (common practice). The moduli are taken from the list
//! `64, 27, 25, 49` and the primes `11 ≤ p ≤ 109`, in that order, the first
//! `log₂(row length) + 6` of them (so that the expected number of survivors
//! per row is well below one), plus any caller [`Congruence`]s. `S(m, z)` depends only on `z mod m`; it is stored as an
//! `m`-bit mask, computed once per residue class of `z` (with `u64`
//! arithmetic on the coefficients reduced modulo `m` once). For a row, the
//! candidates `x` of an interval are packed 64 to a machine word, and for
//! each modulus a table of the 64-bit windows of the periodic mask at every
//! offset lets one load and one AND reject, in one step, all 64 candidates
//! whose residue is not in `S(m, z)`. The moduli are applied in order of
//! increasing density `|S(m, z)|/m` (recomputed per row), and the row stops
//! being sieved as soon as every word is zero. Only the surviving `x` get
//! the exact tests: `gcd(x, z) = 1` on `u64`, then `g(x, z)` in checked
//! `i128` arithmetic and an integer square root on `u128`, falling back to
//! `BigInt` when `g(x, z)` does not fit.
//!
//! # Cost and memory
//! The number of coprime pairs of height `≤ H` is about
//! `(12/π²)·H² ≈ 1.2·H²` (common practice: the density of coprime pairs is
//! `6/π²` [HardyWright, Thm. 332]). The sieve touches each of the `≈ 2H²`
//! pairs as one bit of a word, a few word operations per 64 pairs, and runs
//! the exact test on a fraction of about `2^-k` of them after `k` moduli.
//! Memory is `O(min(H, 2¹⁸))` bits for the row buffer (rows longer than
//! `2¹⁸` are cut into chunks) plus `O(Σ m²)` bits for the residue masks;
//! nothing grows like `H²`. Measured throughput is in `docs/performance.md`.
//!
//! # Budget
//! The search charges its [`Budget`] one unit per 64 candidate `x` of a row
//! (charged before the words are sieved) and one unit per exact test of a
//! sieve survivor. The charges depend only on the input, so a given budget
//! always stops at the same place.

use super::form::Quartic;
use crate::arith::word::isqrt_u128;
use crate::budget::Budget;
use crate::error::{Error, Result};
use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{Signed, ToPrimitive, Zero};

/// The largest search height accepted: `2⁶²`, so that every `x` fits an
/// `i64` with room to spare.
pub const MAX_HEIGHT: u64 = 1 << 62;

#[cfg(test)]
/// The largest modulus a caller [`Congruence`] may have.
pub const MAX_CONGRUENCE_MODULUS: u64 = 4096;

/// The largest number of caller [`Congruence`]s in one search.
pub const MAX_CONGRUENCES: usize = 1024;

/// Sieve moduli: prime powers, each with its prime.
const SIEVE_MODULI: [(u32, u32); 29] = [
    (64, 2),
    (27, 3),
    (25, 5),
    (49, 7),
    (11, 11),
    (13, 13),
    (17, 17),
    (19, 19),
    (23, 23),
    (29, 29),
    (31, 31),
    (37, 37),
    (41, 41),
    (43, 43),
    (47, 47),
    (53, 53),
    (59, 59),
    (61, 61),
    (67, 67),
    (71, 71),
    (73, 73),
    (79, 79),
    (83, 83),
    (89, 89),
    (97, 97),
    (101, 101),
    (103, 103),
    (107, 107),
    (109, 109),
];

/// The upper end of the first height block.
const FIRST_BLOCK: u64 = 32;

/// Candidates per row chunk: 4096 words of 64 bits (32 KiB of buffer).
const CHUNK_WORDS: usize = 4096;

/// A point `(x, z, y)` of `y² = g(x, z)`, normalised: `gcd(x, z) = 1`,
/// `z > 0` or `(x, z) = (1, 0)`, and `y ≥ 0`.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
#[non_exhaustive]
pub struct QuarticPoint {
    /// The first coordinate.
    pub x: BigInt,
    /// The second coordinate (`≥ 0`).
    pub z: BigInt,
    /// The square root `y ≥ 0` of `g(x, z)`.
    pub y: BigInt,
}

impl QuarticPoint {
    /// The height `max(|x|, |z|)` of the pair `(x, z)`.
    ///
    /// Example: the point `(−3, 2, y)` has height 3.
    pub fn height(&self) -> BigInt {
        let ax = self.x.abs();
        let az = self.z.abs();
        if ax >= az {
            ax
        } else {
            az
        }
    }

    /// True iff `y² = g(x, z)` for the form with coefficients
    /// `coeffs = [c4, c3, c2, c1, c0]` (the normalisation is not checked).
    ///
    /// Example: `(1, 1, 2)` lies on `y² = x⁴ + 3z⁴`.
    pub fn lies_on(&self, coeffs: &[BigInt; 5]) -> bool {
        eval_big(coeffs, &self.x, &self.z) == &self.y * &self.y
    }
}

/// The result of a search for the first point.
#[derive(Debug, Clone, PartialEq, Eq)]
#[non_exhaustive]
pub enum SearchOutcome {
    /// A point. When the budget did not run out it is the first point in the
    /// search order (so of least height). If the budget ran out after this
    /// point was found but before its height block was finished, it is still
    /// a point, but a point earlier in the order may exist; this is the only
    /// case in which the budget can end a search with `Found`.
    Found(QuarticPoint),
    /// Every normalised coprime pair of height `≤ height` was tested and none
    /// gives a point.
    NoneUpTo {
        /// The search height `H` that was reached.
        height: u64,
    },
    /// The budget ran out. Every pair of height `≤ completed_height` was
    /// tested and none gives a point; nothing is claimed above it.
    GaveUp {
        /// The height up to which the search is complete (0 if none).
        completed_height: u64,
    },
}

/// All points found by a search that may have been cut short by its budget.
#[derive(Debug, Clone, PartialEq, Eq)]
#[non_exhaustive]
pub struct SearchReport {
    /// Every point of height `≤ completed_height`, in search order, followed
    /// (only when `finished` is false) by points of larger height that were
    /// found before the budget ran out, also in search order.
    pub points: Vec<QuarticPoint>,
    /// The height up to which the search is complete.
    pub completed_height: u64,
    /// True iff the search reached the requested height.
    pub finished: bool,
}

/// A condition `(x mod m, z mod m) ∈ A` imposed by the caller on the
/// normalised pairs `(x, z)` searched (for example one found from local
/// solvability: the pairs whose image in `P¹(Z/2^k)` can lift to a point).
///
/// The condition is applied to the normalised representative (`z > 0`, or
/// `(x, z) = (1, 0)`); to constrain the point `(x : z)` rather than the pair,
/// give a set `A` closed under `(x, z) ↦ (−x, −z)`.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Congruence {
    modulus: u64,
    allowed: Vec<(u64, u64)>,
}

impl Congruence {
    #[cfg(test)]
    /// The condition that `(x mod m, z mod m)` lies in `allowed`.
    ///
    /// # Errors
    /// [`Error::InvalidArgument`] if `modulus` is 0 or larger than
    /// [`MAX_CONGRUENCE_MODULUS`], or if a residue is not in `0..modulus`.
    /// Duplicates are removed; an empty set admits no pair.
    ///
    /// Example: `Congruence::new(4, [(1, 0), (3, 0)])` keeps the pairs with
    /// `x` odd and `4 | z`.
    pub fn new(modulus: u64, allowed: impl IntoIterator<Item = (u64, u64)>) -> Result<Self> {
        check_congruence_modulus(modulus)?;
        let mut list: Vec<(u64, u64)> = Vec::new();
        for (a, b) in allowed {
            if a >= modulus || b >= modulus {
                return Err(Error::InvalidArgument {
                    reason: format!(
                        "congruence residue pair ({a}, {b}) is not reduced modulo {modulus}"
                    ),
                });
            }
            list.push((a, b));
        }
        list.sort_unstable();
        list.dedup();
        Ok(Congruence {
            modulus,
            allowed: list,
        })
    }

    #[cfg(test)]
    /// The condition `x mod m ∈ residues`, whatever `z` is.
    ///
    /// Errors as for [`Congruence::new`].
    ///
    /// Example: `Congruence::on_x(8, [1, 7])` keeps `x ≡ ±1 mod 8`.
    pub fn on_x(modulus: u64, residues: impl IntoIterator<Item = u64>) -> Result<Self> {
        check_congruence_modulus(modulus)?;
        let xs: Vec<u64> = residues.into_iter().collect();
        let mut pairs = Vec::with_capacity(xs.len().saturating_mul(modulus as usize));
        for &a in &xs {
            for b in 0..modulus {
                pairs.push((a, b));
            }
        }
        Self::new(modulus, pairs)
    }

    /// True iff the pair `(x, z)` satisfies the condition.
    ///
    /// Example: `Congruence::on_x(8, [1, 7])` admits `(−1, 5)` and not `(3, 5)`.
    pub fn admits(&self, x: i64, z: i64) -> bool {
        let m = self.modulus as i64;
        let key = (x.rem_euclid(m) as u64, z.rem_euclid(m) as u64);
        self.allowed.binary_search(&key).is_ok()
    }
}

#[cfg(test)]
fn check_congruence_modulus(modulus: u64) -> Result<()> {
    if modulus == 0 || modulus > MAX_CONGRUENCE_MODULUS {
        return Err(Error::InvalidArgument {
            reason: format!("congruence modulus {modulus} is outside 1..={MAX_CONGRUENCE_MODULUS}"),
        });
    }
    Ok(())
}

/// What to search: the height bound and optional congruence conditions.
#[derive(Debug, Clone, PartialEq, Eq)]
#[non_exhaustive]
pub struct SearchOptions {
    /// The height bound `H`: pairs with `max(|x|, z) ≤ H` are searched.
    pub height: u64,
    /// Conditions every reported pair must satisfy (all of them; the
    /// congruence sieve is crate-private).
    pub(crate) congruences: Vec<Congruence>,
}

impl SearchOptions {
    /// Search all pairs of height at most `height`, with no extra condition.
    pub fn up_to(height: u64) -> Self {
        SearchOptions {
            height,
            congruences: Vec::new(),
        }
    }

    #[cfg(test)]
    /// Adds a congruence condition.
    pub(crate) fn with_congruence(mut self, congruence: Congruence) -> Self {
        self.congruences.push(congruence);
        self
    }
}

/// The first point of `y² = g(x, z)` in the search order, among the
/// normalised coprime pairs of height at most `options.height` that satisfy
/// `options.congruences`.
///
/// `coeffs = [c4, c3, c2, c1, c0]` are the coefficients of
/// `g = c4·x⁴ + c3·x³z + c2·x²z² + c1·xz³ + c0·z⁴`. The method is the sieve
/// described in the module documentation of the quartic search; every reported point is
/// verified exactly, and a pair is rejected only when a necessary condition
/// for `g(x, z)` to be a square fails (so no point is missed).
///
/// Cases: `Found(P)` (P of least height, see [`SearchOutcome::Found`]),
/// `NoneUpTo { height }`, or `GaveUp { completed_height }` when the budget
/// runs out first.
///
/// # Errors
/// [`Error::Degenerate`] if the discriminant of `g` is 0 (in
/// particular if `g = 0`), since then the curve can have about `H²` points
/// of height `≤ H`; [`Error::InvalidArgument`] if `height > MAX_HEIGHT` or
/// there are more than `MAX_CONGRUENCES` congruences.
///
/// Cost: at most about `1.2·H²` coprime candidate pairs, sieved 64 at a time
/// (see the module documentation); less when a point of small height exists.
///
/// Example: for `y² = x⁴ + 3z⁴` (`coeffs = [1, 0, 0, 0, 3]`) the first point
/// is `(1, 0, 1)`. For `y² = 2x⁴ + 7z⁴` the pairs of height 1 are visited as
/// `(1, 0)`, `(−1, 1)`, `(0, 1)`, `(1, 1)` with values `2, 9, 7, 9`, so the
/// first point is `(−1, 1, 3)`.
///
/// ```
/// use isodescent::quartic::{search, SearchOptions, SearchOutcome};
/// use isodescent::Budget;
/// use num_bigint::BigInt;
/// let g = [2, 0, 0, 0, 7].map(BigInt::from);
/// let out = search(&g, &SearchOptions::up_to(10), &mut Budget::unlimited()).unwrap();
/// match out {
///     SearchOutcome::Found(p) => {
///         assert_eq!((p.x, p.z, p.y), (BigInt::from(-1), BigInt::from(1), BigInt::from(3)))
///     }
///     other => panic!("{other:?}"),
/// }
/// ```
pub fn search(
    coeffs: &[BigInt; 5],
    options: &SearchOptions,
    budget: &mut Budget,
) -> Result<SearchOutcome> {
    let run = run_search(coeffs, options, budget, true)?;
    if let Some(first) = run.points.into_iter().next() {
        return Ok(SearchOutcome::Found(first));
    }
    if run.finished {
        Ok(SearchOutcome::NoneUpTo {
            height: options.height,
        })
    } else {
        Ok(SearchOutcome::GaveUp {
            completed_height: run.completed_height,
        })
    }
}

#[cfg(test)]
/// Every point of `y² = g(x, z)` among the normalised coprime pairs of
/// height at most `options.height` that satisfy `options.congruences`, in
/// search order.
///
/// Same inputs, method and cost as [`search`] (always the full `≈ 1.2·H²`
/// pairs).
///
/// # Errors
/// as [`search`], and [`Error::BudgetExhausted`] if the budget runs
/// out (use [`search_report`] to keep the partial result).
///
/// Example: `y² = x⁴ − z⁴` has exactly the points `(1, 0, 1)`, `(−1, 1, 0)`,
/// `(1, 1, 0)`, by Fermat's theorem that `x⁴ − z⁴ = y²` has no solution with
/// `xyz ≠ 0` [Mordell69, ch. 4].
pub fn search_all(
    coeffs: &[BigInt; 5],
    options: &SearchOptions,
    budget: &mut Budget,
) -> Result<Vec<QuarticPoint>> {
    let run = run_search(coeffs, options, budget, false)?;
    if run.finished {
        Ok(run.points)
    } else {
        Err(Error::BudgetExhausted {
            stage: format!(
                "quartic point search (complete up to height {} of {})",
                run.completed_height, options.height
            ),
        })
    }
}

#[cfg(test)]
/// Like [`search_all`], but a budget that runs out ends the search with a
/// partial [`SearchReport`] instead of an error.
///
/// # Errors
/// [`Error::Degenerate`] and [`Error::InvalidArgument`] as in
/// [`search`].
///
/// Example: with `Budget::with_units(0)` the report has
/// `completed_height = 0` and `finished = false` (unless `H = 0`).
pub fn search_report(
    coeffs: &[BigInt; 5],
    options: &SearchOptions,
    budget: &mut Budget,
) -> Result<SearchReport> {
    run_search(coeffs, options, budget, false)
}

/// [`search`] for a [`Quartic`]: the first point of `y² = g(x, z)` in the
/// search order, among the pairs of height `≤ options.height`.
///
/// Same cases, errors (a `Quartic` is never degenerate) and cost as
/// [`search`].
///
/// Example: for `Quartic::from_i64([1, 0, 0, 0, 3])` the first point is
/// `(1, 0, 1)`.
pub fn search_quartic(
    quartic: &Quartic,
    options: &SearchOptions,
    budget: &mut Budget,
) -> Result<SearchOutcome> {
    search(quartic.coeffs(), options, budget)
}

#[cfg(test)]
/// [`search_all`] for a [`Quartic`]: every point of height
/// `≤ options.height`, in search order.
///
/// Same errors and cost as [`search_all`].
///
/// Example: for `Quartic::from_i64([1, 0, 0, 0, 1])` (`y² = x⁴ + z⁴`) the
/// points are `(1, 0, 1)` and `(0, 1, 1)` at every height `≥ 1`.
pub fn search_all_quartic(
    quartic: &Quartic,
    options: &SearchOptions,
    budget: &mut Budget,
) -> Result<Vec<QuarticPoint>> {
    search_all(quartic.coeffs(), options, budget)
}

// ---------------------------------------------------------------------------
// Driver

/// A point as found: (height, z, x, y); the derived order on the first three
/// fields is the search order.
#[derive(Debug, Clone, PartialEq, Eq, PartialOrd, Ord)]
struct Found {
    height: u64,
    z: i64,
    x: i64,
    y: BigInt,
}

impl Found {
    fn into_point(self) -> QuarticPoint {
        QuarticPoint {
            x: BigInt::from(self.x),
            z: BigInt::from(self.z),
            y: self.y,
        }
    }
}

/// Marker: the budget ran out inside the sieve.
struct OutOfBudget;

fn run_search(
    coeffs: &[BigInt; 5],
    options: &SearchOptions,
    budget: &mut Budget,
    first_only: bool,
) -> Result<SearchReport> {
    let h = options.height;
    if h > MAX_HEIGHT {
        return Err(Error::InvalidArgument {
            reason: format!("search height {h} exceeds the maximum {MAX_HEIGHT}"),
        });
    }
    if options.congruences.len() > MAX_CONGRUENCES {
        return Err(Error::InvalidArgument {
            reason: format!(
                "{} congruence conditions given, at most {MAX_CONGRUENCES} allowed",
                options.congruences.len()
            ),
        });
    }
    if discriminant_times_27(coeffs).is_zero() {
        return Err(Error::Degenerate {
            reason: format!(
                "the quartic with coefficients [{}, {}, {}, {}, {}] has a repeated factor \
                 (discriminant 0)",
                coeffs[0], coeffs[1], coeffs[2], coeffs[3], coeffs[4]
            ),
        });
    }
    let mut sieve = Sieve::new(coeffs, &options.congruences);
    let mut done: Vec<Found> = Vec::new();
    let mut completed = 0u64;
    let mut lo = 0u64;
    while lo < h {
        let hi = if lo == 0 {
            h.min(FIRST_BLOCK)
        } else {
            h.min(lo + lo / 2)
        };
        let mut block: Vec<Found> = Vec::new();
        let status = sieve.block(lo, hi, first_only, &mut block, budget);
        block.sort_unstable();
        if first_only {
            block.truncate(1);
        }
        let out_of_budget = status.is_err();
        done.extend(block);
        if out_of_budget {
            return Ok(SearchReport {
                points: done.into_iter().map(Found::into_point).collect(),
                completed_height: completed,
                finished: false,
            });
        }
        completed = hi;
        if first_only && !done.is_empty() {
            break;
        }
        lo = hi;
    }
    Ok(SearchReport {
        points: done.into_iter().map(Found::into_point).collect(),
        completed_height: h,
        finished: true,
    })
}

/// `27·Δ(g) = 4I³ − J²` for `g = a x⁴ + b x³z + c x²z² + d xz³ + e z⁴`, with
/// `I = 12ae − 3bd + c²` and `J = 72ace + 9bcd − 27ad² − 27eb² − 2c³`
/// (the classical invariants of a binary quartic, as in [BSD63, §1]; the
/// identity is checked against sympy in the tests below).
fn discriminant_times_27(coeffs: &[BigInt; 5]) -> BigInt {
    let [a, b, c, d, e] = coeffs;
    let i = BigInt::from(12) * a * e - BigInt::from(3) * b * d + c * c;
    let j = BigInt::from(72) * a * c * e + BigInt::from(9) * b * c * d
        - BigInt::from(27) * a * d * d
        - BigInt::from(27) * e * b * b
        - BigInt::from(2) * c * c * c;
    BigInt::from(4) * &i * &i * &i - &j * &j
}

fn eval_big(coeffs: &[BigInt; 5], x: &BigInt, z: &BigInt) -> BigInt {
    let mut v = coeffs[0].clone();
    let mut zp = BigInt::from(1);
    for c in &coeffs[1..] {
        zp *= z;
        v = v * x + c * &zp;
    }
    v
}

/// `g(x, z)` in `i128`, or `None` on overflow.
fn eval_i128(c: &[i128; 5], x: i64, z: i64) -> Option<i128> {
    let (x, z) = (x as i128, z as i128);
    let mut v = c[0];
    let mut zp: i128 = 1;
    for &ci in &c[1..] {
        zp = zp.checked_mul(z)?;
        v = v.checked_mul(x)?.checked_add(ci.checked_mul(zp)?)?;
    }
    Some(v)
}

// ---------------------------------------------------------------------------
// The sieve

/// One sieve modulus with its lazily computed residue masks.
///
/// Row `r` (the mask `S(m, z)` for `z ≡ r mod m`) is stored *periodically
/// extended*: bit `t` of `rows[r*wpr ..]` is bit `t mod m` of the mask, for
/// every `t < 64·wpr`, and `wpr = ⌈m/64⌉ + 1`, so the 64 bits starting at any
/// offset `o < m` are read from two consecutive words.
struct Modulus {
    m: u32,
    /// Words per extended row.
    wpr: usize,
    /// The extended row masks.
    rows: Vec<u64>,
    /// `|S(m, r)|`, or `u32::MAX` if row `r` is not computed yet.
    pop: Vec<u32>,
    /// `⌊2³²·|S(m, r)|/m⌋` for computed rows.
    density: Vec<u64>,
    /// What defines the rows.
    kind: ModKind,
    /// 64-bit windows of one row at every offset, built for long rows.
    windows: Vec<u64>,
    /// The row whose windows are in `windows` (`u32::MAX`: none).
    windows_row: u32,
}

enum ModKind {
    /// `g(x, z)` must be a square mod `m = p^k`, and `p ∤ gcd(x, z)`.
    Square {
        p: u32,
        /// `g`'s coefficients mod `m`.
        c: [u64; 5],
        /// `is_square[v]` for `v` in `0..m`.
        is_square: Vec<bool>,
    },
    /// A caller condition; all rows are filled in at construction.
    Caller,
}

impl Modulus {
    fn square(m: u32, p: u32, coeffs: &[BigInt; 5]) -> Self {
        let mm = BigInt::from(m);
        let c = coeffs.clone().map(|ci| {
            ci.mod_floor(&mm).to_u64().unwrap_or(0) // in 0..m, always fits
        });
        let mut is_square = vec![false; m as usize];
        for t in 0..m as u64 {
            is_square[((t * t) % m as u64) as usize] = true;
        }
        let wpr = (m as usize).div_ceil(64) + 1;
        Modulus {
            m,
            wpr,
            rows: vec![0; wpr * m as usize],
            pop: vec![u32::MAX; m as usize],
            density: vec![0; m as usize],
            kind: ModKind::Square { p, c, is_square },
            windows: Vec::new(),
            windows_row: u32::MAX,
        }
    }

    fn caller(cong: &Congruence) -> Self {
        let m = cong.modulus as u32;
        let wpr = (m as usize).div_ceil(64) + 1;
        let mut md = Modulus {
            m,
            wpr,
            rows: vec![0u64; wpr * m as usize],
            pop: vec![0u32; m as usize],
            density: vec![0; m as usize],
            kind: ModKind::Caller,
            windows: Vec::new(),
            windows_row: u32::MAX,
        };
        for &(a, b) in &cong.allowed {
            let (a, b) = (a as usize, b as usize);
            md.rows[b * wpr + a / 64] |= 1 << (a % 64);
            md.pop[b] += 1;
        }
        for r in 0..m as usize {
            md.extend_row(r);
            md.density[r] = ((md.pop[r] as u64) << 32) / m as u64;
        }
        md
    }

    /// Copies bits `0..m` of row `r` periodically over the rest of the row.
    /// Copies in chunks of `min(m, 64)` bits, each read from bits already
    /// final (`t − m ≥ 0` and below `t`).
    fn extend_row(&mut self, r: usize) {
        let m = self.m as usize;
        let row = &mut self.rows[r * self.wpr..(r + 1) * self.wpr];
        let total = 64 * row.len();
        let mut t = m;
        while t < total {
            let len = m.min(64).min(total - t);
            let u = t - m;
            // bits u .. u+len of the row
            let (q, sh) = (u / 64, u % 64);
            let mut bits = row[q] >> sh;
            if sh != 0 && q + 1 < row.len() {
                bits |= row[q + 1] << (64 - sh);
            }
            if len < 64 {
                bits &= (1u64 << len) - 1;
            }
            let (q, sh) = (t / 64, t % 64);
            row[q] |= bits << sh;
            if sh != 0 && q + 1 < row.len() {
                row[q + 1] |= bits >> (64 - sh);
            }
            t += len;
        }
    }

    /// Makes sure row `r` is computed; returns its population.
    fn ensure_row(&mut self, r: u32) -> u32 {
        let ri = r as usize;
        if self.pop[ri] != u32::MAX {
            return self.pop[ri];
        }
        if let ModKind::Square { p, .. } = self.kind {
            if r > 1 && r % p != 0 {
                let pop = self.ensure_row(1);
                if self.permute_unit_row(r) {
                    self.pop[ri] = pop;
                    self.density[ri] = self.density[1];
                    return pop;
                }
            }
        }
        let mut count = 0u32;
        if let ModKind::Square { p, c, is_square } = &self.kind {
            let m = self.m as u64;
            let zr = r as u64;
            // d_i = c_i · z^i mod m, so g(x, z) ≡ d0 x⁴ + d1 x³ + ... + d4; with
            // all d_i, x < m ≤ 2^7 the Horner value stays below 2^40.
            let mut d = [0u64; 5];
            let mut zp = 1u64;
            for (di, ci) in d.iter_mut().zip(c.iter()) {
                *di = (ci * zp) % m;
                zp = (zp * zr) % m;
            }
            let p = *p as u64;
            let p_divides_z = zr % p == 0;
            let row = &mut self.rows[ri * self.wpr..(ri + 1) * self.wpr];
            // g(xr) mod m for xr = 0, 1, 2, … by forward differences: the
            // value and its first three differences step by additions mod m,
            // the fourth difference is the constant 24·d0 (common practice;
            // the same values as Horner's rule, checked by a test).
            let g = |x: u64| ((((d[0] * x + d[1]) * x + d[2]) * x + d[3]) * x + d[4]) % m;
            let add = |u: u64, v: u64| if u + v >= m { u + v - m } else { u + v };
            let sub = |u: u64, v: u64| if u >= v { u - v } else { u + m - v };
            let g0 = g(0);
            let g1 = g(1);
            let g2 = g(2);
            let g3 = g(3);
            let g4 = g(4);
            let mut v = g0;
            let mut d1 = sub(g1, g0);
            let e1 = sub(g2, g1);
            let e2 = sub(g3, g2);
            let e3 = sub(g4, g3);
            let mut d2 = sub(e1, d1);
            let f2 = sub(e2, e1);
            let f3 = sub(e3, e2);
            let mut d3 = sub(f2, d2);
            let d4 = sub(sub(f3, f2), d3);
            let mut xp = 0u64; // xr mod p
            for xr in 0..m {
                let coprime_ok = !(p_divides_z && xp == 0);
                xp += 1;
                if xp == p {
                    xp = 0;
                }
                if coprime_ok && is_square[v as usize] {
                    row[(xr / 64) as usize] |= 1 << (xr % 64);
                    count += 1;
                }
                v = add(v, d1);
                d1 = add(d1, d2);
                d2 = add(d2, d3);
                d3 = add(d3, d4);
            }
            self.extend_row(ri);
        }
        self.pop[ri] = count;
        self.density[ri] = ((count as u64) << 32) / self.m as u64;
        count
    }

    /// Row `r` for a unit `r` mod `p` (`r > 1`, row 1 computed) from row 1:
    /// `g(x, r) = r⁴·g(x/r, 1)` and `r⁴ = (r²)²` is a unit square mod `m`, so
    /// `g(x, r)` is a square mod `m` iff `g(x·r⁻¹, 1)` is, and `p ∤ r` makes
    /// the coprimality condition hold in both rows (common practice).
    /// Bit `x` of row `r` is bit `x·r⁻¹ mod m` of row 1. False (nothing
    /// written) if `r` has no inverse mod `m`, which a unit always has.
    fn permute_unit_row(&mut self, r: u32) -> bool {
        let m = u64::from(self.m);
        let Some(rinv) = crate::arith::word::inv_mod(u64::from(r), m) else {
            return false;
        };
        let (w, ri) = (self.wpr, r as usize);
        let (head, tail) = self.rows.split_at_mut(ri * w);
        let (one, row) = (&head[w..2 * w], &mut tail[..w]);
        let mut y = 0u64; // x·r⁻¹ mod m
        for x in 0..m {
            if one[(y / 64) as usize] >> (y % 64) & 1 == 1 {
                row[(x / 64) as usize] |= 1 << (x % 64);
            }
            y += rinv;
            if y >= m {
                y -= m;
            }
        }
        self.extend_row(ri);
        true
    }

    /// Bits `o, o+1, …, o+63` of the periodic row mask `r` (`o < m`).
    #[inline(always)]
    fn window(&self, r: usize, o: usize) -> u64 {
        let q = r * self.wpr + (o >> 6);
        let s = o & 63;
        (self.rows[q] >> s) | ((self.rows[q + 1] << 1) << (63 - s))
    }

    /// Fills `windows[o] = window(r, o)` for every offset `o < m`.
    fn ensure_windows(&mut self, r: u32) {
        if self.windows_row == r {
            return;
        }
        let m = self.m as usize;
        let mut windows = std::mem::take(&mut self.windows);
        windows.clear();
        windows.extend((0..m).map(|o| self.window(r as usize, o)));
        self.windows = windows;
        self.windows_row = r;
    }
}

struct Sieve {
    moduli: Vec<Modulus>,
    /// Coefficients as `i128` when they all fit an `i64`.
    small: Option<[i128; 5]>,
    big: [BigInt; 5],
    congruences: Vec<Congruence>,
    buf: Vec<u64>,
    /// Per-row order of the moduli: (density << 16 | modulus index, row).
    keys: Vec<(u64, u32)>,
    /// Words in the current row.
    row_words: usize,
    /// The number of caller moduli (they come first in `moduli`).
    n_caller: usize,
    /// Words per chunk of a row (`CHUNK_WORDS` except in tests).
    chunk_words: usize,
}

impl Sieve {
    fn new(coeffs: &[BigInt; 5], congruences: &[Congruence]) -> Self {
        let mut moduli: Vec<Modulus> = congruences.iter().map(Modulus::caller).collect();
        for &(m, p) in &SIEVE_MODULI {
            moduli.push(Modulus::square(m, p, coeffs));
        }
        let mut small = [0i128; 5];
        let mut fits = true;
        for (s, c) in small.iter_mut().zip(coeffs.iter()) {
            match c.to_i64() {
                Some(v) => *s = v as i128,
                None => fits = false,
            }
        }
        Sieve {
            moduli,
            small: fits.then_some(small),
            big: coeffs.clone(),
            congruences: congruences.to_vec(),
            buf: Vec::new(),
            keys: Vec::new(),
            row_words: 0,
            n_caller: congruences.len(),
            chunk_words: CHUNK_WORDS,
        }
    }

    /// Sieves the pairs of height in `(lo, hi]`, pushing points to `out`.
    /// With `first_only`, rows with `z` above the least height found are
    /// skipped (they cannot hold an earlier point).
    fn block(
        &mut self,
        lo: u64,
        hi: u64,
        first_only: bool,
        out: &mut Vec<Found>,
        budget: &mut Budget,
    ) -> std::result::Result<(), OutOfBudget> {
        if lo == 0 && self.congruences.iter().all(|c| c.admits(1, 0)) {
            budget.spend(1).map_err(|_| OutOfBudget)?;
            if let Some(y) = self.exact_square(1, 0) {
                out.push(Found {
                    height: 1,
                    z: 0,
                    x: 1,
                    y,
                });
            }
        }
        let (lo_i, hi_i) = (lo as i64, hi as i64);
        for z in 1..=hi {
            if first_only {
                if let Some(best) = out.iter().map(|f| f.height).min() {
                    if z > best {
                        break;
                    }
                }
            }
            if z <= lo {
                self.prepare_row(z, 2 * ((hi - lo) as usize).div_ceil(64));
                self.sieve_interval(z as i64, -hi_i, -lo_i - 1, out, budget)?;
                self.sieve_interval(z as i64, lo_i + 1, hi_i, out, budget)?;
            } else {
                self.prepare_row(z, (2 * hi as usize + 1).div_ceil(64));
                self.sieve_interval(z as i64, -hi_i, hi_i, out, budget)?;
            }
        }
        Ok(())
    }

    /// Computes the row masks for `z` and orders the moduli by density;
    /// `row_words` is the number of words the row will be sieved in.
    fn prepare_row(&mut self, z: u64, row_words: usize) {
        self.row_words = row_words;
        self.keys.clear();
        // About log2(candidates in the row) + 6 moduli reduce the survivors
        // of a row to a small fraction of one; more only cost set-up time.
        let wanted =
            (64 - (64 * row_words as u64).leading_zeros() as usize + 6).min(SIEVE_MODULI.len());
        let active = self.n_caller + wanted;
        for (k, md) in self.moduli.iter_mut().take(active).enumerate() {
            let r = (z % md.m as u64) as u32;
            let pop = md.ensure_row(r);
            if pop < md.m {
                // Density pop/m in 32-bit fixed point, then the index, packed
                // into one sort key (ties keep the index order).
                let key = (md.density[r as usize] << 16) | k as u64;
                self.keys.push((key, r));
            }
        }
        self.keys.sort_unstable_by_key(|&(key, _)| key);
    }

    /// Sieves `x ∈ [a, b]` in row `z` (moduli already prepared).
    fn sieve_interval(
        &mut self,
        z: i64,
        a: i64,
        b: i64,
        out: &mut Vec<Found>,
        budget: &mut Budget,
    ) -> std::result::Result<(), OutOfBudget> {
        let mut start = a;
        while start <= b {
            let len = ((b - start) as u64 + 1).min((self.chunk_words * 64) as u64) as usize;
            let nwords = len.div_ceil(64);
            budget.spend(nwords as u64).map_err(|_| OutOfBudget)?;
            self.buf.clear();
            self.buf.resize(nwords, !0u64);
            if len % 64 != 0 {
                self.buf[nwords - 1] = (1u64 << (len % 64)) - 1;
            }
            for &(key, row) in &self.keys {
                let md = &mut self.moduli[(key & 0xffff) as usize];
                let m = md.m as usize;
                let mut r = start.rem_euclid(m as i64) as usize;
                let step = 64 % m;
                let mut any = 0u64;
                if self.row_words >= m {
                    // Long row: one table of windows, one load per word.
                    md.ensure_windows(row);
                    for w in self.buf.iter_mut() {
                        *w &= md.windows[r];
                        any |= *w;
                        r += step;
                        if r >= m {
                            r -= m;
                        }
                    }
                } else {
                    // Short row: read each window from the extended mask.
                    let ri = row as usize;
                    for w in self.buf.iter_mut() {
                        *w &= md.window(ri, r);
                        any |= *w;
                        r += step;
                        if r >= m {
                            r -= m;
                        }
                    }
                }
                if any == 0 {
                    break;
                }
            }
            for j in 0..nwords {
                let mut w = self.buf[j];
                while w != 0 {
                    let bit = w.trailing_zeros() as i64;
                    w &= w - 1;
                    let x = start + 64 * j as i64 + bit;
                    if x.unsigned_abs().gcd(&(z as u64)) != 1 {
                        continue;
                    }
                    budget.spend(1).map_err(|_| OutOfBudget)?;
                    if self.small.is_none() {
                        // A square-root test on big values is slow next
                        // to a unit: read the clock at each one.
                        budget.check_deadline().map_err(|_| OutOfBudget)?;
                    }
                    if let Some(y) = self.exact_square(x, z) {
                        out.push(Found {
                            height: x.unsigned_abs().max(z as u64),
                            z,
                            x,
                            y,
                        });
                    }
                }
            }
            start += len as i64;
        }
        Ok(())
    }

    /// `Some(y)` with `y ≥ 0`, `y² = g(x, z)`, if `g(x, z)` is a square.
    fn exact_square(&self, x: i64, z: i64) -> Option<BigInt> {
        if let Some(c) = &self.small {
            if let Some(v) = eval_i128(c, x, z) {
                if v < 0 {
                    return None;
                }
                let v = v as u128;
                let r = isqrt_u128(v);
                return (r * r == v).then(|| BigInt::from(r));
            }
        }
        let v = eval_big(&self.big, &BigInt::from(x), &BigInt::from(z));
        if v.is_negative() {
            return None;
        }
        let r = v.sqrt();
        (&r * &r == v).then_some(r)
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // tests may unwrap
mod tests {
    #[test]
    fn stepped_rows_agree_with_horner() {
        // Each computed row against the defining condition evaluated
        // directly: g(x, r) a square mod m and p ∤ gcd(x, r).
        let coeffs = [
            BigInt::from(-7),
            BigInt::from(123_456_789),
            BigInt::from(-3),
            BigInt::from(10).pow(25) + 1,
            BigInt::from(5),
        ];
        for &(m, p) in &SIEVE_MODULI {
            let mut md = Modulus::square(m, p, &coeffs);
            let mm = i128::from(m);
            let c: Vec<i128> = coeffs
                .iter()
                .map(|ci| (ci % BigInt::from(m)).to_i128().unwrap().rem_euclid(mm))
                .collect();
            let squares: Vec<i128> = (0..mm).map(|t| t * t % mm).collect();
            for r in 0..m {
                let pop = md.ensure_row(r);
                let mut count = 0;
                let mut wants = Vec::new();
                for x in 0..m {
                    let (xi, zi) = (i128::from(x), i128::from(r));
                    let v = (c[0] * xi.pow(4) % mm
                        + c[1] * xi.pow(3) % mm * zi % mm
                        + c[2] * xi * xi % mm * (zi * zi % mm) % mm
                        + c[3] * xi % mm * (zi.pow(3) % mm) % mm
                        + c[4] * (zi.pow(4) % mm))
                        % mm;
                    let want = squares.contains(&v) && !(x % p == 0 && r % p == 0);
                    let got = md.window(r as usize, x as usize) & 1 == 1;
                    assert_eq!(got, want, "m = {m}, r = {r}, x = {x}");
                    count += u32::from(want);
                    wants.push(want);
                }
                assert_eq!(pop, count, "m = {m}, r = {r}");
                // The periodic extension: 64 bits from every offset.
                for o in 0..m as usize {
                    let w = md.window(r as usize, o);
                    for k in 0..64 {
                        let want = wants[(o + k) % m as usize];
                        assert_eq!(w >> k & 1 == 1, want, "m = {m}, r = {r}, o = {o}, k = {k}");
                    }
                }
            }
        }
    }

    use super::*;

    #[test]
    fn the_u128_square_root_is_exact_at_the_edges() {
        for n in [0u128, 1, 2, 3, 4, 15, 16, 17, u64::MAX as u128, u128::MAX] {
            let r = isqrt_u128(n);
            assert!(r * r <= n);
            assert!((r + 1).checked_mul(r + 1).map_or(true, |s| s > n));
        }
        let big = (1u128 << 63) + 12345;
        assert_eq!(isqrt_u128(big * big), big);
        assert_eq!(isqrt_u128(big * big - 1), big - 1);
    }

    #[test]
    fn the_invariant_discriminant_matches_sympy() {
        // Polynomial discriminants computed with sympy 1.14
        // (`sympy.discriminant`), and for `z(x³ + z³)` the binary-form
        // discriminant b²·disc(x³ + 1) = −27; 4I³ − J² must be 27 times these.
        let cases: [([i64; 5], i64); 4] = [
            ([1, 0, 0, 0, -1], -256),
            ([-34, 0, 0, 0, 2], -80494592),
            ([2, 3, -5, 7, 11], -5480876),
            ([0, 1, 0, 0, 1], -27),
        ];
        for (c, disc) in cases {
            let g = c.map(BigInt::from);
            assert_eq!(discriminant_times_27(&g), BigInt::from(27 * disc), "{c:?}");
        }
        let square = [1, 0, 2, 0, 1].map(BigInt::from); // (x² + z²)²
        assert!(discriminant_times_27(&square).is_zero());
    }

    #[test]
    fn the_exact_test_falls_back_to_bigint_when_i128_overflows() {
        // (x² + z²)² at x = 2^40, z = 3: g(x, z) ≈ 2^160 overflows i128.
        let g = [1, 0, 2, 0, 1].map(BigInt::from);
        let sieve = Sieve::new(&g, &[]);
        let x = 1i64 << 40;
        assert!(eval_i128(&[1, 0, 2, 0, 1], x, 3).is_none());
        let want = (BigInt::from(1) << 80u32) + 9;
        assert_eq!(sieve.exact_square(x, 3), Some(want));
        assert_eq!(
            sieve.exact_square(x, 2),
            Some((BigInt::from(1) << 80u32) + 4)
        );
        // A non-square value near 2^160: (x² + z²)² + 1 is not a square.
        let g1 = [1, 0, 2, 0, 2].map(BigInt::from);
        assert_eq!(Sieve::new(&g1, &[]).exact_square(x, 1), None);
    }

    #[test]
    fn cutting_rows_into_small_chunks_changes_nothing() {
        let g = [1, 2, -3, 4, 9].map(BigInt::from);
        let cong = Congruence::new(3, [(0, 1), (1, 1), (2, 2), (1, 0)]).unwrap();
        for congs in [vec![], vec![cong]] {
            let mut reference = Vec::new();
            let mut sieve = Sieve::new(&g, &congs);
            assert!(sieve
                .block(0, 200, false, &mut reference, &mut Budget::unlimited())
                .is_ok());
            assert!(!reference.is_empty());
            for chunk_words in [1, 2, 3] {
                let mut sieve = Sieve::new(&g, &congs);
                sieve.chunk_words = chunk_words;
                let mut got = Vec::new();
                assert!(sieve
                    .block(0, 200, false, &mut got, &mut Budget::unlimited())
                    .is_ok());
                assert_eq!(got, reference, "chunk of {chunk_words} words");
            }
        }
    }

    #[test]
    fn the_windows_of_a_row_are_its_periodic_bit_pattern() {
        let g = [1, 0, 0, 0, 1].map(BigInt::from);
        let mut md = Modulus::square(13, 13, &g);
        md.ensure_row(5);
        md.ensure_windows(5);
        // Row 5 of x⁴ + z⁴ mod 13, by hand: x⁴ + 5⁴ is a square mod 13.
        let squares: Vec<u64> = (0..13).map(|t| t * t % 13).collect();
        let bit = |x: u64| squares.contains(&((x.pow(4) + 625) % 13)) as u64;
        for o in 0..13usize {
            for i in 0..64usize {
                assert_eq!((md.windows[o] >> i) & 1, bit(((o + i) % 13) as u64));
                assert_eq!(md.windows[o], md.window(5, o));
            }
        }
    }
}
