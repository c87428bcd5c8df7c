//! Property tests and bad-input tests for the arithmetic layer.
//!
//! The properties are definitions (common practice): a factorisation
//! multiplies back to n and lists primes; n = squarefree_part(n) · m²;
//! isqrt(n)² ≤ n < (isqrt(n) + 1)².

use crate::arith::{
    factor, factor_u64, is_perfect_square, is_prime, is_prime_u64, is_squarefree, isqrt,
    rational_sqrt_exact, sqrt_exact, squarefree_kernel, squarefree_part, squarefree_part_rational,
};
use crate::{Budget, Error};
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};
use proptest::prelude::*;

fn big(s: &str) -> BigInt {
    s.parse().unwrap()
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 64, ..ProptestConfig::default() })]

    #[test]
    fn a_factorisation_multiplies_back_and_lists_primes(n in any::<i128>().prop_filter("nonzero", |n| *n != 0)) {
        let n = BigInt::from(n);
        let f = factor(&n, &mut Budget::unlimited()).unwrap();
        prop_assert_eq!(f.value(), n.clone());
        let primes: Vec<&BigInt> = f.primes().collect();
        for w in primes.windows(2) {
            prop_assert!(w[0] < w[1]);
        }
        for p in primes {
            prop_assert!(is_prime(p));
        }
    }

    #[test]
    fn factor_u64_multiplies_back_to_its_input(n in 2u64..) {
        let f = factor_u64(n);
        let mut v = 1u128;
        for &(p, e) in &f {
            prop_assert!(is_prime_u64(p));
            v *= (p as u128).pow(e);
        }
        prop_assert_eq!(v, n as u128);
    }

    #[test]
    fn the_square_free_part_times_a_square_is_n(n in any::<i64>().prop_filter("nonzero", |n| *n != 0)) {
        let n = BigInt::from(n);
        let s = squarefree_part(&n, &mut Budget::unlimited()).unwrap();
        prop_assert_eq!(s.signum(), n.signum());
        prop_assert!((&n % &s).is_zero());
        let q = &n / &s;
        prop_assert!(is_perfect_square(&q));
        prop_assert!(is_squarefree(&s, &mut Budget::unlimited()).unwrap());
        let k = squarefree_kernel(&n, &mut Budget::unlimited()).unwrap();
        prop_assert!(k.is_positive());
        prop_assert!((&n % &k).is_zero());
    }

    #[test]
    fn isqrt_is_the_floor_of_the_square_root(n in any::<u128>(), m in any::<u64>()) {
        let n = BigInt::from(n) * BigInt::from(m);
        let r = isqrt(&n).unwrap();
        prop_assert!(&r * &r <= n);
        let r1 = &r + 1u32;
        prop_assert!(&r1 * &r1 > n);
        prop_assert_eq!(sqrt_exact(&n).is_some(), &r * &r == n);
        prop_assert_eq!(sqrt_exact(&(&r * &r)), Some(r.clone()));
    }

    #[test]
    fn a_rational_and_its_square_free_integer_differ_by_a_square(a in any::<i64>(), b in 1i64..) {
        prop_assume!(a != 0);
        let x = BigRational::new(BigInt::from(a), BigInt::from(b));
        let s = squarefree_part_rational(&x, &mut Budget::unlimited()).unwrap();
        let ratio = &x / BigRational::from_integer(s.clone());
        prop_assert!(ratio.is_positive());
        prop_assert!(rational_sqrt_exact(&ratio).is_some());
    }
}

#[test]
fn zero_is_refused_with_a_typed_error() {
    let z = BigInt::zero();
    let mut b = Budget::unlimited();
    assert!(matches!(factor(&z, &mut b), Err(Error::Zero { .. })));
    assert!(matches!(
        squarefree_part(&z, &mut b),
        Err(Error::Zero { .. })
    ));
    assert!(matches!(
        squarefree_kernel(&z, &mut b),
        Err(Error::Zero { .. })
    ));
    let zr = BigRational::from_integer(z.clone());
    assert!(matches!(
        squarefree_part_rational(&zr, &mut b),
        Err(Error::Zero { .. })
    ));
    let zd = BigRational::new_raw(BigInt::one(), BigInt::zero());
    assert!(matches!(
        squarefree_part_rational(&zd, &mut b),
        Err(Error::ZeroDenominator { .. })
    ));
    assert_eq!(rational_sqrt_exact(&zd), None);
    assert!(factor_u64(0).is_empty());
}

#[test]
fn a_negative_argument_to_isqrt_is_a_typed_error() {
    assert!(matches!(
        isqrt(&BigInt::from(-4)),
        Err(Error::NotPositive { .. })
    ));
    assert_eq!(sqrt_exact(&BigInt::from(-4)), None);
    assert!(!is_perfect_square(&BigInt::from(-1)));
    assert!(!is_prime(&BigInt::from(-7)));
}

#[test]
fn plus_and_minus_one_have_empty_factor_lists() {
    for (n, s) in [(1, 1), (-1, -1)] {
        let f = factor(&BigInt::from(n), &mut Budget::unlimited()).unwrap();
        assert!(f.factors().is_empty());
        assert_eq!(f.sign(), s);
        assert_eq!(f.value(), BigInt::from(n));
    }
}

#[test]
fn small_hand_checked_examples_come_out_right() {
    // Hand-checkable (common practice): -360 = -2^3 3^2 5; -72 = -2 * 6^2; 3/8 = 6/4^2.
    let f = factor(&BigInt::from(-360), &mut Budget::unlimited()).unwrap();
    assert_eq!(f.sign(), -1);
    let fs: Vec<(BigInt, u32)> = vec![(2.into(), 3), (3.into(), 2), (5.into(), 1)];
    assert_eq!(f.factors(), &fs[..]);
    let mut b = Budget::unlimited();
    assert_eq!(
        squarefree_part(&BigInt::from(-72), &mut b).unwrap(),
        BigInt::from(-2)
    );
    assert_eq!(
        squarefree_kernel(&BigInt::from(-72), &mut b).unwrap(),
        BigInt::from(6)
    );
    let x = BigRational::new(3.into(), 8.into());
    assert_eq!(
        squarefree_part_rational(&x, &mut b).unwrap(),
        BigInt::from(6)
    );
    let y = BigRational::new((-1).into(), 4.into());
    assert_eq!(
        squarefree_part_rational(&y, &mut b).unwrap(),
        BigInt::from(-1)
    );
    let q = BigRational::new(9.into(), 4.into());
    assert_eq!(
        rational_sqrt_exact(&q),
        Some(BigRational::new(3.into(), 2.into()))
    );
    assert_eq!(
        rational_sqrt_exact(&BigRational::new(2.into(), 9.into())),
        None
    );
    // An unreduced fraction 8/18 = 4/9 is a square.
    let unreduced = BigRational::new_raw(8.into(), 18.into());
    assert_eq!(
        rational_sqrt_exact(&unreduced),
        Some(BigRational::new(2.into(), 3.into()))
    );
    assert_eq!(
        factor_u64(600851475143),
        vec![(71, 1), (839, 1), (1471, 1), (6857, 1)]
    );
}

#[test]
fn an_exhausted_budget_hands_back_found_primes_and_the_cofactor() {
    // 2^3 * 3 * p20 * q20 with p, q 20-digit primes (sympy 1.14 nextprime(10^19) and
    // nextprime(2*10^19)): a tiny budget is enough for trial division but not ECM.
    let p = big("10000000000000000051");
    let q = big("20000000000000000011");
    assert!(is_prime(&p) && is_prime(&q));
    let n = BigInt::from(24) * &p * &q;
    match factor(&n, &mut Budget::with_units(10_000)) {
        Err(Error::FactorBudgetExhausted { found, cofactor }) => {
            assert_eq!(found, vec![(BigInt::from(2), 3), (BigInt::from(3), 1)]);
            assert_eq!(cofactor, &p * &q);
        }
        other => panic!("expected budget exhaustion, got {other:?}"),
    }
    // The same input with an unlimited budget succeeds, and the run is deterministic.
    let mut b1 = Budget::unlimited();
    let mut b2 = Budget::unlimited();
    let f1 = factor(&n, &mut b1).unwrap();
    let f2 = factor(&n, &mut b2).unwrap();
    assert_eq!(f1, f2);
    assert_eq!(b1.spent(), b2.spent());
    assert_eq!(f1.value(), n);
}

#[test]
fn huge_arguments_do_not_panic() {
    // 2^1500 + 1: far too large to factor fully with a small budget, but every
    // entry point must answer or return a typed error.
    let n = (BigInt::one() << 1500u32) + 1u32;
    assert!(!is_prime(&n)); // 2^1500 + 1 is divisible by 2^4 + 1 = 17 (as 1500 = 4 * 375)
    match factor(&n, &mut Budget::with_units(50_000)) {
        Ok(f) => assert_eq!(f.value(), n),
        Err(Error::FactorBudgetExhausted { found, cofactor }) => {
            let mut v = cofactor;
            for (p, e) in found {
                v *= num_traits::pow(p, e as usize);
            }
            assert_eq!(v, n);
        }
        Err(e) => panic!("unexpected error {e}"),
    }
    let sq = (BigInt::one() << 3001u32) + 7u32;
    let sq2 = &sq * &sq;
    assert_eq!(sqrt_exact(&sq2), Some(sq.clone()));
    assert!(!is_perfect_square(&(&sq2 + 1u32)));
    // A big perfect power is recognised without ECM: (2^89 - 1)^3.
    let m89 = (BigInt::one() << 89u32) - 1u32;
    let f = factor(&(&m89 * &m89 * &m89), &mut Budget::with_units(100_000)).unwrap();
    assert_eq!(f.factors(), &[(m89, 3)][..]);
}
