//! Measurement (ignored by default): saturation over the box |a|, |b| ≤ 30
//! of y² = x³ + ax² + bx, on the independent points the default descent
//! returns. Run:
//!
//! ```text
//! cargo test --release --test height_box -- --ignored --nocapture
//! ```
//!
//! It prints the number of curves with points, how many were proven
//! saturated, the unresolved ones, and the time per curve by rank; the
//! assertion is the contract of `saturate`: a proven result has a proven
//! index bound, and every prime up to it was settled.

use std::time::{Duration, Instant};

use isodescent::curve::Curve;
use isodescent::descent::{descend, DescentOptions};
use isodescent::height::{saturate, SaturationOptions};
use isodescent::Budget;

#[test]
#[ignore = "measurement: a few seconds; see docs/heights.md"]
fn saturation_over_the_box() {
    let mut by_rank: Vec<(usize, usize, Duration, Duration)> =
        vec![(0, 0, Duration::ZERO, Duration::ZERO); 5];
    let mut curves = 0;
    let mut not_proven = Vec::new();
    let mut enlarged = Vec::new();
    let t_all = Instant::now();
    for a in -30i64..=30 {
        for b in -30i64..=30 {
            if b == 0 || a * a == 4 * b {
                continue;
            }
            let e = Curve::from_ints([0, a, 0, b, 0]).unwrap();
            let report = descend(&e, &DescentOptions::default()).unwrap();
            let r = report.descent_points().len();
            if r == 0 {
                continue;
            }
            curves += 1;
            let t = Instant::now();
            let s = saturate(
                &e,
                report.descent_points(),
                &SaturationOptions::default(),
                &mut Budget::unlimited(),
            );
            let dt = t.elapsed();
            let slot = &mut by_rank[r.min(4)];
            slot.0 += 1;
            slot.2 += dt;
            slot.3 = slot.3.max(dt);
            match s {
                Ok(s) => {
                    if s.index_found > 1 {
                        enlarged.push(format!("[{a},{b}] index {}", s.index_found));
                    }
                    if s.proven_saturated {
                        slot.1 += 1;
                        assert!(
                            s.index_bound.is_some()
                                && s.unresolved.is_empty()
                                && !s.beyond_max_prime
                        );
                    } else {
                        not_proven.push(format!(
                            "[{a},{b}] r={r} bound={:?} unresolved={:?} beyond={}",
                            s.index_bound, s.unresolved, s.beyond_max_prime
                        ));
                    }
                }
                Err(err) => not_proven.push(format!("[{a},{b}] r={r} error {err}")),
            }
        }
    }
    println!(
        "curves with points: {curves}; total wall time incl. descents {:?}",
        t_all.elapsed()
    );
    for (r, (n, ok, total, max)) in by_rank.iter().enumerate() {
        if *n > 0 {
            println!(
                "points {r}: {n} curves, {ok} proven saturated, mean {:?}, max {:?}",
                *total / *n as u32,
                max
            );
        }
    }
    println!(
        "descent points enlarged by saturation ({}): {:?}",
        enlarged.len(),
        enlarged.iter().take(10).collect::<Vec<_>>()
    );
    println!("not proven ({}):", not_proven.len());
    for line in not_proven.iter().take(40) {
        println!("  {line}");
    }
}
