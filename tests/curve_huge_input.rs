//! Curves layer: inputs at the digit cap are handled (speed is measured in
//! benches/curve.rs, not here).

use isodescent::curve::{Curve, MAX_COEFFICIENT_DIGITS};
use isodescent::Error;

fn digits(d: char, n: usize) -> String {
    d.to_string().repeat(n)
}

#[test]
fn five_integer_coefficients_at_the_digit_cap_parse() {
    let c = |d| digits(d, MAX_COEFFICIENT_DIGITS);
    let s = format!("{} {} -{} {} {}", c('3'), c('1'), c('7'), c('9'), c('2'));
    let e: Curve = s.parse().unwrap();
    assert!(e.coefficients().iter().all(|c| c.is_integer()));
    assert_eq!(e.to_string().parse::<Curve>().unwrap(), e);
}

#[test]
fn fractional_coefficients_at_the_digit_cap_parse() {
    let c = |d| digits(d, MAX_COEFFICIENT_DIGITS);
    let s = format!("{}/2 0 0 -{}/7 1", c('3'), c('5'));
    let e: Curve = s.parse().unwrap();
    assert!(!e.coefficients().iter().all(|c| c.is_integer()));
}

#[test]
fn one_digit_over_the_cap_is_a_parse_error() {
    let s = format!("0 0 0 1/{} 1", digits('9', MAX_COEFFICIENT_DIGITS + 1));
    assert!(matches!(s.parse::<Curve>(), Err(Error::Parse { .. })));
}
