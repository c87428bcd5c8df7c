//! Decimal strings for certified numbers that keep their promise: the
//! printed interval `printed value ± printed error` contains the certified
//! interval `value ± error` it came from, exactly (as rationals).
//!
//! The value is rounded to one decimal beyond the leading digit of the
//! error; the error is then widened by the exact rounding of the value and
//! rounded *up* to two significant digits (`1.7e-14`). Hence, for the true
//! number `t` with `|t − value| ≤ error`:
//! `|t − printed value| ≤ error + |value − printed value| ≤ printed error`.

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{Signed, Zero};

/// The decimal places printed for a value with error `error`: one more
/// than the position of the error's leading digit, between 1 and 17
/// (16 for an exact value).
fn places(error: f64) -> usize {
    if error > 0.0 && error.is_finite() {
        ((-error.log10()).floor() + 1.0).clamp(1.0, 17.0) as usize
    } else {
        16
    }
}

/// Exact value of a decimal string `[-]digits[.digits]` (as printed by
/// `format!("{:.n$}")`); `None` for anything else.
pub(crate) fn parse_decimal(s: &str) -> Option<BigRational> {
    let (neg, body) = match s.strip_prefix('-') {
        Some(b) => (true, b),
        None => (false, s),
    };
    let (int, frac) = body.split_once('.').unwrap_or((body, ""));
    if int.is_empty() || !int.bytes().all(|b| b.is_ascii_digit()) {
        return None;
    }
    if !frac.bytes().all(|b| b.is_ascii_digit()) {
        return None;
    }
    let digits: BigInt = format!("{int}{frac}").parse().ok()?;
    let den = num_traits::pow(BigInt::from(10), frac.len());
    let v = BigRational::new(digits, den);
    Some(if neg { -v } else { v })
}

/// Exact value of an error string `m.ne±k` (as printed by `{:.1e}`).
#[cfg(test)]
pub(crate) fn parse_error(s: &str) -> Option<BigRational> {
    let (mant, exp) = s.split_once('e')?;
    let m = parse_decimal(mant)?;
    let k: i32 = exp.parse().ok()?;
    let ten = BigRational::from_integer(BigInt::from(10));
    Some(m * num_traits::pow::Pow::pow(&ten, k))
}

/// The smallest number of the form `d.d·10^k` that is ≥ `e` (≥ 0), as
/// `{:.1e}` would print it.
fn error_up(e: &BigRational) -> String {
    if e.is_zero() {
        return "0.0e0".into();
    }
    let ten = BigRational::from_integer(BigInt::from(10));
    let pow = |k: i64| num_traits::pow::Pow::pow(&ten, k as i32);
    // k with 10^k ≤ e < 10^(k+1): estimate, then correct exactly.
    let approx = num_traits::ToPrimitive::to_f64(e).unwrap_or(1.0);
    let mut k = if approx > 0.0 && approx.is_finite() {
        approx.log10().floor() as i64
    } else {
        0
    };
    while pow(k) > *e {
        k -= 1;
    }
    while pow(k + 1) <= *e {
        k += 1;
    }
    // q = ⌈e / 10^(k−1)⌉ ∈ [10, 100].
    let mut q = (e / pow(k - 1)).ceil().to_integer();
    if q >= BigInt::from(100) {
        q = BigInt::from(10);
        k += 1;
    }
    let (a, b) = q.div_rem(&BigInt::from(10));
    format!("{a}.{b}e{k}")
}

/// `(value, error)` strings with `printed value ± printed error ⊇
/// value ± error` exactly. Non-finite input is printed as it is.
pub(crate) fn enclose(value: f64, error: f64) -> (String, String) {
    if !value.is_finite() || !error.is_finite() || error < 0.0 {
        return (format!("{value}"), format!("{error:.1e}"));
    }
    let d = places(error);
    let v = format!("{value:.d$}");
    // A value that rounds to zero is printed without a sign: "-0.000"
    // would claim a sign the bound does not prove.
    let v = match v.strip_prefix('-') {
        Some(rest) if rest.bytes().all(|b| b == b'0' || b == b'.') => rest.to_string(),
        _ => v,
    };
    let (Some(vq), Some(exact), Some(eq)) = (
        parse_decimal(&v),
        BigRational::from_float(value),
        BigRational::from_float(error),
    ) else {
        return (v, format!("{error:.1e}"));
    };
    let widened = eq + (vq - exact).abs();
    (v, error_up(&widened))
}

/// `x` rounded down (towards −∞) to `places` decimals: a printed lower
/// bound that stays a lower bound.
pub(crate) fn decimal_floor(x: f64, places: usize) -> String {
    let Some(q) = BigRational::from_float(x) else {
        return format!("{x}");
    };
    let scale = num_traits::pow(BigInt::from(10), places);
    let n = (q * BigRational::from_integer(scale.clone()))
        .floor()
        .to_integer();
    let neg = n.is_negative();
    let a = n.abs();
    let (int, frac) = a.div_rem(&scale);
    let sign = if neg { "-" } else { "" };
    if places == 0 {
        return format!("{sign}{int}");
    }
    format!("{sign}{int}.{frac:0>places$}")
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_traits::One;
    use proptest::prelude::*;

    fn contained(value: f64, error: f64) -> bool {
        let (v, e) = enclose(value, error);
        let (pv, pe) = (parse_decimal(&v).unwrap(), parse_error(&e).unwrap());
        let (x, r) = (
            BigRational::from_float(value).unwrap(),
            BigRational::from_float(error).unwrap(),
        );
        // [x − r, x + r] ⊆ [pv − pe, pv + pe].
        &pv - &pe <= &x - &r && &x + &r <= &pv + &pe
    }

    /// The example of issue 27: Ω = 1.58956151311214142… (an independent
    /// recomputation cited there) was printed 1.5895615131121 ± 1.2e-14.
    #[test]
    fn the_reported_period_is_inside_its_printed_error() {
        let (v, e) = enclose(1.589_561_513_112_141_4, 1.2e-14);
        let (pv, pe) = (parse_decimal(&v).unwrap(), parse_error(&e).unwrap());
        let truth = parse_decimal("1.58956151311214142").unwrap();
        assert!((truth - pv).abs() <= pe, "{v} ± {e}");
    }

    #[test]
    fn errors_round_up_and_zero_stays_exact() {
        assert_eq!(
            enclose(0.0, 0.0),
            ("0.0000000000000000".into(), "0.0e0".into())
        );
        assert_eq!(
            error_up(&BigRational::new(12.into(), 1000.into())),
            "1.2e-2"
        );
        assert_eq!(
            error_up(&BigRational::new(121.into(), 10000.into())),
            "1.3e-2"
        );
        assert_eq!(error_up(&BigRational::new(991.into(), 10.into())), "1.0e2");
        assert_eq!(decimal_floor(-0.5, 0), "-1");
        assert_eq!(decimal_floor(1.9999999, 6), "1.999999");
        assert_eq!(decimal_floor(-1.0000001, 3), "-1.001");
    }

    proptest! {
        #[test]
        fn printed_interval_contains_the_certified_one(
            mant in -1.0e6f64..1.0e6,
            scale in -20i32..6,
            err_mant in 0.0f64..10.0,
            err_exp in -20i32..3,
        ) {
            let value = mant * 10f64.powi(scale);
            let error = err_mant * 10f64.powi(err_exp);
            prop_assert!(contained(value, error), "{value} ± {error}: {:?}", enclose(value, error));
        }

        #[test]
        fn floors_are_lower_bounds(x in -1.0e9f64..1.0e9, p in 0usize..12) {
            let s = decimal_floor(x, p);
            let q = parse_decimal(&s).unwrap();
            let xq = BigRational::from_float(x).unwrap();
            prop_assert!(q <= xq);
            prop_assert!(xq - q < BigRational::new(BigInt::one(), num_traits::pow(BigInt::from(10), p)));
        }
    }

    #[test]
    fn a_value_that_rounds_to_zero_has_no_sign() {
        let (v, e) = enclose(-1e-15, 2e-12);
        assert!(
            !v.starts_with('-') && v.bytes().all(|b| b == b'0' || b == b'.'),
            "{v}"
        );
        let (ve, ee) = (parse_decimal(&v).unwrap(), parse_error(&e).unwrap());
        let exact = BigRational::from_float(-1e-15).unwrap();
        assert!((ve - exact).abs() <= ee);
        assert_eq!(enclose(-0.25, 0.001).0, "-0.2500");
    }
}
