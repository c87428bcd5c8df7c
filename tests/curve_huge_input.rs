//! Curves layer: inputs at the digit cap must be handled without hanging.

use isodescent::curve::{Curve, MAX_COEFFICIENT_DIGITS};

#[test]
fn five_integer_coefficients_at_the_digit_cap_parse_in_reasonable_time() {
    let c = |d: char| d.to_string().repeat(MAX_COEFFICIENT_DIGITS);
    let s = format!("{} {} -{} {} {}", c('3'), c('1'), c('7'), c('9'), c('2'));
    let t = std::time::Instant::now();
    let e: Curve = s.parse().unwrap();
    eprintln!("parsed in {:?}", t.elapsed());
    assert!(e.is_integral());
}

#[test]
fn fractional_coefficients_at_the_digit_cap_parse() {
    let c = |d: char| d.to_string().repeat(MAX_COEFFICIENT_DIGITS);
    let s = format!("{}/{} 0 0 -{}/7 1", c('3'), c('1'), c('7'));
    let t = std::time::Instant::now();
    let e: Curve = s.parse().unwrap();
    eprintln!("parsed in {:?}", t.elapsed());
    assert!(!e.is_integral());
}
