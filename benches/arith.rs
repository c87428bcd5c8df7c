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
//! Group `printing`: decimal strings of certified numbers (issue 25).
//!
//! Run: `cargo bench --bench arith`.
//!
//! CPU-time mode (less sensitive than wall-clock medians to other jobs on a shared
//! machine): `FACTOR_CPU_SECS=1.5 cargo bench --bench arith` calls `factor` on each number
//! of group `factor_sizes` repeatedly for that many seconds of process CPU time (user +
//! system, from /proc/self/stat, Linux only) and prints the mean CPU time per call instead
//! of running criterion; `scripts/factor_side_by_side.py --cpu` reads that output and
//! times python-flint the same way. `FACTOR_ONLY=8,9` restricts that table to some sizes;
//! `FACTOR_RANDOM_SECS=0.3` adds the sixty products of `RANDOM_SMALL` (8, 9, 10 digits),
//! each timed for that many CPU seconds.

use criterion::{black_box, criterion_group, Criterion};
use isodescent::arith::{factor, Certified};
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

/// Twenty products `p·q` of two random primes of `d` digits for d = 8, 9, 10 (sympy 1.14.0:
/// `rng = random.Random(99)`, then for d = 8, 9, 10 in turn, twenty times,
/// `p = sympy.nextprime(rng.randrange(10**(d-1), 10**d))` and the same for q). The same
/// numbers are in scripts/factor_side_by_side.py; the first four of each size, with their
/// factors, are in tests/factor_sizes.rs.
const RANDOM_SMALL: [(u32, [&str; 20]); 3] = [
    (
        8,
        [
            "3924146792516243",
            "3333612690708403",
            "1390717972380949",
            "1208591874089917",
            "945003346537753",
            "4989587991669037",
            "1815202498752761",
            "7093334036969441",
            "2448715862826427",
            "8212760321591093",
            "2352649843093573",
            "2392600744862203",
            "2189703335150021",
            "3356915797691041",
            "4775748161661937",
            "1711192252943513",
            "1589266333577641",
            "3359726082167149",
            "725818674774881",
            "935688169246379",
        ],
    ),
    (
        9,
        [
            "177426454207736369",
            "329623373649364229",
            "111348715947414199",
            "205404362599075421",
            "447711410589554327",
            "75052263430052429",
            "79173621877086313",
            "236645458872292583",
            "857707692808824941",
            "424584911464823267",
            "186151069355298139",
            "233801089328447603",
            "30459808557936943",
            "35482698338340481",
            "507801812636096201",
            "538985725215428663",
            "104200779802504031",
            "149777100076381529",
            "109655869132926811",
            "80934909190192391",
        ],
    ),
    (
        10,
        [
            "18998725169633558989",
            "19437965655894854933",
            "54972844699175988323",
            "7237127992559856883",
            "14325130763627602159",
            "3429227387587624507",
            "14510955564747208051",
            "10466854515272725781",
            "9992824970830911617",
            "71780013635657658349",
            "11207355425534828849",
            "60733640652294213139",
            "61111208799570603599",
            "29577943796146494169",
            "54075234115210907857",
            "19695927943473611471",
            "28160606081358382757",
            "46510457332941745499",
            "90914578340181512911",
            "59836576158114804011",
        ],
    ),
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

/// Process CPU time (user + system) in seconds, from /proc/self/stat.
fn cpu_seconds() -> Option<f64> {
    let stat = std::fs::read_to_string("/proc/self/stat").ok()?;
    let rest = &stat[stat.rfind(')')? + 2..];
    let fields: Vec<&str> = rest.split_whitespace().collect();
    let ticks: f64 = fields.get(11)?.parse::<f64>().ok()? + fields.get(12)?.parse::<f64>().ok()?;
    Some(ticks / 100.0) // USER_HZ = 100 on Linux
}

/// Mean CPU milliseconds per `factor(n)` call over at least `secs` seconds of process CPU
/// time, and the number of calls; `None` without /proc/self/stat.
fn cpu_per_call(n: &BigInt, secs: f64) -> Option<(f64, u64)> {
    let start = cpu_seconds()?;
    let mut calls = 0u64;
    let mut now = start;
    while now - start < secs {
        for _ in 0..4 {
            black_box(factor(black_box(n), &mut Budget::unlimited()).expect("factors"));
        }
        calls += 4;
        now = cpu_seconds().unwrap_or(f64::INFINITY);
    }
    Some(((now - start) * 1e3 / calls as f64, calls))
}

/// The CPU-time mode described in the module documentation. `FACTOR_ONLY=d1,d2,…` keeps
/// only those sizes of group `factor_sizes`; `FACTOR_RANDOM_SECS=s` then times each number
/// of [`RANDOM_SMALL`] for `s` seconds (lines `rDD n ms calls`).
fn cpu_table(secs: f64) {
    let only: Option<Vec<u32>> = std::env::var("FACTOR_ONLY")
        .ok()
        .map(|s| s.split(',').filter_map(|t| t.trim().parse().ok()).collect());
    println!("digits n cpu_ms_per_call calls");
    for (digits, s) in SIZES {
        if only.as_ref().is_some_and(|o| !o.contains(&digits)) {
            continue;
        }
        let n: BigInt = s.parse().expect("decimal literal");
        let Some((ms, calls)) = cpu_per_call(&n, secs) else {
            println!("no /proc/self/stat: CPU-time mode needs Linux");
            return;
        };
        println!("{digits:02} {s} {ms:.4} {calls}");
    }
    let Some(rsecs) = std::env::var("FACTOR_RANDOM_SECS")
        .ok()
        .and_then(|s| s.parse::<f64>().ok())
    else {
        return;
    };
    for (digits, list) in RANDOM_SMALL {
        for s in list {
            let n: BigInt = s.parse().expect("decimal literal");
            if let Some((ms, calls)) = cpu_per_call(&n, rsecs) {
                println!("r{digits:02} {s} {ms:.4} {calls}");
            }
        }
    }
}

/// Issue 25: printing certified numbers (`Display for Certified`, the
/// strings of `arith::decimal::enclose` that every report uses), 1 000
/// values `m·10^s ± e` with errors from 10⁻¹⁶ to 10⁻⁴ (a fixed xorshift
/// sequence), the shapes of L-values, periods, heights and regulators.
fn bench_printing(c: &mut Criterion) {
    let mut state = 0x9e37_79b9_7f4a_7c15u64;
    let mut next = || {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        (state >> 11) as f64 / (1u64 << 53) as f64
    };
    let numbers: Vec<Certified> = (0..1000)
        .map(|i| {
            let value = (next() * 200.0 - 100.0) * 10f64.powi(i % 5 - 2);
            let error = next() * 10f64.powi(-4 - (i % 13));
            Certified::new(value, error).unwrap_or_else(|_| unreachable!())
        })
        .collect();
    let mut g = c.benchmark_group("printing");
    g.sample_size(20);
    g.bench_function("1000 certified numbers to decimal strings", |b| {
        b.iter(|| {
            let mut len = 0;
            for x in &numbers {
                len += x.to_string().len();
            }
            black_box(len)
        })
    });
    g.finish();
}

criterion_group!(benches, bench_sizes, bench_factor, bench_printing);

fn main() {
    if let Some(secs) = std::env::var("FACTOR_CPU_SECS")
        .ok()
        .and_then(|s| s.parse::<f64>().ok())
    {
        cpu_table(secs);
        return;
    }
    benches();
    Criterion::default().configure_from_args().final_summary();
}
