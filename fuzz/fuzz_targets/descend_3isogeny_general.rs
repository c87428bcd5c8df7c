//! Fuzz target: the descent via a 3-isogeny with α ≠ 0
//! (`descend_3isogeny_general`) on y² = x³ + D(αx + β)² moved by a change
//! of model, D, α, β and the change from the bytes (D ≠ 0, α ≠ 0, so the
//! plane cubics of the general homogeneous spaces and their local
//! solubility are exercised over Q, Q(√−3) and small quadratic fields).
//! Checks: no panic; the only errors are "no supported isogeny" (never on
//! these curves, which have a rational 3-isogeny) and budget errors; every
//! reported point lies on the input curve; `Isogeny3GeneralReport::recheck`
//! passes; lower ≤ upper. `tests/descent3_general.rs`, module `sweep`,
//! runs the same checks as a proptest.
#![no_main]

use isodescent::curve::{Curve, ModelChange};
use isodescent::descent3::{descend_3isogeny_general, Isogeny3Options};
use isodescent::Error;
use libfuzzer_sys::fuzz_target;
use num_bigint::BigInt;
use num_rational::BigRational;

fn int(n: u8) -> BigRational {
    BigRational::from_integer(BigInt::from(n as i8))
}

fuzz_target!(|data: &[u8]| {
    if data.len() < 8 {
        return;
    }
    let mut opts = Isogeny3Options::default();
    opts.analytic = None;
    opts.local_units = 2_000_000;
    opts.search_units = 200_000;
    opts.factor_units = 2_000_000;
    let d = i64::from(data[0] as i8 % 16);
    let alpha = i64::from(data[1] as i8 % 6);
    let beta = i64::from(data[2] as i8 % 9);
    if d == 0 || alpha == 0 {
        return;
    }
    // y² = x³ + Dα²x² + 2Dαβx + Dβ².
    let Ok(base) = Curve::from_ints([
        0,
        d * alpha * alpha,
        0,
        2 * d * alpha * beta,
        d * beta * beta,
    ]) else {
        return;
    };
    let u = i64::from(data[3] % 5) + 1;
    let Ok(ch) = ModelChange::new(
        BigRational::from_integer(BigInt::from(u)),
        int(data[4]),
        int(data[5]),
        int(data[6]),
    ) else {
        return;
    };
    let curve = if data[7] & 1 == 0 {
        ch.apply_to_curve(&base)
    } else {
        base
    };
    match descend_3isogeny_general(&curve, &opts) {
        Ok(r) => {
            assert!(r.rank_lower <= r.rank_upper);
            for p in &r.points {
                assert!(curve.contains(p));
            }
            r.recheck().expect("the report re-checks");
        }
        Err(Error::BudgetExhausted { .. }) | Err(Error::FactorBudgetExhausted { .. }) => {}
        Err(other) => panic!("unexpected error {other} on {curve}"),
    }
});
