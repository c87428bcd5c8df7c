//! Descent via 3-isogeny on x³ + y³ = n for the cube-free n in a range:
//! how many ranks are settled (by the descent alone, or with a certified
//! L-value), the distribution of the upper bounds, and the time taken.
//!
//!     cargo run --release --example cube_sums_census -- 2 2000
//!
//! With `LIST_UNPROVEN=1` the settled curves of positive rank with
//! rank-many points but no proven generators are listed on stderr, with
//! the state of their saturation.

use std::time::Instant;

use isodescent::descent3::{descend_3isogeny, Isogeny3Options};
use isodescent::Curve;

#[path = "support/census3.rs"]
mod census3;
use census3::{unproven_reason, Census3};

fn cube_free(n: i64) -> bool {
    (2..)
        .take_while(|d| d * d * d <= n)
        .all(|d| n % (d * d * d) != 0)
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
    let mut c = Census3::default();
    for n in (lo.max(2)..=hi).filter(|&n| cube_free(n)) {
        c.total += 1;
        let e: Curve = match format!("0 0 0 0 {}", -432 * n * n).parse() {
            Ok(e) => e,
            Err(_) => {
                c.errors += 1;
                continue;
            }
        };
        match descend_3isogeny(&e, &opts) {
            Ok(r) => {
                if c.add(&r) && list_unproven {
                    eprintln!("n = {n}: no proven generators: {}", unproven_reason(&r));
                }
            }
            Err(err) => {
                c.errors += 1;
                eprintln!("n = {n}: {err}");
            }
        }
    }
    let secs = start.elapsed().as_secs_f64();
    println!(
        "cube-free n in {lo}..={hi}: {} curves in {secs:.2} s",
        c.total
    );
    c.print_settled();
    println!(
        "not settled: {}; errors: {}; settled with fewer independent points than the rank: {}",
        c.open, c.errors, c.missing_points
    );
    c.print_points();
    c.print_tables();
}
