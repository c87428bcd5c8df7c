//! Layer 3c: Heegner points — a point of infinite order on a curve of
//! analytic rank one, from CM points on a modular curve.
//!
//! This layer sits above the analytic side and the heights and below the
//! descent; nothing below imports it. The route implemented is that of
//! the congruent-number curves `E_n: y² = x³ − n²x` with square-free
//! `n ≡ 7 (mod 8)`: `E_n` is the quadratic twist of `E0: y² = x³ − x`
//! (conductor 32) by `D = −n`, a fundamental discriminant `≡ 1 (mod 8)`,
//! so 2 splits in `K = Q(√D)` and the Heegner hypothesis holds at level 32
//! (Gross–Zagier, *Invent. Math.* 84 (1986); Gross, "Heegner points on
//! X₀(N)", 1984; from memory). The trace of the Heegner points of `E0`
//! over the Hilbert class field lies in `E0(K)`; its minus part is a point
//! of `E0(K)^− ≅ E_n(Q)`. By Gross–Zagier its canonical height is a
//! non-zero multiple of `L'(E_n, 1)·L(E0, 1)`, so it has infinite order
//! exactly when `L'(E_n, 1) ≠ 0`.
//!
//! For square-free `n ≡ 5, 6 (mod 8)` 2 ramifies in `K`; the route uses
//! Heegner points of conductor 4 (the order of discriminant `−64n`, the
//! kind of points of Tian, *Cambridge J. Math.* 2 (2014), from memory).
//! That their trace has infinite order is observed, not assumed: a torsion
//! trace is reported as such, and every point is checked exactly.
//!
//! Every other curve goes to Heegner points at its own level
//! (`own_level`): Heegner points on `X₀(N)`, `N` the conductor, for a
//! discriminant meeting the Heegner hypothesis at `N`, with the curve's
//! own period lattice; bounded by [`HeegnerOptions::max_own_level_terms`].
//!
//! What is proven and what is numerics: the series, the periods and `℘`
//! are evaluated in binary fixed point (`fixed`) only to *propose* the
//! rational `x`-coordinate; the point is then checked on the curve in
//! exact rational arithmetic, and divisions (`Q = p·R`) are checked by
//! exact multiplication. Nothing here claims generation: the descent hands
//! the point to saturation ([`crate::height::saturate`]), which proves
//! the index. `docs/heegner.md`, included below, has the method, the
//! precision choice and the sources.
//!
#![doc = include_str!("../../docs/heegner.md")]

mod congruent;
pub(crate) mod fixed;
pub(crate) mod forms;
mod own_level;

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{Signed, ToPrimitive, Zero};

use crate::arith::{rational_sqrt_exact, squarefree_part};
use crate::budget::Budget;
use crate::curve::{Curve, ModelChange, Point};
use crate::error::{Error, Result};

use congruent::{Constants, LEVEL};

/// Default cap on the working precision, in bits.
pub(crate) const DEFAULT_MAX_BITS: u32 = 16_384;

/// Default cap on `|D|` (the class group is enumerated in `O(|D|)`).
pub(crate) const DEFAULT_MAX_DISCRIMINANT: u64 = 10_000_000;

/// Options of [`heegner_point`].
#[derive(Clone, Debug, PartialEq)]
#[non_exhaustive]
pub struct HeegnerOptions {
    /// Largest working precision in bits (default 16 384);
    /// the precision starts from the predicted height and doubles while
    /// the point is not recognised.
    pub max_bits: u32,
    /// Largest `|D|` attempted (default 10⁷).
    pub max_discriminant: u64,
    /// Largest prime `p` for which `Q = p·R` is tried (default 1000): the
    /// primes of the index predicted by the height ratio, and 2, 3, 5, 7.
    pub max_division_prime: u64,
    /// Largest number of series terms (summed over the classes) of one
    /// attempt of the route at the curve's own level (default
    /// 4·10⁶); the route is not attempted when
    /// its first precision already needs more, and stops doubling the
    /// precision when the next one would.
    pub max_own_level_terms: u64,
}

/// Default cap on the series terms of one attempt at the curve's own
/// level: the terms grow like `N/√|D|` per class and bit, so this bounds
/// the conductors reached by default (`docs/heegner.md`).
pub(crate) const DEFAULT_MAX_OWN_LEVEL_TERMS: u64 = 4_000_000;

/// Largest conductor of the route at the curve's own level: with
/// `|D| ≤ 20 000` the forms' `A ≤ N(|D| + 1)` and `C·N ≤ N²(|D| + 1)/4`
/// stay inside `i64` (the forms module computes in `i64`).
const MAX_OWN_LEVEL_CONDUCTOR: u64 = 20_000_000;

/// Largest `|D|` scanned by the route at the curve's own level.
const MAX_OWN_LEVEL_DISCRIMINANT: u64 = 20_000;

impl Default for HeegnerOptions {
    fn default() -> Self {
        HeegnerOptions {
            max_bits: DEFAULT_MAX_BITS,
            max_discriminant: DEFAULT_MAX_DISCRIMINANT,
            max_division_prime: 1000,
            max_own_level_terms: DEFAULT_MAX_OWN_LEVEL_TERMS,
        }
    }
}

/// A Heegner point found and checked.
#[derive(Clone, Debug, PartialEq)]
#[non_exhaustive]
pub struct HeegnerPoint {
    /// `n` of the model `y² = x³ − n²x` isomorphic to the curve.
    pub n: BigInt,
    /// The discriminant `D = f²·D_K` of the order used: `−n` for
    /// `n ≡ 7 (mod 8)` (`f = 1`), `−64n` for `n ≡ 5, 6 (mod 8)` (`f = 4`).
    pub discriminant: i64,
    /// The conductor `f` of the order of discriminant `D` in
    /// `K = Q(√−n)`.
    pub conductor: u32,
    /// The class number `h(D)` of the order (the number of Heegner points
    /// summed).
    pub class_number: usize,
    /// The level of the modular curve: 32 for the twists of
    /// `y² = x³ − x`, the conductor `N` of the curve for the route at its
    /// own level (then `n` is 0).
    pub level: u32,
    /// The point of `E_n(Q)` from the trace (on the input model), checked
    /// on the curve exactly. When the trace's parameter was halved before
    /// recognition (index `2^j`, see `docs/heegner.md`) this is `2^j·R`
    /// computed exactly from the recognised `R`; it equals the trace up to
    /// sign and 2-torsion to the working precision (a numerical agreement,
    /// not an exact check).
    pub trace_point: Point,
    /// `trace_point = ±index·point + T` with `T` torsion, checked exactly.
    pub point: Point,
    /// The index divided out (1 when no division applied).
    pub index: u64,
    /// `k` of the relation `k·trace = ±index·point + T` (`T` torsion): 1
    /// for the twists of `y² = x³ − x`; at the curve's own level the
    /// multiple of the trace at which a rational point was recognised
    /// (`docs/heegner.md`: the lattice of the newform and the curve's
    /// differ by a small index when the curve is not the optimal one).
    pub trace_factor: u32,
    /// The working precision in bits at which the point was recognised.
    pub precision_bits: u32,
    /// Series terms summed (over all classes) at that precision.
    pub terms: u64,
}

/// What [`heegner_point`] found.
#[derive(Clone, Debug, PartialEq)]
#[non_exhaustive]
#[allow(clippy::large_enum_variant)]
pub enum HeegnerOutcome {
    /// A point of infinite order, checked exactly.
    Found(HeegnerPoint),
    /// The trace is a torsion point. For the maximal order (odd `D`) this
    /// means `L'(E_n, 1) = 0` by Gross–Zagier; when the caller has that
    /// value certified non-zero, this outcome signals a defect. For the
    /// order of conductor 4 (`D = −64n`) no theorem used here excludes it.
    Torsion {
        /// `D`.
        discriminant: i64,
        /// `h(D)`.
        class_number: usize,
    },
    /// No rational point was recognised up to the precision cap.
    NotRecognised {
        /// `D`.
        discriminant: i64,
        /// `h(D)`.
        class_number: usize,
        /// The last precision tried.
        bits: u32,
    },
    /// The curve is outside the routes implemented; the reason says why.
    NotApplicable(String),
}

/// The class number `h(D)` of a negative discriminant `D ≡ 0, 1 (mod 4)`
/// (the number of primitive reduced forms; see the `forms` sources).
///
/// # Errors
/// [`Error::InvalidArgument`] unless `−10¹² ≤ D < 0`, `D ≡ 0, 1 (mod 4)`.
pub fn class_number(d: i64) -> Result<usize> {
    if !(-1_000_000_000_000..0).contains(&d) || !matches!(d.rem_euclid(4), 0 | 1) {
        return Err(Error::InvalidArgument {
            reason: format!("{d} is not a negative discriminant of at most 12 digits"),
        });
    }
    Ok(forms::reduced_forms(d).len())
}

#[cfg(test)]
/// The Heegner forms `[A, B, C]` of level `level` for the fundamental
/// discriminant `d` (`N | A`, `B ≡ β (mod 2N)` for the least `β ≥ 0` with
/// `β² ≡ D (mod 4N)`, `B² − 4AC = D`), one per ideal class, each with the
/// least `A` of its class; empty when `D` is not a square modulo `4N`.
///
/// # Errors
/// [`Error::InvalidArgument`] for a `d` that is not a fundamental
/// discriminant in `[−10⁷, 0)` or a level outside `1..=10⁴`; budget errors.
pub(crate) fn heegner_forms(
    d: i64,
    level: i64,
    budget: &mut Budget,
) -> Result<Vec<(i64, i64, i64)>> {
    if !(-10_000_000..0).contains(&d) || !forms::is_fundamental(d) || !(1..=10_000).contains(&level)
    {
        return Err(Error::InvalidArgument {
            reason: format!("Heegner forms need a fundamental D in [-10^7, 0) and a level in 1..=10^4, got D = {d}, N = {level}"),
        });
    }
    let Some(beta) = forms::heegner_beta(d, level) else {
        return Ok(Vec::new());
    };
    Ok(forms::heegner_forms(d, level, beta, budget)?.1)
}

/// For a curve isomorphic over Q to `y² = x³ − n²x` (`n` square-free,
/// positive): `n` and the change of model from the curve to that model.
/// `None` for every other curve (checked exactly on the coefficients).
///
/// # Errors
/// Budget errors from the square-free part of the scaling.
pub(crate) fn congruent_model(
    curve: &Curve,
    budget: &mut Budget,
) -> Result<Option<(BigInt, ModelChange)>> {
    if !curve.c6().is_zero() || curve.c4().is_zero() {
        return Ok(None);
    }
    // y² = x³ + Ax with A = −c4/48 after completing the square and cube.
    let m2 = curve.c4() / BigRational::from_integer(BigInt::from(48));
    let Some(m) = rational_sqrt_exact(&m2) else {
        return Ok(None);
    };
    let m = m.abs();
    let n = squarefree_part(&(m.numer() * m.denom()), budget)?.abs();
    let Some(w) = rational_sqrt_exact(&(&m / BigRational::from_integer(n.clone()))) else {
        return Ok(None);
    };
    let [a1, _, a3, _, _] = curve.coefficients();
    let two = BigRational::from_integer(BigInt::from(2));
    let r = -curve.b2() / BigRational::from_integer(BigInt::from(12));
    let s = -a1 / &two;
    let t = -(a3 + &r * a1) / &two;
    let change = ModelChange::translation(r, s, t).then(&ModelChange::scaling(w)?);
    let target = Curve::from_bigints([
        BigInt::zero(),
        BigInt::zero(),
        BigInt::zero(),
        -(&n * &n),
        BigInt::zero(),
    ])?;
    if change.apply_to_curve(curve) != target {
        return Ok(None);
    }
    Ok(Some((n, change)))
}

/// A Heegner point on a curve isomorphic to `E_n: y² = x³ − n²x` with
/// square-free `n ≡ 5, 6, 7 (mod 8)`, as a point of the input model
/// (`docs/heegner.md` has the order used for each class of `n`); on any
/// other curve, a Heegner point at the curve's own level (meaningful for
/// root number −1; `docs/heegner.md`, "The curve's own level").
///
/// `predicted_height` is `ĥ` of a generator by the Birch–Swinnerton-Dyer
/// formula with `#Ш = 1` (x-normalisation of [`crate::height`]); it is a
/// conjecture and is used only to choose the starting precision and the
/// primes tried for division. Without it the precision starts at 256 bits.
///
/// # Errors
/// [`Error::BudgetExhausted`] when the budget (units or deadline) runs
/// out; [`Error::Internal`] when the trace is not where the theory puts it.
pub fn heegner_point(
    curve: &Curve,
    predicted_height: Option<f64>,
    options: &HeegnerOptions,
    budget: &mut Budget,
) -> Result<HeegnerOutcome> {
    let Some((n, change)) = congruent_model(curve, budget)? else {
        return own_level_point(curve, predicted_height, options, budget);
    };
    let r8 = (&n % BigInt::from(8)).to_u64().unwrap_or(0);
    if !matches!(r8, 5..=7) {
        return Ok(HeegnerOutcome::NotApplicable(
            "root number +1 (n = 1, 2, 3 mod 8)".into(),
        ));
    }
    let nn = match n.to_u64() {
        Some(v) if v.saturating_mul(if r8 == 7 { 1 } else { 64 }) <= options.max_discriminant => v,
        _ => {
            return Ok(HeegnerOutcome::NotApplicable(format!(
                "|D| = {}·{n} above the limit {}",
                if r8 == 7 { 1 } else { 64 },
                options.max_discriminant
            )))
        }
    };
    let found = point_on_twist(nn, predicted_height, options, budget)?;
    Ok(match found {
        HeegnerOutcome::Found(mut h) => {
            h.trace_point = change.to_old(&h.trace_point);
            h.point = change.to_old(&h.point);
            if !(curve.contains(&h.point) && curve.contains(&h.trace_point)) {
                return Err(Error::Internal {
                    check: "a Heegner point moved to the input model is off the curve".into(),
                });
            }
            HeegnerOutcome::Found(h)
        }
        other => other,
    })
}

/// The route at the curve's own level (module `own_level`): for a curve of
/// root number −1 (the caller's business: with `w = +1` the trace is
/// torsion or not rational, and nothing is found), Heegner points on
/// `X₀(N)`, `N` the conductor, for up to three discriminants `D`
/// cheapest first; the precision starts from the predicted height and
/// doubles while the series stays within `max_own_level_terms`.
fn own_level_point(
    curve: &Curve,
    predicted_height: Option<f64>,
    options: &HeegnerOptions,
    budget: &mut Budget,
) -> Result<HeegnerOutcome> {
    let local = crate::curve::global_local_data(curve.coefficients(), budget)?;
    let Some(n) = local
        .conductor
        .to_u64()
        .filter(|&n| n <= MAX_OWN_LEVEL_CONDUCTOR)
    else {
        return Ok(HeegnerOutcome::NotApplicable(format!(
            "conductor {} above the own-level limit {MAX_OWN_LEVEL_CONDUCTOR}",
            local.conductor
        )));
    };
    let primes = own_level::conductor_primes(&local);
    let max_d = options.max_discriminant.min(MAX_OWN_LEVEL_DISCRIMINANT);
    // Precision as for the twists (see `point_on_twist`): 2·H/ln 2 bits for
    // a point of logarithmic height H; H from the predicted height with a
    // margin for the naive–canonical difference.
    let start_h = predicted_height
        .filter(|h| h.is_finite() && *h > 0.0)
        .map_or(30.0, |h| 1.1 * h + 10.0);
    let start_bits =
        ((2.0 * start_h / std::f64::consts::LN_2) as u32 + 32).clamp(96, options.max_bits.max(96));
    let choices = own_level::choose(
        n as i64,
        &primes,
        max_d,
        3,
        (start_bits, options.max_own_level_terms),
        budget,
    )?;
    let Some(first) = choices.first() else {
        return Ok(HeegnerOutcome::NotApplicable(format!(
            "level {n}: no discriminant |D| <= {max_d} meets the Heegner hypothesis with at most {} series terms at {start_bits} bits",
            options.max_own_level_terms
        )));
    };
    let (_, total0) = own_level::planned_terms(&first.reps, first.d, start_bits);
    if total0 > options.max_own_level_terms {
        return Ok(HeegnerOutcome::NotApplicable(format!(
            "level {n}: D = {}, h(D) = {} needs {total0} series terms at {start_bits} bits, above the limit {}",
            first.d, first.h, options.max_own_level_terms
        )));
    }
    let mut an: Vec<i64> = Vec::new();
    let mut last = None;
    let mut torsion = None;
    for choice in &choices {
        let mut bits = start_bits;
        loop {
            let (max_terms, total) = own_level::planned_terms(&choice.reps, choice.d, bits);
            if total > options.max_own_level_terms {
                break;
            }
            if an.len() < max_terms as usize + 8 {
                an = crate::analytic::dirichlet_coefficients(&local, max_terms + 8, budget)?;
            }
            last = Some((choice.d, choice.h, bits));
            match own_level::attempt(curve, &local, &an, &choice.reps, choice.d, bits, budget)? {
                own_level::Attempt::Found(point, trace_point, (k, m), terms) => {
                    return Ok(HeegnerOutcome::Found(HeegnerPoint {
                        n: BigInt::zero(),
                        discriminant: choice.d,
                        conductor: 1,
                        class_number: choice.h,
                        level: n as u32,
                        trace_point,
                        point,
                        index: m as u64,
                        trace_factor: k as u32,
                        precision_bits: bits,
                        terms,
                    }))
                }
                own_level::Attempt::Torsion => {
                    torsion = Some((choice.d, choice.h));
                    break;
                }
                own_level::Attempt::Nothing => {}
            }
            if bits >= options.max_bits {
                break;
            }
            bits = bits.saturating_mul(2).min(options.max_bits);
        }
    }
    Ok(match (last, torsion) {
        (_, Some((discriminant, class_number))) if last.map(|l| l.0) == Some(discriminant) => {
            HeegnerOutcome::Torsion {
                discriminant,
                class_number,
            }
        }
        (Some((discriminant, class_number, bits)), _) => HeegnerOutcome::NotRecognised {
            discriminant,
            class_number,
            bits,
        },
        (None, _) => HeegnerOutcome::NotApplicable(format!(
            "level {n}: every attempt was above the term limit"
        )),
    })
}

/// Guard bits of the series: `2·log₂(terms) + 24` covers the ≤ `4M²` ulp
/// of rounding of a sum of `M` terms.
fn guard_bits(terms: u64) -> u32 {
    2 * (64 - terms.leading_zeros()) + 24
}

/// The Heegner point on `E_n` itself (`n ≡ 5, 6, 7 mod 8`, square-free).
fn point_on_twist(
    n: u64,
    predicted_height: Option<f64>,
    options: &HeegnerOptions,
    budget: &mut Budget,
) -> Result<HeegnerOutcome> {
    // The order: the maximal order of Q(√−n) for n ≡ 7 (mod 8), where 2
    // splits; for n ≡ 5, 6 (mod 8), where 2 ramifies, the order of
    // conductor 4, of discriminant D = 16·(−4n) = −64n, which is a square
    // modulo 128: B = 8c with c odd (n ≡ 5), B = 16c with c odd (n ≡ 6).
    // For n ≡ 6 the residues β ≡ 0 (mod 32) give a torsion trace (seen
    // numerically), so β = 16 there.
    let (d, conductor, beta) = match n % 8 {
        7 => {
            let d = -(n as i64);
            if !forms::is_fundamental(d) {
                return Ok(HeegnerOutcome::NotApplicable(format!(
                    "{d} is not a fundamental discriminant"
                )));
            }
            let Some(beta) = forms::heegner_beta(d, LEVEL) else {
                return Ok(HeegnerOutcome::NotApplicable(format!(
                    "{d} is not a square modulo {}",
                    4 * LEVEL
                )));
            };
            (d, 1u32, beta)
        }
        5 => (-64 * n as i64, 4, 8),
        6 => (-64 * n as i64, 4, 16),
        _ => {
            return Ok(HeegnerOutcome::NotApplicable(format!(
                "n = {} mod 8 is outside the routes",
                n % 8
            )))
        }
    };
    if (beta * beta - d) % (4 * LEVEL) != 0 {
        return Err(Error::Internal {
            check: format!("{beta}^2 is not {d} modulo {}", 4 * LEVEL),
        });
    }
    let (h, hforms) = forms::heegner_cover(d, LEVEL, beta, budget)?;
    let nb = BigInt::from(n);
    let e = Curve::from_bigints([
        BigInt::zero(),
        BigInt::zero(),
        BigInt::zero(),
        -(&nb * &nb),
        BigInt::zero(),
    ])?;
    // Precision: recognising X = a/d² from an approximation needs an error
    // below 1/(2d⁴) (Legendre's theorem on continued fractions), and ℘
    // near its pole multiplies the parameter's error by |dX/dy| ≈
    // 2|X|^{3/2}/√n: p ≥ 2·log₂(d²) + 1.5·log₂|X| + 2 bits. With
    // H = log max(|a|, d²): if |a| ≥ d², log|X| = H − log d² and the sum is
    // 1.5H + 0.5·log d² ≤ 2H; otherwise log|X| < 0 and it is ≤ 2H. So
    // 2·H/ln 2 bits (plus log₂ n and the guard bits). H starts at the predicted height (index 1
    // between the trace and a generator, #Ш = 1) plus a margin for the
    // naive–canonical difference; the precision doubles on failure, so a
    // larger index or Ш costs at most twice the final attempt.
    let start_h = predicted_height
        .filter(|h| h.is_finite() && *h > 0.0)
        .map_or(40.0, |h| 1.1 * h + 2.0 * (n as f64).ln() + 10.0);
    let amax = hforms.iter().map(|f| f.form().0).max().unwrap_or(LEVEL);
    let qmax = (-std::f64::consts::PI * ((-d) as f64).sqrt() / amax as f64).exp();
    let mut bits = ((2.0 * start_h / std::f64::consts::LN_2 + (n as f64).log2()) as u32 + 64)
        .clamp(128, options.max_bits.max(128));
    // The coefficients of E0 for the largest precision that may be used.
    let e0 = Curve::from_ints([0, 0, 0, -1, 0])?;
    let local = crate::curve::global_local_data(e0.coefficients(), budget)?;
    loop {
        let m = congruent::terms_for(
            qmax,
            bits + guard_bits(congruent::terms_for(qmax, bits) * 4),
        );
        let an = crate::analytic::dirichlet_coefficients(&local, m + 8, budget)?;
        let step = an
            .iter()
            .enumerate()
            .skip(2)
            .filter(|(_, a)| **a != 0)
            .fold(0usize, |g, (k, _)| num_integer::Integer::gcd(&g, &(k - 1)))
            .max(1);
        let guard = guard_bits(m);
        let c = Constants::new(bits + guard);
        let (z, terms) = congruent::trace(&c, &an, step, &hforms, d, budget)?;
        let (y, _) = congruent::minus_part(&c, &z)?;
        if congruent::is_zero_point(&c, &y) {
            return Ok(HeegnerOutcome::Torsion {
                discriminant: d,
                class_number: h,
            });
        }
        // The trace point itself, or a point R with 2^j·R = ±trace + T
        // (j ≤ 3, T ∈ E_n[2]) found from the halved parameter: the order-4
        // routes give traces of index 2, 4 or 8, and recognising R needs
        // 4^j times fewer bits than recognising the trace.
        if let Some((r0, y0, j)) = congruent::point_or_halves(&c, &y, &nb, guard + 16, 3, budget)? {
            let q = e.mul(&r0, &(BigInt::from(1u8) << j));
            // Divide by the primes of the index the height ratio suggests,
            // then by 2, 3, 5, 7 while that works (each checked exactly).
            let mut primes: Vec<u64> = Vec::new();
            if let (Some(hp), Ok(hq)) = (predicted_height, crate::height::canonical_height(&e, &r0))
            {
                let t = (hq.value() / hp).sqrt();
                let rt = t.round();
                if rt >= 1.0 && (t - rt).abs() < 0.02 * rt.max(1.0) && rt < 1e12 {
                    let mut v = rt as u64;
                    let mut p = 2;
                    while p * p <= v {
                        while v % p == 0 {
                            primes.push(p);
                            v /= p;
                        }
                        p += 1;
                    }
                    if v > 1 {
                        primes.push(v);
                    }
                }
            }
            primes.retain(|&p| p <= options.max_division_prime);
            primes.extend([2, 3, 5, 7]);
            let mut point = r0;
            let mut param = (false, y0);
            let mut index = 1u64 << j;
            let mut tried_small = [false; 8];
            let mut divisions = 0;
            for p in primes {
                loop {
                    divisions += 1;
                    if divisions > 64 {
                        break;
                    }
                    let small = p < 8 && tried_small[p as usize];
                    if small {
                        break;
                    }
                    match congruent::divide(
                        &c,
                        &e,
                        &point,
                        (param.0, &param.1),
                        p,
                        &nb,
                        guard + 16,
                        budget,
                    )? {
                        Some((r, s, yy)) => {
                            point = r;
                            param = (s, yy);
                            index = index.saturating_mul(p);
                        }
                        None => {
                            if p < 8 {
                                tried_small[p as usize] = true;
                            }
                            break;
                        }
                    }
                    if p >= 8 {
                        break;
                    }
                }
            }
            return Ok(HeegnerOutcome::Found(HeegnerPoint {
                n: nb,
                discriminant: d,
                conductor,
                class_number: h,
                level: LEVEL as u32,
                trace_point: q,
                point,
                index,
                trace_factor: 1,
                precision_bits: bits,
                terms,
            }));
        }
        if bits >= options.max_bits {
            return Ok(HeegnerOutcome::NotRecognised {
                discriminant: d,
                class_number: h,
                bits,
            });
        }
        bits = bits.saturating_mul(2).min(options.max_bits);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn congruent_models_are_recognised_exactly() {
        let mut b = Budget::unlimited();
        // y² = x³ − 49x and a translated, scaled model of it.
        let e: Curve = "0 0 0 -49 0".parse().unwrap();
        let (n, _) = congruent_model(&e, &mut b).unwrap().unwrap();
        assert_eq!(n, BigInt::from(7));
        // x ↦ 4x: y² = x³ − 49·16x is E_7 again (scaling u = 2).
        let e: Curve = "0 0 0 -784 0".parse().unwrap();
        assert_eq!(
            congruent_model(&e, &mut b).unwrap().unwrap().0,
            BigInt::from(7)
        );
        // y² = x³ − 28²·x = x³ − 784x ≅ E_7; y² = x³ + 4x is not a twist of E0.
        let e: Curve = "0 0 0 4 0".parse().unwrap();
        assert!(congruent_model(&e, &mut b).unwrap().is_none());
        let e: Curve = "0 0 0 -2 0".parse().unwrap();
        assert!(congruent_model(&e, &mut b).unwrap().is_none());
    }

    #[test]
    fn heegner_forms_agree_with_the_class_number_formula() {
        let mut checked = 0;
        // Class numbers h(−n) from the analytic class number formula, computed
        // with sympy 1.14.0 by tests/data/class_numbers.py (output committed).
        const CLASS_NUMBERS: &str = include_str!("../../tests/data/class_numbers.txt");
        for line in CLASS_NUMBERS.lines().filter(|l| !l.starts_with('#')) {
            let mut it = line.split_whitespace().map(|w| w.parse::<i64>().unwrap());
            let (d, h) = (it.next().unwrap(), it.next().unwrap() as usize);
            let forms = heegner_forms(d, 32, &mut Budget::unlimited()).unwrap();
            // One Heegner form per class (Gross 1984, from memory): h forms,
            // each with 32 | A, the discriminant D and one common B mod 64.
            assert_eq!(forms.len(), h, "D = {d}");
            let b0 = forms[0].1.rem_euclid(64);
            for &(a, b, c) in &forms {
                assert_eq!(a % 32, 0);
                assert_eq!(b * b - 4 * a * c, d);
                assert_eq!(b.rem_euclid(64), b0);
            }
            checked += 1;
        }
        assert!(checked > 200, "{checked}");
    }
}
