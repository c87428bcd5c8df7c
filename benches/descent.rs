//! Criterion benchmarks for the descent layer.
//!
//! Setup: congruent-number curves y² = x³ − n² x for square-free n in a
//! fixed window, and the box of y² = x³ + a x² + b x with small a, b. No
//! randomness. Throughput is reported in curves.
//!
//! Run: `cargo bench --bench descent`.

use criterion::{black_box, criterion_group, criterion_main, Criterion, Throughput};
use isodescent::curve::Curve;
use isodescent::descent::{descend, DescentOptions};

fn squarefree(n: i64) -> bool {
    (2..).take_while(|p| p * p <= n).all(|p| n % (p * p) != 0)
}

fn congruent_curves(from: i64, to: i64) -> Vec<Curve> {
    (from..=to)
        .filter(|&n| squarefree(n))
        .map(|n| Curve::from_ints([0, 0, 0, -n * n, 0]).expect("nonsingular"))
        .collect()
}

fn bench_local_only(c: &mut Criterion) {
    let mut g = c.benchmark_group("descent/local_only_congruent");
    g.sample_size(10);
    for (from, to) in [(1i64, 200i64), (99_800, 100_000)] {
        let curves = congruent_curves(from, to);
        g.throughput(Throughput::Elements(curves.len() as u64));
        let opts = DescentOptions::default().local_conditions_only();
        g.bench_function(format!("n_{from}_to_{to}"), |bch| {
            bch.iter(|| {
                for e in &curves {
                    black_box(descend(e, &opts).ok());
                }
            })
        });
    }
    g.finish();
}

/// The figures of issue 16, one curve family each: the isogeny Selmer
/// groups alone (census mode `isogeny-selmer`) on congruent n ≤ 2000, and
/// the full defaults on congruent n ≤ 150.
fn bench_issue16(c: &mut Criterion) {
    let mut g = c.benchmark_group("descent/congruent");
    g.sample_size(10);
    let mut selmer_only = DescentOptions::default().local_conditions_only();
    selmer_only.lifting_pairing = false;
    for (label, to, opts) in [
        ("isogeny_selmer_n_1_to_2000", 2000, selmer_only),
        ("full_default_n_1_to_150", 150, DescentOptions::default()),
    ] {
        let curves = congruent_curves(1, to);
        g.throughput(Throughput::Elements(curves.len() as u64));
        g.bench_function(label, |bch| {
            bch.iter(|| {
                for e in &curves {
                    black_box(descend(e, &opts).ok());
                }
            })
        });
    }
    g.finish();
}

fn bench_full(c: &mut Criterion) {
    let mut g = c.benchmark_group("descent/full_default");
    g.sample_size(10);
    // a small slice of the box |a|, |b| <= 30
    let curves: Vec<Curve> = (-3i64..=3)
        .flat_map(|a| (-30i64..=30).map(move |b| (a, b)))
        .filter(|&(a, b)| b != 0 && a * a != 4 * b)
        .map(|(a, b)| Curve::from_ints([0, a, 0, b, 0]).expect("nonsingular"))
        .collect();
    g.throughput(Throughput::Elements(curves.len() as u64));
    let opts = DescentOptions::default();
    g.bench_function("box_a3_b30", |bch| {
        bch.iter(|| {
            for e in &curves {
                black_box(descend(e, &opts).ok());
            }
        })
    });
    g.finish();
}

criterion_group!(benches, bench_local_only, bench_issue16, bench_full);
criterion_main!(benches);
