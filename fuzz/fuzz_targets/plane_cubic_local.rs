//! Fuzz target: exact local solubility of plane cubics
//! (`cubic::PlaneCubic::soluble_at`), ten small coefficients and a prime
//! p < 50 from the bytes, under a small budget.
//! Checks: no panic; the only error is a budget error; a witness
//! re-checks (`PlaneCubicWitness::verify`) and is primitive; an
//! "insoluble" verdict leaves no point modulo p that Hensel's lemma lifts
//! (a primitive (u, v, w) mod p with C ≡ 0 and ∇C ≢ 0 mod p would give a
//! point over Z_p). `tests/cubic_plane.rs`, module `sweep`, runs the same
//! checks as a proptest.
#![no_main]

use isodescent::cubic::{PlaneCubic, PLANE_CUBIC_MONOMIALS};
use isodescent::local::Prime;
use isodescent::{Budget, Error};
use libfuzzer_sys::fuzz_target;
use num_bigint::BigInt;

/// ∂C/∂u, ∂C/∂v, ∂C/∂w at x, from the coefficients.
fn gradient(cubic: &PlaneCubic, x: &[BigInt; 3]) -> [BigInt; 3] {
    let mut g = [BigInt::from(0), BigInt::from(0), BigInt::from(0)];
    for (c, &(i, j, k)) in cubic
        .coefficients()
        .iter()
        .zip(PLANE_CUBIC_MONOMIALS.iter())
    {
        let e = [i, j, k];
        for (var, gv) in g.iter_mut().enumerate() {
            if e[var] == 0 {
                continue;
            }
            let mut term = c * BigInt::from(e[var]);
            for (o, &eo) in e.iter().enumerate() {
                term *= x[o].pow(if o == var { eo - 1 } else { eo });
            }
            *gv += term;
        }
    }
    g
}

const PRIMES: [u64; 15] = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47];

fuzz_target!(|data: &[u8]| {
    if data.len() < 11 {
        return;
    }
    let c: [BigInt; 10] = std::array::from_fn(|i| BigInt::from(data[i] as i8));
    let Ok(cubic) = PlaneCubic::new(c) else {
        return;
    };
    let p = PRIMES[usize::from(data[10]) % PRIMES.len()];
    let pb = BigInt::from(p);
    let prime = Prime::new(pb.clone()).expect("a prime");
    let mut budget = Budget::with_units(200_000);
    match cubic.soluble_at(&prime, &mut budget) {
        Ok(Some(w)) => {
            assert!(w.verify(&cubic, &pb));
            assert!(w.point.iter().any(|x| x % &pb != BigInt::from(0)));
        }
        Ok(None) => {
            let r = |x: &BigInt| x % &pb == BigInt::from(0);
            for u in 0..p {
                for v in 0..p {
                    for w in 0..p {
                        let x = [BigInt::from(u), BigInt::from(v), BigInt::from(w)];
                        if (u, v, w) == (0, 0, 0) || !r(&cubic.eval(&x)) {
                            continue;
                        }
                        assert!(
                            gradient(&cubic, &x).iter().all(r),
                            "a smooth point mod {p} lifts: {x:?}"
                        );
                    }
                }
            }
        }
        Err(Error::BudgetExhausted { .. }) => {}
        Err(other) => panic!("unexpected error {other}"),
    }
});
