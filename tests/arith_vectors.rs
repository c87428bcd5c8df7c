//! Factorisation and primality checked against vectors computed by general-purpose
//! reference libraries: sympy 1.14.0 and python-flint 0.9.0 (see the header of
//! tests/data/gen_arith_vectors.py, which wrote the files).

use isodescent::arith::{factor, factor_u64, is_prime, is_prime_u64, Factorization};
use isodescent::Budget;
use num_bigint::BigInt;
use num_traits::ToPrimitive;

/// Parses `n p1^e1*p2^e2*...` lines (`#` comments skipped).
fn factor_vectors(text: &str) -> Vec<(BigInt, Vec<(BigInt, u32)>)> {
    text.lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
        .map(|l| {
            let mut it = l.split_whitespace();
            let n: BigInt = it.next().unwrap().parse().unwrap();
            let body = it.next().unwrap();
            let fs = if body == "1" {
                Vec::new()
            } else {
                body.split('*')
                    .map(|pe| {
                        let (p, e) = pe.split_once('^').unwrap();
                        (p.parse().unwrap(), e.parse().unwrap())
                    })
                    .collect()
            };
            (n, fs)
        })
        .collect()
}

fn check_file(text: &str) -> usize {
    let vectors = factor_vectors(text);
    assert!(!vectors.is_empty());
    for (n, expected) in &vectors {
        let f: Factorization = factor(n, &mut Budget::unlimited()).unwrap();
        assert_eq!(f.factors(), &expected[..], "factorisation of {n}");
        assert_eq!(f.sign(), if n < &BigInt::from(0) { -1 } else { 1 });
        assert_eq!(&f.value(), n);
        if let Some(u) = n.to_u64() {
            let small: Vec<(BigInt, u32)> = factor_u64(u)
                .into_iter()
                .map(|(p, e)| (BigInt::from(p), e))
                .collect();
            assert_eq!(small, *expected, "factor_u64({u})");
        }
    }
    vectors.len()
}

#[test]
fn small_and_word_size_integers_factor_as_sympy_and_flint_say() {
    check_file(include_str!("data/factor_small.txt"));
}

#[test]
fn products_of_10_15_and_20_digit_primes_factor_as_sympy_and_flint_say() {
    check_file(include_str!("data/factor_built.txt"));
}

#[test]
fn perfect_powers_and_carmichael_numbers_factor_as_sympy_and_flint_say() {
    check_file(include_str!("data/factor_special.txt"));
}

#[test]
fn primality_of_pseudoprimes_and_random_numbers_matches_sympy_and_flint() {
    let text = include_str!("data/prime_tricky.txt");
    let mut count = 0;
    for l in text
        .lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
    {
        let (n, flag) = l.split_once(' ').unwrap();
        let n: BigInt = n.parse().unwrap();
        let expected = flag == "1";
        assert_eq!(is_prime(&n), expected, "is_prime({n})");
        if let Some(u) = n.to_u64() {
            assert_eq!(is_prime_u64(u), expected, "is_prime_u64({u})");
        }
        count += 1;
    }
    assert!(count > 300);
}
