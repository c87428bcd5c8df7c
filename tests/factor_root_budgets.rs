//! Root finding for the 2-torsion (`two_torsion_points_with_budget`) charges its budget by
//! operand size and honours the budget's deadline, and gives the same points as the
//! unbudgeted `two_torsion_points`.

use isodescent::curve::{two_torsion_points, two_torsion_points_with_budget, Curve, Point};
use isodescent::{Budget, Error};
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::Zero;

fn huge_rational_curve() -> Curve {
    // 0 A/B 0 C/D 0 with 2000-digit numerators and denominators (issue 17, item 1).
    let d = |c: char| c.to_string().repeat(1999);
    let s = format!("0 {}7/{}1 0 {}3/{}9 0", d('3'), d('1'), d('5'), d('7'));
    s.parse().unwrap()
}

/// y² = (x − r1)(x − r2)(x − r3) for integers r1, r2, r3: its points of order 2 are
/// (r_i, 0) (common practice: y = 0 exactly at the roots of the cubic).
fn curve_with_roots(r: [&BigInt; 3]) -> Curve {
    let a2 = -(r[0] + r[1] + r[2]);
    let a4 = r[0] * r[1] + r[0] * r[2] + r[1] * r[2];
    let a6 = -(r[0] * r[1] * r[2]);
    let z = BigInt::zero();
    Curve::from_bigints([z.clone(), a2, z, a4, a6]).unwrap()
}

#[test]
fn a_small_unit_budget_stops_root_finding_on_huge_rationals() {
    let e = huge_rational_curve();
    let mut b = Budget::with_units(10_000);
    assert!(matches!(
        two_torsion_points_with_budget(&e, &mut b),
        Err(Error::BudgetExhausted { .. })
    ));
}

#[test]
fn with_enough_budget_the_huge_curve_has_only_the_point_zero_zero() {
    // a6 = 0 gives (0, 0); the other two roots solve x² + A/B·x + C/D = 0, whose
    // discriminant is not a rational square here (checked by the same exact arithmetic
    // in both functions, so this compares the two paths).
    let e = huge_rational_curve();
    let mut b = Budget::unlimited();
    let with = two_torsion_points_with_budget(&e, &mut b).unwrap();
    assert_eq!(with, two_torsion_points(&e));
    assert_eq!(with.len(), 1);
    assert!(b.spent() > 0);
}

#[test]
fn three_known_huge_roots_are_found_within_budget() {
    let r1: BigInt = format!("{}1", "9".repeat(300)).parse().unwrap();
    let r2: BigInt = format!("-{}3", "7".repeat(250)).parse().unwrap();
    let r3: BigInt = BigInt::from(12345);
    let e = curve_with_roots([&r1, &r2, &r3]);
    let mut b = Budget::with_units(100_000_000);
    let got = two_torsion_points_with_budget(&e, &mut b).unwrap();
    let mut want: Vec<Point> = [&r1, &r2, &r3]
        .iter()
        .map(|r| Point::new(BigRational::from_integer((*r).clone()), BigRational::zero()))
        .collect();
    want.sort();
    assert_eq!(got, want);
    assert_eq!(two_torsion_points(&e), want);
}
