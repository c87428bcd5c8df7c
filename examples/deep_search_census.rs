//! Census of the deep point search on congruent-number curves
//! y² = x³ − n²x, n square-free in a range: for every curve whose rank is
//! known to be ≥ 1 (decided by the descent, or proven by the analytic
//! layer), run the default descent, then the deep search when points are
//! missing, then saturation; count the curves with rank-many independent
//! points and with proven generators.
//!
//! ```text
//! cargo run --release --example deep_search_census -- [FROM] [TO] [MAX_COVERING_HEIGHT] [DEEP_MEGA_UNITS]
//! ```
//! Defaults: 1 1000 4096 400 (the deep search's budget per curve is
//! DEEP_MEGA_UNITS·10⁶ work units). One line per curve that needed the deep search
//! or failed, then a summary.

use std::time::{Duration, Instant};

use isodescent::analytic::{analyse, AnalyticOptions};
use isodescent::curve::Curve;
use isodescent::descent::{complete_report_points, descend, DeepSearchOptions, DescentOptions};
use isodescent::height::{regulator, saturate, SaturationOptions};
use isodescent::Budget;

fn squarefree(n: i64) -> bool {
    let mut k = 2;
    while k * k <= n {
        if n % (k * k) == 0 {
            return false;
        }
        k += 1;
    }
    true
}

/// Work units of saturation per curve.
const SATURATION_UNITS: u64 = 2_000_000_000;

fn main() {
    let args: Vec<u64> = std::env::args()
        .skip(1)
        .map(|a| a.parse().expect("arguments are integers"))
        .collect();
    let from = *args.first().unwrap_or(&1) as i64;
    let to = *args.get(1).unwrap_or(&1000) as i64;
    let height = *args.get(2).unwrap_or(&4096);
    let deep_units = args.get(3).unwrap_or(&400).saturating_mul(1_000_000);
    let deep_options = DeepSearchOptions::default().with_max_covering_height(height);

    let (mut positive, mut full_rank, mut generated) = (0usize, 0usize, 0usize);
    let (mut needed_deep, mut deep_ok) = (0usize, 0usize);
    let mut undecided = Vec::new();
    let (mut t_descent, mut t_analytic, mut t_deep, mut t_sat) = (
        Duration::ZERO,
        Duration::ZERO,
        Duration::ZERO,
        Duration::ZERO,
    );
    for n in from..=to {
        if n < 1 || !squarefree(n) {
            continue;
        }
        let e = Curve::from_ints([0, 0, 0, -n * n, 0]).expect("non-singular for n ≠ 0");
        let t = Instant::now();
        let report = match descend(&e, &DescentOptions::default()) {
            Ok(r) => r,
            Err(err) => {
                println!("n = {n}: descent failed: {err}");
                continue;
            }
        };
        t_descent += t.elapsed();
        let rank = if report.is_decided() {
            Some(report.rank_lower())
        } else {
            let t = Instant::now();
            let mut b = Budget::unlimited();
            let r = report
                .tate_data()
                .and_then(|l| analyse(&e, l, &AnalyticOptions::default(), &mut b).ok())
                .and_then(|d| d.rank_proven())
                .map(|(r, _)| r);
            t_analytic += t.elapsed();
            r
        };
        let Some(rank) = rank else {
            undecided.push(n);
            continue;
        };
        if rank == 0 {
            continue;
        }
        positive += 1;
        let mut points = report.points().to_vec();
        if points.len() < rank {
            needed_deep += 1;
            let t = Instant::now();
            let mut budget = Budget::with_units(deep_units);
            let result = complete_report_points(&report, rank, &deep_options, &mut budget);
            let dt = t.elapsed();
            t_deep += dt;
            match result {
                Ok(p) => points = p,
                Err(err) => println!("n = {n}: deep search error: {err}"),
            }
            let ok = points.len() >= rank;
            if ok {
                deep_ok += 1;
            }
            println!(
                "n = {n}: rank {rank}, deep search {} in {:.3} s ({} units)",
                if ok {
                    "found the points"
                } else {
                    "found too few"
                },
                dt.as_secs_f64(),
                budget.spent()
            );
        }
        if points.len() < rank {
            continue;
        }
        assert!(points.iter().all(|p| e.contains(p)));
        // Independence, a second way: the regulator is certified positive.
        match regulator(&e, &points) {
            Ok(r) if r.lower() > 0.0 => {}
            other => {
                println!("n = {n}: regulator not certified positive: {other:?}");
                continue;
            }
        }
        full_rank += 1;
        let t = Instant::now();
        let mut budget = Budget::with_units(SATURATION_UNITS);
        let s = saturate(&e, &points, &SaturationOptions::default(), &mut budget);
        t_sat += t.elapsed();
        match s {
            Ok(s) if s.proven_saturated => generated += 1,
            Ok(s) => println!(
                "n = {n}: saturation not proven (index bound {:?}, unresolved {:?})",
                s.index_bound, s.unresolved
            ),
            Err(err) => println!("n = {n}: saturation error: {err}"),
        }
    }
    let pct = |a: usize, b: usize| 100.0 * a as f64 / b.max(1) as f64;
    println!("square-free n in [{from}, {to}], largest covering height {height}");
    println!("rank not decided by descent or analytic theorem: {undecided:?}");
    println!("curves with rank >= 1: {positive}");
    println!(
        "  with rank-many independent points: {full_rank} ({:.1}%)",
        pct(full_rank, positive)
    );
    println!(
        "  with proven generators (saturated): {generated} ({:.1}%)",
        pct(generated, positive)
    );
    println!("  needing the deep search: {needed_deep}, of which it completed {deep_ok}");
    println!(
        "time: descent {:.2} s, analytic {:.2} s, deep search {:.2} s, saturation {:.2} s",
        t_descent.as_secs_f64(),
        t_analytic.as_secs_f64(),
        t_deep.as_secs_f64(),
        t_sat.as_secs_f64()
    );
}
