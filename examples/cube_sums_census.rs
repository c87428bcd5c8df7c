//! Descent via 3-isogeny on x³ + y³ = n for the cube-free n in a range:
//! how many ranks are settled (by the descent alone, or with a certified
//! L-value), the distribution of the upper bounds, and the time taken.
//!
//!     cargo run --release --example cube_sums_census -- 2 2000
//!
//! With `LIST_UNPROVEN=1` the settled curves of positive rank with
//! rank-many points but no proven generators are listed on stderr, with
//! the state of their saturation.

use std::collections::BTreeMap;
use std::time::Instant;

use isodescent::descent3::{descend_3isogeny, Isogeny3Options, Isogeny3Report, Rank3Proof};
use isodescent::Curve;

fn cube_free(n: i64) -> bool {
    (2..)
        .take_while(|d| d * d * d <= n)
        .all(|d| n % (d * d * d) != 0)
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
    let args: Vec<i64> = std::env::args()
        .skip(1)
        .filter_map(|a| a.parse().ok())
        .collect();
    let (lo, hi) = (
        args.first().copied().unwrap_or(2),
        args.get(1).copied().unwrap_or(1000),
    );
    let opts = Isogeny3Options::default();
    let list_unproven = std::env::var_os("LIST_UNPROVEN").is_some();
    let start = Instant::now();
    let (mut total, mut by_descent, mut by_analytic, mut open, mut errors) = (0, 0, 0, 0, 0);
    let mut uppers: BTreeMap<usize, usize> = BTreeMap::new();
    let mut ranks: BTreeMap<usize, usize> = BTreeMap::new();
    let mut missing_points = 0;
    let (mut with_points, mut proven_generators) = (0, 0);
    for n in (lo.max(2)..=hi).filter(|&n| cube_free(n)) {
        total += 1;
        let e: Curve = match format!("0 0 0 0 {}", -432 * n * n).parse() {
            Ok(e) => e,
            Err(_) => {
                errors += 1;
                continue;
            }
        };
        match descend_3isogeny(&e, &opts) {
            Ok(r) => {
                *uppers.entry(r.rank_upper).or_default() += 1;
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
                                eprintln!("n = {n}: no proven generators: {}", unproven_reason(&r));
                            }
                        }
                    }
                    None => open += 1,
                }
            }
            Err(err) => {
                errors += 1;
                eprintln!("n = {n}: {err}");
            }
        }
    }
    let secs = start.elapsed().as_secs_f64();
    println!("cube-free n in {lo}..={hi}: {total} curves in {secs:.2} s");
    println!(
        "rank settled: {} ({:.1}%): {by_descent} by the descent alone, {by_analytic} with a certified L-value",
        by_descent + by_analytic,
        100.0 * (by_descent + by_analytic) as f64 / total.max(1) as f64
    );
    println!("not settled: {open}; errors: {errors}; settled with fewer independent points than the rank: {missing_points}");
    println!("settled with positive rank and rank-many points: {with_points}; generators proven by saturation: {proven_generators}");
    println!("upper bound (Selmer ranks minus torsion) : count");
    for (u, c) in &uppers {
        println!("  {u} : {c}");
    }
    println!("rank : count (settled curves)");
    for (r, c) in &ranks {
        println!("  {r} : {c}");
    }
}
