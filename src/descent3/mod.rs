//! Layer 8b: descent via 3-isogeny on curves with j = 0, y² = x³ + k
//! ([`descend_3isogeny`]), and on any curve with a rational 3-isogeny,
//! y² = x³ + D(αx + β)² ([`descend_3isogeny_general`], module `flex`).
//!
//! # The isogeny
//! E_k: y² = x³ + k has the 3-isogeny
//! φ: E_k → E_{−27k}, (x, y) ↦ ((x³ + 4k)/x², y(x³ − 8k)/x³), with kernel
//! {O, (0, ±√k)}; it pulls dx/2y back to dx/2y. Applied to E_{−27k} it
//! lands on E_{729k}, which is E_k scaled by u = 3, and that composite is
//! the dual φ̂ (φ̂∘φ = \[3\]) (common practice; the kernel and the model are
//! those of Cohen–Pazuki, "Elementary 3-descent with a 3-isogeny", Acta
//! Arith. 140 (2009), with α = 0, from memory; checked exactly in the
//! tests).
//!
//! # The Selmer groups
//! On each side y² = x³ + k the function y − √k has divisor 3(T) − 3(O)
//! with T = (0, √k), and P ↦ y − √k is the connecting map of the isogeny
//! *into* that side, with values in the norm-one part of K*/K*³,
//! K = Q(√k). The side y² = x³ + k gives Sel^φ̂(E_{−27k}) and the side
//! y² = x³ − 27k gives Sel^φ(E_k). The groups are computed exactly as the
//! classes whose plane cubic (module `side`) is soluble at every p in
//! S = {2, 3} ∪ {p | k}; outside S the classes are unramified and the
//! cubics have good reduction (Hasse's bound gives a point mod p and
//! Hensel lifts it), and over R a cubic always has a point.
//!
//! Every k is handled. When k is a square or −3 times a square (the
//! curves of x³ + y³ = n, y² = x³ − 432n², and their isogenous partners)
//! the fields need no class group; for any other k the field Q(√D) of a
//! side comes with its class group, the 3-part of it and, for D > 0, its
//! fundamental unit (`cubic::quadratic`, docs/descent3.md), within the
//! limits of [`Isogeny3Options`] (beyond them: [`Error::BudgetExhausted`]).
//!
//! # Rank bounds
//! From the exact sequence
//! 0 → E′(Q)\[φ̂\]/φ(E(Q)\[3\]) → E′(Q)/φE(Q) → E(Q)/3E(Q) → E(Q)/φ̂E′(Q) → 0
//! and |E(Q)/3E(Q)| = 3^r·|E(Q)\[3\]|, with |E(Q)\[3\]| / |φ(E(Q)\[3\])| =
//! |E(Q)\[φ\]|:
//! r = dim E′(Q)/φE(Q) + dim E(Q)/φ̂E′(Q) − dim E(Q)\[φ\] − dim E′(Q)\[φ̂\]
//! (the 3-isogeny analogue of Silverman–Tate, "Rational Points on
//! Elliptic Curves", III.6; derivation in docs/descent3.md). The Selmer
//! groups bound the two quotients above, the images of points found bound
//! them below. The torsion correction is 1 when one of k, −27k is a
//! square, else 0.
//!
//! # The Tamagawa check
//! Cassels' formula for an isogeny φ: E → E′ of odd degree ("Arithmetic on
//! curves of genus 1, VIII", J. reine angew. Math. 217 (1965); in the form
//! of Schaefer–Stoll 2004, Lemma 3.8 — both from memory):
//! |Sel^φ(E)|/|Sel^φ̂(E′)| = |E(Q)\[φ\]| / |E′(Q)\[φ̂\]| · |α| / |E(R)\[φ\]| ·
//! ∏_p c_p(E′)/c_p(E), with φ*ω′ = α·ω for the minimal differentials. It
//! is recomputed from Tate's algorithm on every curve as an independent
//! check of the local computations.
//!
//! The derivations, the bounds and the sources are in `docs/descent3.md`,
//! included below.
//!
#![doc = include_str!("../../docs/descent3.md")]

pub(crate) mod f3;
mod flex;
mod generators;
pub(crate) mod side;
mod uncovered;

#[cfg(test)]
mod tests;

use std::time::{Duration, Instant};

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};

use crate::analytic::{analyse, AnalyticOptions, RankTheorem};
use crate::arith::factor;
use crate::arith::Certified;
use crate::budget::Budget;
use crate::cubic::quadratic::FieldLimits;
use crate::cubic::{CubicPoint, CubicWitness};
use crate::curve::{
    global_local_data, short_integral_model, Curve, GlobalLocalData, ModelChange, Point,
};
use crate::error::{Error, Result};
use crate::height::{Saturation, SaturationOptions};
use crate::local::Prime;
use f3::Span;
use side::{intersect_local, point_on, search_side, SideSetup};

pub use flex::{descend_3isogeny_general, GeneralSide3, Isogeny3GeneralReport};
pub use side::{ElementOrigin, Generator3, SideField};

/// Options of [`descend_3isogeny`].
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub struct Isogeny3Options {
    /// Height bound for the point search on each plane cubic: coprime
    /// (u, v) with max(|u|, |v|) ≤ this.
    pub search_height: u64,
    /// Work units for the factorisation of k.
    pub factor_units: u64,
    /// Work units for all local tests of one curve (both sides).
    pub local_units: u64,
    /// Work units for the point search of one curve (both sides).
    pub search_units: u64,
    /// Height bound of the second search, run when the points found stay
    /// below the rank the analytic side proves, or below the Selmer bound
    /// when the analytic side ran and left the rank open (the bound is
    /// then met if enough points turn up). Not run when the analytic side
    /// is off.
    pub deep_search_height: u64,
    /// Work units for that second search (both sides).
    pub deep_search_units: u64,
    /// Compute the Tamagawa-ratio check (Tate's algorithm on both curves).
    pub tamagawa_check: bool,
    /// Optional wall-clock limit for one curve.
    pub time_limit: Option<Duration>,
    /// The analytic side, run only when the descent leaves a gap between
    /// its bounds (`None`: off).
    pub analytic: Option<AnalyticOptions>,
    /// Largest |discriminant| of a field Q(√D) whose class group is
    /// computed (the reduced forms are enumerated, O(|disc|) work).
    pub max_discriminant: u64,
    /// Largest class number accepted.
    pub max_class_number: u64,
    /// Largest size in bits of the fundamental unit of a real field and of
    /// the generators of principal ideals.
    pub max_unit_bits: u64,
    /// Saturation of the independent points found into generators of
    /// E(Q) modulo torsion, when the rank is proven and that many points
    /// are known (`None`: off; the heights of the independent points are
    /// computed either way). Runs under `factor_units` and the clock.
    /// Default: [`SaturationOptions::default`] with `max_prime` 1000 (on
    /// y² = x³ + k, j = 0, p-saturation needs no point counts; module docs
    /// of [`crate::height`]'s saturation, "Curves with j = 0").
    pub saturation: Option<SaturationOptions>,
}

impl Default for Isogeny3Options {
    fn default() -> Self {
        Isogeny3Options {
            search_height: 60,
            factor_units: 200_000_000,
            local_units: 20_000_000,
            search_units: 2_000_000,
            deep_search_height: 400,
            deep_search_units: 2_000_000,
            tamagawa_check: true,
            time_limit: None,
            analytic: Some(AnalyticOptions::default()),
            max_discriminant: 2_000_000,
            max_class_number: 5_000,
            max_unit_bits: 8_192,
            saturation: Some(SaturationOptions {
                max_prime: 1000,
                ..SaturationOptions::default()
            }),
        }
    }
}

impl Isogeny3Options {
    fn limits(&self) -> FieldLimits {
        FieldLimits {
            max_discriminant: self.max_discriminant,
            max_class_number: self.max_class_number,
            max_unit_bits: self.max_unit_bits,
        }
    }
}

/// A point found on a homogeneous space, with its class and its point on
/// the side's curve.
#[derive(Debug, Clone, PartialEq, Eq)]
#[non_exhaustive]
pub struct CubicFind {
    /// The class (exponents on the side's generators).
    pub class: Vec<u8>,
    /// The point (u : v : w) on the class's plane cubic.
    pub on_cubic: CubicPoint,
    /// The point on y² = x³ + k of the side.
    pub point: Point,
}

/// One side: y² = x³ + k with its group, Selmer group and images.
#[derive(Debug, Clone, PartialEq, Eq)]
#[non_exhaustive]
pub struct Isogeny3Side {
    /// k of the side's curve y² = x³ + k.
    pub k: BigInt,
    /// The field Q(√k).
    pub field: SideField,
    /// The basis of the group K(S,3) (norm one) of the side.
    pub generators: Vec<Generator3>,
    /// A basis of the Selmer group, as exponent vectors on `generators`.
    pub selmer_basis: Vec<Vec<u8>>,
    /// Dimension of the span of the images of known points (kernel
    /// points included).
    pub image_dim: usize,
    /// For each Selmer basis vector and each prime of S, the local witness.
    pub witnesses: Vec<(Vec<u8>, BigInt, CubicWitness)>,
    /// Points found on the homogeneous spaces.
    pub finds: Vec<CubicFind>,
    /// True when the kernel point (0, √k) is rational (k a square).
    pub rational_kernel: bool,
    /// The primes of S (2, 3 and those of k), where the local conditions
    /// were tested.
    pub primes: Vec<BigInt>,
}

impl Isogeny3Side {
    /// The dimension of the Selmer group over F3.
    pub fn selmer_dim(&self) -> usize {
        self.selmer_basis.len()
    }
}

/// Cassels' Tamagawa ratio next to the Selmer ratio.
#[derive(Debug, Clone, PartialEq, Eq)]
#[non_exhaustive]
pub struct TamagawaRatio {
    /// |Sel^φ(E)| / |Sel^φ̂(E′)| as computed.
    pub selmer_ratio: BigRational,
    /// The right-hand side of Cassels' formula.
    pub formula: BigRational,
    /// Tamagawa numbers of E = E_k at its bad primes.
    pub tamagawa: Vec<(BigInt, u64)>,
    /// Tamagawa numbers of E′ = E_{−27k} at its bad primes.
    pub tamagawa_isogenous: Vec<(BigInt, u64)>,
    /// α with φ*ω′ = αω on minimal models.
    pub alpha: BigRational,
}

impl TamagawaRatio {
    /// True when both sides agree.
    pub fn holds(&self) -> bool {
        self.selmer_ratio == self.formula
    }
}

/// What settled the rank.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum Rank3Proof {
    /// The two bounds of the descent meet.
    Descent,
    /// A certified L-value within the descent's bounds, by the theorem named.
    Analytic(RankTheorem),
}

/// The outcome of [`descend_3isogeny`].
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub struct Isogeny3Report {
    /// The curve as given.
    pub curve: Curve,
    /// k of the model y² = x³ + k used (sixth-power free).
    pub k: BigInt,
    /// The change of model from the given curve to y² = x³ + k.
    pub change: ModelChange,
    /// The side of E = E_k (Sel^φ̂ of E_{−27k}) and the side of
    /// E′ = E_{−27k} (Sel^φ of E_k).
    pub sides: [Isogeny3Side; 2],
    /// Proven lower bound for the rank.
    pub rank_lower: usize,
    /// Proven upper bound for the rank.
    pub rank_upper: usize,
    /// Points of the given curve found (from both sides, the second
    /// through φ̂), each checked on the curve.
    pub points: Vec<Point>,
    /// Cassels' check, when asked for.
    pub tamagawa: Option<TamagawaRatio>,
    /// The rank, when proven, and what proved it.
    pub rank: Option<(usize, Rank3Proof)>,
    /// When the rank r is proven: rank_upper − r, the F3-dimension that
    /// Sha(E)\[φ\] and Sha(E′)\[φ̂\] contribute to the Selmer groups
    /// (nonzero means nontrivial elements of the Tate–Shafarevich groups).
    pub sha_dim: Option<usize>,
    /// False when a budget or the clock cut the point search short (the
    /// bounds are still proven).
    pub search_complete: bool,
    /// The optional steps that a budget or the clock cut short (point
    /// search, local data, Tamagawa check, analytic side, generators); the
    /// report is then partial, though every number in it stays proven.
    pub cut: Vec<String>,
    /// The torsion subgroup of the given curve.
    pub torsion: crate::curve::TorsionGroup,
    /// Points among `points` that are independent modulo torsion (the
    /// certified regulator of the set is positive), with their canonical
    /// heights (normalisation of [`crate::height`]).
    pub independent_points: Vec<(Point, Certified)>,
    /// The saturation of `independent_points`, run when the rank is proven
    /// positive and equals their number: LLL-reduced generators, their
    /// heights, the regulator and the proof (index bound, primes checked).
    pub saturation: Option<Saturation>,
    /// True when the saturation left only p = 3 open and the descent
    /// proved 3-saturation instead: E(Q)\[3\] = 0 and the points are those
    /// found on the homogeneous spaces, with independent images (module
    /// `generators`, docs/descent3.md).
    pub three_saturated_by_descent: bool,
}

/// φ: E_k → E_{−27k}, (x, y) ↦ ((x³ + 4k)/x², y(x³ − 8k)/x³).
pub(crate) fn three_isogeny(k: &BigInt, p: &Point) -> Point {
    let (Some(x), Some(y)) = (p.x(), p.y()) else {
        return Point::Infinity;
    };
    if x.is_zero() {
        return Point::Infinity;
    }
    let kq = BigRational::from_integer(k.clone());
    let x3 = x * x * x;
    let nx = (&x3 + &kq * BigRational::from_integer(4.into())) / (x * x);
    let ny = y * (&x3 - &kq * BigRational::from_integer(8.into())) / &x3;
    Point::new(nx, ny)
}

/// φ̂: E_{−27k} → E_k, the map φ of E_{−27k} followed by the scaling of
/// E_{729k} to E_k (x ↦ x/9, y ↦ y/27).
pub(crate) fn dual_three_isogeny(k: &BigInt, p: &Point) -> Point {
    let kk = BigInt::from(-27) * k;
    match three_isogeny(&kk, p) {
        Point::Infinity => Point::Infinity,
        q => {
            let (Some(x), Some(y)) = (q.x(), q.y()) else {
                return Point::Infinity;
            };
            Point::new(
                x / BigRational::from_integer(9.into()),
                y / BigRational::from_integer(27.into()),
            )
        }
    }
}

fn budget_for(units: u64, start: Instant, limit: Option<Duration>) -> Budget {
    let b = Budget::with_units(units);
    match limit {
        Some(l) => b.with_deadline(start + l),
        None => b,
    }
}

/// Descent via the 3-isogeny of a curve with j = 0.
///
/// The curve is moved to y² = x³ + k (k sixth-power free, the change
/// recorded); both Selmer groups are computed exactly, points are searched
/// on the homogeneous spaces, and the rank is bounded by the exact
/// sequence (module docs).
///
/// # Errors
/// [`Error::NoSupportedIsogeny`] when j ≠ 0, its reason saying whether the
/// curve has a rational 3-isogeny (α ≠ 0, not covered yet, with the model
/// y² = x³ + D(αx + β)² named) or none; [`Error::BudgetExhausted`]
/// when the factorisation or the local tests run out of budget or time, or
/// when a field Q(√D) is beyond the discriminant, class-number or
/// unit-size limits of the options.
pub fn descend_3isogeny(e: &Curve, opts: &Isogeny3Options) -> Result<Isogeny3Report> {
    let start = Instant::now();
    let (a, b, _short, ch) = short_integral_model(e);
    if !a.is_zero() {
        return uncovered::refuse(
            e,
            &mut budget_for(opts.factor_units, start, opts.time_limit),
        );
    }
    let mut fb = budget_for(opts.factor_units, start, opts.time_limit);
    let fac = factor(&b, &mut fb)?;
    // Remove sixth powers.
    let mut u = BigInt::one();
    let mut primes: Vec<BigInt> = vec![BigInt::from(2), BigInt::from(3)];
    let mut square_class = BigInt::from(fac.sign());
    for (p, ex) in fac.factors() {
        u *= p.pow(ex / 6);
        if ex % 6 != 0 && !primes.contains(p) {
            primes.push(p.clone());
        }
        if ex % 2 == 1 {
            square_class *= p;
        }
    }
    primes.sort();
    let u6 = u.pow(6);
    let k = &b / &u6;
    let change = ch.then(&ModelChange::scaling(BigRational::from_integer(u.clone()))?);
    let k2 = BigInt::from(-27) * &k;
    // k = D·m² and −27k = D′·m′² with D, D′ square-free.
    let side_of = |kk: &BigInt, dsq: &BigInt| -> Result<(SideField, BigInt)> {
        let m = sqrt_int(&(kk / dsq))?;
        let field = SideField::for_squarefree(dsq, opts.max_discriminant)?;
        Ok((field, m))
    };
    let square_class2 = if (&square_class % 3u32).is_zero() {
        -&square_class / 3
    } else {
        &square_class * -3
    };
    let (field, m) = side_of(&k, &square_class)?;
    let (field2, m2) = side_of(&k2, &square_class2)?;
    let mut qb = budget_for(opts.local_units, start, opts.time_limit);
    let setups = [
        SideSetup::new(k.clone(), m, field, primes.clone(), opts.limits(), &mut qb)?,
        SideSetup::new(
            k2.clone(),
            m2,
            field2,
            primes.clone(),
            opts.limits(),
            &mut qb,
        )?,
    ];
    let mut lb = budget_for(opts.local_units, start, opts.time_limit);
    let mut sb = budget_for(opts.search_units, start, opts.time_limit);
    let mut search_complete = true;
    let mut sides = Vec::with_capacity(2);
    let mut spans: Vec<Span> = Vec::with_capacity(2);
    let mut user_points = Vec::new();
    let inverse_change = &change;
    for (idx, st) in setups.iter().enumerate() {
        let n = st.dim();
        let mut l: Vec<Vec<u8>> = (0..n)
            .map(|i| {
                let mut v = vec![0u8; n];
                v[i] = 1;
                v
            })
            .collect();
        for p in &primes {
            let pr = Prime::new(p.clone())?;
            l = intersect_local(st, &l, &pr, &mut lb)?.0;
        }
        // Witnesses for the final basis.
        let mut witnesses = Vec::new();
        for v in &l {
            for p in &primes {
                let pr = Prime::new(p.clone())?;
                match st.local(v, &pr, &mut lb)? {
                    crate::cubic::CubicLocal::Soluble(w) => {
                        witnesses.push((v.clone(), p.clone(), w))
                    }
                    crate::cubic::CubicLocal::Insoluble => {
                        return Err(Error::Internal {
                            check: format!(
                                "a Selmer basis vector of y^2 = x^3 + {} is soluble at {p}",
                                st.k
                            ),
                        })
                    }
                }
            }
        }
        let mut images = Span::default();
        let rational_kernel = st.field == SideField::Rational;
        if rational_kernel {
            let t = Point::new(BigRational::zero(), BigRational::from_integer(st.m.clone()));
            images.insert(&st.image(&t)?);
        }
        let mut found = Vec::new();
        match search_side(st, &l, &mut images, &mut found, opts.search_height, &mut sb) {
            Ok(c) => search_complete &= c,
            Err(Error::BudgetExhausted { .. }) => search_complete = false,
            Err(err) => return Err(err),
        }
        let finds = register_finds(found, idx, &k, e, inverse_change, &mut user_points)?;
        sides.push(Isogeny3Side {
            k: st.k.clone(),
            field: st.field,
            generators: st.basis.clone(),
            selmer_basis: l,
            image_dim: images.dim(),
            witnesses,
            finds,
            rational_kernel,
            primes: primes.clone(),
        });
        spans.push(images);
    }
    let [mut s0, mut s1]: [Isogeny3Side; 2] = sides.try_into().map_err(|_| Error::Internal {
        check: "two sides".into(),
    })?;
    let torsion = usize::from(s0.rational_kernel) + usize::from(s1.rational_kernel);
    let rank_upper = (s0.selmer_dim() + s1.selmer_dim()).saturating_sub(torsion);
    let mut rank_lower = (s0.image_dim + s1.image_dim).saturating_sub(torsion);
    if rank_lower > rank_upper {
        return Err(Error::Internal {
            check: "the images of points lie in the Selmer groups".into(),
        });
    }
    let mut tb = budget_for(opts.factor_units, start, opts.time_limit);
    let needs_analytic = opts.analytic.is_some() && rank_lower < rank_upper;
    let mut cut = Vec::new();
    let local = if opts.tamagawa_check || needs_analytic {
        let z = BigInt::zero;
        let ek = Curve::from_bigints([z(), z(), z(), z(), k.clone()])?;
        match global_local_data(ek.coefficients(), &mut tb) {
            Ok(l) => Some((l, ek)),
            Err(Error::BudgetExhausted { .. }) | Err(Error::FactorBudgetExhausted { .. }) => {
                cut.push("local data (Tate's algorithm)".to_string());
                None
            }
            Err(err) => return Err(err),
        }
    } else {
        None
    };
    let tamagawa = match (&local, opts.tamagawa_check) {
        (Some((l1, _)), true) => {
            match tamagawa_ratio(&k, l1, s1.selmer_dim(), s0.selmer_dim(), &mut tb) {
                Ok(t) => Some(t),
                Err(Error::BudgetExhausted { .. }) | Err(Error::FactorBudgetExhausted { .. }) => {
                    cut.push("Tamagawa check".to_string());
                    None
                }
                Err(err) => return Err(err),
            }
        }
        _ => None,
    };
    let mut rank = (rank_lower == rank_upper).then_some((rank_lower, Rank3Proof::Descent));
    if let (Some(ao), Some((l1, ek)), true) = (&opts.analytic, &local, needs_analytic) {
        let mut ab = budget_for(u64::MAX, start, opts.time_limit);
        match analyse(ek, l1, ao, &mut ab) {
            Ok(data) => {
                if let Some((r, theorem)) = data.rank_proven() {
                    if r < rank_lower || r > rank_upper {
                        return Err(Error::Internal {
                            check: format!(
                                "the analytic rank {r} lies in the descent's bounds [{rank_lower}, {rank_upper}]"
                            ),
                        });
                    }
                    rank = Some((r, Rank3Proof::Analytic(theorem)));
                }
            }
            Err(Error::BudgetExhausted { .. }) => cut.push("analytic side".to_string()),
            Err(err) => return Err(err),
        }
    }
    // A proven rank above the points found, or bounds that the analytic
    // side left apart: search the cubics again, higher.
    let target = match rank {
        Some((r, _)) => Some(r),
        None if opts.analytic.is_some() => Some(rank_upper),
        None => None,
    };
    if let Some(r) = target {
        if r > rank_lower && opts.deep_search_height > opts.search_height {
            let mut db = budget_for(opts.deep_search_units, start, opts.time_limit);
            for (idx, side) in [&mut s0, &mut s1].into_iter().enumerate() {
                let mut found = Vec::new();
                match search_side(
                    &setups[idx],
                    &side.selmer_basis,
                    &mut spans[idx],
                    &mut found,
                    opts.deep_search_height,
                    &mut db,
                ) {
                    Ok(c) => search_complete &= c,
                    Err(Error::BudgetExhausted { .. }) => search_complete = false,
                    Err(err) => return Err(err),
                }
                let more = register_finds(found, idx, &k, e, &change, &mut user_points)?;
                side.finds.extend(more);
                side.image_dim = spans[idx].dim();
            }
            rank_lower = (s0.image_dim + s1.image_dim).saturating_sub(torsion);
            if rank_lower > r {
                return Err(Error::Internal {
                    check: "the points found lie within the proven rank".into(),
                });
            }
            if rank.is_none() && rank_lower == rank_upper {
                rank = Some((rank_lower, Rank3Proof::Descent));
            }
        }
    }
    if !search_complete {
        cut.insert(0, "point search".to_string());
    }
    let mut gb = budget_for(opts.factor_units, start, opts.time_limit);
    let torsion = crate::curve::torsion(e);
    // The points are those of the finds, one per dimension they add.
    let descent_proves_three = torsion.order() % 3 != 0
        && rank.is_some_and(|(r, _)| r == rank_lower && user_points.len() == r);
    let (found, stop) = generators::generators(
        e,
        &user_points,
        rank.map(|(r, _)| r),
        opts.saturation.as_ref(),
        descent_proves_three,
        &mut gb,
    );
    match stop {
        None => {}
        Some(Error::BudgetExhausted { .. }) | Some(Error::FactorBudgetExhausted { .. }) => {
            cut.push("generators (heights, saturation)".to_string())
        }
        Some(err) => return Err(err),
    }
    let sha_dim = rank.map(|(r, _)| rank_upper - r);
    Ok(Isogeny3Report {
        curve: e.clone(),
        k,
        change,
        sides: [s0, s1],
        rank_lower,
        rank_upper,
        points: user_points,
        tamagawa,
        rank,
        sha_dim,
        search_complete,
        cut,
        torsion,
        independent_points: found.independent,
        saturation: found.saturation,
        three_saturated_by_descent: found.three_by_descent,
    })
}

/// The points found on one side as [`CubicFind`]s; each is mapped to the
/// given curve (through φ̂ for the second side), checked, and added to
/// `user_points`.
fn register_finds(
    found: Vec<(Vec<u8>, CubicPoint, Point)>,
    idx: usize,
    k: &BigInt,
    e: &Curve,
    change: &ModelChange,
    user_points: &mut Vec<Point>,
) -> Result<Vec<CubicFind>> {
    let finds: Vec<CubicFind> = found
        .into_iter()
        .map(|(class, on_cubic, point)| CubicFind {
            class,
            on_cubic,
            point,
        })
        .collect();
    for f in &finds {
        let on_e = if idx == 0 {
            f.point.clone()
        } else {
            dual_three_isogeny(k, &f.point)
        };
        if !point_on(k, &on_e) {
            return Err(Error::Internal {
                check: "φ̂ maps to y^2 = x^3 + k".into(),
            });
        }
        let q = change.to_old(&on_e);
        if !q.is_infinity() {
            if !e.contains(&q) {
                return Err(Error::Internal {
                    check: "a point found lies on the given curve".into(),
                });
            }
            user_points.push(q);
        }
    }
    Ok(finds)
}

fn sqrt_int(n: &BigInt) -> Result<BigInt> {
    crate::arith::sqrt_exact(n).ok_or_else(|| Error::Internal {
        check: format!("{n} is a square"),
    })
}

/// Cassels' ratio for φ: E_k → E_{−27k} (module docs), next to
/// 3^(sel_phi − sel_phihat).
pub(crate) fn tamagawa_ratio(
    k: &BigInt,
    l1: &GlobalLocalData,
    sel_phi: usize,
    sel_phihat: usize,
    budget: &mut Budget,
) -> Result<TamagawaRatio> {
    let z = BigInt::zero;
    let k2 = BigInt::from(-27) * k;
    let e2 = Curve::from_bigints([z(), z(), z(), z(), k2.clone()])?;
    let l2 = global_local_data(e2.coefficients(), budget)?;
    let tam = |l: &GlobalLocalData| -> Vec<(BigInt, u64)> {
        l.primes
            .iter()
            .map(|r| (r.prime.get().clone(), r.tamagawa))
            .collect()
    };
    let t1 = tam(l1);
    let t2 = tam(&l2);
    let prod = |t: &[(BigInt, u64)]| t.iter().map(|(_, c)| BigInt::from(*c)).product::<BigInt>();
    let alpha = &l2.change[0] / &l1.change[0];
    let three = BigInt::from(3);
    let tors_e = if crate::arith::is_perfect_square(k) {
        3
    } else {
        1
    };
    let tors_e2 = if crate::arith::is_perfect_square(&k2) {
        3
    } else {
        1
    };
    let real_e = if k.is_positive() { 3 } else { 1 };
    let formula = BigRational::new(
        BigInt::from(tors_e) * prod(&t2),
        BigInt::from(tors_e2) * prod(&t1),
    ) * alpha.abs()
        / BigRational::from_integer(BigInt::from(real_e));
    let d = sel_phi as i64 - sel_phihat as i64;
    let selmer_ratio = if d >= 0 {
        BigRational::from_integer(three.pow(d as u32))
    } else {
        BigRational::new(BigInt::one(), three.pow((-d) as u32))
    };
    Ok(TamagawaRatio {
        selmer_ratio,
        formula,
        tamagawa: t1,
        tamagawa_isogenous: t2,
        alpha,
    })
}

impl std::fmt::Display for SideField {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            SideField::Rational => write!(f, "Q (kernel point rational)"),
            SideField::Eisenstein => write!(f, "Q(√−3)"),
            SideField::Quadratic { d } => write!(f, "Q(√{d})"),
        }
    }
}

fn signed(k: &BigInt) -> String {
    if k.is_negative() {
        format!("- {}", -k)
    } else {
        format!("+ {k}")
    }
}

fn class_text(gens: &[Generator3], v: &[u8]) -> String {
    let parts: Vec<String> = gens
        .iter()
        .zip(v)
        .filter(|(_, &e)| e != 0)
        .map(|(g, &e)| {
            if e == 1 {
                format!("{g}")
            } else {
                format!("({g})^{e}")
            }
        })
        .collect();
    if parts.is_empty() {
        "1".into()
    } else {
        parts.join("·")
    }
}

impl std::fmt::Display for Isogeny3Report {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        writeln!(f, "Descent via 3-isogeny for {}", self.curve)?;
        writeln!(
            f,
            "  working model: y^2 = x^3 {}   (u, r, s, t) = ({}, {}, {}, {})",
            signed(&self.k),
            self.change.u(),
            self.change.r(),
            self.change.s(),
            self.change.t()
        )?;
        let names = ["φ̂ side, image of E(Q)", "φ side, image of E'(Q)"];
        for (side, name) in self.sides.iter().zip(names) {
            writeln!(f, "  curve y^2 = x^3 {}  [{name}]", signed(&side.k))?;
            writeln!(f, "    field of y − √k: {}", side.field)?;
            let gens: Vec<String> = side.generators.iter().map(|g| g.to_string()).collect();
            if gens.is_empty() {
                writeln!(f, "    group generators: none (the group is trivial)")?;
            } else {
                writeln!(f, "    group generators: {}", gens.join(", "))?;
            }
            let sel: Vec<String> = side
                .selmer_basis
                .iter()
                .map(|v| class_text(&side.generators, v))
                .collect();
            writeln!(
                f,
                "    Selmer group: dimension {} over F3, basis {{{}}}",
                side.selmer_dim(),
                sel.join(", ")
            )?;
            writeln!(
                f,
                "    images of known points: dimension {}",
                side.image_dim
            )?;
            for fd in &side.finds {
                writeln!(
                    f,
                    "    class {}: (u : v : w) = ({} : {} : {}) gives {}",
                    class_text(&side.generators, &fd.class),
                    fd.on_cubic.u,
                    fd.on_cubic.v,
                    fd.on_cubic.w,
                    fd.point
                )?;
            }
        }
        writeln!(
            f,
            "  rank bounds: {} ≤ rank ≤ {} (exact sequence of the 3-isogeny{})",
            self.rank_lower,
            self.rank_upper,
            if self.search_complete {
                ""
            } else {
                "; point search cut by a budget"
            }
        )?;
        match &self.rank {
            Some((r, Rank3Proof::Descent)) => writeln!(f, "  rank = {r}: the bounds meet")?,
            Some((r, Rank3Proof::Analytic(t))) => {
                writeln!(f, "  rank = {r}: certified L-value, {}", t.name())?
            }
            None => writeln!(f, "  rank: not settled")?,
        }
        if let Some(d) = self.sha_dim {
            if d > 0 {
                writeln!(
                    f,
                    "  Tate–Shafarevich: the φ- and φ̂-parts add {d} to the Selmer dimensions"
                )?;
            }
        }
        if let Some(t) = &self.tamagawa {
            writeln!(
                f,
                "  Cassels' ratio: |Sel^φ|/|Sel^φ̂| = {}, Tamagawa side = {} ({})",
                t.selmer_ratio,
                t.formula,
                if t.holds() { "equal" } else { "DIFFERENT" }
            )?;
        }
        for p in &self.points {
            writeln!(f, "  point on the given curve: {p}")?;
        }
        let label = if self.points_generate() && self.three_saturated_by_descent {
            "proven by saturation, p = 3 by the descent"
        } else if self.points_generate() {
            "proven by saturation"
        } else {
            "independent; saturation not proven"
        };
        write_generators(
            f,
            &self.torsion,
            self.saturation.as_ref(),
            &self.independent_points,
            label,
        )?;
        if !self.cut.is_empty() {
            writeln!(
                f,
                "  partial: cut short by a budget or the clock: {}",
                self.cut.join(", ")
            )?;
        }
        Ok(())
    }
}

/// The torsion, generators (or independent points) with heights and the
/// regulator, as the text reports of both 3-isogeny descents write them.
pub(crate) fn write_generators(
    f: &mut std::fmt::Formatter<'_>,
    torsion: &crate::curve::TorsionGroup,
    saturation: Option<&crate::height::Saturation>,
    independent: &[(Point, Certified)],
    label: &str,
) -> std::fmt::Result {
    let pm = |c: &Certified| {
        let (v, e) = crate::arith::decimal::enclose(c.value(), c.error());
        format!("{v} ± {e}")
    };
    writeln!(f, "  torsion: order {}", torsion.order())?;
    match saturation {
        Some(s) => {
            writeln!(
                f,
                "  generators ({label}): {}",
                s.generators
                    .iter()
                    .zip(&s.heights)
                    .map(|(p, h)| format!("{p} with ĥ = {}", pm(h)))
                    .collect::<Vec<_>>()
                    .join(", ")
            )?;
            writeln!(f, "  regulator: {}", pm(&s.regulator))
        }
        None => {
            for (p, h) in independent {
                writeln!(f, "  independent point: {p} with ĥ = {}", pm(h))?;
            }
            Ok(())
        }
    }
}

/// The outcome of [`descend_by_isogeny`]: the descent that applied.
#[derive(Debug, Clone)]
#[non_exhaustive]
#[allow(clippy::large_enum_variant)]
pub enum IsogenyDescent {
    /// Descent via 2-isogeny ([`crate::descend`]).
    Two(crate::descent::DescentReport),
    /// Descent via 3-isogeny ([`descend_3isogeny`]).
    Three(Isogeny3Report),
    /// Descent via a 3-isogeny with α ≠ 0 ([`descend_3isogeny_general`]).
    ThreeGeneral(Isogeny3GeneralReport),
}

/// Descent via 2-isogeny when the curve has a rational point of order 2,
/// else via 3-isogeny: [`descend_3isogeny`] when j = 0, else
/// [`descend_3isogeny_general`] when the curve has a rational 3-isogeny.
///
/// # Errors
/// Those of [`crate::descend`] for curves with a point of order 2;
/// otherwise those of [`descend_3isogeny`] ([`Error::NoSupportedIsogeny`]
/// when neither descent applies).
pub fn descend_by_isogeny(
    e: &Curve,
    two: &crate::descent::DescentOptions,
    three: &Isogeny3Options,
) -> Result<IsogenyDescent> {
    match crate::descent::descend(e, two) {
        Ok(r) => Ok(IsogenyDescent::Two(r)),
        Err(Error::NoTwoTorsion) if !e.c4().is_zero() => descend_3isogeny_general(e, three)
            .map(IsogenyDescent::ThreeGeneral)
            .map_err(|err| match err {
                Error::NoSupportedIsogeny { reason } => Error::NoSupportedIsogeny {
                    reason: format!("no rational point of order 2, and {reason}"),
                },
                other => other,
            }),
        Err(Error::NoTwoTorsion) => descend_3isogeny(e, three)
            .map(IsogenyDescent::Three)
            .map_err(|err| match err {
                Error::NoSupportedIsogeny { reason } => Error::NoSupportedIsogeny {
                    reason: format!("no rational point of order 2, and {reason}"),
                },
                other => other,
            }),
        Err(other) => Err(other),
    }
}

impl IsogenyDescent {
    /// Re-checks the evidence of either descent: [`crate::descent::verify_report_default`]
    /// for a 2-isogeny report, [`Isogeny3Report::recheck`] for a 3-isogeny
    /// one.
    ///
    /// # Errors
    /// [`Error::Internal`] naming the first check that fails; the budget
    /// errors of [`crate::descent::verify_report`].
    pub fn recheck(&self) -> Result<()> {
        match self {
            IsogenyDescent::Two(r) => {
                let v = crate::descent::verify_report_default(r)?;
                match v.failures().first() {
                    None => Ok(()),
                    Some(c) => Err(Error::Internal {
                        check: format!("{c:?}"),
                    }),
                }
            }
            IsogenyDescent::Three(r) => r.recheck(),
            IsogenyDescent::ThreeGeneral(r) => r.recheck(),
        }
    }
}

impl Isogeny3Side {
    fn setup(&self) -> Result<SideSetup> {
        let m = match self.field {
            SideField::Rational => sqrt_int(&self.k)?,
            SideField::Eisenstein => sqrt_int(&(-&self.k / 3))?,
            SideField::Quadratic { d } => sqrt_int(&(&self.k / d))?,
        };
        let limits = FieldLimits {
            max_discriminant: u64::MAX,
            max_class_number: u64::MAX,
            max_unit_bits: u64::MAX,
        };
        let mut budget = Budget::unlimited();
        let st = SideSetup::new(
            self.k.clone(),
            m,
            self.field,
            self.primes.clone(),
            limits,
            &mut budget,
        )?;
        if st.basis != self.generators {
            return Err(Error::Internal {
                check: "the generators of a side follow from k and S".into(),
            });
        }
        Ok(st)
    }
}

impl Isogeny3Report {
    /// True when the rank is proven and generators of E(Q) modulo torsion
    /// are known: the rank is 0, or saturation proved the generators of
    /// [`Isogeny3Report::saturation`] (as many as the rank) saturated.
    pub fn points_generate(&self) -> bool {
        match self.rank {
            Some((0, _)) => true,
            Some((r, _)) => self.saturation.as_ref().is_some_and(|s| {
                (s.proven_saturated || self.three_saturated_by_descent) && s.generators.len() == r
            }),
            None => false,
        }
    }

    /// Re-checks the evidence of the report exactly: the change of model
    /// gives y² = x³ + k; every Selmer basis vector has, at every prime of
    /// S, a local witness on its plane cubic that re-checks; every point
    /// found lies on its cubic, maps to the side's curve and has the class
    /// of its cubic as image; every reported point lies on the given
    /// curve. (The exclusion of the other classes rests on the exhaustive
    /// p-adic tree, which has no short certificate.)
    ///
    /// # Errors
    /// [`Error::Internal`] naming the first check that fails.
    pub fn recheck(&self) -> Result<()> {
        let fail = |check: String| Err(Error::Internal { check });
        let z = BigInt::zero;
        let model = Curve::from_bigints([z(), z(), z(), z(), self.k.clone()])?;
        if self.change.apply_to_curve(&self.curve) != model {
            return fail("the change of model gives y^2 = x^3 + k".into());
        }
        for side in &self.sides {
            let st = side.setup()?;
            for v in &side.selmer_basis {
                let cc = st.class_cubic(v)?;
                for p in &side.primes {
                    let ok = side
                        .witnesses
                        .iter()
                        .any(|(c, q, w)| c == v && q == p && w.verify(&cc.cubic, p));
                    if !ok {
                        return fail(format!("a local witness at {p} for {}", cc.cubic));
                    }
                }
            }
            for fd in &side.finds {
                let cc = st.class_cubic(&fd.class)?;
                let c = &fd.on_cubic;
                if !cc.cubic.contains(&c.u, &c.v, &c.w) {
                    return fail(format!(
                        "({} : {} : {}) lies on {}",
                        c.u, c.v, c.w, cc.cubic
                    ));
                }
                if st.point_from_cubic(&cc, c) != fd.point || !point_on(&side.k, &fd.point) {
                    return fail(format!(
                        "the point of {} on y^2 = x^3 + {}",
                        cc.cubic, side.k
                    ));
                }
                if st.image(&fd.point)? != fd.class {
                    return fail(format!("the class of {}", fd.point));
                }
            }
        }
        let generators = self.saturation.iter().flat_map(|s| &s.generators);
        let independent = self.independent_points.iter().map(|(p, _)| p);
        for p in self.points.iter().chain(independent).chain(generators) {
            if !self.curve.contains(p) {
                return fail(format!("{p} lies on {}", self.curve));
            }
        }
        Ok(())
    }
}
