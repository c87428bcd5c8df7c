//! Times the descent over the congruent-number curves y² = x³ − n² x for
//! square-free n ≤ N (or, with `box:B`, over every nonsingular
//! y² = x³ + a x² + b x with |a|, |b| ≤ B) and prints the rate and the
//! decided share — the measurement behind the descent figures in
//! docs/performance.md.
//!
//! ```text
//! cargo run --release --example selmer_census -- N|box:B [local-only|isogeny-selmer|first|descent|analytic|points|full]
//! ```
//! `local-only`: Selmer groups (with the lifting pairing, hence Sel²) and
//! torsion images, no search; `isogeny-selmer`: the two isogeny Selmer
//! groups and torsion images only (no lifting pairing);
//! `first`: default search, no second descent, no analytic side;
//! `descent`: the whole descent, no analytic side or saturation;
//! `analytic`: the descent and the analytic side; `points`: also the deep
//! search for missing points; `full`: the defaults (also saturation).
//!
//! Built with `--features parallel`, the curves run on a rayon pool of one
//! thread per core (`RAYON_NUM_THREADS` sets the number); the counts are
//! sums, so the output is the same as on one thread except for the
//! timing line.

use std::process::ExitCode;
use std::time::Instant;

use isodescent::curve::Curve;
use isodescent::descent::{descend, DescentOptions};

fn squarefree(n: i64) -> bool {
    (2..).take_while(|p| p * p <= n).all(|p| n % (p * p) != 0)
}

/// Counts over a set of curves (sums, so independent of the order).
#[derive(Clone, Copy, Default)]
struct Tally {
    curves: u64,
    decided: u64,
    errors: u64,
    /// Curves of positive decided rank, those with rank-many points, and
    /// those whose points are proven to generate E(Q) modulo torsion.
    positive: u64,
    with_points: u64,
    generated: u64,
}

impl Tally {
    fn add(mut self, o: Tally) -> Tally {
        self.curves += o.curves;
        self.decided += o.decided;
        self.errors += o.errors;
        self.positive += o.positive;
        self.with_points += o.with_points;
        self.generated += o.generated;
        self
    }
}

/// The descent on one curve, as a tally of one.
fn one(m: &[i64; 5], opts: &DescentOptions) -> Tally {
    let mut t = Tally::default();
    let Ok(c) = Curve::from_ints(*m) else {
        t.errors = 1;
        return t;
    };
    match descend(&c, opts) {
        Ok(r) => {
            t.curves = 1;
            t.decided = u64::from(r.rank_bounds().is_decided());
            if r.rank_bounds().is_decided() && r.rank_bounds().lower() > 0 {
                t.positive = 1;
                t.with_points = u64::from(r.points().len() == r.rank_bounds().lower());
                t.generated = u64::from(r.generators().is_some());
            }
        }
        Err(_) => t.errors = 1,
    }
    t
}

#[cfg(feature = "parallel")]
fn tally(members: &[[i64; 5]], opts: &DescentOptions) -> Tally {
    use rayon::prelude::*;
    members
        .par_iter()
        .with_min_len(64)
        .map(|m| one(m, opts))
        .reduce(Tally::default, Tally::add)
}

#[cfg(not(feature = "parallel"))]
fn tally(members: &[[i64; 5]], opts: &DescentOptions) -> Tally {
    members
        .iter()
        .fold(Tally::default(), |t, m| t.add(one(m, opts)))
}

const USAGE: &str =
    "usage: selmer_census N|box:B [local-only|isogeny-selmer|first|descent|analytic|points|full]
  N: the congruent-number curves y^2 = x^3 - n^2 x, n square-free, n <= N (1 <= N <= 10^6)
  box:B: y^2 = x^3 + ax^2 + bx, |a|, |b| <= B (1 <= B <= 1000)
  the second argument chooses how much of the descent runs (default local-only)";

fn main() -> ExitCode {
    if std::env::args().any(|a| a == "-h" || a == "--help") {
        println!("{USAGE}");
        return ExitCode::SUCCESS;
    }
    let mut args = std::env::args().skip(1);
    let family = args.next().unwrap_or_default();
    let (boxed, n_max) = match family.strip_prefix("box:") {
        Some(b) => (true, b.parse::<i64>().ok().filter(|&b| b <= 1000)),
        None => (false, family.parse::<i64>().ok()),
    };
    let Some(n_max) = n_max.filter(|&n| (1..=1_000_000).contains(&n)) else {
        eprintln!("{USAGE}");
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
        "isogeny-selmer" => {
            let mut o = DescentOptions::default().local_conditions_only();
            o.lifting_pairing = false;
            o
        }
        "first" => {
            let mut o = DescentOptions::default().descent_only();
            o.four_coverings = false;
            o
        }
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
    let t = tally(&members, &opts);
    let Tally {
        curves,
        decided,
        errors,
        positive,
        with_points,
        generated,
    } = t;
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
