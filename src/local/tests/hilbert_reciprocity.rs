//! Hilbert reciprocity: for nonzero rationals a, b,
//! ∏_v (a, b)_v = 1 over all places v of Q
//! (Serre, A Course in Arithmetic, III.2.1, Thm. 3).
//! Only v = R, 2 and the primes dividing the numerators and denominators
//! of a and b can contribute −1 (Serre, III.1.2, Thm. 1: (a, b)_p = 1 when
//! p is odd and a, b are p-adic units).

use crate::arith::factor;
use crate::local::{hilbert_symbol, Place, Prime};
use crate::Budget;
use num_bigint::BigInt;
use num_rational::BigRational;
use proptest::prelude::*;
use std::collections::BTreeSet;

fn places_of(xs: &[&BigRational]) -> Vec<Place> {
    let mut primes: BTreeSet<BigInt> = BTreeSet::new();
    primes.insert(BigInt::from(2));
    let mut budget = Budget::unlimited();
    for x in xs {
        for n in [x.numer(), x.denom()] {
            for p in factor(n, &mut budget).unwrap().primes() {
                primes.insert(p.clone());
            }
        }
    }
    let mut places = vec![Place::Real];
    places.extend(
        primes
            .into_iter()
            .map(|p| Place::Finite(Prime::new(p).unwrap())),
    );
    places
}

fn product_of_symbols(a: &BigRational, b: &BigRational) -> i8 {
    places_of(&[a, b])
        .iter()
        .map(|v| hilbert_symbol(a, b, v).unwrap())
        .product()
}

fn rat(n: i64, d: i64) -> BigRational {
    BigRational::new(BigInt::from(n), BigInt::from(d))
}

#[test]
fn reciprocity_holds_for_minus_one_with_itself() {
    // (−1, −1)_R = (−1, −1)_2 = −1, the rest 1 (Serre, III.1.2 and III.2.1).
    assert_eq!(product_of_symbols(&rat(-1, 1), &rat(-1, 1)), 1);
}

#[test]
fn reciprocity_holds_on_a_grid_of_small_integers() {
    for a in -60i64..=60 {
        for b in -60i64..=60 {
            if a != 0 && b != 0 {
                assert_eq!(product_of_symbols(&rat(a, 1), &rat(b, 1)), 1, "a={a} b={b}");
            }
        }
    }
}

fn nonzero() -> impl Strategy<Value = i64> {
    prop_oneof![1i64..1_000_000_000, -1_000_000_000i64..-1]
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2000))]

    #[test]
    fn reciprocity_holds_for_random_nonzero_rationals(
        an in nonzero(), ad in 1i64..100_000, bn in nonzero(), bd in 1i64..100_000,
    ) {
        let a = rat(an, ad);
        let b = rat(bn, bd);
        prop_assert_eq!(product_of_symbols(&a, &b), 1);
    }
}
