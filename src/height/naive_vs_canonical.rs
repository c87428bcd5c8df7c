//! Bounds: the difference between the naive and the canonical height, and
//! a proven lower bound for `ĥ` on the non-torsion points.
//!
//! # Naive minus canonical
//! On the minimal model, for `P = (a/d², ·)`, `h(P) = log d² + log max(|x|, 1)`
//! and (see the `local` module) `ĥ(P) = log d² + Λ∞(P) + Σ κ_p(P) log p`
//! with `Λ∞(P) = log(x − r) + ¼ Σ 4⁻ⁿ log z(·)`. Since
//! `ℓ₋ ≤ log z ≤ ℓ₊` on `E(R)` and `Σ_{n≥0} 4⁻ⁿ = 4/3`,
//!
//! ```text
//! h(P) − ĥ(P) ≤ sup(log max(|x|,1) − log(x − r)) − ⅓·min(0, ℓ₋) + Σ_p (v_p(Δ)/4)·log p,
//! ĥ(P) − h(P) ≤ sup(log(x − r) − log max(|x|,1)) + ⅓·max(0, ℓ₊),
//! ```
//!
//! the suprema taken over `x ≥ x₀`, a certified lower bound for `x` on
//! `E(R)`, and evaluated in closed form. The term `v_p(Δ)/4·log p` bounds
//! `−κ_p`: for `I_N` the correction is `M(N − M)/N ≤ N/4` (Silverman 1988);
//! for the additive types the largest correction is at most
//! `(m + 4)/4 ≤ v_p(Δ)/4` for `I_m*` and at most `v_p(Δ)/4` for the
//! others (component values as tabulated by Cremona–Prickett–Siksek,
//! J. Number Theory 116 (2006), from memory); the code also checks every
//! correction it computes against this bound.
//! This plays the part of Silverman's bound (Math. Comp. 55 (1990)) with
//! constants specific to the curve.
//!
//! # Lower bound for ĥ on non-torsion points
//! If every point with `h(x) ≤ H` on the minimal model is listed, then
//! every non-torsion point `P` not in the list has
//! `ĥ(P) ≥ h(P) − B > H − B` (`B` the first bound above), so
//! `λ = min(H − B, min ĥ over the listed non-torsion points)` is a lower
//! bound for `ĥ` on all non-torsion points. The list comes from an exact
//! search over `x = a/d²` with `max(|a|, d²) ≤ e^H`, `a ≥ x₀d²`,
//! `gcd(a, d) = 1`, testing whether `x` lifts to a rational point
//! (a discriminant is a square). This simple provable bound replaces the
//! sharper method of Cremona–Siksek (ANTS VII, 2006); its cost grows like
//! `e^{1.5H}`, so it suits curves whose `B` is small.

use num_bigint::BigInt;
use num_integer::{Integer, Roots};
use num_rational::BigRational;
use num_traits::{ToPrimitive, Zero};

use super::{Certified, HeightContext, DEFAULT_PRECISION};
use crate::budget::Budget;
use crate::curve::{torsion, Point};
use crate::error::{Error, Result};

/// Bounds valid for every point of `E(Q)` on the minimal model:
/// `−canonical_minus_naive ≤ h(P) − ĥ(P) ≤ naive_minus_canonical`.
#[derive(Clone, Copy, Debug, PartialEq)]
#[non_exhaustive]
pub struct DifferenceBounds {
    /// Upper bound for `h(P) − ĥ(P)`.
    pub naive_minus_canonical: f64,
    /// Upper bound for `ĥ(P) − h(P)`.
    pub canonical_minus_naive: f64,
}

/// The bounds of the module docs for the minimal model of `ctx`.
pub fn difference_bounds(ctx: &HeightContext) -> DifferenceBounds {
    let arch = ctx.arch();
    let mut nmc = arch.g_sup - arch.log_z_lo.min(0.0) / 3.0;
    for bp in ctx.bad() {
        nmc += bp.n as f64 / 4.0 * bp.log_p;
    }
    let cmn = arch.h_sup + arch.log_z_hi.max(0.0) / 3.0;
    DifferenceBounds {
        naive_minus_canonical: nmc * (1.0 + 1e-12) + 1e-12,
        canonical_minus_naive: cmn * (1.0 + 1e-12) + 1e-12,
    }
}

/// A proven lower bound for `ĥ` on the non-torsion points of `E(Q)`.
#[derive(Clone, Debug, PartialEq)]
#[non_exhaustive]
pub struct HeightLowerBound {
    /// Every non-torsion `P` has `ĥ(P) ≥ bound`.
    pub bound: f64,
    /// The naive height `H` up to which points were listed.
    pub search_height: f64,
    /// The non-torsion point of least height found (input model), if any.
    pub smallest: Option<(Point, Certified)>,
    /// Candidates `x = a/d²` tested.
    pub candidates: u64,
}

/// Largest search height accepted (the cost grows like `e^{1.5H}`).
pub const MAX_SEARCH_HEIGHT: f64 = 16.0;

/// The lower bound of the module docs, searching up to naive height
/// `search_height` (`None` when `search_height` does not exceed the
/// difference bound, so nothing can be proven that way). Charges one unit
/// per candidate.
///
/// # Errors
/// [`Error::InvalidArgument`] for a search height that is not finite or
/// exceeds `MAX_SEARCH_HEIGHT`; [`Error::BudgetExhausted`].
pub fn height_lower_bound(
    ctx: &HeightContext,
    search_height: f64,
    budget: &mut Budget,
) -> Result<Option<HeightLowerBound>> {
    if !(search_height.is_finite() && search_height <= MAX_SEARCH_HEIGHT) {
        return Err(Error::InvalidArgument {
            reason: format!("search height must be finite and ≤ {MAX_SEARCH_HEIGHT}"),
        });
    }
    let b = difference_bounds(ctx).naive_minus_canonical;
    if search_height - b <= 1e-6 {
        return Ok(None);
    }
    let tors = torsion(ctx.minimal_model());
    let m = search_height.exp().floor() as i128;
    let x0 = ctx.arch().x_floor;
    let a = ctx.a_invariants();
    let ai: Option<Vec<i128>> = a.iter().map(|v| v.to_i128()).collect();
    let mut best: Option<(Point, Certified)> = None;
    let mut candidates = 0u64;
    let mut d: i128 = 1;
    while d * d <= m {
        let d2 = d * d;
        let lo = ((x0 * d2 as f64).floor() as i128).max(-m);
        let row = (m - lo + 1).max(0) as u64;
        budget.spend(row).map_err(|_| Error::BudgetExhausted {
            stage: "height lower bound search".into(),
        })?;
        candidates += row;
        for num in lo..=m {
            if d > 1 && num.gcd(&d) != 1 {
                continue;
            }
            for p in lifts(a, ai.as_deref(), num, d) {
                if tors.points().contains(&p) {
                    continue;
                }
                let h = ctx.height_minimal(&p, DEFAULT_PRECISION);
                if best.as_ref().map_or(true, |(_, bh)| h.value() < bh.value()) {
                    best = Some((p, h));
                }
            }
        }
        d += 1;
    }
    let mut bound = search_height - b;
    if let Some((_, h)) = &best {
        bound = bound.min(h.lower());
    }
    if bound <= 0.0 {
        return Ok(None);
    }
    Ok(Some(HeightLowerBound {
        bound,
        search_height,
        smallest: best.map(|(p, h)| (ctx.point_on_input(&p), h)),
        candidates,
    }))
}

/// The rational points with `x = num/d²` on the model `a` (0, 1 or 2).
fn lifts(a: &[BigInt; 5], ai: Option<&[i128]>, num: i128, d: i128) -> Vec<Point> {
    // D = (a1·num·d + a3·d³)² + 4(num³ + a2·num²d² + a4·num·d⁴ + a6·d⁶);
    // x lifts iff D is a square, then y = (−(a1·num·d + a3·d³) ± √D)/(2d³).
    if let Some(c) = ai {
        if let Some((lin, disc)) = disc_i128(c, num, d) {
            if disc < 0 || !quick_square(disc) {
                return Vec::new();
            }
            let s = (disc as u128).sqrt() as i128;
            if s * s != disc {
                return Vec::new();
            }
            return make_points(
                &BigInt::from(num),
                &BigInt::from(d),
                &BigInt::from(lin),
                &BigInt::from(s),
            );
        }
    }
    let (n, dd) = (BigInt::from(num), BigInt::from(d));
    let [a1, a2, a3, a4, a6] = a;
    let d2 = &dd * &dd;
    let d3 = &d2 * &dd;
    let lin = a1 * &n * &dd + a3 * &d3;
    let disc = &lin * &lin
        + (&n * &n * &n + a2 * &n * &n * &d2 + a4 * &n * &d2 * &d2 + a6 * &d3 * &d3) * 4;
    match crate::arith::sqrt_exact(&disc) {
        Some(s) => make_points(&n, &dd, &lin, &s),
        None => Vec::new(),
    }
}

/// The rational points with `x = num/d²` on the model `a`, in exact
/// big-integer arithmetic.
pub(crate) fn lifts_exact(a: &[BigInt; 5], num: i128, d: i128) -> Vec<Point> {
    if d <= 0 {
        return Vec::new();
    }
    lifts(a, None, num, d)
}

fn disc_i128(c: &[i128], n: i128, d: i128) -> Option<(i128, i128)> {
    let (a1, a2, a3, a4, a6) = (c[0], c[1], c[2], c[3], c[4]);
    let d2 = d.checked_mul(d)?;
    let d3 = d2.checked_mul(d)?;
    let lin = a1
        .checked_mul(n)?
        .checked_mul(d)?
        .checked_add(a3.checked_mul(d3)?)?;
    let n2 = n.checked_mul(n)?;
    let cubic = n2
        .checked_mul(n)?
        .checked_add(a2.checked_mul(n2)?.checked_mul(d2)?)?
        .checked_add(a4.checked_mul(n)?.checked_mul(d2.checked_mul(d2)?)?)?
        .checked_add(a6.checked_mul(d3.checked_mul(d3)?)?)?;
    let disc = lin.checked_mul(lin)?.checked_add(cubic.checked_mul(4)?)?;
    Some((lin, disc))
}

/// Squares mod 64, 63 and 65 (a cheap filter, common practice).
fn quick_square(n: i128) -> bool {
    let r64 = (n & 63) as u32;
    if !matches!(r64, 0 | 1 | 4 | 9 | 16 | 17 | 25 | 33 | 36 | 41 | 49 | 57) {
        return false;
    }
    let r63 = n.rem_euclid(63) as u32;
    let r65 = n.rem_euclid(65) as u32;
    SQ63 >> r63 & 1 == 1 && SQ65 >> r65 & 1 == 1
}

const fn square_mask(m: u32) -> u128 {
    let mut mask = 0u128;
    let mut k = 0;
    while k < m {
        mask |= 1u128 << (k * k % m);
        k += 1;
    }
    mask
}

const SQ63: u128 = square_mask(63);
const SQ65: u128 = square_mask(65);

fn make_points(n: &BigInt, d: &BigInt, lin: &BigInt, s: &BigInt) -> Vec<Point> {
    let d2 = d * d;
    let x = BigRational::new(n.clone(), d2.clone());
    let den: BigInt = &d2 * d * 2;
    let y1 = BigRational::new(-lin + s, den.clone());
    if s.is_zero() {
        return vec![Point::new(x, y1)];
    }
    let y2 = BigRational::new(-lin - s, den);
    vec![Point::new(x.clone(), y1), Point::new(x, y2)]
}
