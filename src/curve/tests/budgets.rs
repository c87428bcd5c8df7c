//! The deadline of a budget stops root finding for the 2-torsion on huge
//! rationals (the clock is read every few thousand units, so the test
//! first spends past that stride with the crate-private `Budget::spend`).

use std::time::Instant;

use crate::curve::{two_torsion_points_with_budget, Curve};
use crate::{Budget, Error};

fn huge_rational_curve() -> Curve {
    // 0 A/B 0 C/D 0 with 2000-digit numerators and denominators (issue 17, item 1).
    let d = |c: char| c.to_string().repeat(1999);
    let s = format!("0 {}7/{}1 0 {}3/{}9 0", d('3'), d('1'), d('5'), d('7'));
    s.parse().unwrap()
}

#[test]
fn a_passed_deadline_stops_root_finding_on_huge_rationals() {
    let e = huge_rational_curve();
    let mut b = Budget::unlimited().with_deadline(Instant::now());
    // Burn the clock-check stride so that the next charge reads the clock.
    let _ = b.spend(1 << 13);
    let got = two_torsion_points_with_budget(&e, &mut b);
    assert!(
        matches!(got, Err(Error::BudgetExhausted { ref stage }) if stage.contains("2-torsion")),
        "{got:?}"
    );
}
