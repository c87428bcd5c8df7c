//! A second, budgeted hunt for the points a descent did not find.
//!
//! When the rank r is known from elsewhere (the descent's own bounds, or a
//! theorem of the analytic layer) and the descent returned fewer than r
//! independent points, the missing points lie in Selmer classes the
//! descent left open: classes of the liftable subgroup I (or of the whole
//! Selmer group when the pairing is missing) outside the span K of the
//! known images. This module searches those classes again, much further:
//!
//! 1. the homogeneous space C_d itself (the 2-covering) to a moderate
//!    height, which is cheap;
//! 2. its everywhere locally soluble 4-coverings
//!    ([`crate::quartic::covering`]) to a large height.
//!
//! A point of canonical height ĥ has, on a 2-covering, coordinates of
//! size about e^(ĥ/4) and on a 4-covering about e^(ĥ/8) (the covering
//! maps have degree 2 and 4 in the coordinates; common practice), so the
//! 4-coverings reach points whose height is twice as large for the same
//! search height.
//!
//! # Order and cost
//! The work is done in rounds of growing covering height (each round
//! multiplies the height by `growth`, up to `max_covering_height`). In a
//! round every open class of both sides is visited in a fixed order
//! (complement basis vectors of K, then sums of two of them, at most
//! `max_classes_per_side` classes; never all 2^dim classes). A search to
//! height H visits about 1.2·H² pairs, so with growth g the rounds before
//! the last cost a fraction 1/(g² − 1) of it: the total is linear in the
//! work of the last round, and every search is charged to the caller's
//! [`Budget`]. Before each covering search the remaining budget is
//! compared with the search's cost, so the hunt stops (returning what it
//! has) instead of overrunning. The hunt stops as soon as the target
//! number of points is reached.
//!
//! # Independence
//! A point found in class d ∉ K on one side has α-image independent of
//! the known images on that side; the side's K then grows by d. By the
//! lemma in the documentation of [`crate::descent`] (points on E with
//! α-images independent modulo α(torsion), and φ̂ of points on E' with
//! α'-images independent modulo α'(torsion), are independent in
//! E(Q)/E(Q)_tors), the descent's points together with the new ones are
//! independent. Independence is thus certified by F₂-linear algebra,
//! not by heights.

use num_bigint::BigInt;
use num_traits::{One, Signed, Zero};

use super::isogeny_side::{connecting_value, SelmerSide, TWISTS_PER_CLASS};
use super::{DescentReport, IsogenyDescent};
use crate::budget::Budget;
use crate::curve::{Curve, Point};
use crate::error::{Error, Result};
use crate::quartic::search::{search, SearchOptions, SearchOutcome, MAX_HEIGHT};
use crate::quartic::Quartic;
use crate::second::covering::{
    second_descent, second_descent_on_twists, SecondDescentOptions, SecondDescentOutcome,
};
use crate::second::pairing::{class_lift, soluble_twists};
use crate::selmer::f2::{BitVec, Subspace};
use crate::selmer::group::LocalCondition;

/// Knobs of [`search_missing_points`].
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct DeepSearchOptions {
    /// Covering height of the first round.
    pub first_covering_height: u64,
    /// Largest covering height (the last round).
    pub max_covering_height: u64,
    /// Factor between the heights of two rounds (at least 2).
    pub growth: u64,
    /// Largest height of the direct search on C_d (the 2-covering); in a
    /// round of covering height H it is min(2H, this).
    pub max_space_height: u64,
    /// Most open classes visited per side and round.
    pub max_classes_per_side: usize,
    /// Most twists (4-coverings) searched per class.
    pub twists_per_class: usize,
    /// Most twists examined by the untargeted 4-covering route (used when
    /// the lifting pairing is missing).
    pub max_twists: usize,
    /// For rank one with the analytic side available: search only as high
    /// as the height predicted by the Birch–Swinnerton-Dyer formula needs
    /// (the schedule is shortened to that height). A heuristic for the budget,
    /// never used in a proof. Default true.
    pub bsd_guided: bool,
    /// Rank two and more, with the analytic side available: the largest
    /// covering height a hunt sized by the predicted regulator may reach
    /// (the schedule is sized by that regulator). Default 16 384, about
    /// 9·10⁷ work units for a hunt that finds nothing.
    pub reach_covering_height: u64,
    /// Rank one, sized by the BSD prediction: the largest covering height
    /// for the open classes on the curve's own side of an isogeny (the
    /// domain E of φ, where a generator of height ĥ lies at covering
    /// height about e^{ĥ/4} instead of e^{ĥ/8}; docs/deep_search.md).
    /// Default 2¹⁷ = 131 072, about 5.4·10⁸ work units per covering; such a
    /// round is skipped, not cut, when the budget cannot pay for it.
    pub own_side_max_height: u64,
    /// Per-side largest heights `[E, E′]` set by [`DeepSearchOptions::guided`]
    /// (`None`: both sides go to `max_covering_height`).
    side_limits: Option<[u64; 2]>,
}

impl Default for DeepSearchOptions {
    fn default() -> Self {
        DeepSearchOptions {
            first_covering_height: 256,
            max_covering_height: 4096,
            growth: 4,
            max_space_height: 2048,
            max_classes_per_side: 8,
            twists_per_class: 2 * TWISTS_PER_CLASS,
            max_twists: 1 << 6,
            bsd_guided: true,
            reach_covering_height: 1 << 14,
            own_side_max_height: 1 << 17,
            side_limits: None,
        }
    }
}

/// Calibration of the reach of the 4-covering search: on the
/// congruent-number curves n ≤ 1000 the points found by a search to
/// covering height H have ĥ ≤ 8·ln H + c with c between 14 and 19
/// (docs/deep_search.md, "Guided by the BSD prediction").
const REACH_OFFSET: f64 = 17.0;

/// Headroom of the search height over the calibrated need: a factor
/// e^{SLACK/8} in H.
const REACH_SLACK: f64 = 14.0;

/// The covering height at which a point of height `h` is expected,
/// with headroom: `exp((h − REACH_OFFSET + REACH_SLACK)/8)`.
fn height_for(h: f64) -> f64 {
    ((h - REACH_OFFSET + REACH_SLACK) / 8.0).exp()
}

/// Calibration on the curve's own side (the domain E of φ): a generator
/// of height ĥ whose class lies in E(Q)/φ̂(E′(Q)) was found at covering
/// height H with ĥ − 4·ln H between 0.9 and 3.5 on the eight box curves
/// of docs/deep_search.md ("The curve's own side").
const OWN_REACH_OFFSET: f64 = 3.5;

/// The own-side rounds stop at `e^{(ĥ + OWN_SLACK)/4}`, a factor
/// `e^{(OWN_SLACK + 0.9)/4} ≈ 1.6` above the largest height measured.
const OWN_SLACK: f64 = 1.0;

/// Work units all late rounds (own side, above the common height) of one
/// hunt may spend together: about two covering searches at 2¹⁷ (a
/// second or two each on the development machine, docs/performance.md).
const LATE_UNITS: u64 = 1_200_000_000;

/// The room left for a late round at height `h` (`None` for a regular
/// round); the first late round fixes `late_start`, the units spent before.
fn late_room(
    options: &DeepSearchOptions,
    h: u64,
    late_start: &mut Option<u64>,
    budget: &Budget,
) -> Option<u64> {
    if !options.is_late(h) {
        return None;
    }
    let start = *late_start.get_or_insert(budget.spent());
    Some(LATE_UNITS.saturating_sub(budget.spent().saturating_sub(start)))
}

impl DeepSearchOptions {
    /// The options for a rank-one hunt sized by the Birch–Swinnerton-Dyer
    /// formula. `predicted` is the regulator that formula gives with
    /// `#Ш = 1`; the descent proves `#Ш ≥ 2^sha2_dim`, and in general the
    /// generator has height `predicted/(2^sha2_dim·m²)` for an integer `m`
    /// (odd when `sha2_dim = 0`, for then `Ш[2] = 0`). The largest such
    /// value within reach of `max_covering_height` (`ĥ ≤ 8·ln H + 17`, the
    /// calibration in docs/deep_search.md) is the target, and the rounds
    /// stop at `e^{(ĥ − 3)/8}`, a factor of about 6 above the calibrated
    /// need, clamped to `[first_covering_height, max_covering_height]`.
    /// When the prediction with `#Ш = 1` is within reach (of
    /// `reach_covering_height`), the rounds are set per side instead: E′'s
    /// side to `e^{(ĥ − 3)/8}` or beyond as above, E's own side (where a
    /// generator lies at about `e^{ĥ/4}`) on to `e^{(ĥ + 1)/4}`, at most
    /// `own_side_max_height` (docs/deep_search.md, "The curve's own side").
    /// Unchanged options when `bsd_guided` is off or the prediction is not
    /// a positive number. Only the amount of searching changes; what is
    /// found is proven as always.
    pub(crate) fn guided(&self, predicted: f64, sha2_dim: usize) -> DeepSearchOptions {
        let mut o = self.clone();
        if !(self.bsd_guided && predicted.is_finite() && predicted > 0.0) {
            return o;
        }
        let base = predicted / 2f64.powi(sha2_dim.min(60) as i32);
        let max_h = self.max_covering_height as f64;
        let far_h = self.max_covering_height.max(self.reach_covering_height) as f64;
        let reach = 8.0 * far_h.ln() + REACH_OFFSET;
        let step = if sha2_dim == 0 { 2 } else { 1 };
        let mut m = 1u32;
        let target = loop {
            let c = base / f64::from(m * m);
            if c <= reach || m > 1000 {
                break c;
            }
            m += step;
        };
        if m == 1 {
            // The prediction with #Ш = 1 is within reach: the full rounds
            // (which stop at the first point). Stopping them earlier at
            // the calibrated height lost generators: on the box
            // |a|, |b| ≤ 100, 109 curves of predicted height 10–90 whose
            // points need covering heights far above e^{(ĥ − 3)/8}
            // (docs/deep_search.md). When even the calibration's headroom
            // fits in the default rounds (e^{(ĥ − 3)/8} ≤ max), a point
            // missed there lies on a covering far larger than its height
            // suggests; one more round, to `reach_covering_height`. When
            // it does not, the rounds go on to e^{(ĥ − 3)/8}, at most
            // `reach_covering_height`.
            let far = self.max_covering_height.max(self.reach_covering_height);
            let need = height_for(target);
            let common = if need <= max_h {
                far
            } else {
                (need.ceil() as u64).clamp(self.max_covering_height, far)
            };
            // The curve's own side: a generator whose class lies there
            // needs e^{ĥ/4}, not e^{ĥ/8} (docs/deep_search.md); rounds to
            // e^{(ĥ + 1)/4} for that side only, when the calibration
            // puts the point below `own_side_max_height`.
            let own_cap = self.own_side_max_height;
            let own_reach = 4.0 * (own_cap as f64).ln() + OWN_REACH_OFFSET;
            let own = if target <= own_reach {
                (((target + OWN_SLACK) / 4.0).exp().ceil() as u64).min(own_cap)
            } else {
                0
            };
            let limits = [common.max(own), common];
            o.max_covering_height = limits[0];
            o.side_limits = Some(limits);
            return o;
        }
        // Never below the first round: a round at the first height is
        // cheap (1/256 of the default last round).
        let floor = self.first_covering_height as f64;
        let h = height_for(target).max(floor).min(max_h).ceil() as u64;
        o.max_covering_height = h.clamp(self.first_covering_height, self.max_covering_height);
        o
    }

    /// The options for a hunt for the last missing generator of a curve
    /// of rank r ≥ 2, sized by the Birch–Swinnerton-Dyer formula.
    /// `predicted` is the height that formula gives the missing generator
    /// with `#Ш = 1`: the predicted regulator divided by the regulator of
    /// the r − 1 known points (for a reduced basis the last minimum lies
    /// between that quotient and 4/3 of it, common practice). When that
    /// height, divided by `2^sha2_dim` (Ш\[2\] as the descent proves it), is
    /// beyond the calibrated reach of `max_covering_height`
    /// (`ĥ ≤ 8·ln H + 17`) but within reach of `reach_covering_height`,
    /// the rounds go on to `reach_covering_height`; otherwise the options
    /// are unchanged. Only the amount of searching changes; what is found
    /// is proven as always.
    pub(crate) fn guided_rank_two(&self, predicted: f64, sha2_dim: usize) -> DeepSearchOptions {
        let mut o = self.clone();
        if !(self.bsd_guided && predicted.is_finite() && predicted > 0.0) {
            return o;
        }
        let h = predicted / 2f64.powi(sha2_dim.min(60) as i32);
        let reach = 8.0 * (self.reach_covering_height as f64).ln() + REACH_OFFSET;
        o.side_limits = None;
        let need = height_for(h);
        if need > self.max_covering_height as f64
            && h <= reach
            && self.reach_covering_height > self.max_covering_height
        {
            o.max_covering_height = (need.ceil() as u64).min(self.reach_covering_height);
        }
        o
    }

    fn check(&self) -> Result<()> {
        let bad = |reason: &str| {
            Err(Error::InvalidArgument {
                reason: format!("deep search options: {reason}"),
            })
        };
        if self.first_covering_height == 0 || self.first_covering_height > self.max_covering_height
        {
            return bad("need 0 < first_covering_height ≤ max_covering_height");
        }
        // 2⁶²/… would overflow the sieve's cost estimate long before; keep
        // heights where H² fits comfortably in a u64.
        if self.max_covering_height > (1 << 24)
            || self.max_space_height > (1 << 24)
            || self.reach_covering_height > (1 << 24)
            || self.own_side_max_height > (1 << 24)
        {
            return bad("heights above 2^24 are not supported");
        }
        if self.growth < 2 || self.growth > 1 << 10 {
            return bad("growth must lie in 2..=1024");
        }
        if self.twists_per_class == 0 || self.max_twists == 0 {
            return bad("twist counts must be positive");
        }
        debug_assert!(self.max_covering_height <= MAX_HEIGHT);
        Ok(())
    }

    /// The covering heights of the rounds, increasing (with each side's
    /// own last height when [`DeepSearchOptions::guided`] set them).
    fn rounds(&self) -> Vec<u64> {
        let mut hs = Vec::new();
        let mut h = self.first_covering_height;
        loop {
            hs.push(h);
            if h >= self.max_covering_height {
                break;
            }
            h = h.saturating_mul(self.growth).min(self.max_covering_height);
        }
        if let Some(limits) = self.side_limits {
            for l in limits {
                if l >= self.first_covering_height && l <= self.max_covering_height {
                    hs.push(l);
                }
            }
            hs.sort_unstable();
            hs.dedup();
        }
        hs
    }

    /// The largest covering height for side `s` (0: E, 1: E′).
    fn side_limit(&self, s: usize) -> u64 {
        self.side_limits.map_or(self.max_covering_height, |l| {
            l[s].min(self.max_covering_height)
        })
    }

    /// Rounds above the common limit of both sides: run only where the
    /// budget can pay for them (skipped, not cut, otherwise).
    fn is_late(&self, h: u64) -> bool {
        self.side_limits.is_some_and(|l| h > l[0].min(l[1]))
    }
}

/// Work units of one sieved search to height h (one unit per 64
/// candidates, about 2h² candidates; [`crate::quartic::search`]), with
/// room for the exact tests of the survivors.
fn search_cost(h: u64) -> u64 {
    (2 * h * h) / 64 + 4 * h + 64
}

/// One side of one isogeny during the hunt.
struct SideHunt<'a> {
    side: &'a SelmerSide,
    /// The side's curve y² = x³ + a x² + b x.
    curve: &'a Curve,
    /// Where the classes are searched: I, or Sel without a pairing.
    space: Subspace,
    /// Span of the images known so far (grows).
    known: Subspace,
    conditions: Vec<LocalCondition>,
    /// Classes (as integers) whose direct and covering searches at the
    /// current round are done.
    done: Vec<BigInt>,
}

impl<'a> SideHunt<'a> {
    fn new(side: &'a SelmerSide, curve: &'a Curve) -> Self {
        let space = match side.liftable() {
            Some(l) => l.clone(),
            None => side.group.clone(),
        };
        let conditions = side
            .local_images
            .iter()
            .map(|w| LocalCondition::from_masks(w.place.clone(), &w.members))
            .collect();
        SideHunt {
            side,
            curve,
            space,
            known: side.known.clone(),
            conditions,
            done: Vec::new(),
        }
    }

    /// The open classes in the fixed order: complement basis vectors of K
    /// in the search space, then sums of two, at most `max` of them, each
    /// moved to a small representative of its coset.
    fn open_classes(&self, max: usize) -> Vec<(BigInt, BitVec)> {
        let rest = self.known.complement_in(&self.space);
        let mut out: Vec<(BigInt, BitVec)> = Vec::new();
        let push = |v: BitVec, out: &mut Vec<(BigInt, BitVec)>| {
            let (d, v) = small_representative(self, &v);
            if !d.is_one() && !out.iter().any(|(e, _)| *e == d) {
                out.push((d, v));
            }
        };
        for v in &rest {
            if out.len() >= max {
                return out;
            }
            push(v.clone(), &mut out);
        }
        for i in 0..rest.len() {
            for j in i + 1..rest.len() {
                if out.len() >= max {
                    return out;
                }
                push(rest[i].add(&rest[j]), &mut out);
            }
        }
        out
    }
}

/// x moved greedily inside x + K to a class of small |d| (each step
/// lowers |d|, so at most a bounded number of passes).
fn small_representative(hunt: &SideHunt<'_>, x: &BitVec) -> (BigInt, BitVec) {
    let qs2 = &hunt.side.qs2;
    let y = super::isogeny_side::smallest_in_coset(qs2, x, &hunt.known);
    (qs2.integer(&y), y)
}

/// A point found on one side: on that side's curve, with its class.
struct Catch {
    point: Point,
    class: BitVec,
}

/// The direct search on C_d to height `h` (charged to `budget`).
fn search_space(
    hunt: &SideHunt<'_>,
    d: &BigInt,
    h: u64,
    budget: &mut Budget,
) -> Result<Option<Point>> {
    let (a, b) = (&hunt.side.a(), &hunt.side.b());
    let q = Quartic::two_isogeny_space(d, a, b)?;
    let outcome = search(q.coeffs(), &SearchOptions::up_to(h), budget)?;
    let SearchOutcome::Found(qp) = outcome else {
        return Ok(None);
    };
    if qp.z.is_zero() {
        return Ok(None);
    }
    // y² = d M⁴ + a M² e² + (b/d) e⁴ with the factor f = |d / gcd(d, b)|
    // taken out of N (the integral model of the quartic layer).
    let g = num_integer::Integer::gcd(d, b);
    let f = (d / &g).abs();
    let m = num_rational::BigRational::from_integer(qp.x.clone());
    let e = num_rational::BigRational::from_integer(qp.z.clone());
    let n = num_rational::BigRational::new(qp.y.clone(), f);
    let dq = num_rational::BigRational::from_integer(d.clone());
    let x = &dq * &m * &m / (&e * &e);
    let y = &dq * &m * &n / (&e * &e * &e);
    Ok(Some(Point::new(x, y)))
}

/// The 4-covering route on C_d to height `h`: on a few soluble twists of
/// the class when the pairing is known, else on all twists.
fn search_coverings(
    hunt: &SideHunt<'_>,
    d: &BigInt,
    h: u64,
    options: &DeepSearchOptions,
    late: Option<u64>,
    budget: &mut Budget,
) -> Result<Option<Point>> {
    let mut sd = SecondDescentOptions::default();
    sd.search_height = h;
    sd.search_units = sd.search_units.max(search_cost(h));
    sd.max_twists = options.max_twists;
    sd.covariant_reduction = true;
    let outcome = if hunt.side.pairing.is_some() {
        let lift = class_lift(&hunt.side.model, d, &hunt.side.qs2, budget)?;
        let mut twists = soluble_twists(
            &lift,
            &hunt.side.qs2,
            &hunt.conditions,
            options.twists_per_class,
            budget,
        )?;
        if twists.is_empty() {
            return Ok(None);
        }
        let needed = search_cost(h).saturating_mul(twists.len() as u64);
        if let Some(room) = late {
            // A late round (own side, above the common height) searches
            // only the twists its room and the budget can pay for, first
            // ones first; nothing at all is skipped, not cut.
            let room = budget.remaining().map_or(room, |r| r.min(room));
            let affordable = (room / search_cost(h)) as usize;
            if affordable == 0 {
                return Ok(None);
            }
            twists.truncate(affordable);
        } else if budget.remaining().is_some_and(|r| r < needed) {
            return Err(exhausted());
        }
        second_descent_on_twists(&hunt.side.model, d, &lift.conic_point, &twists, &sd, budget)?
    } else {
        let needed = search_cost(h).saturating_mul(options.max_twists as u64);
        let room = match late {
            Some(room) => budget.remaining().map_or(room, |r| r.min(room)),
            None => budget.remaining().unwrap_or(u64::MAX),
        };
        if room < needed {
            if late.is_some() {
                return Ok(None);
            }
            return Err(exhausted());
        }
        second_descent(&hunt.side.model, d, &sd, budget)?
    };
    match outcome {
        SecondDescentOutcome::Point {
            point_x, point_y, ..
        } => Ok(Some(Point::new(point_x, point_y))),
        _ => Ok(None),
    }
}

fn exhausted() -> Error {
    Error::BudgetExhausted {
        stage: "deep point search".into(),
    }
}

/// Checks a point from class d and returns its class if it is new.
fn accept(hunt: &SideHunt<'_>, d: &BigInt, p: Point) -> Result<Option<Catch>> {
    if !hunt.curve.contains(&p) {
        return Err(Error::Internal {
            check: format!("deep search: point from C_{d} is not on the curve"),
        });
    }
    let Some(val) = connecting_value(hunt.side.b(), &p) else {
        return Ok(None);
    };
    let class = hunt.side.qs2.vector_rational(&val)?;
    if !hunt.space.contains(&class) {
        return Err(Error::Internal {
            check: format!("deep search: point from C_{d} has a class outside the Selmer group"),
        });
    }
    if hunt.known.contains(&class) {
        return Ok(None);
    }
    Ok(Some(Catch { point: p, class }))
}

/// One isogeny during the hunt: both sides and the points found so far
/// (on the input model).
struct IsogenyHunt<'a> {
    descent: &'a IsogenyDescent,
    sides: [SideHunt<'a>; 2],
    found: Vec<Point>,
    /// A budget (units or the clock) stopped a search of this hunt.
    cut: bool,
}

impl<'a> IsogenyHunt<'a> {
    fn new(descent: &'a IsogenyDescent) -> Self {
        IsogenyHunt {
            descent,
            sides: [
                SideHunt::new(&descent.domain, descent.model.curve()),
                SideHunt::new(&descent.codomain, descent.isogeny.codomain()),
            ],
            found: Vec::new(),
            cut: false,
        }
    }

    fn total(&self) -> usize {
        self.descent.points.len() + self.found.len()
    }

    /// One round at covering height `h`; stops early at `target` points.
    /// `Err` only for internal failures; budget exhaustion is `Ok(false)`.
    fn round(
        &mut self,
        input: &Curve,
        h: u64,
        target: usize,
        options: &DeepSearchOptions,
        late: Option<u64>,
        budget: &mut Budget,
    ) -> Result<bool> {
        let space_h = (2 * h).min(options.max_space_height);
        let spent0 = budget.spent();
        for s in 0..2 {
            if h > options.side_limit(s) {
                continue;
            }
            self.sides[s].done.clear();
            'restart: loop {
                if self.total() >= target {
                    return Ok(true);
                }
                let classes = self.sides[s].open_classes(options.max_classes_per_side);
                for (d, _) in classes {
                    if self.sides[s].done.contains(&d) {
                        continue;
                    }
                    self.sides[s].done.push(d.clone());
                    if budget.is_exhausted() {
                        self.cut = true;
                        return Ok(false);
                    }
                    let hunt = &self.sides[s];
                    let mut p = match search_space(hunt, &d, space_h, budget) {
                        Ok(p) => p,
                        Err(e) if is_budget(&e) => {
                            self.cut = true;
                            return Ok(false);
                        }
                        Err(e) => return Err(e),
                    };
                    if p.is_none() {
                        let late = late.map(|room| room.saturating_sub(budget.spent() - spent0));
                        p = match search_coverings(hunt, &d, h, options, late, budget) {
                            Ok(p) => p,
                            Err(e) if is_budget(&e) => {
                                self.cut = true;
                                return Ok(false);
                            }
                            // A class the covering machinery cannot handle
                            // (e.g. too many twists) is skipped; a failed
                            // internal check (`Error::Internal`) is not.
                            Err(Error::InvalidArgument { .. }) => None,
                            Err(e) => return Err(e),
                        };
                    }
                    let Some(p) = p else { continue };
                    let Some(catch) = accept(&self.sides[s], &d, p)? else {
                        continue;
                    };
                    let on_input = if s == 0 {
                        self.descent.model.to_input(&catch.point)
                    } else {
                        self.descent
                            .model
                            .to_input(&self.descent.isogeny.dual_image(&catch.point))
                    };
                    if !input.contains(&on_input) || on_input.is_infinity() {
                        return Err(Error::Internal {
                            check: "deep search: mapped point is not on the input curve".into(),
                        });
                    }
                    self.sides[s].known.insert(catch.class);
                    self.found.push(on_input);
                    continue 'restart;
                }
                break;
            }
        }
        Ok(self.total() >= target)
    }
}

fn is_budget(e: &Error) -> bool {
    matches!(
        e,
        Error::BudgetExhausted { .. } | Error::FactorBudgetExhausted { .. }
    )
}

/// Searches the open Selmer classes of one isogeny descent much further
/// than the descent did, until the descent's points and the new ones
/// number `target_rank`.
///
/// `curve` must be the input curve of the descent. Returns only the new
/// points, on the input model, each verified to lie on `curve`; together
/// with `descent.points` they are independent modulo torsion (module
/// documentation). Fewer than `target_rank − descent.points.len()` points
/// come back when the budget or the largest height is reached first; an
/// empty vector when nothing is missing.
///
/// # Errors
/// [`Error::InvalidArgument`] for options out of range or when
/// `target_rank` exceeds the descent's proven upper bound;
/// [`Error::Internal`] when a found point fails a check (a bug).
pub fn search_missing_points(
    curve: &Curve,
    descent: &IsogenyDescent,
    target_rank: usize,
    options: &DeepSearchOptions,
    budget: &mut Budget,
) -> Result<Vec<Point>> {
    options.check()?;
    if target_rank > descent.rank_upper {
        return Err(Error::InvalidArgument {
            reason: format!(
                "target rank {target_rank} exceeds the proven upper bound {}",
                descent.rank_upper
            ),
        });
    }
    let mut hunt = IsogenyHunt::new(descent);
    if hunt.total() >= target_rank {
        return Ok(Vec::new());
    }
    let mut late_start = None;
    for h in options.rounds() {
        let late = late_room(options, h, &mut late_start, budget);
        if hunt.round(curve, h, target_rank, options, late, budget)? || budget.is_exhausted() {
            break;
        }
    }
    Ok(hunt.found)
}

/// [`search_missing_points`] over every isogeny of a descent report,
/// round by round (all isogenies at one height before the next height),
/// so the isogeny on which the generators are smallest is the one that
/// finds them. Returns a full list of independent points on the input
/// model — the points of one isogeny's descent followed by its new points
/// — from the first isogeny that reaches `target_rank`, or else from the
/// isogeny with the most points (the descent's own points when nothing
/// was found).
///
/// # Errors
/// As [`search_missing_points`] (the target is checked against the
/// report's upper bound).
pub fn complete_report_points(
    report: &DescentReport,
    target_rank: usize,
    options: &DeepSearchOptions,
    budget: &mut Budget,
) -> Result<Vec<Point>> {
    complete_report_points_cut(report, target_rank, options, budget).map(|(p, _)| p)
}

/// [`complete_report_points`], also saying whether a budget (units or the
/// clock) cut the hunt short before `target_rank` points were known.
pub(crate) fn complete_report_points_cut(
    report: &DescentReport,
    target_rank: usize,
    options: &DeepSearchOptions,
    budget: &mut Budget,
) -> Result<(Vec<Point>, bool)> {
    options.check()?;
    if target_rank > report.rank_upper() {
        return Err(Error::InvalidArgument {
            reason: format!(
                "target rank {target_rank} exceeds the proven upper bound {}",
                report.rank_upper()
            ),
        });
    }
    if report.descent_points().len() >= target_rank {
        return Ok((report.descent_points().to_vec(), false));
    }
    let mut hunts: Vec<IsogenyHunt<'_>> = report
        .isogenies()
        .iter()
        .filter(|d| d.rank_upper >= target_rank)
        .map(IsogenyHunt::new)
        .collect();
    let curve = report.curve();
    let mut late_start = None;
    'rounds: for h in options.rounds() {
        for hunt in &mut hunts {
            let late = late_room(options, h, &mut late_start, budget);
            if hunt.round(curve, h, target_rank, options, late, budget)? {
                break 'rounds;
            }
            if budget.is_exhausted() {
                break 'rounds;
            }
        }
    }
    let best = hunts
        .iter()
        .rev()
        .max_by_key(|h| (h.total() >= target_rank, h.total()));
    let reached = best.is_some_and(|h| h.total() >= target_rank);
    let cut = !reached && (budget.is_exhausted() || hunts.iter().any(|h| h.cut));
    match best {
        Some(h) if h.total() > report.descent_points().len() => {
            let mut all = h.descent.points.clone();
            all.extend(h.found.iter().cloned());
            Ok((all, cut))
        }
        _ => Ok((report.descent_points().to_vec(), cut)),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rounds_grow_to_the_largest_height() {
        // common practice: geometric rounds ending exactly at the maximum
        let o = DeepSearchOptions::default();
        assert_eq!(o.rounds(), vec![256, 1024, 4096]);
        let o = DeepSearchOptions {
            max_covering_height: 300,
            ..Default::default()
        };
        assert_eq!(o.rounds(), vec![256, 300]);
    }

    #[test]
    fn the_bsd_prediction_sizes_the_rounds() {
        // The calibration of the module: stop at e^{(ĥ − 3)/8}, within
        // [first_covering_height, max_covering_height].
        let o = DeepSearchOptions::default();
        // Within reach with #Ш = 1: the full rounds, and one more when
        // e^{(ĥ − 3)/8} ≤ 4096 (ĥ ≤ 69.5).
        assert_eq!(o.guided(20.0, 0).rounds(), vec![256, 1024, 4096, 16384]);
        // ĥ = 50 ≤ 4·ln 2¹⁷ + 3.5 ≈ 50.6: the curve's own side goes on to
        // min(e^{51/4}, 2¹⁷); the other side stops at 16384.
        let g = o.guided(50.0, 0);
        assert_eq!(g.rounds(), vec![256, 1024, 4096, 16384, 65536, 131072]);
        assert_eq!((g.side_limit(0), g.side_limit(1)), (131072, 16384));
        assert!(g.is_late(65536) && !g.is_late(16384));
        assert_eq!(o.guided(20.0, 0).side_limit(0), 16384);
        // e^{(80 − 3)/8} ≈ 15138.6 > 4096, within the reach of 16384
        // (8·ln 16384 + 17 ≈ 94.6): rounds to that height, both sides.
        let g = o.guided(80.0, 0);
        assert_eq!(g.rounds(), vec![256, 1024, 4096, 15139]);
        assert_eq!((g.side_limit(0), g.side_limit(1)), (15139, 15139));
        // Beyond reach: the next candidate is ĥ/9 (Ш odd), here 25, and
        // one cheap round aimed at it.
        assert_eq!(o.guided(225.0, 0).rounds(), vec![256]);
        // Beyond reach, ĥ/9 = 80: rounds up to e^{(80 − 3)/8}.
        assert_eq!(o.guided(720.0, 0).rounds(), vec![256, 1024, 4096]);
        assert_eq!(o.guided(603.0, 0).rounds(), vec![256, 1024, 2981]);
        // With dim Ш[2] = 2 the prediction is divided by 4 first (225),
        // and m need not be odd: 225/2² = 56.25 is in reach, and the
        // rounds stop at e^{(56.25 − 3)/8} ≈ 778.
        assert_eq!(o.guided(900.0, 2).rounds(), vec![256, 778]);
        let off = DeepSearchOptions {
            bsd_guided: false,
            ..DeepSearchOptions::default()
        };
        assert_eq!(off.guided(50.0, 0), off);
        assert_eq!(o.guided(f64::NAN, 0), o);
    }

    #[test]
    fn the_predicted_regulator_raises_the_rank_two_rounds() {
        // The rounds stop at e^{(ĥ − 3)/8} (as for rank one), raised
        // above 4096 only for ĥ within the reach of 16384, 8·ln 16384 + 17
        // ≈ 94.6.
        let o = DeepSearchOptions::default();
        assert_eq!(
            o.guided_rank_two(90.0, 0).rounds(),
            vec![256, 1024, 4096, 16384]
        );
        assert_eq!(
            o.guided_rank_two(77.0, 0).rounds(),
            vec![256, 1024, 4096, 10405]
        );
        // Needing no more than the default rounds, or beyond any reach:
        // unchanged.
        assert_eq!(o.guided_rank_two(60.0, 0), o);
        assert_eq!(o.guided_rank_two(140.0, 0), o);
        // dim Ш[2] = 1 halves the prediction: 180 → 90.
        assert_eq!(
            o.guided_rank_two(180.0, 1).rounds(),
            vec![256, 1024, 4096, 16384]
        );
        let off = DeepSearchOptions {
            bsd_guided: false,
            ..DeepSearchOptions::default()
        };
        assert_eq!(off.guided_rank_two(90.0, 0), off);
        assert_eq!(o.guided_rank_two(f64::NAN, 0), o);
    }

    #[test]
    fn bad_options_are_refused() {
        let o = DeepSearchOptions {
            growth: 1,
            ..DeepSearchOptions::default()
        };
        assert!(o.check().is_err());
        let o = DeepSearchOptions {
            max_covering_height: 1,
            ..Default::default()
        };
        assert!(o.check().is_err());
    }
}
