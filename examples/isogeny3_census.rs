//! The curves y² = x³ + D(αx + β)² with D square-free, 0 < |D| ≤ B,
//! 1 ≤ α, β ≤ A: how many have their 3-isogeny found with the same normal
//! form (D, α, β) on a moved model, how many have a point of order 2 (and
//! go through the 2-isogeny descent, with the rank decided or not), how
//! many have j = 0 (Dα³ = 6β; the α = 0 descent on y² = x³ + k applies),
//! how many get the typed error of the uncovered case α ≠ 0, and the time.
//!
//!     cargo run --release --example isogeny3_census -- 7 4

use std::time::Instant;

use isodescent::curve::{rational_3_isogenies, ModelChange};
use isodescent::descent3::{descend_by_isogeny, Isogeny3Options, IsogenyDescent};
use isodescent::{Budget, Curve, DescentOptions, Error};
use num_bigint::BigInt;
use num_rational::BigRational;

fn squarefree(d: i64) -> bool {
    (2..)
        .take_while(|p: &i64| p * p <= d.abs())
        .all(|p| d % (p * p) != 0)
}

fn main() {
    let args: Vec<i64> = std::env::args()
        .skip(1)
        .filter_map(|a| a.parse().ok())
        .collect();
    let bd = args.first().copied().unwrap_or(7);
    let ab = args.get(1).copied().unwrap_or(4);
    let q = |n: i64| BigRational::from_integer(BigInt::from(n));
    let moved = ModelChange::new(q(1), q(2), q(1), q(1)).expect("a change of model");
    let (mut total, mut found, mut two, mut two_decided, mut typed, mut other) = (0, 0, 0, 0, 0, 0);
    let (mut three, mut three_decided) = (0, 0);
    let (mut general, mut general_decided, mut cassels_fail, mut partial) = (0, 0, 0, 0);
    let mut slowest = (0.0f64, String::new());
    let mut detect_secs = 0.0;
    let start = Instant::now();
    for d in (-bd..=bd).filter(|&d| d != 0 && squarefree(d)) {
        for a in 1..=ab {
            for b in 1..=ab {
                let Ok(e) = Curve::from_ints([0, d * a * a, 0, 2 * d * a * b, d * b * b]) else {
                    continue;
                };
                let e = moved.apply_to_curve(&e);
                total += 1;
                let t = Instant::now();
                let isos = rational_3_isogenies(&e, &mut Budget::unlimited()).expect("detection");
                detect_secs += t.elapsed().as_secs_f64();
                // The normal form of the kernel above x = 0 of the flex model.
                let want = (BigInt::from(d), BigInt::from(a), BigInt::from(b));
                let mut n0 = (a, b);
                for p in 2..=a.max(b) {
                    while n0.0 % p == 0 && n0.1 % (p * p * p) == 0 {
                        n0 = (n0.0 / p, n0.1 / (p * p * p));
                    }
                }
                let want = (want.0, BigInt::from(n0.0), BigInt::from(n0.1));
                if isos.iter().any(|i| {
                    (
                        i.model().d.clone(),
                        i.model().alpha.clone(),
                        i.model().beta.clone(),
                    ) == want
                }) {
                    found += 1;
                }
                let t = Instant::now();
                let out =
                    descend_by_isogeny(&e, &DescentOptions::default(), &Isogeny3Options::default());
                let secs = t.elapsed().as_secs_f64();
                if secs > slowest.0 {
                    slowest = (secs, format!("D = {d}, α = {a}, β = {b}"));
                }
                match out {
                    Ok(IsogenyDescent::Two(r)) => {
                        two += 1;
                        two_decided += usize::from(r.rank_bounds().is_decided());
                    }
                    Ok(IsogenyDescent::ThreeGeneral(r)) => {
                        general += 1;
                        general_decided += usize::from(r.rank.is_some());
                        cassels_fail +=
                            usize::from(r.tamagawa.as_ref().is_some_and(|t| !t.holds()));
                        partial += usize::from(!r.cut.is_empty());
                    }
                    Ok(IsogenyDescent::Three(r)) => {
                        three += 1;
                        three_decided += usize::from(r.rank.is_some());
                    }
                    Ok(_) => other += 1,
                    Err(Error::NoSupportedIsogeny { reason }) if reason.contains("α ≠ 0") => {
                        typed += 1
                    }
                    Err(e) => {
                        other += 1;
                        eprintln!("{e}");
                    }
                }
            }
        }
    }
    println!("curves: {total}");
    println!("3-isogeny found with the normal form (D, α, β): {found}");
    println!("point of order 2 (2-isogeny descent): {two}, rank decided on {two_decided}");
    println!(
        "j = 0 (the α = 0 descent on y^2 = x^3 + k): {three}, rank decided on {three_decided}"
    );
    println!(
        "α ≠ 0 (general descent): {general}, rank decided on {general_decided}; Cassels' ratio failed on {cassels_fail}; partial {partial}"
    );
    println!("slowest curve: {} ({:.2} s)", slowest.1, slowest.0);
    println!("typed error, α ≠ 0 not covered: {typed}");
    println!("other outcomes: {other}");
    println!(
        "detection: {:.3} ms per curve; total {:.1} s",
        1000.0 * detect_secs / total.max(1) as f64,
        start.elapsed().as_secs_f64()
    );
}
