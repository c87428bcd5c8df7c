//! Fuzz target: the full descent on small random curves.
//!
//! Five small integers or fractions are read from the bytes: either a
//! reduced model y² = x³ + a x² + b x moved by a change of model
//! (u, r, s, t) (so it has a rational 2-torsion point), or five raw
//! coefficients (which mostly have none). Checks: no panic; the only
//! errors are "no 2-torsion" and budget errors; every returned point lies
//! on the input curve; `verify_report` passes every check.
#![no_main]

use isodescent::curve::{Curve, ModelChange};
use isodescent::descent::{descend, verify_report, DescentOptions};
use isodescent::Error;
use libfuzzer_sys::fuzz_target;
use num_bigint::BigInt;
use num_rational::BigRational;

/// A small fraction from two bytes: numerator in −128..=127, denominator
/// in 1..=4 (1 half of the time).
fn frac(n: u8, d: u8) -> BigRational {
    let den = if d & 1 == 0 {
        1
    } else {
        i64::from(d >> 1) % 4 + 1
    };
    BigRational::new(BigInt::from(n as i8), BigInt::from(den))
}

fn int(n: u8) -> BigRational {
    BigRational::from_integer(BigInt::from(n as i8))
}

fn curve_from(data: &[u8]) -> Option<Curve> {
    let byte = |i: usize| data.get(i).copied().unwrap_or(0);
    if byte(0) & 1 == 0 {
        let zero = BigRational::from_integer(BigInt::from(0));
        let base =
            Curve::new([zero.clone(), int(byte(1)), zero.clone(), int(byte(2)), zero]).ok()?;
        let u = frac(byte(3), byte(4));
        let ch = ModelChange::new(
            u,
            frac(byte(5), byte(6)),
            frac(byte(7), 0),
            frac(byte(8), byte(9)),
        )
        .ok()?;
        Some(ch.apply_to_curve(&base))
    } else {
        let c = [
            frac(byte(1), byte(2)),
            frac(byte(3), byte(4)),
            frac(byte(5), byte(6)),
            frac(byte(7), byte(8)),
            frac(byte(9), byte(10)),
        ];
        Curve::new(c).ok()
    }
}

fuzz_target!(|data: &[u8]| {
    let Some(curve) = curve_from(data) else {
        return;
    };
    let mut options = DescentOptions::default();
    options.search_height = 16;
    options.search_units = 500_000;
    options.local_units = 2_000_000;
    options.factor_units = 2_000_000;
    options.four_coverings = data.get(11).is_some_and(|b| b & 1 == 1);
    options.covering_units = 1_000_000;
    options.covering_search_height = 8;
    match descend(&curve, &options) {
        Ok(report) => {
            for p in report.points() {
                assert!(curve.contains(p), "point {p:?} not on {curve}");
            }
            assert!(
                report.rank_bounds().lower() <= report.rank_bounds().upper(),
                "bounds cross on {curve}"
            );
            match verify_report(&report, 2_000_000) {
                Ok(v) => assert!(
                    v.all_passed(),
                    "verification failed on {curve}: {:?}",
                    v.failures()
                ),
                Err(Error::BudgetExhausted { .. }) => {}
                Err(e) => panic!("verify_report error {e:?} on {curve}"),
            }
        }
        Err(Error::NoTwoTorsion)
        | Err(Error::BudgetExhausted { .. })
        | Err(Error::FactorBudgetExhausted { .. }) => {}
        Err(e) => panic!("unexpected error {e:?} on {curve}"),
    }
});
