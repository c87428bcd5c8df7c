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
//! ```
//!
//! CPU time is the calling thread's time on CPU
//! (`/proc/thread-self/schedstat`, Linux); elsewhere wall-clock time.

use std::time::Instant;

use isodescent::analytic::{analyse, AnalyticOptions};
use isodescent::curve::Curve;
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
    let local = e.local_data(&mut budget).expect("local data");
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
/// `n`, `64n²` for even `n` (checked against Tate's algorithm by `run`).
fn congruent_conductor(n: u64) -> u64 {
    if n % 2 == 1 {
        32 * n * n
    } else {
        64 * n * n
    }
}

fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let options = AnalyticOptions::default().with_conductor_limit(u64::MAX);
    match args.first().map(String::as_str) {
        Some("levels") => {
            let k: usize = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(5);
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
            let mut state: u64 = args.get(2).and_then(|s| s.parse().ok()).unwrap_or(1);
            let lo: u64 = args.get(3).and_then(|s| s.parse().ok()).unwrap_or(10_000);
            let hi: u64 = args.get(4).and_then(|s| s.parse().ok()).unwrap_or(100_000);
            let options = AnalyticOptions::default();
            let mut rows = Vec::new();
            while rows.len() < k {
                state ^= state << 13;
                state ^= state >> 7;
                state ^= state << 17;
                let n = lo + state % (hi - lo + 1);
                if squarefree(n) {
                    rows.push(run(n, &options));
                }
            }
            let proven = rows.iter().filter(|r| r.proven.is_some()).count();
            let skipped = rows.iter().filter(|r| r.skipped).count();
            let med = median(rows.iter().map(|r| r.seconds).collect());
            let total: f64 = rows.iter().map(|r| r.seconds).sum();
            println!(
                "{k} square-free n in [{lo}, {hi}]: rank proven by the analytic side on {proven}, skipped {skipped}; median cpu {med:.4} s, total {total:.1} s"
            );
        }
        Some("compare") => {
            // Both routes on one curve, side by side.
            let n: i64 = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(1);
            let e = Curve::from_ints([0, 0, 0, -n * n, 0]).expect("n > 0");
            let mut budget = Budget::unlimited();
            let local = e.local_data(&mut budget).expect("local data");
            for above in [u64::MAX, 0] {
                let o = options.clone().with_streamed_above(above);
                let cpu0 = thread_cpu_ns().unwrap_or(0);
                let d = analyse(&e, &local, &o, &mut budget).expect("analyse");
                let cpu = thread_cpu_ns().unwrap_or(0) - cpu0;
                println!(
                    "{:?}: w = {:?}, values {:?}, split {:?}, cpu {:.4} s",
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
