//! Local solubility of quartics with 30-digit coefficients.
//!
//! Setup: coefficients are fixed 30-digit integers from a linear
//! congruential generator (seed 0x9e3779b97f4a7c15, multiplier
//! 6364136223846793005), so every run measures the same inputs.
//! Groups: `p = 2`; a 20-digit prime `p = 10^20 + 39` with good reduction
//! (a witness in the first class) and with bad reduction (`p` divides every
//! coefficient but `c4`, so the roots of `g mod p` are found by `gcd` with
//! `x^p − x` and the classes refined); the real place.
//!
//! A second group, `local_image`, times [`local_image`] at the places a
//! descent visits for the congruent-number curves `y² = x³ − n²x`
//! (`a = 0, b = −n²`, and the isogenous side `b = 4n²`), square-free
//! `n ≤ 300`: the real place, `p = 2`, the odd primes `p | n` below 64 and
//! those from 64 on (Lemma P by enumeration of residues, resp. by Weil's
//! bound and root finding, both in machine words).
//!
//! Run: `cargo bench --bench quartic_local`.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use isodescent::curve::ReducedModel;
use isodescent::local::{Place, Prime};
use isodescent::quartic::{local_image, locally_soluble, Quartic};
use isodescent::Budget;
use num_bigint::BigInt;

fn thirty_digit_coeffs(seed: u64) -> [BigInt; 5] {
    let mut s = seed;
    let mut next = || {
        s = s
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        s
    };
    [0; 5].map(|_| {
        let base: BigInt = "100000000000000000000000000000".parse().unwrap();
        let r = BigInt::from(next()) * BigInt::from(next()) % &base;
        let sign = if next() & 1 == 1 { -1 } else { 1 };
        (r + &base) * sign
    })
}

fn quartics(seed: u64, n: usize) -> Vec<Quartic> {
    (0..n as u64)
        .filter_map(|i| Quartic::new(thirty_digit_coeffs(seed + i)).ok())
        .collect()
}

fn bench(c: &mut Criterion) {
    let mut group = c.benchmark_group("quartic_local");
    let generic = quartics(0x9e3779b97f4a7c15, 8);
    let two = Place::Finite(Prime::two());
    group.bench_function("p=2, 8 quartics, 30-digit coefficients", |b| {
        b.iter(|| {
            for q in &generic {
                black_box(locally_soluble(q, &two, &mut Budget::unlimited()).unwrap());
            }
        })
    });
    // p = 2 with 2^20 dividing all coefficients but c4 (deep refinement).
    let two_deep: Vec<Quartic> = generic
        .iter()
        .filter_map(|q| {
            let c = q.coeffs();
            let s = BigInt::from(1) << 20u32;
            Quartic::new([c[0].clone(), &c[1] * &s, &c[2] * &s, &c[3] * &s, &c[4] * &s]).ok()
        })
        .collect();
    group.bench_function("p=2, 8 quartics, 2^20 | c3..c0", |b| {
        b.iter(|| {
            for q in &two_deep {
                black_box(locally_soluble(q, &two, &mut Budget::unlimited()).unwrap());
            }
        })
    });
    let p: BigInt = "100000000000000000039".parse().unwrap();
    let big = Place::Finite(Prime::new(p.clone()).unwrap());
    group.bench_function("p=10^20+39, 8 quartics, good reduction", |b| {
        b.iter(|| {
            for q in &generic {
                black_box(locally_soluble(q, &big, &mut Budget::unlimited()).unwrap());
            }
        })
    });
    let bad: Vec<Quartic> = generic
        .iter()
        .filter_map(|q| {
            let c = q.coeffs();
            Quartic::new([c[0].clone(), &c[1] * &p, &c[2] * &p, &c[3] * &p, &c[4] * &p]).ok()
        })
        .collect();
    group.bench_function("p=10^20+39, 8 quartics, p | c3..c0", |b| {
        b.iter(|| {
            for q in &bad {
                black_box(locally_soluble(q, &big, &mut Budget::unlimited()).unwrap());
            }
        })
    });
    group.bench_function("real place, 8 quartics", |b| {
        b.iter(|| {
            for q in &generic {
                black_box(locally_soluble(q, &Place::Real, &mut Budget::unlimited()).unwrap());
            }
        })
    });
    group.finish();
}

/// `(a, b, place)` for every place a congruent-number descent visits,
/// sorted into real, 2, odd `p < 64`, odd `p ≥ 64`.
fn congruent_places(n_max: i64) -> [Vec<(ReducedModel, Place)>; 4] {
    let mut out: [Vec<(ReducedModel, Place)>; 4] = Default::default();
    for n in 1..=n_max {
        if (2..).take_while(|p| p * p <= n).any(|p| n % (p * p) == 0) {
            continue;
        }
        let mut odd = Vec::new();
        let mut m = n;
        for p in 2..=n {
            if m % p == 0 {
                if p != 2 {
                    odd.push(p as u64);
                }
                m /= p;
            }
        }
        for b in [-n * n, 4 * n * n] {
            let m = ReducedModel::new(BigInt::from(0), BigInt::from(b)).unwrap();
            out[0].push((m.clone(), Place::Real));
            out[1].push((m.clone(), Place::Finite(Prime::two())));
            for &p in &odd {
                let v = Place::Finite(Prime::small(p).unwrap());
                out[if p < 64 { 2 } else { 3 }].push((m.clone(), v));
            }
        }
    }
    out
}

fn bench_images(c: &mut Criterion) {
    let mut group = c.benchmark_group("local_image");
    let jobs = congruent_places(300);
    let names = ["real place", "p = 2", "odd p < 64", "odd p >= 64"];
    for (name, list) in names.iter().zip(&jobs) {
        let label = format!("congruent n <= 300, {name}, {} images", list.len());
        group.bench_function(label, |bch| {
            bch.iter(|| {
                for (m, v) in list {
                    black_box(local_image(m, v, &mut Budget::unlimited()).unwrap());
                }
            })
        });
    }
    group.finish();
}

criterion_group!(benches, bench, bench_images);
criterion_main!(benches);
