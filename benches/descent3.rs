//! Criterion benchmarks of the descent via 3-isogeny on the cube-sum
//! curves Y² = X³ − 432n² (x³ + y³ = n).
//!
//! * `descent3/selmer_stage/cube_free_n_le_300`: both Selmer groups (local
//!   tests at every prime of S, factoring of k included), no point search,
//!   no Tamagawa check, no analytic side; one iteration runs all cube-free
//!   n in 2..=300 (253 curves).
//! * `descent3/selmer_stage/cube_free_n_9701_to_10000`: the same stage on
//!   the cube-free n in 9701..=10000 (250 curves), the top of the issue's
//!   range.
//! * `descent3/with_search/cube_free_n_le_100`: the same plus the point
//!   search at the default height and the Tamagawa check (Tate's algorithm
//!   on both curves); one iteration runs all cube-free n in 2..=100.
//! * `descent3/selmer_stage/mordell_k_le_300`: the Selmer stage on the
//!   Mordell curves y² = x³ + k, 0 < |k| ≤ 300 (600 curves, most over
//!   quadratic fields with class groups and units).
//! * `descent3/isogeny3_detection/flex_family_moved`: the rational
//!   3-isogenies of the 587 curves y² = x³ + D(αx + β)² (D square-free,
//!   |D| ≤ 7, 1 ≤ α ≤ 7, 1 ≤ β ≤ 7), each given on a moved model
//!   (x ↦ x + 2, y ↦ y + x + 1): roots of ψ₃, Vélu's maps and dual with
//!   their exact checks, the model y² = x³ + D(αx + β)² and that of the
//!   isogenous curve (`curve::rational_3_isogenies`).
//! * `descent3/general_selmer_stage/flex_d_le_7_ab_le_3`: the Selmer stage
//!   of `descend_3isogeny_general` (detection, models, both Selmer groups
//!   from the plane cubics; no point search, no Tamagawa check, no
//!   analytic side) on the 101 curves y² = x³ + D(αx + β)² with α ≠ 0,
//!   D square-free, |D| ≤ 7, 1 ≤ α, β ≤ 3, that have no point of order 2
//!   and j ≠ 0.

use criterion::{criterion_group, criterion_main, Criterion};
use isodescent::curve::{rational_3_isogenies, ModelChange};
use isodescent::descent3::{descend_3isogeny, descend_3isogeny_general, Isogeny3Options};
use isodescent::{descend, DescentOptions, Error};
use isodescent::{Budget, Curve};
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::Zero;

fn cube_free(n: i64) -> bool {
    (2..)
        .take_while(|d| d * d * d <= n)
        .all(|d| n % (d * d * d) != 0)
}

fn curves(limit: i64) -> Vec<Curve> {
    curves_in(2, limit)
}

fn curves_in(from: i64, limit: i64) -> Vec<Curve> {
    (from..=limit)
        .filter(|&n| cube_free(n))
        .map(|n| {
            format!("0 0 0 0 {}", -432 * n * n)
                .parse()
                .expect("a cube-sum curve")
        })
        .collect()
}

fn bench(c: &mut Criterion) {
    let mut g = c.benchmark_group("descent3");
    g.sample_size(10);
    let selmer_only = {
        let mut o = Isogeny3Options::default();
        o.search_height = 0;
        o.tamagawa_check = false;
        o.analytic = None;
        o
    };
    let set = curves(300);
    g.bench_function("selmer_stage/cube_free_n_le_300", |b| {
        b.iter(|| {
            for e in &set {
                let r = descend_3isogeny(e, &selmer_only).expect("descent");
                criterion::black_box(r.rank_upper);
            }
        })
    });
    let high = curves_in(9701, 10_000);
    g.bench_function("selmer_stage/cube_free_n_9701_to_10000", |b| {
        b.iter(|| {
            for e in &high {
                let r = descend_3isogeny(e, &selmer_only).expect("descent");
                criterion::black_box(r.rank_upper);
            }
        })
    });
    let mordell: Vec<Curve> = (-300i64..=300)
        .filter(|&k| k != 0)
        .map(|k| format!("0 0 0 0 {k}").parse().expect("curve"))
        .collect();
    g.bench_function("selmer_stage/mordell_k_le_300", |b| {
        b.iter(|| {
            for e in &mordell {
                let r = descend_3isogeny(e, &selmer_only).expect("descent");
                criterion::black_box(r.rank_upper);
            }
        })
    });
    let full = {
        let mut o = Isogeny3Options::default();
        o.analytic = None;
        o
    };
    let small = curves(100);
    g.bench_function("with_search/cube_free_n_le_100", |b| {
        b.iter(|| {
            for e in &small {
                let r = descend_3isogeny(e, &full).expect("descent");
                criterion::black_box(r.rank_lower);
            }
        })
    });
    let q = |n: i64| BigRational::from_integer(BigInt::from(n));
    let moved = ModelChange::new(q(1), q(2), q(1), q(1)).expect("a change of model");
    let flex: Vec<Curve> = [-7i64, -6, -5, -3, -2, -1, 1, 2, 3, 5, 6, 7]
        .iter()
        .flat_map(|&d| (1i64..=7).flat_map(move |a| (1i64..=7).map(move |b| (d, a, b))))
        .filter_map(|(d, a, b)| Curve::from_ints([0, d * a * a, 0, 2 * d * a * b, d * b * b]).ok())
        .map(|e| moved.apply_to_curve(&e))
        .collect();
    g.bench_function("isogeny3_detection/flex_family_moved", |b| {
        b.iter(|| {
            for e in &flex {
                let v = rational_3_isogenies(e, &mut Budget::unlimited()).expect("detection");
                criterion::black_box(v.len());
            }
        })
    });
    let general: Vec<Curve> = [-7i64, -6, -5, -3, -2, -1, 1, 2, 3, 5, 6, 7]
        .iter()
        .flat_map(|&d| (1i64..=3).flat_map(move |a| (1i64..=3).map(move |b| (d, a, b))))
        .filter_map(|(d, a, b)| Curve::from_ints([0, d * a * a, 0, 2 * d * a * b, d * b * b]).ok())
        .filter(|e| !e.j_invariant().is_zero())
        .filter(|e| {
            matches!(
                descend(e, &DescentOptions::default()),
                Err(Error::NoTwoTorsion)
            )
        })
        .collect();
    assert_eq!(general.len(), 101);
    g.bench_function("general_selmer_stage/flex_d_le_7_ab_le_3", |b| {
        b.iter(|| {
            for e in &general {
                let r = descend_3isogeny_general(e, &selmer_only).expect("descent");
                criterion::black_box(r.rank_upper);
            }
        })
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
