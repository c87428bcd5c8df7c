//! Criterion benchmarks for the curves layer: the group law and the
//! reduced-model computation on curves with 20-, 50- and 100-digit
//! coefficients, plus 2-torsion and the torsion subgroup.
//!
//! The `curve/family/*` benchmarks time each curves-layer call the descent
//! makes, over two whole families per iteration: the congruent-number curves
//! y² = x³ − n²x for square-free n ≤ 2000 (1215 curves) and
//! y² = x³ + ax² + bx with |a|, |b| ≤ 30 (3650 nonsingular curves), plus
//! `descend` with `DescentOptions::default().local_conditions_only()` end to end. Divide by the
//! family size for the cost per curve.
//!
//! Run: `cargo bench --bench curve`.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use isodescent::curve::{
    first_two_torsion_model, torsion, two_torsion_model, two_torsion_points, Curve, Point,
    TwoIsogeny, TwoTorsionModel,
};
use isodescent::descent::{descend, DescentOptions};
use isodescent::Budget;
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::Zero;

/// A deterministic d-digit integer (digits from a fixed linear recurrence).
fn digits(d: usize, seed: u64) -> BigInt {
    let mut s = String::new();
    let mut x = seed;
    for i in 0..d {
        x = x
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        let digit = ((x >> 33) % 10) as u8;
        s.push((b'0' + if i == 0 { digit.max(1) } else { digit }) as char);
    }
    s.parse().unwrap_or_default()
}

/// y² = x³ + a x² + b x through (x0, x0 k): a, b with about d digits and a
/// point of (almost surely) infinite order.
fn curve_with_point(d: usize) -> (Curve, Point) {
    let a = digits(d, 1);
    let x0 = digits(d / 2, 2);
    let k = digits(d / 4 + 1, 3);
    let b = &x0 * &k * &k - &x0 * &x0 - &a * &x0;
    let e = Curve::from_bigints([BigInt::zero(), a, BigInt::zero(), b, BigInt::zero()])
        .unwrap_or_else(|_| Curve::from_ints([0, 0, 0, -1, 0]).unwrap_or_else(|_| unreachable!()));
    let p = Point::new(
        BigRational::from_integer(x0.clone()),
        BigRational::from_integer(&x0 * &k),
    );
    (e, p)
}

/// A general model (a1, a3 ≠ 0) with one rational 2-torsion point and about
/// d-digit coefficients: y² = (x − r1)(x² + c) moved by a change of model
/// with r, s, t ≠ 0.
fn general_curve(d: usize) -> Curve {
    let r1 = digits(d / 2, 4);
    let c = digits(d, 5);
    let a2 = -r1.clone();
    let a4 = c.clone();
    let a6 = -(&r1 * &c);
    let base = Curve::from_bigints([BigInt::zero(), a2, BigInt::zero(), a4, a6])
        .unwrap_or_else(|_| unreachable!());
    let ch = isodescent::curve::ModelChange::new(
        BigRational::from_integer(1.into()),
        BigRational::from_integer(digits(d / 3 + 1, 6)),
        BigRational::from_integer(1.into()),
        BigRational::from_integer(digits(d / 3 + 1, 7)),
    )
    .unwrap_or_else(|_| unreachable!());
    ch.apply_to_curve(&base)
}

fn bench(c: &mut Criterion) {
    for d in [20usize, 50, 100] {
        let (e, p) = curve_with_point(d);
        let p2 = e.add(&p, &p);
        c.bench_function(&format!("curve/add/{d}-digit"), |b| {
            b.iter(|| e.add(black_box(&p), black_box(&p2)))
        });
        c.bench_function(&format!("curve/double/{d}-digit"), |b| {
            b.iter(|| e.add(black_box(&p), black_box(&p)))
        });
        c.bench_function(&format!("curve/mul_by_8/{d}-digit"), |b| {
            b.iter(|| e.mul(black_box(&p), &BigInt::from(8)))
        });
        let g = general_curve(d);
        c.bench_function(&format!("curve/two_torsion_points/{d}-digit"), |b| {
            b.iter(|| two_torsion_points(black_box(&g)))
        });
        c.bench_function(&format!("curve/reduced_model/{d}-digit"), |b| {
            b.iter(|| first_two_torsion_model(black_box(&g)))
        });
        c.bench_function(&format!("curve/torsion/{d}-digit"), |b| {
            b.iter(|| torsion(black_box(&g)))
        });
    }
}

/// The two descent families of the module docs.
fn families() -> Vec<(&'static str, Vec<Curve>)> {
    let squarefree = |n: i64| !(2..).take_while(|p| p * p <= n).any(|p| n % (p * p) == 0);
    let congruent: Vec<Curve> = (1..=2000i64)
        .filter(|&n| squarefree(n))
        .filter_map(|n| Curve::from_ints([0, 0, 0, -n * n, 0]).ok())
        .collect();
    let mut ab = Vec::new();
    for a in -30..=30i64 {
        for b in -30..=30i64 {
            if let Ok(c) = Curve::from_ints([0, a, 0, b, 0]) {
                ab.push(c);
            }
        }
    }
    vec![("congruent_2000", congruent), ("ab_30", ab)]
}

fn bench_families(c: &mut Criterion) {
    for (name, curves) in families() {
        let ts: Vec<Vec<Point>> = curves.iter().map(two_torsion_points).collect();
        let models: Vec<Vec<TwoTorsionModel>> = curves
            .iter()
            .zip(&ts)
            .map(|(e, ps)| {
                ps.iter()
                    .filter_map(|p| two_torsion_model(e, p).ok())
                    .collect()
            })
            .collect();
        let isogenies: Vec<TwoIsogeny> = models
            .iter()
            .flatten()
            .filter_map(|m| TwoIsogeny::from_reduced(m.reduced()).ok())
            .collect();
        let tors: Vec<_> = curves.iter().map(torsion).collect();
        let mut g = c.benchmark_group(format!("curve/family/{name}"));
        g.sample_size(10);
        g.bench_function("curve_new", |b| {
            b.iter(|| {
                for e in &curves {
                    black_box(Curve::new(e.coefficients().clone()).ok());
                }
            })
        });
        g.bench_function("two_torsion_points", |b| {
            b.iter(|| {
                for e in &curves {
                    black_box(two_torsion_points(e));
                }
            })
        });
        g.bench_function("torsion_subgroup_of_e", |b| {
            b.iter(|| {
                for e in &curves {
                    black_box(torsion(e));
                }
            })
        });
        g.bench_function("two_torsion_model_all_points", |b| {
            b.iter(|| {
                for (e, ps) in curves.iter().zip(&ts) {
                    for p in ps {
                        black_box(two_torsion_model(e, p).ok());
                    }
                }
            })
        });
        g.bench_function("isogeny_from_model", |b| {
            b.iter(|| {
                for m in models.iter().flatten() {
                    black_box(TwoIsogeny::from_reduced(m.reduced()).ok());
                }
            })
        });
        g.bench_function("torsion_subgroup_of_codomains", |b| {
            b.iter(|| {
                for i in &isogenies {
                    black_box(torsion(i.codomain()));
                }
            })
        });
        g.bench_function("contains_torsion_points", |b| {
            b.iter(|| {
                for (e, t) in curves.iter().zip(&tors) {
                    for p in t.points() {
                        black_box(e.contains(p));
                    }
                }
            })
        });
        g.bench_function("model_change_there_and_back", |b| {
            b.iter(|| {
                for (ms, t) in models.iter().zip(&tors) {
                    for m in ms {
                        for p in t.points() {
                            black_box(m.change().to_old(&m.change().to_new(p)));
                        }
                    }
                }
            })
        });
        let codomain_torsion: Vec<Vec<Point>> = isogenies
            .iter()
            .map(|i| torsion(i.codomain()).points().to_vec())
            .collect();
        g.bench_function("dual_image_of_codomain_torsion", |b| {
            b.iter(|| {
                for (i, pts) in isogenies.iter().zip(&codomain_torsion) {
                    for q in pts {
                        black_box(i.dual_image(q));
                    }
                }
            })
        });
        g.bench_function("tate_data", |b| {
            b.iter(|| {
                for e in &curves {
                    black_box(e.tate_data(&mut Budget::unlimited()).ok());
                }
            })
        });
        let opts = DescentOptions::default().local_conditions_only();
        g.bench_function("descend_local_only", |b| {
            b.iter(|| {
                for e in &curves {
                    black_box(descend(e, &opts).ok());
                }
            })
        });
        g.finish();
    }
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(20).measurement_time(std::time::Duration::from_secs(2)).warm_up_time(std::time::Duration::from_millis(500));
    targets = bench, bench_families
}
criterion_main!(benches);
