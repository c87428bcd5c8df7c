//! CPU cost of the analytic side (`analyse` alone) on congruent-number
//! curves `y² = x³ − n²x` at chosen conductor sizes, and the share of
//! curves whose rank it settles.
//!
//! ```text
//! analytic_reach levels [K]          K curves (default 5) with N nearest
//!                                    above 10^10, 10^11, 10^12, 10^13
//! analytic_reach sample K SEED LO HI K square-free n in [LO, HI] drawn with
//!                                    a fixed xorshift seed
//! analytic_reach one N               the single curve y^2 = x^3 - n^2 x
//! analytic_reach compare N [REPS]    both series routes on that curve
//!                                    (mean CPU time over REPS runs)
//! analytic_reach descent K SEED LO HI  the full descent (default options)
//!                                    on K square-free n in [LO, HI]
//! ```
//!
//! `levels K stored` uses the stored route throughout (side by side).
//! `general K MAXEXP` times the quadratic twists `y² = x³ − 1296d²x + 11664d³`
//! of `y² + y = x³ − x` (no complex multiplication, `a_p` prime by prime),
//! `d ≡ 1 (mod 4)` square-free, at `N ≈ 10^10 … 10^MAXEXP`.
//!
//! CPU time is the calling thread's time on CPU
//! (`/proc/thread-self/schedstat`, Linux); elsewhere wall-clock time.

use std::time::Instant;

use isodescent::analytic::{analyse, AnalyticOptions};
use isodescent::curve::Curve;
use isodescent::descent::{descend, DescentOptions};
use isodescent::Budget;

fn thread_cpu_ns() -> Option<u64> {
    let s = std::fs::read_to_string("/proc/thread-self/schedstat").ok()?;
    s.split_whitespace().next()?.parse().ok()
}

fn squarefree(n: u64) -> bool {
    let mut d = 2u64;
    while d * d <= n {
        if n % (d * d) == 0 {
            return false;
        }
        d += 1;
    }
    true
}

struct Row {
    n: u64,
    conductor: String,
    terms: u64,
    seconds: f64,
    proven: Option<usize>,
    skipped: bool,
}

fn run(n: u64, options: &AnalyticOptions) -> Row {
    let n_i = n as i64;
    let e = Curve::from_ints([0, 0, 0, -n_i * n_i, 0]).expect("n > 0");
    let mut budget = Budget::unlimited();
    let local = e.tate_data(&mut budget).expect("local data");
    let cpu0 = thread_cpu_ns();
    let t0 = Instant::now();
    let d = analyse(&e, &local, options, &mut budget).expect("analyse");
    let seconds = match (cpu0, thread_cpu_ns()) {
        (Some(a), Some(b)) => (b - a) as f64 * 1e-9,
        _ => t0.elapsed().as_secs_f64(),
    };
    Row {
        n,
        conductor: d.conductor().to_string(),
        terms: d.terms_used(),
        seconds,
        proven: d.rank_proven().map(|r| r.0),
        skipped: d.skipped().is_some(),
    }
}

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(|a, b| a.total_cmp(b));
    if v.is_empty() {
        return f64::NAN;
    }
    v[v.len() / 2]
}

fn print(r: &Row) {
    println!(
        "n = {:>8}  N = {:>16}  terms = {:>9}  cpu = {:>8.4} s  rank proven: {}{}",
        r.n,
        r.conductor,
        r.terms,
        r.seconds,
        r.proven.map_or("-".to_string(), |k| k.to_string()),
        if r.skipped { "  (skipped)" } else { "" }
    );
}

/// The conductor of `y² = x³ − n²x` for square-free `n`: `32n²` for odd
/// `n`, `16n²` for even `n` (checked against Tate's algorithm in `levels`).
fn congruent_conductor(n: u64) -> u64 {
    if n % 2 == 1 {
        32 * n * n
    } else {
        16 * n * n
    }
}

/// `LO`, `HI` from the arguments 4 and 5 (default `[10^4, 10^5]`).
fn draw_range(args: &[String]) -> (u64, u64) {
    let lo = args.get(3).and_then(|s| s.parse().ok()).unwrap_or(10_000);
    let hi = args.get(4).and_then(|s| s.parse().ok()).unwrap_or(100_000);
    (lo, hi)
}

/// `k` distinct square-free `n` in `[LO, HI]` from xorshift64 with the seed
/// in argument 3 (default 1).
fn draw(args: &[String], k: usize) -> Vec<u64> {
    let mut state: u64 = args.get(2).and_then(|s| s.parse().ok()).unwrap_or(1).max(1);
    let (lo, hi) = draw_range(args);
    let mut out: Vec<u64> = Vec::new();
    while out.len() < k {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        let n = lo + state % (hi - lo + 1);
        if squarefree(n) && !out.contains(&n) {
            out.push(n);
        }
    }
    out
}

fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let mut options = AnalyticOptions::default();
    options.conductor_limit = u64::MAX;
    match args.first().map(String::as_str) {
        Some("levels") => {
            let k: usize = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(5);
            let options = if args.get(2).map(String::as_str) == Some("stored") {
                options.clone().with_streamed_above(u64::MAX)
            } else {
                options.clone()
            };
            for exp in 10..=13u32 {
                let target = 10u64.pow(exp);
                let mut n = ((target as f64 / 32.0).sqrt()) as u64;
                let mut rows = Vec::new();
                while rows.len() < k {
                    n += 1;
                    if n % 2 == 1 && squarefree(n) && congruent_conductor(n) >= target {
                        let r = run(n, &options);
                        assert_eq!(r.conductor, congruent_conductor(n).to_string());
                        print(&r);
                        rows.push(r);
                    }
                }
                let med = median(rows.iter().map(|r| r.seconds).collect());
                println!("N ≈ 10^{exp}: median cpu {med:.4} s over {k} curves");
            }
        }
        Some("sample") => {
            let k: usize = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(100);
            let options = AnalyticOptions::default();
            let rows: Vec<Row> = draw(&args, k)
                .into_iter()
                .map(|n| run(n, &options))
                .collect();
            let (lo, hi) = draw_range(&args);
            let proven = rows.iter().filter(|r| r.proven.is_some()).count();
            let skipped = rows.iter().filter(|r| r.skipped).count();
            let med = median(rows.iter().map(|r| r.seconds).collect());
            let total: f64 = rows.iter().map(|r| r.seconds).sum();
            println!(
                "{k} square-free n in [{lo}, {hi}]: rank proven by the analytic side on {proven}, skipped {skipped}; median cpu {med:.4} s, total {total:.1} s"
            );
        }
        Some("general") => {
            let k: usize = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(3);
            let max_exp: u32 = args.get(2).and_then(|s| s.parse().ok()).unwrap_or(11);
            for exp in 10..=max_exp {
                let target = 10u64.pow(exp);
                let mut d = ((target as f64 / 37.0).sqrt()) as i64;
                let mut times = Vec::new();
                while times.len() < k {
                    d += 1;
                    if d % 4 != 1 || d % 37 == 0 || !squarefree(d as u64) {
                        continue;
                    }
                    let e = Curve::from_ints([0, 0, 0, -1296 * d * d, 11664 * d * d * d])
                        .expect("curve");
                    let mut budget = Budget::unlimited();
                    let local = e.tate_data(&mut budget).expect("local data");
                    let cpu0 = thread_cpu_ns().unwrap_or(0);
                    let r = analyse(&e, &local, &options, &mut budget).expect("analyse");
                    let cpu = (thread_cpu_ns().unwrap_or(0) - cpu0) as f64 * 1e-9;
                    println!(
                        "d = {d:>8}  N = {:>16}  terms = {:>9}  route {:?}  cpu = {cpu:>8.4} s  rank proven: {:?}",
                        r.conductor(),
                        r.terms_used(),
                        r.series_route(),
                        r.rank_proven().map(|x| x.0)
                    );
                    times.push(cpu);
                }
                println!(
                    "N ≈ 10^{exp}: median cpu {:.4} s over {k} curves",
                    median(times)
                );
            }
        }
        Some("descent") => {
            let k: usize = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(100);
            let options = DescentOptions::default();
            let mut decided = 0;
            let mut by_analytic = 0;
            let mut times = Vec::new();
            let mut rank_one = 0;
            let mut rank_one_points = 0;
            for n in draw(&args, k) {
                let n_i = n as i64;
                let e = Curve::from_ints([0, 0, 0, -n_i * n_i, 0]).expect("n > 0");
                let cpu0 = thread_cpu_ns().unwrap_or(0);
                let r = descend(&e, &options).expect("descent");
                let cpu = (thread_cpu_ns().unwrap_or(0) - cpu0) as f64 * 1e-9;
                times.push(cpu);
                if r.rank_bounds().is_decided() {
                    decided += 1;
                    if r.rank_bounds().lower() == 1 {
                        rank_one += 1;
                        if r.generators().is_some() && !r.points().is_empty() {
                            rank_one_points += 1;
                        }
                    }
                }
                if r.analytic().and_then(|a| a.rank_proven()).is_some() {
                    by_analytic += 1;
                }
            }
            let total: f64 = times.iter().sum();
            let (lo, hi) = draw_range(&args);
            println!(
                "{k} square-free n in [{lo}, {hi}], full descent with default options: rank decided on {decided}, rank proven by the analytic side on {by_analytic}; rank 1: {rank_one}, of which with a proven generator {rank_one_points}; median cpu {:.4} s, total {total:.1} s",
                median(times)
            );
        }
        Some("compare") => {
            // Both routes on one curve, side by side.
            // With REPS, each route runs REPS times and the CPU time is
            // the mean per run.
            let n: i64 = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(1);
            let reps: u32 = args.get(2).and_then(|s| s.parse().ok()).unwrap_or(1).max(1);
            let e = Curve::from_ints([0, 0, 0, -n * n, 0]).expect("n > 0");
            let mut budget = Budget::unlimited();
            let local = e.tate_data(&mut budget).expect("local data");
            for above in [u64::MAX, 0] {
                let o = options.clone().with_streamed_above(above);
                let cpu0 = thread_cpu_ns().unwrap_or(0);
                let mut d = analyse(&e, &local, &o, &mut budget).expect("analyse");
                for _ in 1..reps {
                    d = analyse(&e, &local, &o, &mut budget).expect("analyse");
                }
                let cpu = (thread_cpu_ns().unwrap_or(0) - cpu0) / u64::from(reps);
                println!(
                    "{:?}: w = {:?}, values {:?}, split {:?}, cpu {:.6} s",
                    d.series_route(),
                    d.root_number(),
                    d.l_values()
                        .iter()
                        .map(|(r, v)| format!("L^({r}) = {v}"))
                        .collect::<Vec<_>>(),
                    d.split_check().map(|s| s.difference.to_string()),
                    cpu as f64 * 1e-9
                );
            }
        }
        Some("one") => {
            let n: u64 = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(1);
            print(&run(n, &options));
        }
        _ => eprintln!("usage: analytic_reach levels [K] | sample K SEED LO HI | one N"),
    }
}
