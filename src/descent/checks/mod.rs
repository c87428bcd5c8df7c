//! Checks of the local-image counts (crate-private cross-check functions in
//! `selmer::image_size`) against outside sources, and of the second descent
//! as linear algebra (`second_pairing`); unit tests so that the cross-check
//! functions and the F2 internals they reach stay out of the public face.

mod height_lower_bound;
mod image_size_checks;
mod image_size_families;
mod second_pairing;

use crate::arith::factor_u64;
use crate::curve::ReducedModel;
use crate::local::Prime;
use num_bigint::BigInt;

fn b(n: i64) -> BigInt {
    BigInt::from(n)
}

/// The checked model y² = x³ + ax² + bx (the tests pass non-singular pairs).
fn rm(a: i64, bb: i64) -> ReducedModel {
    rmb(&b(a), &b(bb))
}

fn rmb(a: &BigInt, bb: &BigInt) -> ReducedModel {
    ReducedModel::new(a.clone(), bb.clone()).unwrap()
}

/// The finite places of a list of local images.
fn finite_primes(images: &[crate::quartic::LocalImage]) -> Vec<Prime> {
    images
        .iter()
        .filter_map(|w| match &w.place {
            crate::local::Place::Finite(p) => Some(p.clone()),
            crate::local::Place::Real => None,
        })
        .collect()
}

/// The primes of 2·|n| for n ≠ 0 (factor_u64 is exact).
fn primes_of_2n(ns: &[i64]) -> Vec<Prime> {
    let mut v = vec![Prime::two()];
    for &n in ns {
        for (p, _) in factor_u64(n.unsigned_abs()) {
            v.push(Prime::small(p).unwrap());
        }
    }
    v.sort();
    v.dedup();
    v
}
