//! Fuzz target: the descent via 3-isogeny on small j = 0 curves moved by a
//! change of model, and on raw small models (which mostly have j ≠ 0).
//!
//! y² = x³ + k with k = s²·t (s and t ≠ 0 from the bytes, so that the
//! kernel field Q(√t) is Q, Q(√−3) or any small quadratic field) is moved by
//! (u, r, s, t) from the bytes. Checks: no panic; the only errors are
//! "no supported isogeny" and budget errors; every reported point lies on
//! the input curve; `Isogeny3Report::recheck` passes; lower ≤ upper.
#![no_main]

use isodescent::curve::{Curve, ModelChange};
use isodescent::descent3::{descend_3isogeny, Isogeny3Options};
use isodescent::Error;
use libfuzzer_sys::fuzz_target;
use num_bigint::BigInt;
use num_rational::BigRational;

fn int(n: u8) -> BigRational {
    BigRational::from_integer(BigInt::from(n as i8))
}

fuzz_target!(|data: &[u8]| {
    if data.len() < 7 {
        return;
    }
    let mut opts = Isogeny3Options::default();
    opts.analytic = None;
    opts.local_units = 2_000_000;
    opts.search_units = 200_000;
    let curve = if data[0] & 1 == 0 {
        let s = i64::from(data[1] as i8).abs().max(1);
        let t = i64::from(data[2] as i8);
        if t == 0 {
            return;
        }
        let k = s * s * t;
        let Ok(base) = Curve::from_ints([0, 0, 0, 0, k]) else {
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
        ch.apply_to_curve(&base)
    } else {
        let c: Vec<BigRational> = data[1..6].iter().map(|&b| int(b)).collect();
        let Ok(e) = Curve::new([c[0].clone(), c[1].clone(), c[2].clone(), c[3].clone(), c[4].clone()]) else {
            return;
        };
        e
    };
    match descend_3isogeny(&curve, &opts) {
        Ok(r) => {
            assert!(r.rank_lower <= r.rank_upper);
            for p in &r.points {
                assert!(curve.contains(p));
            }
            r.recheck().expect("the report re-checks");
        }
        Err(Error::NoSupportedIsogeny { .. })
        | Err(Error::BudgetExhausted { .. })
        | Err(Error::FactorBudgetExhausted { .. }) => {}
        Err(other) => panic!("unexpected error {other} on {curve}"),
    }
});
