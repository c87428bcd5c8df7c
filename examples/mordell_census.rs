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

use std::time::Instant;

use isodescent::descent3::{descend_3isogeny, Isogeny3Options};
use isodescent::Curve;

#[path = "support/census3.rs"]
mod census3;
use census3::{sixth_power_free, unproven_reason, Census3};

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
    let mut c = Census3::default();
    let mut slowest = (0.0f64, 0i64);
    for k in (-bound..=bound).filter(|&k| k.abs() > from && sixth_power_free(k)) {
        c.total += 1;
        let e: Curve = match format!("0 0 0 0 {k}").parse() {
            Ok(e) => e,
            Err(_) => {
                c.errors += 1;
                continue;
            }
        };
        let t = Instant::now();
        match descend_3isogeny(&e, &opts) {
            Ok(r) => {
                if c.add(&r) && list_unproven {
                    eprintln!("k = {k}: no proven generators: {}", unproven_reason(&r));
                }
            }
            Err(err) => {
                c.errors += 1;
                eprintln!("k = {k}: {err}");
            }
        }
        let s = t.elapsed().as_secs_f64();
        if s > slowest.0 {
            slowest = (s, k);
        }
    }
    let secs = start.elapsed().as_secs_f64();
    println!(
        "sixth-power-free k, {from} < |k| <= {bound}: {} curves in {secs:.2} s",
        c.total
    );
    c.print_settled();
    println!(
        "not settled: {}; errors: {}; partial reports: {}; Cassels' ratio failures: {}",
        c.open, c.errors, c.partial, c.cassels_fail
    );
    println!(
        "settled with fewer independent points than the rank: {}",
        c.missing_points
    );
    c.print_points();
    println!("slowest curve: k = {} in {:.3} s", slowest.1, slowest.0);
    c.print_tables();
}
