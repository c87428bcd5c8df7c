//! Factorisation of numbers built from two primes of 10, 15 and 20 digits.
//!
//! The fixed list was made once with sympy 1.14.0:
//! `rng = random.Random(7); p = sympy.nextprime(rng.randrange(10**(d-1), 10**d))`,
//! three products `p·q` for each of d = 10, 15, 20 (in that order). The same
//! numbers are timed against python-flint by scripts/factor_side_by_side.py;
//! results are in docs/performance.md ("Arithmetic layer").
//!
//! Run: `cargo bench --bench arith`.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use isodescent::arith::factor;
use isodescent::Budget;
use num_bigint::BigInt;

/// (digits of each prime, the three products).
const NUMBERS: [(u32, [&str; 3]); 3] = [
    (
        10,
        [
            "22557563476733397557",
            "10497159103228211209",
            "8310118173378612839",
        ],
    ),
    (
        15,
        [
            "267248347801212327008981166599",
            "122690208393211359883019535107",
            "612697093380257235542637128011",
        ],
    ),
    (
        20,
        [
            "1470739766636828256728566343556768576353",
            "623422361556630915541682356015766385943",
            "3109898323645415535574981604728249868779",
        ],
    ),
];

fn bench_factor(c: &mut Criterion) {
    let mut group = c.benchmark_group("factor");
    group.sample_size(10);
    for (digits, list) in NUMBERS {
        for (i, s) in list.iter().enumerate() {
            let n: BigInt = s.parse().expect("decimal literal");
            group.bench_function(format!("p{digits}*q{digits} #{i}"), |b| {
                b.iter(|| factor(black_box(&n), &mut Budget::unlimited()).expect("factors"))
            });
        }
    }
    group.finish();
}

criterion_group!(benches, bench_factor);
criterion_main!(benches);
