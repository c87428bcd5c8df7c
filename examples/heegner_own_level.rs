//! The Heegner step at the curve's own level on curves given as five
//! coefficients per line (stdin), with the predicted height of a
//! generator from the descent's ledger, and the time per curve.
//!
//! ```text
//! heegner_own_level [MAX_TERMS [SECONDS]] < curves.txt
//! ```
//! A line `a1 a2 a3 a4 a6 | x y` only saturates the given point (to prove
//! a point found earlier a generator without recomputing it).
//! MAX_TERMS replaces the default cap on the series terms of one attempt;
//! SECONDS bounds the Heegner step of each curve (the outcome is then a
//! budget error).
//! Prints, per curve: the coefficients, the conductor, the outcome (D,
//! h(D), bits, terms, the point), and the wall time of the Heegner step
//! alone (the descent and analytic side that predict the height are not
//! timed).

use std::io::BufRead;
use std::time::Instant;

use isodescent::curve::Curve;
use isodescent::curve::Point;
use isodescent::descent::{descend, DescentOptions};
use isodescent::heegner::{heegner_point, HeegnerOptions, HeegnerOutcome};
use isodescent::height::{saturate, SaturationOptions};
use isodescent::Budget;

/// Saturation of one point: "index k, proven generator" or why not.
fn saturation_word(curve: &Curve, p: &Point) -> String {
    match saturate(
        curve,
        std::slice::from_ref(p),
        &SaturationOptions::default(),
        &mut Budget::unlimited(),
    ) {
        Ok(s) => format!(
            "saturation: index found {}, proven saturated {}, generator height {:?}",
            s.index_found, s.proven_saturated, s.heights
        ),
        Err(e) => format!("saturation: {e}"),
    }
}

fn main() {
    let max_terms: Option<u64> = std::env::args().nth(1).and_then(|a| a.parse().ok());
    let seconds: Option<u64> = std::env::args().nth(2).and_then(|a| a.parse().ok());
    for line in std::io::stdin().lock().lines() {
        let Ok(line) = line else { break };
        let line = line.trim();
        if line.is_empty() || line.starts_with('#') {
            continue;
        }
        if let Some((c, pt)) = line.split_once('|') {
            let curve: Curve = match c.trim().parse() {
                Ok(c) => c,
                Err(e) => {
                    println!("{line}: {e}");
                    continue;
                }
            };
            let xy: Vec<num_rational::BigRational> = pt
                .split_whitespace()
                .filter_map(|t| t.parse().ok())
                .collect();
            if xy.len() != 2 || !curve.contains(&Point::new(xy[0].clone(), xy[1].clone())) {
                println!("{line}: not a point of the curve");
                continue;
            }
            let p = Point::new(xy[0].clone(), xy[1].clone());
            println!("{line} | {}", saturation_word(&curve, &p));
            continue;
        }
        let curve: Curve = match line.parse() {
            Ok(c) => c,
            Err(e) => {
                println!("{line}: {e}");
                continue;
            }
        };
        let mut opts = DescentOptions::default();
        opts.heegner = None;
        let report = match descend(&curve, &opts) {
            Ok(r) => r,
            Err(e) => {
                println!("{line}: {e}");
                continue;
            }
        };
        // BSD with #Ш = 1 (a conjecture, used only to size the precision):
        // ĥ = L'(E,1)·|T|²/(Ω·∏c_p).
        let predicted = (|| {
            let a = report.analytic()?;
            let l = a.l_value(1)?.value();
            let omega = a.real_period()?.value();
            let cp: f64 = report
                .tate_data()?
                .primes
                .iter()
                .map(|p| p.tamagawa as f64)
                .product();
            let t = f64::from(report.torsion().order());
            Some(l * t * t / (omega * cp)).filter(|h| h.is_finite() && *h > 0.0)
        })();
        let mut h = HeegnerOptions::default();
        if let Some(t) = max_terms {
            h.max_own_level_terms = t;
        }
        let t0 = Instant::now();
        let mut budget = match seconds {
            Some(s) => Budget::unlimited().with_deadline(t0 + std::time::Duration::from_secs(s)),
            None => Budget::unlimited(),
        };
        let out = heegner_point(&curve, predicted, &h, &mut budget);
        let secs = t0.elapsed().as_secs_f64();
        let what = match out {
            Ok(HeegnerOutcome::Found(p)) => format!(
                "found D = {} h = {} level {} bits {} terms {} index {} factor {} point {:?} {}",
                p.discriminant,
                p.class_number,
                p.level,
                p.precision_bits,
                p.terms,
                p.index,
                p.trace_factor,
                p.point,
                saturation_word(&curve, &p.point)
            ),
            Ok(other) => format!("{other:?}"),
            Err(e) => format!("error: {e}"),
        };
        println!(
            "{line} | points {} | predicted {predicted:?} | {what} | {secs:.2} s",
            report.points().len()
        );
    }
}
