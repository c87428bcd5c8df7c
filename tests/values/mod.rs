//! Reference values computed independently from first principles by
//! `tests/data/gen_curve_values.py` (mpmath; its version is in the first
//! line of `tests/data/curve_values.txt`): a_n by point counting,
//! conductor and root number by the theta relation of the functional
//! equation, periods by the AGM (checked by quadrature), L-derivatives by
//! the rapidly converging series, canonical heights by the local
//! decomposition (checked against the 2^k limit). The script's docstring
//! gives the formulas and their sources.
#![allow(dead_code)]

use num_bigint::BigInt;
use num_rational::BigRational;

/// The committed output of the script.
pub const TEXT: &str = include_str!("../data/curve_values.txt");

fn fields(kind: &str, keys: &[&str]) -> Vec<&'static str> {
    TEXT.lines()
        .filter(|l| !l.starts_with('#'))
        .map(|l| l.split_whitespace().collect::<Vec<_>>())
        .find(|f| f.first() == Some(&kind) && f.len() > keys.len() && f[1..=keys.len()] == *keys)
        .unwrap_or_else(|| panic!("no `{kind} {keys:?}` in tests/data/curve_values.txt"))
}

/// The last field of the line `kind keys… value`, as f64.
pub fn real(kind: &str, keys: &[&str]) -> f64 {
    let f = fields(kind, keys);
    f[f.len() - 1].parse().expect("a number")
}

/// The last field of the line `kind keys… value`, as an integer.
pub fn integer(kind: &str, keys: &[&str]) -> i64 {
    let f = fields(kind, keys);
    f[f.len() - 1].parse().expect("an integer")
}

/// The coefficients `[a1, a2, a3, a4, a6]` of the curve tagged `tag`.
pub fn curve(tag: &str) -> [i64; 5] {
    let f = fields("curve", &[tag]);
    std::array::from_fn(|i| f[2 + i].parse().expect("an integer"))
}

/// Every tag with a `conductor` line.
pub fn conductor_tags() -> Vec<&'static str> {
    TEXT.lines()
        .filter_map(|l| l.strip_prefix("conductor "))
        .filter_map(|l| l.split_whitespace().next())
        .collect()
}

/// Exact value of a printed decimal `[-]d.ddd` or error `d.de<k>`, as
/// a rational (shared by the tests that compare printed digits).
pub fn exact_decimal(s: &str) -> BigRational {
    let (mant, exp) = s.split_once('e').unwrap_or((s, "0"));
    let (neg, body) = match mant.strip_prefix('-') {
        Some(b) => (true, b),
        None => (false, mant),
    };
    let (int, frac) = body.split_once('.').unwrap_or((body, ""));
    let digits: BigInt = format!("{int}{frac}").parse().unwrap();
    let k: i32 = exp.parse::<i32>().unwrap() - frac.len() as i32;
    let ten = BigRational::from_integer(BigInt::from(10));
    let v = BigRational::from_integer(digits) * num_traits::Pow::pow(&ten, k);
    if neg {
        -v
    } else {
        v
    }
}
