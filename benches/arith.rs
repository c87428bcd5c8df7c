//! Factorisation of numbers built from two primes of 10, 15 and 20 digits.
//!
//! The fixed list was made once with sympy 1.14.0:
//! `rng = random.Random(7); p = sympy.nextprime(rng.randrange(10**(d-1), 10**d))`,
//! three products `p·q` for each of d = 10, 15, 20 (in that order). The same
//! numbers are timed against python-flint by scripts/factor_side_by_side.py;
//! results are in docs/performance.md ("Arithmetic layer").
//!
//! Group `factor_sizes`: one product `p·q` of two random primes of `d` digits for each
//! d = 8, …, 22 (sympy 1.14.0: `rng = random.Random(7)`, then for each d in turn
//! `p = sympy.nextprime(rng.randrange(10**(d-1), 10**d))` and the same for q). The same
//! numbers are in scripts/factor_side_by_side.py.
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

/// (digits of each prime, p·q).
const SIZES: [(u32, &str); 15] = [
    (8, "1617112384513319"),
    (9, "418593139362162697"),
    (10, "6881212980518412671"),
    (11, "1387963942594134081079"),
    (12, "80551254091020886344251"),
    (13, "5786066816834635098394559"),
    (14, "1912614221021085043121289191"),
    (15, "283334206502604836738363188807"),
    (16, "59106137351597839651530909133361"),
    (17, "1122591703439096732752496344774529"),
    (18, "115553126415904632093306783016014461"),
    (19, "8022874210350435847575463436375479729"),
    (20, "3447453260913698249602873997444564308381"),
    (21, "571966649857784659082929989519912463753813"),
    (22, "17778604110573035003702769146759503953219199"),
];

fn bench_sizes(c: &mut Criterion) {
    let mut group = c.benchmark_group("factor_sizes");
    group.sample_size(10);
    group.warm_up_time(std::time::Duration::from_millis(500));
    group.measurement_time(std::time::Duration::from_secs(2));
    for (digits, s) in SIZES {
        let n: BigInt = s.parse().expect("decimal literal");
        group.bench_function(format!("d{digits:02}"), |b| {
            b.iter(|| factor(black_box(&n), &mut Budget::unlimited()).expect("factors"))
        });
    }
    group.finish();
}

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

criterion_group!(benches, bench_sizes, bench_factor);
criterion_main!(benches);
