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
///
/// The error string comes from [`error_fast`] when its binary64 enclosure
/// of the widened error decides every digit, else from the exact rational
/// computation; both give the same string (a test compares them).
pub(crate) fn enclose(value: f64, error: f64) -> (String, String) {
    if !value.is_finite() || !error.is_finite() || error < 0.0 {
        return (format!("{value}"), format!("{error:.1e}"));
    }
    let (d, v) = printed_value(value, error);
    if let Some(e) = error_fast(&v, d, value, error) {
        return (v, e);
    }
    exact_error(v, value, error)
}

/// The value string of [`enclose`] and its number of decimal places.
fn printed_value(value: f64, error: f64) -> (usize, String) {
    let d = places(error);
    let v = format!("{value:.d$}");
    // A value that rounds to zero is printed without a sign: "-0.000"
    // would claim a sign the bound does not prove.
    let v = match v.strip_prefix('-') {
        Some(rest) if rest.bytes().all(|b| b == b'0' || b == b'.') => rest.to_string(),
        _ => v,
    };
    (d, v)
}

/// Knuth's TwoSum: `(s, t)` with `s = fl(a + b)` and `s + t = a + b`
/// exactly [Knuth, TAOCP vol. 2, §4.2.2, Thm B].
fn two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    let bp = s - a;
    let t = (a - (s - bp)) + (b - bp);
    (s, t)
}

/// Unit roundoff of binary64.
const U: f64 = f64::EPSILON / 2.0;

/// The error string of [`enclose`] in binary64, or `None` when the
/// enclosure below does not decide it (then the exact path runs).
///
/// With `V` the printed digits of `v` as an integer and `P = 10^d`, both
/// exact in binary64 (`|V| ≤ 2⁵³`, `d ≤ 22`): `q = fl(V/P)` and
/// `r = V − qP`, computed exactly by one fused multiply-add (the remainder
/// of a correctly rounded quotient is representable; Boldo–Daumas,
/// "Representable correcting terms for possibly underflowing floating
/// point operations", 2003); so `vq − value = (q − value) + r/P` with
/// `q − value = s + t` exactly (TwoSum). The widened error
/// `w = error + |vq − value|` is then known within a proven absolute
/// bound, and so is `y = w·10^(1−k)` (`10^(1−k)` exact for
/// `0 ≤ 1 − k ≤ 22`). The string `⌈y⌉/10 e k` of [`error_up`] is returned
/// only when the whole enclosure of `y` lies in `[10, 100)` and has one
/// ceiling (`⌈·⌉` is monotone), so it equals the exact one.
fn error_fast(v: &str, d: usize, value: f64, error: f64) -> Option<String> {
    if value == 0.0 && error == 0.0 {
        // Printed "0.000…" exactly: the widened error is 0.
        return Some("0.0e0".into());
    }
    if d > 22 {
        return None;
    }
    let (neg, body) = match v.strip_prefix('-') {
        Some(b) => (true, b),
        None => (false, v),
    };
    let mut big: u64 = 0;
    for c in body.bytes() {
        if c == b'.' {
            continue;
        }
        big = big
            .checked_mul(10)?
            .checked_add(u64::from(c.checked_sub(b'0')?))?;
        if big > 1 << 53 {
            return None;
        }
    }
    let vv = if neg { -(big as f64) } else { big as f64 };
    let p = 10f64.powi(d as i32); // exact for d ≤ 22
    let q = vv / p;
    let r = (-q).mul_add(p, vv); // exact
    let rp = r / p;
    let (s, t) = two_sum(q, -value);
    let diff = s + (t + rp);
    // |diff − (vq − value)| ≤ u|rp| + u|t + rp| + u|diff| (and underflow).
    let diff_err = 4.0 * U * (s.abs() + t.abs() + rp.abs()) + 4.0 * f64::MIN_POSITIVE;
    let w = error + diff.abs();
    let w_err = U * w + diff_err;
    if !(w > 0.0 && w.is_finite() && w < 10.0 && w > 1e-20) {
        return None;
    }
    let k = w.log10().floor() as i32;
    let e = 1 - k;
    if !(0..=22).contains(&e) {
        return None;
    }
    let scale = 10f64.powi(e); // exact
    let y = w * scale;
    let y_err = 2.0 * (w_err * scale + U * y) * (1.0 + 8.0 * U);
    let (lo, hi) = (y - y_err, y + y_err);
    if !(lo >= 10.0 && hi < 100.0) || lo.ceil() != hi.ceil() {
        return None;
    }
    let c = hi.ceil() as u64;
    let (c, k) = if c >= 100 { (10, k + 1) } else { (c, k) };
    Some(format!("{}.{}e{k}", c / 10, c % 10))
}

/// The error string of [`enclose`] by exact rational arithmetic.
fn exact_error(v: String, value: f64, error: f64) -> (String, String) {
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

    /// Both error strings of [`enclose`]: the fast one (if it decides)
    /// and the exact one.
    fn both_paths(value: f64, error: f64) -> (Option<String>, String) {
        let (d, v) = printed_value(value, error);
        let fast = error_fast(&v, d, value, error);
        (fast, exact_error(v, value, error).1)
    }

    #[test]
    fn the_fast_path_gives_the_exact_strings_and_usually_decides() {
        // A sweep over values and errors of every size the reports print,
        // and errors that sit on the two-digit rounding boundaries
        // (m·10^k for integers m, their neighbours in binary64, and values
        // whose rounding moves the widened error onto a boundary).
        let mut state = 0x2545_f491_4f6c_dd1du64;
        let mut next = || {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            state
        };
        let (mut fast, mut total) = (0, 0);
        for i in 0..40_000u64 {
            let r = next();
            let mant = (r >> 11) as f64 / (1u64 << 53) as f64 * 20.0 - 10.0;
            let value = mant * 10f64.powi((next() % 12) as i32 - 6);
            let error = match i % 4 {
                0 => {
                    (next() >> 11) as f64 / (1u64 << 53) as f64
                        * 10f64.powi(-((next() % 18) as i32))
                }
                1 => (10 + next() % 90) as f64 * 10f64.powi(-((next() % 16) as i32) - 1),
                2 => {
                    let e = (10 + next() % 90) as f64 * 10f64.powi(-((next() % 16) as i32) - 1);
                    let bits = e.to_bits();
                    f64::from_bits(if next() % 2 == 0 { bits + 1 } else { bits - 1 })
                }
                _ => 0.0,
            };
            let (f, e) = both_paths(value, error);
            if let Some(f) = f {
                assert_eq!(f, e, "value {value:e}, error {error:e}");
                fast += 1;
            }
            total += 1;
        }
        // Exact decimals with error 0 and errors on the boundary give
        // exact ties, which must fall back.
        assert!(fast * 10 >= total * 6, "{fast} of {total}");
        for (value, error) in [
            (0.25, 0.0),
            (1.5, 0.05),
            (0.0, 0.0),
            (-0.0, 0.0),
            (-0.125, 1e-3),
            (2.0, 1.0),
        ] {
            let (f, e) = both_paths(value, error);
            if let Some(f) = f {
                assert_eq!(f, e, "value {value}, error {error}");
            }
        }
    }

    proptest! {
        #[test]
        fn fast_and_exact_error_strings_agree(
            mant in -1.0e6f64..1.0e6,
            scale in -20i32..6,
            err_mant in 0.0f64..10.0,
            err_exp in -20i32..3,
        ) {
            let value = mant * 10f64.powi(scale);
            let error = err_mant * 10f64.powi(err_exp);
            let (f, e) = both_paths(value, error);
            if let Some(f) = f {
                prop_assert_eq!(f, e, "{} ± {}", value, error);
            }
        }

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
