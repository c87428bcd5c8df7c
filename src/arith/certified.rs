//! Certified real numbers: a midpoint with a proven error radius.
//!
//! Every operation rounds to nearest in IEEE-754 binary64, so the computed
//! midpoint of `a ∘ b` differs from the exact value by at most
//! `u·|result|` with `u = 2⁻⁵³` (for normal results; an absolute `2⁻¹⁰⁷⁴`
//! more for subnormal ones) [Higham02, §2.2]. The radius of each result is
//! the propagated radius of the operands plus `2⁻⁵²·|result|`, the whole
//! then inflated by the factor `1 + 2⁻⁵⁰` and the smallest normal number, so
//! that rounding in the computation of the radius itself cannot make it too
//! small (common practice in midpoint–radius arithmetic). Square roots are
//! correctly rounded by IEEE-754. The exponential and the logarithm are
//! computed here from their Taylor series with explicit remainder bounds, so
//! no accuracy claim of the platform's maths library is used.

use crate::error::{Error, Result};

/// `2⁻⁵²`: twice the unit roundoff of binary64.
const U2: f64 = f64::EPSILON;

/// A real number `x` known only through `|x − value| ≤ error`, where the
/// inequality is proven (rounding and truncation errors included).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Certified {
    value: f64,
    error: f64,
}

/// `x > 0` (false for NaN).
pub(crate) fn is_pos(x: f64) -> bool {
    x > 0.0
}

/// Inflates a radius so that the rounding of its own computation is covered.
fn up(r: f64) -> f64 {
    if r.is_finite() {
        r * (1.0 + 4.0 * U2) + f64::MIN_POSITIVE
    } else {
        f64::INFINITY
    }
}

impl Certified {
    /// A certified number from a midpoint and an error radius.
    ///
    /// # Errors
    /// [`Error::InvalidArgument`] when `value` is not finite or `error` is
    /// negative or NaN.
    pub fn new(value: f64, error: f64) -> Result<Certified> {
        if !value.is_finite() || error.is_nan() || error < 0.0 {
            return Err(Error::InvalidArgument {
                reason: format!("a certified number needs a finite value and an error ≥ 0, got {value} ± {error}"),
            });
        }
        Ok(Certified { value, error })
    }

    /// An exactly known number (radius zero).
    pub(crate) fn exact(value: f64) -> Certified {
        Certified { value, error: 0.0 }
    }

    /// A number with a radius the caller guarantees.
    pub(crate) fn with_radius(value: f64, error: f64) -> Certified {
        if value.is_finite() && error >= 0.0 {
            Certified { value, error }
        } else {
            Certified::unknown()
        }
    }

    /// A number about which nothing is known (infinite radius).
    pub(crate) fn unknown() -> Certified {
        Certified {
            value: 0.0,
            error: f64::INFINITY,
        }
    }

    /// The midpoint.
    pub fn value(&self) -> f64 {
        self.value
    }

    /// The proven bound on `|true value − value()|`.
    pub fn error(&self) -> f64 {
        self.error
    }

    /// A proven lower bound of the true value.
    pub fn lower(&self) -> f64 {
        let l = self.value - self.error;
        l - U2 * l.abs() - f64::MIN_POSITIVE
    }

    /// A proven upper bound of the true value.
    pub fn upper(&self) -> f64 {
        let h = self.value + self.error;
        h + U2 * h.abs() + f64::MIN_POSITIVE
    }

    /// True when `x` lies in the enclosure `[lower(), upper()]`.
    pub fn contains(&self, x: f64) -> bool {
        self.lower() <= x && x <= self.upper()
    }

    /// True when the radius is finite.
    pub fn is_finite(&self) -> bool {
        self.value.is_finite() && self.error.is_finite()
    }

    /// True when zero is not excluded: `|value| ≤ error` (up to rounding).
    /// When this is false, the true value is proven non-zero, with the sign
    /// of `value()`.
    pub(crate) fn may_be_zero(&self) -> bool {
        !self.is_finite() || (self.lower() <= 0.0 && self.upper() >= 0.0)
    }

    /// True when the two enclosures overlap, i.e. the true values may agree.
    pub fn overlaps(&self, other: &Certified) -> bool {
        self.sub(other).map_or(true, |d| d.may_be_zero())
    }

    fn finish(value: f64, radius: f64) -> Certified {
        if value.is_finite() && radius.is_finite() {
            Certified {
                value,
                error: up(radius + U2 * value.abs()),
            }
        } else {
            Certified::unknown()
        }
    }

    /// `self + other`.
    pub(crate) fn add(&self, o: &Certified) -> Certified {
        Self::finish(self.value + o.value, self.error + o.error)
    }

    /// `self − other` (never fails; `Option` only for the call sites'
    /// convenience in `overlaps`).
    pub(crate) fn sub(&self, o: &Certified) -> Option<Certified> {
        Some(Self::finish(self.value - o.value, self.error + o.error))
    }

    /// `self − other`.
    pub(crate) fn minus(&self, o: &Certified) -> Certified {
        Self::finish(self.value - o.value, self.error + o.error)
    }

    /// `−self` (exact).
    pub(crate) fn neg(&self) -> Certified {
        Certified {
            value: -self.value,
            error: self.error,
        }
    }

    /// `self · other`.
    pub(crate) fn mul(&self, o: &Certified) -> Certified {
        let m = self.value * o.value;
        let r = self.value.abs() * o.error + o.value.abs() * self.error + self.error * o.error;
        Self::finish(m, r)
    }

    /// `self · k` for an exactly known `k`.
    pub(crate) fn scale(&self, k: f64) -> Certified {
        Self::finish(self.value * k, self.error * k.abs())
    }

    /// `self / other`; unknown when the divisor may be zero.
    pub(crate) fn div(&self, o: &Certified) -> Certified {
        let d = o.value.abs() - o.error;
        if !is_pos(d) {
            return Certified::unknown();
        }
        let d = d * (1.0 - 4.0 * U2);
        let m = self.value / o.value;
        // |a/b − am/bm| ≤ (|a − am| + |am/bm|·|b − bm|) / |b|.
        let r = (self.error + m.abs() * o.error) / d;
        Self::finish(m, r)
    }

    /// The square root; unknown when the enclosure reaches below zero.
    pub(crate) fn sqrt(&self) -> Certified {
        let lo = self.value - self.error;
        if lo < 0.0 || lo.is_nan() || !self.is_finite() {
            return Certified::unknown();
        }
        let lo = (lo * (1.0 - 4.0 * U2)).max(0.0);
        let hi = (self.value + self.error) * (1.0 + 4.0 * U2);
        let m = self.value.sqrt();
        let r = (hi.sqrt() - m).max(m - lo.sqrt());
        Self::finish(m, r.max(0.0))
    }

    /// `e^self`, with the remainder of the Taylor series and all roundings
    /// bounded (see [`exp_with_error`]).
    pub(crate) fn exp(&self) -> Certified {
        if !self.is_finite() || self.error > 1.0 {
            return Certified::unknown();
        }
        let (v, rel) = exp_with_error(self.value);
        if !v.is_finite() {
            return Certified::unknown();
        }
        // e^{m ± r} = e^m · e^{±r}; |e^{±r} − 1| ≤ r·e^r ≤ 3r for r ≤ 1.
        let r = v * rel + v * (1.0 + rel) * 3.0 * self.error;
        Self::finish(v, r)
    }

    /// The natural logarithm; unknown unless the enclosure is positive.
    pub(crate) fn ln(&self) -> Certified {
        let lo = self.value - self.error;
        if !is_pos(lo) || !self.is_finite() {
            return Certified::unknown();
        }
        let (v, abs) = ln_with_error(self.value);
        // |ln(m ± r) − ln m| ≤ r / (m − r).
        let r = abs + self.error / (lo * (1.0 - 4.0 * U2));
        Self::finish(v, r)
    }
}

impl std::fmt::Display for Certified {
    /// `value ± error`, the value to one decimal beyond the error's leading
    /// digit, the error widened by that rounding and rounded up: the printed
    /// interval contains the certified one.
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        // The printed interval contains the certified one (arith::decimal).
        let (v, e) = crate::arith::decimal::enclose(self.value, self.error);
        write!(f, "{v} ± {e}")
    }
}

/// `ln 2` rounded to binary64 (error ≤ 2⁻⁵⁴; common practice, the constant
/// of the standard library).
const LN2: f64 = std::f64::consts::LN_2;

/// `e^y` for a binary64 `y`, with a proven relative error bound.
///
/// Argument reduction `y = k·ln 2 + r` with `|r| ≤ 0.35` (plus rounding),
/// Horner evaluation of the Taylor polynomial of degree 22, whose remainder
/// is below `|r|²³/23!·e^{|r|} < 10⁻²⁸`, and exact scaling by `2^k`.
/// Returns `(value, rel)` with `|e^y − value| ≤ rel·value`. Below `−740`
/// the value is 0 with relative error 1 (then `e^y < 10⁻³²¹`, covered by
/// the absolute floor of every radius).
pub(crate) fn exp_with_error(y: f64) -> (f64, f64) {
    if y.is_nan() || y > 700.0 {
        return (f64::INFINITY, f64::INFINITY);
    }
    if y < -740.0 {
        return (0.0, 1.0);
    }
    let k = (y / LN2).round();
    let r = y - k * LN2;
    // Error of r: |k|·|LN2 − ln 2| + rounding of the product and the
    // difference (each ≤ u·|result|, bounded generously).
    let er = k.abs() * 6.0e-17 + U2 * (k.abs() * LN2 + y.abs() + r.abs());
    let mut s = 1.0;
    for j in (1..=22).rev() {
        s = 1.0 + s * r / f64::from(j);
    }
    // Horner with positive-dominated terms: relative rounding error at most
    // 2·22·u·e^{2|r|} ≤ 100·u for |r| ≤ 0.36; the truncation is < 1e-28.
    let rel = 100.0 * U2 + (er * 1.01) + 1e-27;
    let scale = pow2(k as i32);
    (s * scale, rel * 1.01)
}

/// `2^k` exactly, for `k` in the normal range (else 0 or ∞).
fn pow2(k: i32) -> f64 {
    if k < -1022 {
        // Split to keep exactness for the few subnormal cases.
        return pow2(k + 60) * pow2(-60);
    }
    if k > 1023 {
        return f64::INFINITY;
    }
    f64::from_bits(((k + 1023) as u64) << 52)
}

/// `ln x` for a positive finite binary64 `x`, with a proven absolute error
/// bound: `x = m·2^e` with `m ∈ [1/√2, √2)`, `ln m = 2·atanh(s)`,
/// `s = (m − 1)/(m + 1)`, `|s| < 0.172`, series to `s²⁷` (remainder
/// `< |s|²⁹/(29(1 − s²)) < 10⁻²³`). Returns `(value, abs)`.
pub(crate) fn ln_with_error(x: f64) -> (f64, f64) {
    if !is_pos(x) || !x.is_finite() {
        return (f64::NAN, f64::INFINITY);
    }
    let (mut m, mut e) = frexp(x);
    if m > std::f64::consts::SQRT_2 {
        m /= 2.0;
        e += 1;
    }
    let s = (m - 1.0) / (m + 1.0);
    let s2 = s * s;
    let mut t = 0.0;
    for j in (0..=13).rev() {
        t = 1.0 / f64::from(2 * j + 1) + s2 * t;
    }
    let lm = 2.0 * s * t;
    let ef = f64::from(e);
    let v = ef * LN2 + lm;
    // s carries relative error ≤ 3u (m − 1 is exact by Sterbenz), the
    // series another ≤ 30u relative; the factor 2/(1 − s²) ≤ 2.07 maps
    // them to ln m; then e·LN2 and the final sum.
    let abs = 80.0 * U2 * s.abs() + ef.abs() * 6.0e-17 + U2 * (ef.abs() * LN2 + v.abs()) + 1e-22;
    (v, abs * 1.01)
}

/// `x = m·2^e` with `m ∈ [1, 2)` for positive normal or subnormal `x`.
fn frexp(x: f64) -> (f64, i32) {
    let mut x = x;
    let mut shift = 0;
    if x < f64::MIN_POSITIVE {
        x *= pow2(60);
        shift = -60;
    }
    let bits = x.to_bits();
    let e = ((bits >> 52) & 0x7ff) as i32 - 1023;
    let m = f64::from_bits((bits & !(0x7ffu64 << 52)) | (1023u64 << 52));
    (m, e + shift)
}

/// π as a certified number (`std::f64::consts::PI` is π rounded to
/// binary64, error < 1.3·10⁻¹⁶; common practice).
pub(crate) fn pi() -> Certified {
    Certified::with_radius(std::f64::consts::PI, 2.0e-16)
}

/// Euler's constant γ = 0.5772156649015328606… (from memory; checked by
/// a unit test against `H_n − ln n` with its proven bracket).
pub(crate) fn euler_gamma() -> Certified {
    Certified::with_radius(0.577_215_664_901_532_9, 1.0e-16)
}

/// ζ(3) = 1.2020569031595942853… (from memory; checked by a unit test
/// against the partial sums of Σ 1/n³ with their proven tail bound).
pub(crate) fn zeta3() -> Certified {
    Certified::with_radius(1.202_056_903_159_594_3, 1.0e-16)
}

/// ζ(2) = π²/6 (Euler; common practice).
pub(crate) fn zeta2() -> Certified {
    let p = pi();
    p.mul(&p).scale(1.0 / 6.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn exp_and_ln_match_known_identities() {
        // e^{ln 2·k} = 2^k exactly (common practice).
        for k in [-30i32, -1, 0, 1, 7, 40] {
            let (v, rel) = exp_with_error(f64::from(k) * LN2);
            assert!((v - pow2(k)).abs() <= 3.0 * rel * v + 1e-300, "k = {k}");
        }
        // ln(e^y) = y within the sum of the two bounds.
        for y in [-700.0, -20.5, -1.0, -1e-3, 0.3, 5.0, 300.0] {
            let (v, rel) = exp_with_error(y);
            let (l, abs) = ln_with_error(v);
            assert!((l - y).abs() <= abs + 1.01 * rel + 1e-15, "y = {y}");
        }
        // ln 10: the standard library's constant (common practice).
        let (l, abs) = ln_with_error(10.0);
        assert!((l - std::f64::consts::LN_10).abs() <= abs + 4e-16);
    }

    #[test]
    fn constants_agree_with_their_defining_limits() {
        // ζ(3): Σ_{n≤N} 1/n³ + tail, tail ∈ [1/(2(N+1)²), 1/(2N²)]
        // (integral comparison; common practice).
        let n = 100_000u32;
        let mut s = 0.0f64;
        for k in (1..=n).rev() {
            let k = f64::from(k);
            s += 1.0 / (k * k * k);
        }
        let lo = s + 0.5 / ((f64::from(n) + 1.0).powi(2));
        let hi = s + 0.5 / f64::from(n).powi(2);
        let z = zeta3();
        assert!(z.upper() >= lo - 1e-15 && z.lower() <= hi + 1e-15);
        // γ: H_n − ln n − 1/(2n) ∈ (γ − 1/(8n²)·…, γ) (common practice:
        // H_n = ln n + γ + 1/(2n) − 1/(12n²) + O(n⁻⁴)).
        let n = 1_000_000u32;
        let mut h = 0.0f64;
        for k in (1..=n).rev() {
            h += 1.0 / f64::from(k);
        }
        let nf = f64::from(n);
        let (l, _) = ln_with_error(nf);
        let est = h - l - 0.5 / nf + 1.0 / (12.0 * nf * nf);
        assert!((est - euler_gamma().value()).abs() < 1e-12);
    }

    #[test]
    fn ball_operations_enclose_exact_results() {
        let a = Certified::exact(0.1);
        let b = Certified::exact(0.2);
        let s = a.add(&b);
        assert!(s.lower() <= 0.30000000000000004 && s.upper() >= 0.3);
        let d = Certified::exact(1.0).div(&Certified::exact(3.0));
        assert!(
            d.mul(&Certified::exact(3.0))
                .minus(&Certified::exact(1.0))
                .error()
                < 1e-15
        );
        assert!(!Certified::exact(2.0).sqrt().may_be_zero());
        assert!(Certified::with_radius(0.5, 1.0)
            .sqrt()
            .error()
            .is_infinite());
        assert!(Certified::new(f64::NAN, 0.0).is_err());
    }
}
