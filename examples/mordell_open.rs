//! Why Mordell curves y² = x³ + k stay open: for the sixth-power-free k
//! with FROM < |k| ≤ TO, runs the 3-isogeny descent with the defaults and,
//! for every curve whose rank is not settled, the analytic side on its own
//! (conductor, root number, which L-values were certified), and sorts the
//! open curves by cause.
//!
//!     cargo run --release --example mordell_open -- 9000 9300

use std::collections::BTreeMap;
use std::time::Instant;

use isodescent::analytic::{analyse, AnalyticOptions, Skip};
use isodescent::descent3::{descend_3isogeny, Isogeny3Options};
use isodescent::{Budget, Curve};

#[path = "support/census3.rs"]
mod census3;
use census3::sixth_power_free;

fn main() {
    let args: Vec<i64> = std::env::args()
        .skip(1)
        .filter_map(|a| a.parse().ok())
        .collect();
    let (from, to) = (
        args.first().copied().unwrap_or(9000),
        args.get(1).copied().unwrap_or(9300),
    );
    let verbose = std::env::var("MORDELL_OPEN_VERBOSE").is_ok();
    let opts = Isogeny3Options::default();
    let start = Instant::now();
    let (mut total, mut settled, mut errors) = (0usize, 0usize, 0usize);
    let mut causes: BTreeMap<String, usize> = BTreeMap::new();
    let ks = (from + 1..=to)
        .flat_map(|a| [a, -a])
        .filter(|&k| sixth_power_free(k));
    for k in ks {
        total += 1;
        let e: Curve = format!("0 0 0 0 {k}").parse().expect("a curve");
        let r = match descend_3isogeny(&e, &opts) {
            Ok(r) => r,
            Err(err) => {
                errors += 1;
                eprintln!("k = {k}: {err}");
                continue;
            }
        };
        if r.rank.is_some() {
            settled += 1;
            continue;
        }
        let mut b = Budget::unlimited();
        let local = e.tate_data(&mut b).expect("local data");
        let data = analyse(&e, &local, &AnalyticOptions::default(), &mut b).expect("analytic");
        let n = data.conductor().clone();
        let cause = match data.skipped() {
            Some(Skip::ConductorAboveLimit) => "conductor above the analytic limit".to_string(),
            Some(s) => format!("analytic side: {s:?}"),
            None => {
                let w = data.root_number().unwrap_or(0);
                let order = data.analytic_order().map(|o| format!("{o:?}"));
                format!(
                    "w = {w}, order {}",
                    order.unwrap_or("none certified".into())
                )
            }
        };
        let cause = format!(
            "{cause}; bounds [{}, {}]{}",
            r.rank_lower,
            r.rank_upper,
            if r.cut.is_empty() { "" } else { "; cut" }
        );
        if verbose {
            println!("k = {k}: N = {n}: {cause}");
        }
        *causes.entry(cause).or_default() += 1;
    }
    println!(
        "sixth-power-free k, {from} < |k| <= {to}: {total} curves in {:.1} s; settled {settled}; errors {errors}; open {}",
        start.elapsed().as_secs_f64(),
        total - settled - errors
    );
    for (c, n) in &causes {
        println!("  {n:5}  {c}");
    }
}
