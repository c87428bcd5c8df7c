//! Criterion benchmarks for the second descent (src/quartic/covering.rs).
//!
//! * `second_descent/lind_reichardt`: y² = x³ − 68x, class d = 2, whose
//!   space is 2Y² = 1 − 17X⁴; every twist is obstructed (`NoPoint`).
//! * `second_descent/congruent_53`: y² = x³ + 4·53²x, class 53, left
//!   undecided by the first descent at height 128; a covering gives the point.
//! * `second_descent/congruent_142`: y² = x³ − 142²x, class 2; the point on
//!   C_2 has height 8183, the covering finds it at small height.
//! * `second_descent/verify_lind_reichardt`: re-checking the `NoPoint`
//!   evidence of the first case.

use criterion::{criterion_group, criterion_main, Criterion};
use isodescent::quartic::{
    second_descent, verify_obstruction, SecondDescentOptions, SecondDescentOutcome,
};
use isodescent::Budget;
use num_bigint::BigInt;

fn run(a: i64, b: i64, d: i64) -> SecondDescentOutcome {
    second_descent(
        &BigInt::from(a),
        &BigInt::from(b),
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
        bch.iter(|| verify_obstruction(&a, &b, &d, &ev, &mut Budget::unlimited()))
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
