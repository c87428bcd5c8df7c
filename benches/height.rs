//! Criterion benchmarks for the heights layer: ĥ of a point with about
//! 100-digit coordinates (with a prepared context, and one-shot), the
//! exact multiple that produces it, and saturation of index-n sublattices
//! on the rank 1, 2, 3 curves y² + y = x³ − x, y² + y = x³ + x² − 2x, y² + y = x³ − 7x + 6.
//!
//! Run: `cargo bench --bench height`.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use isodescent::curve::{Curve, Point};
use isodescent::height::{canonical_height, saturate, HeightContext, SaturationOptions};
use isodescent::Budget;
use num_bigint::BigInt;

fn pts(v: &[(i64, i64)]) -> Vec<Point> {
    v.iter().map(|&(x, y)| Point::from_ints(x, y)).collect()
}

/// y² + y = x³ − 7x + 6 and a multiple of (0,2)+(1,0)+(2,0) whose x has a ≥ 100-digit
/// denominator.
fn big_point() -> (Curve, HeightContext, Point, Point, i64) {
    let e = Curve::from_ints([0, 0, 1, -7, 6]).unwrap();
    let ctx = HeightContext::new(&e, &mut Budget::unlimited()).unwrap();
    let p = ctx
        .combination(
            &pts(&[(0, 2), (1, 0), (2, 0)]),
            &[1.into(), 1.into(), 1.into()],
        )
        .unwrap();
    let (n, big) = (2i64..)
        .map(|n| (n, ctx.multiple(&p, &BigInt::from(n)).unwrap()))
        .find(|(_, q)| q.x().unwrap().denom().to_string().len() >= 100)
        .unwrap();
    (e, ctx, p, big, n)
}

fn heights(c: &mut Criterion) {
    let (e, ctx, p, big, n) = big_point();
    let mut g = c.benchmark_group("height");
    g.bench_function("hundred_digit_point_prepared_context", |b| {
        b.iter(|| ctx.height(black_box(&big)).unwrap())
    });
    g.bench_function("hundred_digit_point_one_shot", |b| {
        b.iter(|| canonical_height(black_box(&e), black_box(&big)).unwrap())
    });
    g.bench_function("multiple_to_hundred_digits", |b| {
        b.iter(|| ctx.multiple(black_box(&p), &BigInt::from(n)).unwrap())
    });
    g.bench_function("context_rank3", |b| {
        b.iter(|| HeightContext::new(black_box(&e), &mut Budget::unlimited()).unwrap())
    });
    g.finish();
}

fn saturation(c: &mut Criterion) {
    type Case = (
        &'static str,
        [i64; 5],
        &'static [(i64, i64)],
        &'static [&'static [i64]],
    );
    let cases: &[Case] = &[
        ("rank1_three_p", [0, 0, 1, -1, 0], &[(0, 0)], &[&[3]]),
        (
            "rank2_index_6",
            [0, 1, 1, -2, 0],
            &[(-1, 1), (0, 0)],
            &[&[2, 0], &[0, 3]],
        ),
        (
            "rank3_index_6",
            [0, 0, 1, -7, 6],
            &[(0, 2), (1, 0), (2, 0)],
            &[&[1, 2, 0], &[0, 3, 0], &[0, 1, 2]],
        ),
        (
            "rank3_saturated",
            [0, 0, 1, -7, 6],
            &[(0, 2), (1, 0), (2, 0)],
            &[&[1, 0, 0], &[0, 1, 0], &[0, 0, 1]],
        ),
    ];
    let mut g = c.benchmark_group("saturate");
    for (name, a, gens, m) in cases {
        let e = Curve::from_ints(*a).unwrap();
        let ctx = HeightContext::new(&e, &mut Budget::unlimited()).unwrap();
        let gens = pts(gens);
        let sub: Vec<Point> = m
            .iter()
            .map(|row| {
                let c: Vec<BigInt> = row.iter().map(|&v| BigInt::from(v)).collect();
                ctx.combination(&gens, &c).unwrap()
            })
            .collect();
        let o = SaturationOptions::default();
        g.bench_function(*name, |b| {
            b.iter(|| {
                saturate(black_box(&e), black_box(&sub), &o, &mut Budget::unlimited()).unwrap()
            })
        });
    }
    g.finish();
}

criterion_group!(benches, heights, saturation);
criterion_main!(benches);
