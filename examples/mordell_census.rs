//! Descent via 3-isogeny on the Mordell curves y² = x³ + k for the
//! sixth-power-free k with |k| ≤ K: how many ranks are settled (by the
//! descent alone, or with a certified L-value), how many by each kind of
//! field, the failures of Cassels' ratio (there must be none), and the time.
//!
//!     cargo run --release --example mordell_census -- 1000
//!     cargo run --release --example mordell_census -- 9000 9150   # 9000 < |k| <= 9150
//!
//! With `LIST_UNPROVEN=1` the settled curves of positive rank with
//! rank-many points but no proven generators are listed on stderr, with
//! the state of their saturation.

use std::collections::BTreeMap;
use std::time::Instant;

use isodescent::descent3::{descend_3isogeny, Isogeny3Options, Isogeny3Report, Rank3Proof};
use isodescent::Curve;

fn sixth_power_free(k: i64) -> bool {
    let n = k.abs();
    (2..)
        .take_while(|d: &i64| d.pow(6) <= n)
        .all(|d| n % d.pow(6) != 0)
}

/// Why a settled curve of positive rank with rank-many points has no
/// proven generators (printed with `LIST_UNPROVEN=1`).
fn unproven_reason(r: &Isogeny3Report) -> String {
    let points = r.points.iter().filter(|p| !p.is_infinity()).count();
    let head = format!(
        "{} points, {} independent, torsion {}, cut {:?}",
        points,
        r.independent_points.len(),
        r.torsion.order(),
        r.cut
    );
    match &r.saturation {
        None => format!("{head}; no saturation"),
        Some(s) => format!(
            "{head}; index bound {:?} ({:?}), beyond max prime {}, checked {:?}, unresolved {:?}, 3 by descent {}",
            s.index_bound,
            s.height_lower_bound_source,
            s.beyond_max_prime,
            s.primes_checked,
            s.unresolved,
            r.three_saturated_by_descent
        ),
    }
}

fn main() {
    // `-- K` runs 0 < |k| <= K; `-- K0 K` runs K0 < |k| <= K.
    let args: Vec<i64> = std::env::args()
        .skip(1)
        .filter_map(|a| a.parse().ok())
        .collect();
    let (from, bound) = match args[..] {
        [k0, k1, ..] => (k0.max(0), k1),
        [k1] => (0, k1),
        [] => (0, 1000),
    };
    let opts = Isogeny3Options::default();
    let list_unproven = std::env::var_os("LIST_UNPROVEN").is_some();
    let start = Instant::now();
    let (mut total, mut by_descent, mut by_analytic, mut open, mut errors) = (0, 0, 0, 0, 0);
    let (mut missing_points, mut cassels_fail, mut partial) = (0, 0, 0);
    let (mut with_points, mut proven_generators) = (0, 0);
    let mut uppers: BTreeMap<usize, usize> = BTreeMap::new();
    let mut ranks: BTreeMap<usize, usize> = BTreeMap::new();
    let mut slowest = (0.0f64, 0i64);
    for k in (-bound..=bound).filter(|&k| k.abs() > from && sixth_power_free(k)) {
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
                            } else if list_unproven {
                                eprintln!("k = {k}: no proven generators: {}", unproven_reason(&r));
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
    println!("sixth-power-free k, {from} < |k| <= {bound}: {total} curves in {secs:.2} s");
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
