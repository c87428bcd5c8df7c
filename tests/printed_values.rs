//! Printed certified numbers against independent 22-digit references:
//! periods, L-derivatives, canonical heights and regulators, as their
//! `Display` strings print them (the text report and the JSON use the same
//! strings), must contain the reference value: |reference − printed value|
//! ≤ printed error, read exactly as rationals (docs/analytic.md, "Printed
//! values"). References: `tests/data/curve_values.txt`, written by
//! `tests/data/gen_curve_values.py` (mpmath; version in its first line).

use isodescent::analytic::{analyse, AnalyticOptions};
use isodescent::curve::{Curve, Point};
use isodescent::height::{canonical_height, regulator};
use isodescent::Budget;
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::Signed;

mod values;

/// The reference (22 significant digits, so within 10⁻²¹·|ref| of the
/// truth) lies within the printed error of the printed value.
fn inside(label: &str, printed: &str, reference: &str) {
    let (p, e) = printed.split_once(" ± ").unwrap();
    let (p, e, r) = (
        values::exact_decimal(p),
        values::exact_decimal(e),
        values::exact_decimal(reference),
    );
    let slack = r.abs() * BigRational::new(1.into(), BigInt::from(10).pow(21));
    assert!(
        (&r - &p).abs() + slack <= e,
        "{label}: printed {printed}, reference {reference}"
    );
}

/// Reference lines `kind tag keys… value`.
fn lines(kind: &str) -> Vec<Vec<&'static str>> {
    values::TEXT
        .lines()
        .filter(|l| !l.starts_with('#'))
        .map(|l| l.split_whitespace().collect::<Vec<_>>())
        .filter(|f| f.first() == Some(&kind))
        .collect()
}

#[test]
fn printed_periods_and_l_derivatives_contain_the_references() {
    let mut checked = 0;
    for f in lines("curve") {
        let tag = f[1];
        let e = Curve::from_ints(values::curve(tag)).unwrap();
        let mut b = Budget::unlimited();
        let local = e.tate_data(&mut b).unwrap();
        let d = analyse(&e, &local, &AnalyticOptions::default(), &mut b).unwrap();
        for r in lines("real_period").iter().filter(|r| r[1] == tag) {
            inside(tag, &d.real_period().unwrap().to_string(), r[2]);
            checked += 1;
        }
        for r in lines("l_derivative").iter().filter(|r| r[1] == tag) {
            let order: usize = r[2].parse().unwrap();
            if let Some(v) = d.l_value(order) {
                inside(&format!("{tag} L^({order})"), &v.to_string(), r[3]);
                checked += 1;
            }
        }
    }
    assert!(checked >= 8, "{checked}");
}

#[test]
fn printed_heights_and_regulators_contain_the_references() {
    let mut checked = 0;
    for f in lines("height") {
        let e = Curve::from_ints(values::curve(f[1])).unwrap();
        let (x, y): (i64, i64) = (f[2].parse().unwrap(), f[3].parse().unwrap());
        let h = canonical_height(&e, &Point::from_ints(x, y)).unwrap();
        inside(&format!("{} ({x}, {y})", f[1]), &h.to_string(), f[4]);
        checked += 1;
    }
    for f in lines("regulator") {
        let e = Curve::from_ints(values::curve(f[1])).unwrap();
        let pts: Vec<Point> = f[2]
            .split(';')
            .map(|xy| {
                let (x, y) = xy.split_once(',').unwrap();
                Point::from_ints(x.parse().unwrap(), y.parse().unwrap())
            })
            .collect();
        let reg = regulator(&e, &pts).unwrap();
        inside(&format!("{} regulator", f[1]), &reg.to_string(), f[3]);
        checked += 1;
    }
    assert!(checked >= 6, "{checked}");
}
