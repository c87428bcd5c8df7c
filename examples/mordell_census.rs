//! Descent via 3-isogeny on the Mordell curves y² = x³ + k for the
//! sixth-power-free k with |k| ≤ K: how many ranks are settled (by the
//! descent alone, or with a certified L-value), how many by each kind of
//! field, the failures of Cassels' ratio (there must be none), and the time.
//!
//!     cargo run --release --example mordell_census -- 1000

use std::collections::BTreeMap;
use std::time::Instant;

use isodescent::descent3::{descend_3isogeny, Isogeny3Options, Rank3Proof};
use isodescent::Curve;

fn sixth_power_free(k: i64) -> bool {
    let n = k.abs();
    (2..)
        .take_while(|d: &i64| d.pow(6) <= n)
        .all(|d| n % d.pow(6) != 0)
}

fn main() {
    let bound: i64 = std::env::args()
        .nth(1)
        .and_then(|a| a.parse().ok())
        .unwrap_or(1000);
    let opts = Isogeny3Options::default();
    let start = Instant::now();
    let (mut total, mut by_descent, mut by_analytic, mut open, mut errors) = (0, 0, 0, 0, 0);
    let (mut missing_points, mut cassels_fail, mut partial) = (0, 0, 0);
    let (mut with_points, mut proven_generators) = (0, 0);
    let mut uppers: BTreeMap<usize, usize> = BTreeMap::new();
    let mut ranks: BTreeMap<usize, usize> = BTreeMap::new();
    let mut slowest = (0.0f64, 0i64);
    for k in (-bound..=bound).filter(|&k| k != 0 && sixth_power_free(k)) {
        total += 1;
        let e: Curve = match format!("0 0 0 0 {k}").parse() {
            Ok(e) => e,
            Err(_) => {
                errors += 1;
                continue;
            }
        };
        let t = Instant::now();
        match descend_3isogeny(&e, &opts) {
            Ok(r) => {
                *uppers.entry(r.rank_upper).or_default() += 1;
                if r.tamagawa.as_ref().is_some_and(|t| !t.holds()) {
                    cassels_fail += 1;
                }
                if !r.cut.is_empty() {
                    partial += 1;
                }
                match r.rank {
                    Some((rank, proof)) => {
                        *ranks.entry(rank).or_default() += 1;
                        match proof {
                            Rank3Proof::Analytic(_) => by_analytic += 1,
                            _ => by_descent += 1,
                        }
                        if r.rank_lower < rank {
                            missing_points += 1;
                        } else if rank > 0 {
                            with_points += 1;
                            if r.points_generate() {
                                proven_generators += 1;
                            }
                        }
                    }
                    None => open += 1,
                }
            }
            Err(err) => {
                errors += 1;
                eprintln!("k = {k}: {err}");
            }
        }
        let s = t.elapsed().as_secs_f64();
        if s > slowest.0 {
            slowest = (s, k);
        }
    }
    let secs = start.elapsed().as_secs_f64();
    println!("sixth-power-free k, 0 < |k| <= {bound}: {total} curves in {secs:.2} s");
    println!(
        "rank settled: {} ({:.1}%): {by_descent} by the descent alone, {by_analytic} with a certified L-value",
        by_descent + by_analytic,
        100.0 * (by_descent + by_analytic) as f64 / total.max(1) as f64
    );
    println!("not settled: {open}; errors: {errors}; partial reports: {partial}; Cassels' ratio failures: {cassels_fail}");
    println!("settled with fewer independent points than the rank: {missing_points}");
    println!("settled with positive rank and rank-many points: {with_points}; generators proven by saturation: {proven_generators}");
    println!("slowest curve: k = {} in {:.3} s", slowest.1, slowest.0);
    println!("upper bound (Selmer ranks minus torsion) : count");
    for (u, c) in &uppers {
        println!("  {u} : {c}");
    }
    println!("rank : count (settled curves)");
    for (r, c) in &ranks {
        println!("  {r} : {c}");
    }
}
