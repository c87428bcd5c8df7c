//! Criterion benchmarks for the analytic layer: every `a_p` up to 10⁶,
//! `a_1..a_30000` with and without the closed form of `j = 1728`, and
//! the whole analysis (root number, period, certified L-values, analytic
//! rank) plus the BSD ledger for curves of conductor near 10⁸.
//!
//! Run: `cargo bench --bench analytic`.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use isodescent::analytic::{
    analyse, dirichlet_coefficients, sha_analytic, AnalyticOptions, ApTable,
};
use isodescent::curve::{torsion, Curve};
use isodescent::Budget;
use num_bigint::BigInt;

/// Primes up to `n` (sieve of Eratosthenes).
fn primes(n: usize) -> Vec<u64> {
    let mut s = vec![true; n + 1];
    let mut out = Vec::new();
    for i in 2..=n {
        if s[i] {
            out.push(i as u64);
            let mut j = i * i;
            while j <= n {
                s[j] = false;
                j += i;
            }
        }
    }
    out
}

fn bench_ap(c: &mut Criterion) {
    // y² + y = x³ − x (trivial torsion), and y² = x³ − 1767²x
    // (torsion Z/2 × Z/2, the family this crate is about).
    let ps = primes(1_000_000);
    // Issue 25: the primes between the old crossover of the direct count
    // (230) and the new one (700), and up to 2000.
    let mid: Vec<u64> = ps
        .iter()
        .copied()
        .filter(|&p| (230..700).contains(&p))
        .collect();
    let upper: Vec<u64> = ps
        .iter()
        .copied()
        .filter(|&p| (700..2000).contains(&p))
        .collect();
    let mut g = c.benchmark_group("analytic");
    g.sample_size(10);
    let e = Curve::from_ints([0, 0, 1, -1, 0]).unwrap_or_else(|_| unreachable!());
    let local = e
        .tate_data(&mut Budget::unlimited())
        .unwrap_or_else(|_| unreachable!());
    let table = ApTable::new(&local);
    for (range, list) in [("230..700", &mid), ("700..2000", &upper)] {
        g.bench_function(format!("a_p for p in {range} (y^2+y=x^3-x)"), |b| {
            b.iter(|| {
                let mut s = 0i64;
                for &p in list {
                    s += table.frobenius_trace(p).unwrap_or(0);
                }
                black_box(s)
            })
        });
    }
    for (name, a) in [
        ("y^2+y=x^3-x", [0, 0, 1, -1, 0]),
        ("y^2=x^3-1767^2x", [0, 0, 0, -1767 * 1767, 0]),
    ] {
        let e = Curve::from_ints(a).unwrap_or_else(|_| unreachable!());
        let local = e
            .tate_data(&mut Budget::unlimited())
            .unwrap_or_else(|_| unreachable!());
        let table = ApTable::new(&local);
        g.bench_function(format!("a_p for all p below 10^6 ({name})"), |b| {
            b.iter(|| {
                let mut s = 0i64;
                for &p in &ps {
                    s += table.frobenius_trace(p).unwrap_or(0);
                }
                black_box(s)
            })
        });
    }
    g.finish();
}

fn bench_analyse(c: &mut Criterion) {
    // Conductors near 10^8: congruent-number curves y² = x³ − n²x with
    // n = 1767 (N = 32·n² ≈ 10^8, w = −1) and n = 1763 (w = +1).
    let curves: Vec<(&str, [i64; 5])> = vec![
        ("n=1767", [0, 0, 0, -1767 * 1767, 0]),
        ("n=1763", [0, 0, 0, -1763 * 1763, 0]),
    ];
    let mut g = c.benchmark_group("analytic");
    g.sample_size(10);
    for (name, a) in curves {
        let e = Curve::from_ints(a).unwrap_or_else(|_| unreachable!());
        let local = e
            .tate_data(&mut Budget::unlimited())
            .unwrap_or_else(|_| unreachable!());
        let tors = torsion(&e).order();
        let cp: BigInt = local
            .primes
            .iter()
            .map(|l| BigInt::from(l.tamagawa))
            .product();
        println!("{name}: conductor {}", local.conductor);
        g.bench_function(format!("analyse + ledger, {name}"), |b| {
            b.iter(|| {
                let d = analyse(
                    &e,
                    &local,
                    &AnalyticOptions::default(),
                    &mut Budget::unlimited(),
                )
                .unwrap_or_else(|_| unreachable!());
                let l = d
                    .analytic_rank()
                    .and_then(|r| sha_analytic(&d, r, tors, &cp, None));
                black_box((d, l))
            })
        });
    }
    g.finish();
}

fn bench_an_list(c: &mut Criterion) {
    // The coefficients a_1..a_M with M = 30 000, about what the default
    // options use at the congruent-number conductors N = 32n² near n = 1000:
    // y² = x³ − 997²x takes the closed form of j = 1728 at every good
    // p ≥ 5; y² + y = x³ − x (no complex multiplication) takes direct counts and
    // baby-step giant-step. docs/performance.md has both trees side by side.
    let mut g = c.benchmark_group("analytic");
    g.sample_size(20);
    for (name, a) in [
        ("y^2=x^3-997^2x, closed form", [0, 0, 0, -997 * 997, 0]),
        ("y^2+y=x^3-x, counts", [0, 0, 1, -1, 0]),
    ] {
        let e = Curve::from_ints(a).unwrap_or_else(|_| unreachable!());
        let local = e
            .tate_data(&mut Budget::unlimited())
            .unwrap_or_else(|_| unreachable!());
        g.bench_function(format!("a_n for n <= 30000 ({name})"), |b| {
            b.iter(|| {
                black_box(
                    dirichlet_coefficients(&local, 30_000, &mut Budget::unlimited())
                        .unwrap_or_else(|_| unreachable!()),
                )
            })
        });
    }
    g.finish();
}

fn bench_twist_routes(c: &mut Criterion) {
    // Issue 25: congruent-number curves y² = x³ − n²x at n = 1001 and
    // n = 9997 (conductors 3.2·10⁷ and 3.2·10⁹), the stored route (the
    // default before issue 25) against the default (the streamed twist
    // route above 10⁶), side by side in one run.
    let mut g = c.benchmark_group("analytic");
    g.sample_size(10);
    for n in [1001i64, 9997] {
        let e = Curve::from_ints([0, 0, 0, -n * n, 0]).unwrap_or_else(|_| unreachable!());
        let local = e
            .tate_data(&mut Budget::unlimited())
            .unwrap_or_else(|_| unreachable!());
        for (route, options) in [
            (
                "stored",
                AnalyticOptions::default().with_streamed_above(u64::MAX),
            ),
            ("default", AnalyticOptions::default()),
        ] {
            g.bench_function(format!("analyse y^2=x^3-{n}^2x, {route}"), |b| {
                b.iter(|| {
                    black_box(
                        analyse(&e, &local, &options, &mut Budget::unlimited())
                            .unwrap_or_else(|_| unreachable!()),
                    )
                })
            });
        }
    }
    g.finish();
}

criterion_group!(
    benches,
    bench_ap,
    bench_an_list,
    bench_analyse,
    bench_twist_routes
);
criterion_main!(benches);
