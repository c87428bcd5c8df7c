//! Local heights: the archimedean one by Tate's series, the ones at the
//! primes of bad reduction from the valuations of the division
//! polynomials (Silverman, *Computing heights on elliptic curves*,
//! Math. Comp. 51 (1988); the series is Tate's, as presented there).
//!
//! # Normalisation used in this file
//! Everything is in the *x-normalisation* of `docs/heights.md`:
//! `ĥ(P) = lim h(x(2ⁿP))/4ⁿ` with `h(a/b) = log max(|a|, |b|)`. On a
//! minimal model, for `P = (a/d², ·)` in lowest terms,
//!
//! ```text
//! ĥ(P) = log d² + Λ∞(P) + Σ_{p bad} κ_p(P)·log p
//! ```
//!
//! where `Λ∞(P) = 2λ∞(P) − (1/6)·log|Δ|` is twice Silverman's archimedean
//! local height with the `Δ` term removed, and `κ_p(P) ≤ 0` is the
//! component correction (zero when `P` reduces to a non-singular point).
//! The `(1/12)·log|Δ|_v` terms of Silverman's local heights cancel over
//! all places by the product formula, so they are dropped everywhere.
//!
//! # The archimedean term
//! With an integer shift `r` below every real point (`x − r ≥ δ > 0` on
//! `E(R)`), put `x' = x − r`, `t = 1/x'` and, with the `b`-invariants of
//! the shifted model,
//! `z(t) = 1 − b4t² − 2b6t³ − b8t⁴`, `w(t) = 4t + b2t² + 2b4t³ + b6t⁴`.
//! Then `t(2Q) = w(t)/z(t)` and the quasi-parallelogram law
//! `Λ∞(2Q) = 4Λ∞(Q) − log|2y + a1x + a3|²` gives Tate's series
//!
//! ```text
//! Λ∞(P) = log x'(P) + ¼ Σ_{n≥0} 4⁻ⁿ log z(t(2ⁿP)).
//! ```
//!
//! `z > 0` on `E(R)` and `log z` lies in a range `[ℓ₋, ℓ₊]` that is
//! certified once per curve (adaptive bisection with Taylor's theorem on
//! the polynomial `z`), so stopping after `N` terms leaves a tail of at most
//! `(1/3)·4⁻ᴺ·max(|ℓ₋|, |ℓ₊|)`.

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{Signed, ToPrimitive, Zero};

use crate::curve::tate::{Kodaira, ReductionKind};
use crate::error::{Error, Result};
use crate::local::{valuation, Prime};

/// Unit roundoff of f64.
pub(crate) const EPS: f64 = f64::EPSILON * 0.5;

/// Natural logarithm of |n| > 0 with relative error a few units of EPS
/// (top 64 bits and the binary exponent).
pub(crate) fn ln_abs(n: &BigInt) -> f64 {
    let bits = n.bits();
    if bits <= 900 {
        return n.abs().to_f64().map(f64::ln).unwrap_or(f64::NAN);
    }
    let shift = bits - 64;
    let top: BigInt = n.abs() >> shift;
    top.to_f64().map(f64::ln).unwrap_or(f64::NAN) + shift as f64 * std::f64::consts::LN_2
}

/// `num/den` as f64 for big integers of any size (0 on underflow, ±inf on
/// overflow), relative error a few EPS.
pub(crate) fn ratio_f64(num: &BigInt, den: &BigInt) -> f64 {
    if num.is_zero() {
        return 0.0;
    }
    let (nb, db) = (num.bits() as i64, den.bits() as i64);
    let sn = nb.saturating_sub(60).max(0);
    let sd = db.saturating_sub(60).max(0);
    let n = (num >> (sn as usize)).to_f64().unwrap_or(f64::NAN);
    let d = (den >> (sd as usize)).to_f64().unwrap_or(f64::NAN);
    let e = (sn - sd).clamp(-2000, 2000) as i32;
    (n / d) * 2f64.powi(e.clamp(-1074, 1023))
}

/// Horner evaluation of an exact integer polynomial (ascending
/// coefficients) at a rational point.
fn eval_f64(c: &[f64], x: f64) -> f64 {
    c.iter().rev().fold(0.0, |acc, a| acc * x + a)
}

/// Approximate real roots of a real polynomial (ascending coefficients,
/// degree ≤ 12), ascending, by recursive isolation between the critical
/// points and bisection. Critical points where the value nearly vanishes
/// are included too (double roots); callers verify every candidate.
pub(crate) fn real_roots_f64(c: &[f64]) -> Vec<f64> {
    let mut c = c.to_vec();
    while c.len() > 1 && c.last().is_some_and(|v| *v == 0.0) {
        c.pop();
    }
    let deg = c.len().saturating_sub(1);
    if deg == 0 {
        return Vec::new();
    }
    if deg == 1 {
        return vec![-c[0] / c[1]];
    }
    let lead = c[deg];
    let bound = 1.0
        + c[..deg]
            .iter()
            .map(|a| (a / lead).abs())
            .fold(0.0, f64::max);
    let d: Vec<f64> = (1..=deg).map(|i| c[i] * i as f64).collect();
    let crit = real_roots_f64(&d);
    let mut pts = vec![-bound];
    pts.extend(crit.iter().copied().filter(|v| v.abs() < bound));
    pts.push(bound);
    let scale: f64 = c.iter().map(|a| a.abs()).fold(0.0, f64::max);
    let mut out = Vec::new();
    for w in pts.windows(2) {
        let (mut lo, mut hi) = (w[0], w[1]);
        let (flo, fhi) = (eval_f64(&c, lo), eval_f64(&c, hi));
        if flo == 0.0 {
            out.push(lo);
            continue;
        }
        if flo.signum() == fhi.signum() {
            continue;
        }
        for _ in 0..2000 {
            let mid = 0.5 * (lo + hi);
            if mid <= lo || mid >= hi {
                break;
            }
            let fm = eval_f64(&c, mid);
            if fm == 0.0 {
                lo = mid;
                hi = mid;
                break;
            }
            if fm.signum() == flo.signum() {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        out.push(0.5 * (lo + hi));
    }
    for &cp in &crit {
        let v = eval_f64(&c, cp);
        let tol = 1e-9 * scale * (1.0 + cp.abs()).powi(deg as i32);
        if v.abs() <= tol
            && !out
                .iter()
                .any(|r| (r - cp).abs() <= 1e-9 * (1.0 + cp.abs()))
        {
            out.push(cp);
        }
    }
    out.sort_by(|a, b| a.total_cmp(b));
    out
}

/// Brackets of the real locus `E(R)`: `p0` below the least real root of
/// `f`, and when Δ > 0 the gap `(qa, qb)` between the two components.
type Brackets = (f64, Option<(f64, f64)>);

/// Certified brackets of the real locus from the f64 roots of
/// `f = 4x³ + b2x² + 2b4x + b6` (`fc` its coefficients, constant first):
/// `E(R) ⊂ [p0, qa] ∪ [qb, ∞)` when Δ > 0, `[p0, ∞)` when Δ < 0, as
/// `(p0, Some((qa, qb)))` or `(p0, None)`, with every sign checked at the
/// f64 points themselves; `None` when the f64 roots are too inaccurate.
fn brackets_from_f64_roots(
    fc: &[BigInt],
    roots: &[f64],
    scale: f64,
    disc: &BigInt,
) -> Option<Brackets> {
    let sign = |x: f64| crate::arith::sign_at_f64(fc, x);
    use std::cmp::Ordering::{Greater, Less};
    for k in [1e-9, 1e-7, 1e-11, 1e-5, 1e-13] {
        let eta = |v: f64| k * (scale + v.abs());
        if disc.is_positive() {
            if roots.len() != 3 {
                break;
            }
            let (e3, e2, e1) = (roots[0], roots[1], roots[2]);
            let p0 = e3 - eta(e3);
            let p1 = 0.5 * (e3 + e2);
            let qa = e2 + eta(e2).min(0.25 * (e1 - e2));
            let qb = e1 - eta(e1).min(0.25 * (e1 - e2));
            let p3 = e1 + eta(e1);
            if !(p0 < p1 && p1 < qa && qa <= qb && qb < p3) {
                continue;
            }
            if sign(p0) == Some(Less)
                && sign(p1) == Some(Greater)
                && sign(qa) == Some(Less)
                && sign(qb) == Some(Less)
                && sign(p3) == Some(Greater)
            {
                return Some((p0, Some((qa, qb))));
            }
        } else {
            let &e1 = roots.first()?;
            let p0 = e1 - eta(e1);
            // Δ < 0: f has one real root, so f(p0) < 0 puts it above p0.
            if sign(p0) == Some(Less) {
                return Some((p0, None));
            }
        }
    }
    None
}

/// The brackets of [`brackets_from_f64_roots`] when the f64 roots are too
/// inaccurate for them: certified isolation of the real roots of `f`
/// (square-free: Δ ≠ 0), exact in Q, narrowed to width ≤ k·(scale + |e|)
/// with outward f64 rounding checked exactly; the signs are re-checked
/// exactly. `Ok(None)` when even that does not resolve the roots.
///
/// # Errors
/// [`Error::Internal`] if `f` is not square-free or has the wrong number
/// of real roots for the sign of Δ.
fn brackets_from_isolation(fc: &[BigInt], scale: f64, disc: &BigInt) -> Result<Option<Brackets>> {
    use crate::arith::real_roots::{f64_above, f64_below, isolate_real_roots, refine};
    use std::cmp::Ordering::Less;
    let sign = |x: f64| crate::arith::sign_at_f64(fc, x);
    let mut ivs = isolate_real_roots(fc).ok_or_else(|| Error::Internal {
        check: "4x³ + b2x² + 2b4x + b6 is square-free when Δ ≠ 0".into(),
    })?;
    let expected = if disc.is_positive() { 3 } else { 1 };
    if ivs.len() != expected {
        return Err(Error::Internal {
            check: "4x³ + b2x² + 2b4x + b6 has 3 real roots when Δ > 0 and 1 when Δ < 0".into(),
        });
    }
    // p0 < e3, e2 < qa ≤ qb < e1 from the narrowed isolating intervals.
    for k in [1e-9, 1e-11, 1e-13] {
        for iv in ivs.iter_mut() {
            let e = iv.lo.to_f64().unwrap_or(f64::INFINITY).abs();
            let Some(w) = BigRational::from_float(k * (scale + e)) else {
                continue;
            };
            refine(fc, iv, &w);
        }
        let Some(p0) = f64_below(&ivs[0].lo) else {
            break;
        };
        if sign(p0) != Some(Less) {
            continue;
        }
        if !disc.is_positive() {
            return Ok(Some((p0, None)));
        }
        let (Some(qa), Some(qb)) = (f64_above(&ivs[1].hi), f64_below(&ivs[2].lo)) else {
            break;
        };
        if qa <= qb && sign(qa) == Some(Less) && sign(qb) == Some(Less) {
            return Ok(Some((p0, Some((qa, qb)))));
        }
    }
    Ok(None)
}

/// `b2, b4, b6, b8` of the model shifted by `x = x′ + r`
/// [Sil09, III.1, Table 3.1].
fn shifted_invariants([b2, b4, b6, b8]: [&BigInt; 4], r: &BigInt) -> [BigInt; 4] {
    let r2 = r * r;
    let r3 = &r2 * r;
    let nb2: BigInt = b2 + r * 12;
    let nb4: BigInt = b4 + r * b2 + &r2 * 6;
    let nb6: BigInt = b6 + r * b4 * 2 + &r2 * b2 + &r3 * 4;
    let nb8: BigInt = b8 + r * b6 * 3 + &r2 * b4 * 3 + &r3 * b2 + &r3 * r * 3;
    [nb2, nb4, nb6, nb8]
}

/// Certified `(g_sup, h_sup)` of [`Archimedean`] for the real locus
/// `x ≥ p0` and the shift `r_f` (module docs), with an allowance for the
/// rounding of the few f64 operations.
fn log_ratio_sups(p0: f64, r_f: f64) -> (f64, f64) {
    // sup of log max(|x|,1) − log(x − r) over x ≥ p0 (module docs).
    let mut g_sup = f64::NEG_INFINITY;
    if p0 < 1.0 {
        g_sup = g_sup.max(p0.abs().max(1.0).ln() - (p0 - r_f).ln());
    }
    let x0 = p0.max(1.0);
    g_sup = g_sup.max(if r_f <= 0.0 {
        0.0
    } else {
        x0.ln() - (x0 - r_f).ln()
    });
    // sup of log(x − r) − log max(|x|,1): below 1 at most log(1 − r)
    // (x − r ≤ 1 − r), above max(1, p0) at most log(1 − r/x0) if r < 0.
    let mut h_sup = if r_f < 0.0 {
        (1.0 - r_f / x0).ln()
    } else {
        0.0
    };
    if p0 < 1.0 {
        h_sup = h_sup.max((1.0 - r_f).ln());
    }
    // Rounding in the few operations above: a generous allowance.
    g_sup += 1e-9 * (1.0 + g_sup.abs());
    h_sup += 1e-9 * (1.0 + h_sup.abs());
    (g_sup, h_sup)
}

/// Per-curve data for the archimedean local height on a minimal model.
#[derive(Clone, Debug)]
pub(crate) struct Archimedean {
    /// The integer shift `r`.
    r: BigInt,
    /// `b2, b4, b6, b8` of the shifted model, as double-doubles.
    b: [Dd; 4],
    /// Certified bounds `ℓ₋ ≤ log z ≤ ℓ₊` on `E(R)`.
    pub log_z_lo: f64,
    pub log_z_hi: f64,
    /// Certified: `sup_{P ∈ E(R)} (log max(|x|, 1) − log(x − r))`.
    pub g_sup: f64,
    /// Certified: `sup_{P ∈ E(R)} (log(x − r) − log max(|x|, 1))`.
    pub h_sup: f64,
    /// Certified lower bound for `x` on `E(R)`.
    pub x_floor: f64,
}

impl Archimedean {
    /// Sets up the series for the model with invariants `b2, b4, b6, b8`.
    ///
    /// # Errors
    /// [`Error::InvalidArgument`] when the invariants exceed the `f64`
    /// range of the height routine, or the real roots of the cubic lie
    /// closer together than it resolves.
    pub fn new(b2: &BigInt, b4: &BigInt, b6: &BigInt, b8: &BigInt, disc: &BigInt) -> Result<Self> {
        let too_big = || Error::InvalidArgument {
            reason: "curve invariants exceed the f64 range of the height routine".into(),
        };
        // f(x) = 4x³ + b2x² + 2b4x + b6 = (2y + a1x + a3)²; E(R) is f ≥ 0.
        let fc: Vec<BigInt> = vec![b6.clone(), b4 * 2, b2.clone(), BigInt::from(4)];
        let ff: Vec<f64> = fc
            .iter()
            .map(|v| v.to_f64().unwrap_or(f64::INFINITY))
            .collect();
        if ff.iter().any(|v| !v.is_finite() || v.abs() > 1e280) {
            return Err(too_big());
        }
        let roots = real_roots_f64(&ff);
        let roots: Vec<f64> = if disc.is_positive() {
            roots
        } else {
            roots.into_iter().take(1).collect()
        };
        let scale = [
            b2.to_f64().unwrap_or(0.0).abs() / 4.0,
            (b4.to_f64().unwrap_or(0.0).abs() / 2.0).sqrt(),
            (b6.to_f64().unwrap_or(0.0).abs() / 4.0).cbrt(),
            b8.to_f64().unwrap_or(0.0).abs().powf(0.25),
        ]
        .into_iter()
        .fold(1.0, f64::max);
        let cert = match brackets_from_f64_roots(&fc, &roots, scale, disc) {
            Some(c) => Some(c),
            None => brackets_from_isolation(&fc, scale, disc)?,
        };
        let (p0, gap) = cert.ok_or_else(|| Error::InvalidArgument {
            reason: "the real roots of 4x³ + b2x² + 2b4x + b6 lie closer together than the f64 height routine resolves".into(),
        })?;
        let delta = scale.ceil().max(1.0);
        let r_f = p0.floor() - delta;
        let r = BigRational::from_float(r_f)
            .ok_or_else(too_big)?
            .to_integer();
        let [nb2, nb4, nb6, nb8] = shifted_invariants([b2, b4, b6, b8], &r);
        let b: [f64; 4] = [
            nb2.to_f64().unwrap_or(f64::INFINITY),
            nb4.to_f64().unwrap_or(f64::INFINITY),
            nb6.to_f64().unwrap_or(f64::INFINITY),
            nb8.to_f64().unwrap_or(f64::INFINITY),
        ];
        if b.iter().any(|v| !v.is_finite() || v.abs() > 1e280) {
            return Err(too_big());
        }
        // x' ≥ p0 − r on E(R); in the gap case the egg ends before qa and
        // the unbounded branch starts after qb.
        let t_max = 1.0 / (p0 - r_f);
        let ranges: Vec<(f64, f64)> = match gap {
            None => vec![(0.0, t_max)],
            Some((qa, qb)) => vec![(0.0, 1.0 / (qb - r_f)), (1.0 / (qa - r_f), t_max)],
        };
        let (zlo, zhi) = z_bounds(&b, &ranges).ok_or_else(|| Error::InvalidArgument {
            reason: "could not certify a positive lower bound for Tate's z on E(R)".into(),
        })?;
        let (g_sup, h_sup) = log_ratio_sups(p0, r_f);
        let bdd = [
            Dd::from_bigint(&nb2),
            Dd::from_bigint(&nb4),
            Dd::from_bigint(&nb6),
            Dd::from_bigint(&nb8),
        ];
        Ok(Archimedean {
            r,
            b: bdd,
            log_z_lo: zlo.ln() - 1e-12,
            log_z_hi: zhi.ln() + 1e-12,
            g_sup,
            h_sup,
            x_floor: p0,
        })
    }

    /// The integer shift `r` (every real point has `x > r`).
    pub(crate) fn shift(&self) -> &BigInt {
        &self.r
    }

    /// `b2, b4, b6, b8` of the shifted model, rounded to f64 (relative
    /// error ≤ 2⁻⁵²; [`z_bounds`] allows for far more).
    pub(crate) fn shifted_b(&self) -> [f64; 4] {
        self.b.map(|v| v.hi + v.lo)
    }

    /// Number of series terms for an absolute truncation error ≤ `tol`.
    fn terms_for(&self, tol: f64) -> usize {
        let lz = self.log_z_lo.abs().max(self.log_z_hi.abs()).max(1e-300);
        // (1/3)·4^{-N}·lz ≤ tol.
        let mut n = 0usize;
        let mut tail = lz / 3.0;
        while tail > tol && n < 200 {
            tail *= 0.25;
            n += 1;
        }
        n
    }

    /// `Λ∞(P) + log xd` for `x = xn/xd` (lowest terms, `xd > 0`): value,
    /// truncation bound, rounding estimate.
    ///
    /// The orbit `t ↦ w(t)/z(t)` and `z` are computed in double-double
    /// arithmetic (unit roundoff `2⁻¹⁰⁴`), starting from `t₀ = xd/(xn − r·xd)`
    /// obtained by exact integer division to 110 bits; only the logarithms
    /// are taken in f64 (`ln z = ln(z_hi) + z_lo/z_hi`).
    pub fn lambda(&self, xn: &BigInt, xd: &BigInt, tol: f64) -> (f64, f64, f64) {
        let num = xn - &self.r * xd; // x' = num/xd > 0
        let log_num = ln_abs(&num);
        let mut t = Dd::quotient(xd, &num);
        let [b2, b4, b6, b8] = self.b;
        let n_terms = self.terms_for(tol);
        let mut sum = 0.0;
        let mut weight = 1.0;
        let mut rounding = 0.0;
        for _ in 0..n_terms {
            let t2 = t.mul(t);
            let t3 = t2.mul(t);
            let t4 = t2.mul(t2);
            let z = Dd::ONE
                .sub(b4.mul(t2))
                .sub(b6.mul(t3).scale(2.0))
                .sub(b8.mul(t4));
            let w = t
                .scale(4.0)
                .add(b2.mul(t2))
                .add(b4.mul(t3).scale(2.0))
                .add(b6.mul(t4));
            let lz = z.hi.ln() + z.lo / z.hi;
            // ln in f64 (≤ 1 ulp) and the double-double cancellation in z.
            let mag =
                1.0 + (b4.hi * t2.hi).abs() + (2.0 * b6.hi * t3.hi).abs() + (b8.hi * t4.hi).abs();
            rounding += weight * (2.0 * EPS * lz.abs() + EPS * EPS * 64.0 * mag / z.hi);
            sum += weight * lz;
            weight *= 0.25;
            t = w.div(z);
        }
        let lz = self.log_z_lo.abs().max(self.log_z_hi.abs());
        let trunc = weight * lz / 3.0;
        // Λ∞ + log xd = log num + ¼Σ: the big logarithm enters once.
        let value = log_num + 0.25 * sum;
        // ln_abs: argument rounded to 53 bits (≤ EPS absolute after ln),
        // result rounded (≤ EPS·|ln|), binary-exponent term (≤ EPS·|ln|);
        // the final sums (≤ 2·EPS·|value|). Safety factor 4 on these, 16
        // on the series estimate.
        let rounding = 16.0 * 0.25 * rounding
            + 4.0 * (3.0 * EPS * (log_num.abs() + 1.0) + 2.0 * EPS * value.abs());
        (value, trunc, rounding)
    }
}

/// A double-double number `hi + lo` with `|lo| ≤ ulp(hi)/2` (Dekker,
/// Numer. Math. 18 (1971); common practice).
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct Dd {
    hi: f64,
    lo: f64,
}

fn two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    let bb = s - a;
    (s, (a - (s - bb)) + (b - bb))
}

fn split(a: f64) -> (f64, f64) {
    // Veltkamp splitting with 2^27 + 1.
    let c = 134_217_729.0 * a;
    let hi = c - (c - a);
    (hi, a - hi)
}

fn two_prod(a: f64, b: f64) -> (f64, f64) {
    let p = a * b;
    let (ah, al) = split(a);
    let (bh, bl) = split(b);
    let e = ((ah * bh - p) + ah * bl + al * bh) + al * bl;
    (p, e)
}

impl Dd {
    const ONE: Dd = Dd { hi: 1.0, lo: 0.0 };

    fn new(hi: f64, lo: f64) -> Dd {
        let (h, l) = two_sum(hi, lo);
        Dd { hi: h, lo: l }
    }

    fn add(self, o: Dd) -> Dd {
        let (s, e) = two_sum(self.hi, o.hi);
        Dd::new(s, e + self.lo + o.lo)
    }

    fn sub(self, o: Dd) -> Dd {
        self.add(Dd {
            hi: -o.hi,
            lo: -o.lo,
        })
    }

    fn mul(self, o: Dd) -> Dd {
        let (p, e) = two_prod(self.hi, o.hi);
        Dd::new(p, e + self.hi * o.lo + self.lo * o.hi)
    }

    fn scale(self, k: f64) -> Dd {
        Dd {
            hi: self.hi * k,
            lo: self.lo * k,
        }
    }

    fn div(self, o: Dd) -> Dd {
        let q1 = self.hi / o.hi;
        let r = self.sub(o.mul(Dd { hi: q1, lo: 0.0 }));
        let q2 = r.hi / o.hi;
        let r = r.sub(o.mul(Dd { hi: q2, lo: 0.0 }));
        let q3 = r.hi / o.hi;
        Dd::new(q1, q2).add(Dd { hi: q3, lo: 0.0 })
    }

    /// A big integer to about 106 bits (exact below 2^106).
    pub(crate) fn from_bigint(n: &BigInt) -> Dd {
        let bits = n.bits();
        let shift = bits.saturating_sub(110);
        let top: BigInt = n >> shift;
        let hi = top.to_f64().unwrap_or(f64::NAN);
        let rest = &top
            - BigRational::from_float(hi)
                .map(|q| q.to_integer())
                .unwrap_or_default();
        let lo = rest.to_f64().unwrap_or(0.0);
        let s = 2f64.powi(shift.min(1000) as i32);
        Dd::new(hi * s, lo * s)
    }

    /// `a/b` for big integers `a ≥ 0`, `b > 0`, to about 106 bits, by
    /// exact integer division (0 on underflow).
    pub(crate) fn quotient(a: &BigInt, b: &BigInt) -> Dd {
        if a.is_zero() {
            return Dd { hi: 0.0, lo: 0.0 };
        }
        let k = 112i64 + b.bits() as i64 - a.bits() as i64;
        let q: BigInt = if k >= 0 {
            (a << (k as usize)) / b
        } else {
            (a >> ((-k) as usize)) / b
        };
        if k > 1000 {
            // a/b < 2^-880: far below anything that matters (t ≈ 0).
            return Dd { hi: 0.0, lo: 0.0 };
        }
        let d = Dd::from_bigint(&q);
        let e = (-k).clamp(-1074, 1023) as i32;
        // Two steps so that 2^e does not overflow for large |k|.
        let (e1, e2) = (e / 2, e - e / 2);
        d.scale(2f64.powi(e1)).scale(2f64.powi(e2))
    }
}

/// Certified `[min z, max z]` over t-intervals, `None` when no positive
/// lower bound is found within the work limit.
///
/// Adaptive bisection with Taylor's theorem: on `[m − h, m + h]`,
/// `|z(t) − z(m)| ≤ |z'(m)|·h + M₂h²/2` with `M₂ = 2|b4| + 12|b6|e + 12|b8|e²
/// ≥ max|z''|` (`e` the right end); an allowance of `1e−13·(1 + Σ|terms|)`
/// covers the f64 evaluation.
pub(crate) fn z_bounds(b: &[f64; 4], ranges: &[(f64, f64)]) -> Option<(f64, f64)> {
    let [_, b4, b6, b8] = *b;
    let z = |t: f64| 1.0 - b4 * t * t - 2.0 * b6 * t * t * t - b8 * t * t * t * t;
    let dz = |t: f64| -2.0 * b4 * t - 6.0 * b6 * t * t - 4.0 * b8 * t * t * t;
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    let mut work = 0usize;
    for &(a, e) in ranges {
        if !(a.is_finite() && e.is_finite() && a <= e) {
            return None;
        }
        let m2 = 2.0 * b4.abs() + 12.0 * b6.abs() * e.abs() + 12.0 * b8.abs() * e * e;
        let mag = 1.0 + b4.abs() * e * e + 2.0 * b6.abs() * e.abs().powi(3) + b8.abs() * e.powi(4);
        let round = 1e-13 * mag;
        let pieces = 64usize;
        let step = (e - a) / pieces as f64;
        let mut stack: Vec<(f64, f64)> = (0..pieces)
            .map(|i| (a + step * i as f64, a + step * (i + 1) as f64))
            .collect();
        while let Some((u, v)) = stack.pop() {
            work += 1;
            if work > 2_000_000 {
                return None;
            }
            let mid = 0.5 * (u + v);
            let h = 0.5 * (v - u) * (1.0 + 1e-12);
            let zm = z(mid);
            let spread = dz(mid).abs() * h + 0.5 * m2 * h * h + round;
            let low = zm - spread;
            // Keep refining while the lower bound is not positive, or is
            // much weaker than the value (so log z is pinned within 1%).
            if (low <= 0.0 || spread > 1e-2 * zm) && h > 1e-300 {
                stack.push((u, mid));
                stack.push((mid, v));
                continue;
            }
            if low <= 0.0 {
                return None;
            }
            lo = lo.min(low);
            hi = hi.max(zm + spread);
        }
    }
    Some((lo, hi))
}

/// One prime of bad reduction of a minimal model.
#[derive(Clone, Debug)]
pub(crate) struct BadPrime {
    pub prime: Prime,
    pub log_p: f64,
    /// `v_p(Δ_min)`.
    pub n: u64,
    pub multiplicative: bool,
    pub kodaira: Kodaira,
    /// The Tamagawa number `c_p` (0 when not known).
    pub tamagawa: u64,
}

/// `v_p` of a rational with denominator prime to `p`; `None` for 0.
fn v_int(x: &BigRational, p: &Prime) -> Option<u64> {
    valuation(x.numer(), p)
}

impl BadPrime {
    pub fn new(prime: Prime, n: u64, reduction: ReductionKind, kodaira: Kodaira) -> BadPrime {
        let log_p = ln_abs(prime.get());
        BadPrime {
            prime,
            log_p,
            n,
            multiplicative: matches!(
                reduction,
                ReductionKind::SplitMultiplicative | ReductionKind::NonSplitMultiplicative
            ),
            kodaira,
            tamagawa: 0,
        }
    }

    /// The correction `κ_p(P)` (a rational ≤ 0, as numerator/denominator)
    /// for `P = (x, y)` on the minimal model `a` with invariants `b`
    /// (Silverman 1988, the theorem on non-archimedean local heights; in
    /// the x-normalisation the values are twice his):
    /// `P ∈ E⁰` → 0; multiplicative `I_N` → `−M(N − M)/N` with
    /// `M = min(v(ψ₂(P)), N/2)`; additive → `−2v(ψ₂)/3` if
    /// `v(ψ₃) ≥ 3v(ψ₂)`, else `−v(ψ₃)/4`.
    pub fn correction(
        &self,
        a: &[BigInt; 5],
        b: &[BigInt; 4],
        x: &BigRational,
        y: &BigRational,
    ) -> (i64, i64) {
        let p = &self.prime;
        if crate::local::valuation_rational(x, p).unwrap_or(0) < 0 {
            return (0, 1);
        }
        let [a1, a2, a3, a4, _] = a;
        let [b2, b4, b6, b8] = b;
        let q = |n: &BigInt| BigRational::from_integer(n.clone());
        let dfx =
            x * x * BigRational::from_integer(3.into()) + q(&(a2 * 2)) * x + q(a4) - q(a1) * y;
        let psi2 = y * BigRational::from_integer(2.into()) + q(a1) * x + q(a3);
        let va = v_int(&dfx, p);
        let vb = v_int(&psi2, p);
        if va == Some(0) || vb == Some(0) {
            return (0, 1);
        }
        let n = self.n as i64;
        if self.multiplicative {
            // M2 = 2M = min(2B, N); κ = −M(N − M)/N = −M2(2N − M2)/(4N).
            let m2 = match vb {
                Some(v) => (2 * v as i64).min(n),
                None => n,
            };
            return (-(m2 * (2 * n - m2)), 4 * n);
        }
        let x2 = x * x;
        let psi3 = &x2 * &x2 * BigRational::from_integer(3.into())
            + q(b2) * &x2 * x
            + q(&(b4 * 3)) * &x2
            + q(&(b6 * 3)) * x
            + q(b8);
        let vc = v_int(&psi3, p);
        match (vb, vc) {
            (Some(bv), Some(cv)) if cv >= 3 * bv => (-2 * bv as i64, 3),
            (Some(bv), None) => (-2 * bv as i64, 3),
            (_, Some(cv)) => (-(cv as i64), 4),
            (None, None) => (0, 1),
        }
    }
}
