//! Criterion benchmarks for the second descent (src/second/covering.rs).
//!
//! * `second_descent/lind_reichardt`: y² = x³ − 68x, class d = 2, whose
//!   space is 2Y² = 1 − 17X⁴; every twist is obstructed (`NoPoint`).
//! * `second_descent/congruent_53`: y² = x³ + 4·53²x, class 53, left
//!   undecided by the first descent at height 128; a covering gives the point.
//! * `second_descent/congruent_142`: y² = x³ − 142²x, class 2; the point on
//!   C_2 has height 8183, the covering finds it at small height.
//! * `second_descent/verify_lind_reichardt`: re-checking the `NoPoint`
//!   evidence of the first case.
//! * `lifting_pairing/lind_reichardt`: the pairing and its kernel on the
//!   Selmer group of y² = x³ − 68x (src/second/pairing.rs).
//! * `stress/k_prime/k`: the whole descent under the defaults on
//!   y² = x(x − n)(x − 2n), n the product of the first k odd primes,
//!   k = 8 … 30 (target: each under 2 s, docs/performance.md).
//! * `stress/b_497668710` and `stress/twist_10`: y² = x³ − x² − 497668710x
//!   and the k = 10 twist y² = x³ + dx² − d²x,
//!   d = 44792726118713000380412228089361.

use criterion::{criterion_group, criterion_main, Criterion};
use isodescent::curve::{Curve, Point};
use isodescent::descent::{descend, descend_isogeny, DescentOptions};
use isodescent::second::lift_pairing;
use isodescent::second::{
    second_descent, verify_obstruction, SecondDescentOptions, SecondDescentOutcome,
};
use isodescent::Budget;
use num_bigint::BigInt;

/// The checked model y² = x³ + ax² + bx of a test curve (non-singular by choice).
fn rm(a: &num_bigint::BigInt, b: &num_bigint::BigInt) -> isodescent::curve::ReducedModel {
    isodescent::curve::ReducedModel::new(a.clone(), b.clone()).expect("a non-singular test curve")
}

fn run(a: i64, b: i64, d: i64) -> SecondDescentOutcome {
    second_descent(
        &rm(&BigInt::from(a), &BigInt::from(b)),
        &BigInt::from(d),
        &SecondDescentOptions::default(),
        &mut Budget::unlimited(),
    )
    .expect("valid input")
}

fn bench(c: &mut Criterion) {
    let mut g = c.benchmark_group("second_descent");
    g.bench_function("lind_reichardt", |bch| bch.iter(|| run(0, -68, 2)));
    g.bench_function("congruent_53", |bch| bch.iter(|| run(0, 4 * 53 * 53, 53)));
    g.bench_function("congruent_142", |bch| bch.iter(|| run(0, -142 * 142, 2)));
    let SecondDescentOutcome::NoPoint(ev) = run(0, -68, 2) else {
        panic!("expected NoPoint");
    };
    let (a, b, d) = (BigInt::from(0), BigInt::from(-68), BigInt::from(2));
    g.bench_function("verify_lind_reichardt", |bch| {
        bch.iter(|| verify_obstruction(&rm(&a, &b), &d, &ev, &mut Budget::unlimited()))
    });
    g.finish();

    let mut g = c.benchmark_group("lifting_pairing");
    let lind = Curve::from_ints([0, 0, 0, -68, 0]).unwrap();
    let descent = descend_isogeny(
        &lind,
        &Point::from_ints(0, 0),
        &DescentOptions::default().local_conditions_only(),
    )
    .unwrap();
    let side = descent.domain();
    g.bench_function("lind_reichardt", |bch| {
        bch.iter(|| {
            lift_pairing(
                &side.model,
                &side.qs2,
                &side.group,
                &side.known,
                &mut Budget::unlimited(),
            )
            .unwrap()
        })
    });
    g.finish();

    let mut g = c.benchmark_group("stress");
    g.sample_size(10);
    let odd = [
        3u64, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53, 59, 61, 67, 71, 73, 79, 83, 89,
        97, 101, 103, 107, 109, 113, 127,
    ];
    for k in 8..=30usize {
        let n: BigInt = odd[..k].iter().map(|&p| BigInt::from(p)).product();
        let curve = Curve::from_bigints([
            0.into(),
            -(BigInt::from(3) * &n),
            0.into(),
            BigInt::from(2) * &n * &n,
            0.into(),
        ])
        .unwrap();
        g.bench_function(format!("k_prime/{k}"), |bch| {
            bch.iter(|| descend(&curve, &DescentOptions::default()).unwrap())
        });
    }
    let b497 = Curve::from_ints([0, -1, 0, -497668710, 0]).unwrap();
    g.bench_function("b_497668710", |bch| {
        bch.iter(|| descend(&b497, &DescentOptions::default()).unwrap())
    });
    let d: BigInt = "44792726118713000380412228089361".parse().unwrap();
    let twist = Curve::from_bigints([0.into(), d.clone(), 0.into(), -(&d * &d), 0.into()]).unwrap();
    g.bench_function("twist_10", |bch| {
        bch.iter(|| descend(&twist, &DescentOptions::default()).unwrap())
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
