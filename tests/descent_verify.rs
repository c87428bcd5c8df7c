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
