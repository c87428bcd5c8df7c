//! Criterion benchmarks for the conic layer: solving Legendre's equation
//! a X² + b Y² + c Z² = 0 with coefficients of 10, 20 and 30 digits.
//!
//! Setup: splitmix64 with seed 7; each size uses 8 soluble conics
//! (a, b, c) = (p, −q, ±r) with p, q, r random primes of the given number
//! of digits, kept only when soluble (so the lattice step always runs).
//! * `conic/primes_supplied/<digits>`: [`solve_diagonal_with_primes`], the
//!   primes handed over (no factoring); one iteration solves all 8 conics.
//! * `conic/factoring_included/<digits>`: [`solve_diagonal`] on
//!   (p·p′, −q·q′, ±r·r′) with p, p′, … primes of digits/2 digits, soluble
//!   ones only: the time includes factoring three `digits`-digit numbers
//!   (each a product of two primes of half the size) per conic.

use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use isodescent::arith::is_prime;
use isodescent::conic::{solve_diagonal, solve_diagonal_with_primes};
use isodescent::Budget;
use num_bigint::BigInt;

fn splitmix(state: &mut u64) -> u64 {
    *state = state.wrapping_add(0x9E37_79B9_7F4A_7C15);
    let mut z = *state;
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    z ^ (z >> 31)
}

fn random_prime(digits: u32, state: &mut u64) -> BigInt {
    let lo = BigInt::from(10u32).pow(digits - 1);
    let mut n = BigInt::from(0);
    for _ in 0..(digits / 18 + 1) {
        n = n * BigInt::from(1u64 << 60) + BigInt::from(splitmix(state));
    }
    let mut n = &lo + (n % (&lo * 9u32));
    while !is_prime(&n) {
        n += 1u32;
    }
    n
}

type Conic = (BigInt, BigInt, BigInt, Vec<BigInt>);

/// Soluble conics whose coefficients are products of `k` primes of
/// `digits / k` digits each.
fn soluble_conics(digits: u32, k: u32, count: usize, state: &mut u64) -> Vec<Conic> {
    let mut out = Vec::new();
    let mut flip = false;
    while out.len() < count {
        let mut ps = Vec::new();
        let mut coeff = || {
            let mut x = BigInt::from(1);
            for _ in 0..k {
                let p = random_prime(digits / k, state);
                x *= &p;
                ps.push(p);
            }
            x
        };
        let a = coeff();
        let b = -coeff();
        let c0 = coeff();
        flip = !flip;
        let c = if flip { c0 } else { -c0 };
        let s = solve_diagonal_with_primes(&a, &b, &c, &ps, &mut Budget::unlimited());
        if matches!(s, Ok(ref x) if x.is_soluble()) {
            out.push((a, b, c, ps));
        }
    }
    out
}

fn bench_conics(crit: &mut Criterion) {
    let mut state = 7u64;
    let mut g = crit.benchmark_group("conic/primes_supplied");
    g.sample_size(20);
    for digits in [10u32, 20, 30] {
        let cs = soluble_conics(digits, 1, 8, &mut state);
        g.bench_with_input(BenchmarkId::from_parameter(digits), &cs, |bch, cs| {
            bch.iter(|| {
                for (a, b, c, ps) in cs {
                    let s = solve_diagonal_with_primes(a, b, c, ps, &mut Budget::unlimited());
                    assert!(matches!(s, Ok(ref x) if x.is_soluble()));
                }
            })
        });
    }
    g.finish();
    let mut g = crit.benchmark_group("conic/factoring_included");
    g.sample_size(10);
    for digits in [10u32, 20, 30] {
        let cs = soluble_conics(digits, 2, 8, &mut state);
        g.bench_with_input(BenchmarkId::from_parameter(digits), &cs, |bch, cs| {
            bch.iter(|| {
                for (a, b, c, _) in cs {
                    let s = solve_diagonal(a, b, c, &mut Budget::unlimited());
                    assert!(matches!(s, Ok(ref x) if x.is_soluble()));
                }
            })
        });
    }
    g.finish();
}

criterion_group!(benches, bench_conics);
criterion_main!(benches);
