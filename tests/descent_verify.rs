//! The verify path accepts honest reports and rejects tampered ones.

//! (Tampered reports are checked by the unit tests of `descent::verify`,
//! which can reach inside a report.)

use isodescent::curve::Curve;
use isodescent::descent::{descend, verify_report, DescentOptions};

#[test]
fn honest_reports_pass_every_check() {
    for c in [
        "0 0 0 -36 0",
        "0 0 0 -1 0",
        "0 3 0 -10 0",
        "0 -1/4 0 -6 0",
        "0 7 0 3 0",
        "y^2 = x^3 + 5x^2 - 14x",
        "y^2 + xy = x^3 - x^2 - 6x",
    ] {
        // Every listed curve must parse and descend: a failure here fails
        // the test rather than skipping the curve.
        let c2 = c.parse::<Curve>().unwrap_or_else(|e| panic!("{c}: {e}"));
        let r = descend(&c2, &DescentOptions::default()).unwrap_or_else(|e| panic!("{c}: {e}"));
        let v = verify_report(&r, 10_000_000).unwrap();
        assert!(v.all_passed(), "{c}: {:?}", v.failures());
        assert!(v.checks.len() > 10);
    }
}

#[test]
fn a_budget_too_small_is_an_error_and_the_default_suffices() {
    use isodescent::descent::{verify_report_default, Check};
    use isodescent::Error;
    // y^2 = x^3 - 29x^2 - 30x has classes proven not images, whose
    // 4-coverings verify_report re-checks (demo data of this crate).
    let c: Curve = "y^2 = x^3 - 29x^2 - 30x".parse().unwrap();
    let r = descend(&c, &DescentOptions::default()).unwrap();
    let v = verify_report_default(&r).unwrap();
    assert!(v.all_passed(), "{:?}", v.failures());
    let first: &Check = &v.checks[0];
    assert!(first.passed && !first.what.is_empty());
    for units in [0, 1, 10, 1000] {
        match verify_report(&r, units) {
            Err(Error::BudgetExhausted { .. }) | Err(Error::FactorBudgetExhausted { .. }) => {}
            Ok(v) => panic!("{units} units: Ok with {} failures", v.failures().len()),
            Err(e) => panic!("{units} units: {e}"),
        }
    }
}

#[test]
fn generators_come_with_their_certificate() {
    // y^2 = x^3 - 36x has rank 1 (proven by the descent, bounds 1 = 1);
    // y^2 = x^3 - x has rank 0 (upper bound 0), so the empty set generates.
    let opts = DescentOptions::default();
    let e: Curve = "y^2 = x^3 - 36x".parse().unwrap();
    let r = descend(&e, &opts).unwrap();
    assert_eq!((r.rank_bounds().lower(), r.rank_bounds().upper()), (1, 1));
    let g = r.generators().expect("saturation proves generation");
    assert_eq!(g.points().len(), 1);
    assert_eq!(g.points(), r.points());
    assert!(g.points().iter().all(|p| e.contains(p)));
    assert_eq!(g.heights().len(), 1);
    let cert = g.certificate().expect("a saturation certificate");
    assert!(cert.proven_saturated);
    assert!(g.regulator().unwrap().overlaps(&g.heights()[0]));

    let e0: Curve = "y^2 = x^3 - x".parse().unwrap();
    let r0 = descend(&e0, &opts).unwrap();
    assert_eq!(r0.rank_bounds().upper(), 0);
    let g0 = r0.generators().unwrap();
    assert!(g0.points().is_empty() && g0.regulator().is_none());
}
