//! Criterion benchmarks for the Selmer stage of the congruent-number
//! family (the figures of "Selmer stage on machine words (issue 16)" in
//! docs/performance.md): Tate's algorithm and the conductor, the local
//! images, and the whole first descent (Selmer groups and local data
//! only, with and without the lifting pairing: the census modes
//! `local-only` and `isogeny-selmer` of `examples/selmer_census.rs`), on
//! curves whose coefficients fit in machine words.
//!
//! Run: `cargo bench --bench selmer_words`. The file uses only the public
//! API, so the same file runs unchanged on an earlier commit for a side
//! by side comparison.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use isodescent::curve::ReducedModel;
use isodescent::curve::{global_local_data, Curve};
use isodescent::descent::{descend, DescentOptions};
use isodescent::local::{Place, Prime};
use isodescent::quartic::local_image;
use isodescent::Budget;
use num_bigint::BigInt;
use num_rational::BigRational;

fn squarefree(n: i64) -> bool {
    (2..).take_while(|p| p * p <= n).all(|p| n % (p * p) != 0)
}

/// Square-free n in [from, from + count) (stepping over the others).
fn congruent(from: i64, count: usize) -> Vec<i64> {
    (from..).filter(|&n| squarefree(n)).take(count).collect()
}

fn odd_primes(mut n: i64) -> Vec<u64> {
    let mut out = Vec::new();
    let mut p = 2;
    while p * p <= n {
        if n % p == 0 {
            if p != 2 {
                out.push(p as u64);
            }
            while n % p == 0 {
                n /= p;
            }
        }
        p += 1;
    }
    if n > 2 {
        out.push(n as u64);
    }
    out
}

fn bench_tate(c: &mut Criterion) {
    let mut group = c.benchmark_group("selmer_words_tate");
    group.sample_size(20);
    for from in [1_000i64, 990_000] {
        let curves: Vec<[BigRational; 5]> = congruent(from, 200)
            .into_iter()
            .map(|n| [0, 0, 0, -n * n, 0].map(|x| BigRational::from_integer(BigInt::from(x))))
            .collect();
        group.bench_function(
            format!("global minimal model, 200 congruent n from {from}"),
            |b| {
                b.iter(|| {
                    for a in &curves {
                        black_box(global_local_data(a, &mut Budget::unlimited()).unwrap());
                    }
                })
            },
        );
    }
    group.finish();
}

fn bench_images(c: &mut Criterion) {
    let mut group = c.benchmark_group("selmer_words_images");
    group.sample_size(20);
    for from in [1_000i64, 990_000] {
        let mut jobs = Vec::new();
        for n in congruent(from, 100) {
            let mut places = vec![Place::Real, Place::Finite(Prime::two())];
            for p in odd_primes(n) {
                places.push(Place::Finite(Prime::new(BigInt::from(p)).unwrap()));
            }
            for b in [-n * n, 4 * n * n] {
                for v in &places {
                    jobs.push((
                        ReducedModel::new(BigInt::from(0), BigInt::from(b)).unwrap(),
                        v.clone(),
                    ));
                }
            }
        }
        let label = format!(
            "local images, 100 congruent n from {from}, {} images",
            jobs.len()
        );
        group.bench_function(label, |bch| {
            bch.iter(|| {
                for (m, v) in &jobs {
                    black_box(local_image(m, v, &mut Budget::unlimited()).unwrap());
                }
            })
        });
    }
    group.finish();
}

fn bench_first_descent(c: &mut Criterion) {
    let mut group = c.benchmark_group("selmer_words_descent");
    group.sample_size(10);
    let opts = DescentOptions::default().local_conditions_only();
    // The census mode `isogeny-selmer`: the two isogeny Selmer groups only.
    let mut isogeny_only = DescentOptions::default().local_conditions_only();
    isogeny_only.lifting_pairing = false;
    for from in [1_000i64, 990_000] {
        let curves: Vec<Curve> = congruent(from, 100)
            .into_iter()
            .map(|n| Curve::from_ints([0, 0, 0, -n * n, 0]).unwrap())
            .collect();
        group.bench_function(
            format!("Selmer groups and local data, 100 congruent n from {from}"),
            |b| {
                b.iter(|| {
                    for e in &curves {
                        black_box(descend(e, &opts).unwrap());
                    }
                })
            },
        );
        group.bench_function(
            format!("isogeny Selmer groups only, 100 congruent n from {from}"),
            |b| {
                b.iter(|| {
                    for e in &curves {
                        black_box(descend(e, &isogeny_only).unwrap());
                    }
                })
            },
        );
    }
    group.finish();
}

criterion_group!(benches, bench_tate, bench_images, bench_first_descent);
criterion_main!(benches);
