//! Throughput of the sieved quartic point search against a naive loop.
//!
//! Run: `cargo bench --bench quartic_search`. The quartic is the
//! Lind–Reichardt one, `y² = −34x⁴ + 2z⁴` (the integral model of
//! `2Y² = Z⁴ − 17X⁴`), which is soluble everywhere locally and has no
//! rational point, so every search runs to the full height and no local
//! obstruction helps the sieve. Throughput is reported per coprime pair
//! (normalised pairs of height ≤ H with gcd(x, z) = 1, about 1.2·H²).

use criterion::{black_box, criterion_group, criterion_main, Criterion, Throughput};
use isodescent::quartic::{search, SearchOptions, SearchOutcome};
use isodescent::Budget;
use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::Signed;

const LIND_REICHARDT: [i64; 5] = [-34, 0, 0, 0, 2];

/// The number of normalised coprime pairs of height ≤ h.
fn coprime_pairs(h: i64) -> u64 {
    let mut n = 0u64;
    for z in 0..=h {
        for x in -h..=h {
            if x.gcd(&z) == 1 && (z != 0 || x == 1) {
                n += 1;
            }
        }
    }
    n
}

fn isqrt_u128(n: u128) -> u128 {
    let mut r = (n as f64).sqrt() as u128;
    while r * r > n {
        r -= 1;
    }
    while (r + 1) * (r + 1) <= n {
        r += 1;
    }
    r
}

/// The naive loop with machine arithmetic: every coprime pair, g(x, z) by
/// Horner in i128, then an integer square root. Returns the number of points.
fn naive_i128(c: &[i64; 5], h: i64) -> u64 {
    let mut found = 0;
    for z in 0..=h {
        for x in -h..=h {
            if x.gcd(&z) != 1 || (z == 0 && x != 1) {
                continue;
            }
            let (xx, zz) = (x as i128, z as i128);
            let mut v = c[0] as i128;
            let mut zp = 1i128;
            for &ci in &c[1..] {
                zp *= zz;
                v = v * xx + ci as i128 * zp;
            }
            if v >= 0 {
                let r = isqrt_u128(v as u128);
                if r * r == v as u128 {
                    found += 1;
                }
            }
        }
    }
    found
}

/// The naive loop in BigInt arithmetic throughout.
fn naive_bigint(c: &[BigInt; 5], h: i64) -> u64 {
    let mut found = 0;
    for z in 0..=h {
        for x in -h..=h {
            if x.gcd(&z) != 1 || (z == 0 && x != 1) {
                continue;
            }
            let (xx, zz) = (BigInt::from(x), BigInt::from(z));
            let mut v = c[0].clone();
            let mut zp = BigInt::from(1);
            for ci in &c[1..] {
                zp *= &zz;
                v = v * &xx + ci * &zp;
            }
            if !v.is_negative() {
                let r = v.sqrt();
                if &r * &r == v {
                    found += 1;
                }
            }
        }
    }
    found
}

fn bench(cr: &mut Criterion) {
    let g = LIND_REICHARDT.map(BigInt::from);

    let mut group = cr.benchmark_group("quartic_search");
    group.sample_size(10);
    for h in [1_000i64, 10_000] {
        let pairs = coprime_pairs(h);
        eprintln!("H = {h}: {pairs} coprime pairs");
        group.throughput(Throughput::Elements(pairs));
        group.bench_function(format!("sieve_lind_reichardt_H{h}"), |b| {
            b.iter(|| {
                let out = search(
                    black_box(&g),
                    &SearchOptions::up_to(h as u64),
                    &mut Budget::unlimited(),
                )
                .unwrap();
                assert_eq!(out, SearchOutcome::NoneUpTo { height: h as u64 });
            })
        });
    }
    let h = 1_000i64;
    group.throughput(Throughput::Elements(coprime_pairs(h)));
    group.bench_function(format!("naive_i128_lind_reichardt_H{h}"), |b| {
        b.iter(|| assert_eq!(naive_i128(black_box(&LIND_REICHARDT), h), 0))
    });
    let h = 300i64;
    group.throughput(Throughput::Elements(coprime_pairs(h)));
    group.bench_function(format!("naive_bigint_lind_reichardt_H{h}"), |b| {
        b.iter(|| assert_eq!(naive_bigint(black_box(&g), h), 0))
    });
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
