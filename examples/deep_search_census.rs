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

const USAGE: &str = "usage: deep_search_census [FROM] [TO] [MAX_COVERING_HEIGHT] [DEEP_MEGA_UNITS]
  census of the deep point search on y^2 = x^3 - n^2 x, n square-free, FROM <= n <= TO
  defaults: 1 1000 4096 400; 1 <= FROM <= TO <= 10^9, 1 <= MAX_COVERING_HEIGHT <= 10^6,
  DEEP_MEGA_UNITS >= 1 (the deep search's budget per curve, in 10^6 work units)";

/// The four numbers, or a message saying what is wrong.
fn parse_args(args: &[String]) -> Result<(i64, i64, u64, u64), String> {
    if args.len() > 4 {
        return Err(format!("at most 4 arguments, got {}", args.len()));
    }
    let mut v = [1u64, 1000, 4096, 400];
    let names = ["FROM", "TO", "MAX_COVERING_HEIGHT", "DEEP_MEGA_UNITS"];
    for (i, a) in args.iter().enumerate() {
        v[i] = a
            .parse()
            .map_err(|_| format!("{} must be a positive integer, got {a:?}", names[i]))?;
    }
    let [from, to, height, mega] = v;
    if from < 1 || to < from || to > 1_000_000_000 {
        return Err(format!("need 1 <= FROM <= TO <= 10^9, got {from} and {to}"));
    }
    if !(1..=1_000_000).contains(&height) {
        return Err(format!(
            "MAX_COVERING_HEIGHT must lie in 1..=10^6, got {height}"
        ));
    }
    if mega < 1 {
        return Err("DEEP_MEGA_UNITS must be at least 1".into());
    }
    // from, to <= 10^9 fit in i64, and n^2 <= 10^18 does too.
    Ok((
        from as i64,
        to as i64,
        height,
        mega.saturating_mul(1_000_000),
    ))
}

fn main() -> std::process::ExitCode {
    let argv: Vec<String> = std::env::args().skip(1).collect();
    if argv.iter().any(|a| a == "-h" || a == "--help") {
        println!("{USAGE}");
        return std::process::ExitCode::SUCCESS;
    }
    let (from, to, height, deep_units) = match parse_args(&argv) {
        Ok(v) => v,
        Err(msg) => {
            eprintln!("deep_search_census: {msg}\n{USAGE}");
            return std::process::ExitCode::from(2);
        }
    };
    let mut deep_options = DeepSearchOptions::default();
    deep_options.max_covering_height = height;

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
        let rank = if report.rank_bounds().is_decided() {
            Some(report.rank_bounds().lower())
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
        let mut points = report.descent_points().to_vec();
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
    std::process::ExitCode::SUCCESS
}
