//! Times the descent over the congruent-number curves y² = x³ − n² x for
//! square-free n ≤ N (or, with `box:B`, over every nonsingular
//! y² = x³ + a x² + b x with |a|, |b| ≤ B) and prints the rate and the
//! decided share — the measurement behind the descent figures in
//! docs/performance.md.
//!
//! ```text
//! cargo run --release --example selmer_census -- N|box:B [local-only|first|descent|analytic|points|full]
//! ```
//! `local-only`: Selmer groups and torsion images, no search;
//! `first`: default search, no second descent, no analytic side;
//! `descent`: the whole descent, no analytic side or saturation;
//! `analytic`: the descent and the analytic side; `points`: also the deep
//! search for missing points; `full`: the defaults (also saturation).

use std::process::ExitCode;
use std::time::Instant;

use isodescent::curve::Curve;
use isodescent::descent::{descend, DescentOptions};

fn squarefree(n: i64) -> bool {
    (2..).take_while(|p| p * p <= n).all(|p| n % (p * p) != 0)
}

fn main() -> ExitCode {
    let mut args = std::env::args().skip(1);
    let family = args.next().unwrap_or_default();
    let (boxed, n_max) = match family.strip_prefix("box:") {
        Some(b) => (true, b.parse::<i64>().ok()),
        None => (false, family.parse::<i64>().ok()),
    };
    let Some(n_max) = n_max.filter(|&n| (1..=1_000_000).contains(&n)) else {
        eprintln!("usage: selmer_census N|box:B [local-only|first|descent|analytic|points|full]");
        return ExitCode::from(2);
    };
    let members: Vec<[i64; 5]> = if boxed {
        (-n_max..=n_max)
            .flat_map(|a| (-n_max..=n_max).map(move |b| (a, b)))
            .filter(|&(a, b)| b != 0 && a * a != 4 * b)
            .map(|(a, b)| [0, a, 0, b, 0])
            .collect()
    } else {
        (1..=n_max)
            .filter(|&n| squarefree(n))
            .map(|n| [0, 0, 0, -n * n, 0])
            .collect()
    };
    let mode = args.next().unwrap_or_else(|| "local-only".to_string());
    let opts = match mode.as_str() {
        "local-only" => DescentOptions::default().local_conditions_only(),
        "first" => DescentOptions::default()
            .descent_only()
            .with_four_coverings(false),
        "descent" => DescentOptions::default().descent_only(),
        "analytic" => {
            let mut o = DescentOptions::default();
            o.saturation = None;
            o.deep_search = None;
            o
        }
        "points" => {
            let mut o = DescentOptions::default();
            o.saturation = None;
            o
        }
        "full" => DescentOptions::default(),
        other => {
            eprintln!("unknown mode {other:?}");
            return ExitCode::from(2);
        }
    };
    let start = Instant::now();
    let (mut curves, mut decided, mut errors) = (0u64, 0u64, 0u64);
    // Curves of positive decided rank, those with rank-many points, and
    // those whose points are proven to generate E(Q) modulo torsion.
    let (mut positive, mut with_points, mut generated) = (0u64, 0u64, 0u64);
    for m in members {
        let Ok(c) = Curve::from_ints(m) else {
            errors += 1;
            continue;
        };
        match descend(&c, &opts) {
            Ok(r) => {
                curves += 1;
                decided += u64::from(r.is_decided());
                if r.is_decided() && r.rank_lower() > 0 {
                    positive += 1;
                    with_points += u64::from(r.returned_points().len() == r.rank_lower());
                    generated += u64::from(r.points_generate());
                }
            }
            Err(_) => errors += 1,
        }
    }
    let secs = start.elapsed().as_secs_f64();
    println!(
        "mode {mode}, family {family}: {curves} curves, {errors} errors, {decided} decided ({:.1}%), {secs:.2} s, {:.0} curves/s",
        100.0 * decided as f64 / curves.max(1) as f64,
        curves as f64 / secs
    );
    println!(
        "  rank >= 1: {positive} curves, {with_points} with rank-many independent points, {generated} with proven generators"
    );
    ExitCode::SUCCESS
}
