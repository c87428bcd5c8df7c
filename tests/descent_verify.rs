//! The verify path accepts honest reports and rejects tampered ones.

use isodescent::curve::{Curve, Point};
use isodescent::descent::{descend, verify_report, DescentOptions};
use num_bigint::BigInt;
use num_rational::BigRational;

fn report(coeffs: &str) -> isodescent::descent::DescentReport {
    let c: Curve = coeffs.parse().unwrap();
    descend(&c, &DescentOptions::default()).unwrap()
}

#[test]
fn honest_reports_pass_every_check() {
    for c in [
        "0 0 0 -36 0",
        "0 0 0 -1 0",
        "0 3 0 -10 0",
        "1 0 0 -11 -14",
        "0 -1/4 0 -6 0",
        "0 7 0 3 0",
        "0 0 0 -34 0",
    ] {
        let Ok(c2) = c.parse::<Curve>() else { continue };
        let Ok(r) = descend(&c2, &DescentOptions::default()) else {
            continue;
        };
        let v = verify_report(&r, 10_000_000).unwrap();
        assert!(v.all_passed(), "{c}: {:?}", v.failures());
        assert!(v.checks.len() > 10);
    }
}

#[test]
fn a_moved_point_is_caught() {
    let mut r = report("0 0 0 -36 0");
    assert!(!r.points.is_empty());
    let q = |n: i64| BigRational::from_integer(BigInt::from(n));
    r.points[0] = Point::new(q(1), q(1));
    let v = verify_report(&r, 10_000_000).unwrap();
    assert!(!v.all_passed());
}

#[test]
fn an_inflated_rank_bound_is_caught() {
    let mut r = report("0 0 0 -1 0");
    r.isogenies[0].rank_upper += 1;
    let v = verify_report(&r, 10_000_000).unwrap();
    assert!(!v.all_passed());
}

#[test]
fn a_forged_local_image_is_caught() {
    let mut r = report("0 0 0 -36 0");
    // find a place whose local image is not everything, and claim it is
    let side = &mut r.isogenies[0].domain;
    let w = side
        .local_images
        .iter_mut()
        .find(|w| w.members.len() < 1 << isodescent::local::class_dimension(&w.place))
        .expect("some proper local image");
    let n = 1u8 << isodescent::local::class_dimension(&w.place);
    w.members = (0..n).collect();
    let v = verify_report(&r, 10_000_000).unwrap();
    let failed: Vec<String> = v.failures().iter().map(|c| c.what.clone()).collect();
    assert!(
        failed
            .iter()
            .any(|f| f.contains("re-decided insoluble") || f.contains("recomputed")),
        "{failed:?}"
    );
}
