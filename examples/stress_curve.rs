//! Runs the descent with default options on curves read from stdin, one
//! per line as five integers `a1 a2 a3 a4 a6`, and prints one line per
//! curve: the rank bounds, the 2-Selmer rank and the wall time. The
//! measurement behind the stress table in docs/performance.md (run each
//! line under `/usr/bin/time -v` for the peak memory).
//!
//! ```text
//! echo "0 -1 0 -497668710 0" | cargo run --release --example stress_curve
//! ```

use std::io::{self, BufRead};
use std::process::ExitCode;
use std::str::FromStr;
use std::time::Instant;

use isodescent::curve::Curve;
use isodescent::descent::{descend, DescentOptions};
use num_bigint::BigInt;

fn main() -> ExitCode {
    if std::env::args().any(|a| a == "-h" || a == "--help") {
        println!(
            "usage: stress_curve < FILE\n  one curve per stdin line as five integers a1 a2 a3 a4 a6;\n  prints the rank bounds, the 2-Selmer rank and the wall time of each\n  (exit status 1 if a line is bad or a descent fails)"
        );
        return ExitCode::SUCCESS;
    }
    if std::env::args().len() > 1 {
        eprintln!("stress_curve takes no arguments (curves come on stdin); see --help");
        return ExitCode::from(2);
    }
    let stdin = io::stdin();
    let mut status = ExitCode::SUCCESS;
    for line in stdin.lock().lines() {
        let Ok(line) = line else {
            return ExitCode::from(2);
        };
        let t = line.trim();
        if t.is_empty() || t.starts_with('#') {
            continue;
        }
        let parsed: Option<Vec<BigInt>> = t
            .split_whitespace()
            .map(|w| BigInt::from_str(w).ok())
            .collect();
        let Some(c) = parsed.filter(|v| v.len() == 5) else {
            println!("bad line: {t}");
            status = ExitCode::from(1);
            continue;
        };
        let coeffs = [
            c[0].clone(),
            c[1].clone(),
            c[2].clone(),
            c[3].clone(),
            c[4].clone(),
        ];
        let curve = match Curve::from_bigints(coeffs) {
            Ok(curve) => curve,
            Err(e) => {
                println!("error: {e}");
                continue;
            }
        };
        let start = Instant::now();
        let mut options = DescentOptions::default();
        if std::env::var_os("STRESS_NO_SECOND").is_some() {
            options.four_coverings = false;
        }
        if std::env::var_os("STRESS_NO_SEARCH").is_some() {
            options.max_classes_searched = 0;
        }
        let out = descend(&curve, &options);
        let ms = start.elapsed().as_secs_f64() * 1e3;
        match out {
            Ok(r) => {
                if std::env::var_os("STRESS_DETAIL").is_some() {
                    for d in r.isogenies() {
                        for side in [&d.domain(), &d.codomain()] {
                            println!(
                                "  side b={}: dim Sel {}, dim I {:?}, dim K {}, searches {}, 4-covering runs {:?}, pairing error {:?}",
                                side.model().b(),
                                side.group().dim(),
                                side.pairing().map(|p| p.liftable.dim()),
                                side.known().dim(),
                                side.searches().len(),
                                side.covering_runs()
                                    .iter()
                                    .map(|r| format!("{}: {}", r.class, r.verdict.word()))
                                    .collect::<Vec<_>>(),
                                side.pairing_error.as_ref().map(|e| e.to_string())
                            );
                        }
                    }
                }
                let sel: Vec<String> = r
                    .isogenies()
                    .iter()
                    .map(|d| d.selmer2_rank().map_or("?".to_string(), |r| r.to_string()))
                    .collect();
                println!(
                    "bounds {}..{} selmer2 {} time_ms {:.1}",
                    r.rank_bounds().lower(),
                    r.rank_bounds().upper(),
                    sel.join("/"),
                    ms
                );
            }
            Err(e) => println!("error: {e} time_ms {ms:.1}"),
        }
    }
    status
}
