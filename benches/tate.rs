//! Criterion benchmarks for Tate's algorithm on models with coefficients
//! of 30 to 70 digits, at fixed primes (so that factoring is not
//! measured), and the global minimal model of such a model whose
//! discriminant has only small prime factors.
//!
//! Run: `cargo bench --bench tate`.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use isodescent::curve::{global_local_data, local_reduction};
use isodescent::local::Prime;
use isodescent::Budget;
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::One;

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

fn q(n: &BigInt) -> BigRational {
    BigRational::from_integer(n.clone())
}

/// `[u, r, s, t]` applied to a model [Silverman, AEC, III.1, Table 3.1].
fn transform(a: &[BigRational; 5], ch: &[BigRational; 4]) -> [BigRational; 5] {
    let [a1, a2, a3, a4, a6] = a;
    let [u, r, s, t] = ch;
    let two = q(&2.into());
    let three = q(&3.into());
    let n1 = (a1 + &two * s) / u;
    let n2 = (a2 - s * a1 + &three * r - s * s) / (u * u);
    let n3 = (a3 + r * a1 + &two * t) / (u * u * u);
    let n4 = (a4 - s * a3 + &two * r * a2 - (t + r * s) * a1 + &three * r * r - &two * s * t)
        / (u * u * u * u);
    let n6 = (a6 + r * a4 + r * r * a2 + r * r * r - t * a3 - t * t - r * t * a1)
        / (u * u * u * u * u * u);
    [n1, n2, n3, n4, n6]
}

/// A small model moved by `u = 1/k` and shifts of 16/25/25 digits, giving
/// an integral, non-minimal model (coefficients of about 29, 56, 35, 62, 68
/// digits for k = 6⁴).
fn disguised(base: [i64; 5], k: i64) -> [BigInt; 5] {
    let a = base.map(|c| q(&c.into()));
    let ch = [
        BigRational::new(BigInt::one(), k.into()),
        q(&digits(16, 7)),
        q(&digits(25, 8)),
        q(&digits(25, 9)),
    ];
    transform(&a, &ch).map(|x| x.to_integer())
}

fn bench_tate(c: &mut Criterion) {
    let mut g = c.benchmark_group("tate");

    // Random 50-digit coefficients at 2, 3, 5: typically good or
    // multiplicative (one pass, steps 1-2).
    let random: [BigInt; 5] = std::array::from_fn(|i| digits(50, 100 + i as u64));
    for p in [2u64, 3, 5] {
        let pr = Prime::small(p).unwrap_or_else(|_| Prime::two());
        g.bench_function(format!("random_50_digit_model_at_{p}"), |b| {
            b.iter(|| local_reduction(black_box(&random), &pr))
        });
    }

    // y² = x³ − x (type III at 2) and y² = x³ + 1 (IV at 2, III at 3)
    // disguised by u = 1/6⁴: four extra passes at 2 and at 3.
    let iii = disguised([0, 0, 0, -1, 0], 1296);
    let iv = disguised([0, 0, 0, 0, 1], 1296);
    let two = Prime::two();
    let three = Prime::small(3).unwrap_or_else(|_| Prime::two());
    g.bench_function("non_minimal_50_digit_type_iii_at_2", |b| {
        b.iter(|| local_reduction(black_box(&iii), &two))
    });
    g.bench_function("non_minimal_50_digit_type_iii_at_3", |b| {
        b.iter(|| local_reduction(black_box(&iv), &three))
    });

    // Type I0* at a 17-digit prime p: y² = x³ − 7p²x + 6p³ (coefficients
    // of 33 and 49 digits); the cubic T³ − 7T + 6 is counted by the gcd
    // with T^p − T.
    let p17: BigInt = "10000000000000061".parse().unwrap_or_default();
    if let Ok(pr) = Prime::new(p17.clone()) {
        let a = [
            BigInt::from(0),
            BigInt::from(0),
            BigInt::from(0),
            BigInt::from(-7) * &p17 * &p17,
            BigInt::from(6) * &p17 * &p17 * &p17,
        ];
        g.bench_function("type_i0_star_at_a_17_digit_prime", |b| {
            b.iter(|| local_reduction(black_box(&a), &pr))
        });
    }

    // The global minimal model of y² + y = x³ − x² − 10x − 20 disguised by
    // u = 1/(2³·3²·5) and 16/25/25-digit shifts (28 to 65 digits): Δ = −11⁵·2³⁶·3²⁴·5¹²,
    // so factoring is trivial and four runs of Tate's algorithm dominate.
    let glob = disguised([0, -1, 1, -10, -20], 360).map(|x| q(&x));
    g.bench_function("global_data_of_a_disguised_50_digit_model", |b| {
        b.iter(|| global_local_data(black_box(&glob), &mut Budget::unlimited()))
    });
    g.finish();
}

criterion_group!(benches, bench_tate);
criterion_main!(benches);
