//! Measurement behind the issue-22 figures of docs/performance.md:
//! congruent-number curves y² = x³ − n²x, square-free n ≡ 5, 6, 7 (mod 8) in
//! [FROM, TO], each descended twice (Heegner step off, then on with the
//! defaults); counts rank-1 curves without a point, how many the Heegner
//! step turns into proven generators, and the extra time per curve.
//!
//! Run: cargo run --release --example heegner_census -- FROM TO

use std::time::Instant;

use isodescent::curve::Curve;
use isodescent::descent::PointOrigin;
use isodescent::{descend, DescentOptions};

fn main() {
    let args: Vec<u64> = std::env::args()
        .skip(1)
        .filter_map(|a| a.parse().ok())
        .collect();
    let (from, to) = (
        args.first().copied().unwrap_or(7),
        args.get(1).copied().unwrap_or(1000),
    );
    let (mut curves, mut no_point, mut proven, mut other) = (0, 0, 0, 0);
    let mut costs = Vec::new();
    for n in from..=to {
        if !(5..=7).contains(&(n % 8))
            || (2..n).take_while(|d| d * d <= n).any(|d| n % (d * d) == 0)
        {
            continue;
        }
        curves += 1;
        let n2 = (n * n) as i64;
        let e = Curve::from_ints([0, 0, 0, -n2, 0]).expect("curve");
        let mut off = DescentOptions::default();
        off.heegner = None;
        let t0 = Instant::now();
        let Ok(before) = descend(&e, &off) else {
            continue;
        };
        let t_off = t0.elapsed().as_secs_f64();
        if !(before.rank_bounds().is_decided()
            && before.rank_bounds().lower() == 1
            && before.points().is_empty())
        {
            continue;
        }
        no_point += 1;
        let t1 = Instant::now();
        let Ok(after) = descend(&e, &DescentOptions::default()) else {
            continue;
        };
        let t_on = t1.elapsed().as_secs_f64();
        costs.push(t_on);
        if matches!(after.points_origin(), PointOrigin::Heegner(_)) && after.generators().is_some()
        {
            proven += 1;
        } else {
            other += 1;
            println!(
                "n = {n}: {:?} completion {:?}",
                after.heegner(),
                after.completion()
            );
        }
        let _ = t_off;
    }
    costs.sort_by(f64::total_cmp);
    let median = costs.get(costs.len() / 2).copied().unwrap_or(0.0);
    let max = costs.last().copied().unwrap_or(0.0);
    println!(
        "n in [{from}, {to}], n = 5, 6, 7 mod 8 square-free: {curves} curves; rank 1 without a point (Heegner off): {no_point}; \
         with a proven Heegner generator (defaults): {proven}; other: {other}; descent with Heegner per such curve: median {median:.3} s, max {max:.3} s"
    );
}
