//! A first program written from the README and the rustdoc alone: one
//! curve with its generators and their certificate, the analytic side's
//! certified values, a family scan read back as typed reports, and a serde
//! round trip of a report line.
//!
//! ```text
//! cargo run --release --example from_the_readme
//! ```

use isodescent::descent::verify_report_default;
use isodescent::family::{scan, Family, ScanOptions};
use isodescent::output::ReportRecord;
use isodescent::{descend, Curve, DescentOptions};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    if std::env::args().any(|a| a == "-h" || a == "--help") {
        println!("usage: from_the_readme   (no arguments; prints what the README example finds)");
        return Ok(());
    }
    let options = DescentOptions::default();

    // One curve: the rank, the generators with their certificate.
    let e: Curve = "y^2 = x^3 - 36x".parse()?;
    let report = descend(&e, &options)?;
    println!(
        "{e}: rank in [{}, {}]",
        report.rank_bounds().lower(),
        report.rank_bounds().upper()
    );
    match report.generators() {
        Some(g) => {
            let index_bound = g.certificate().and_then(|c| c.index_bound);
            println!(
                "  {} generator(s) of E(Q) modulo torsion, proven by saturation (index bound {index_bound:?})",
                g.points().len()
            );
            for p in g.points() {
                assert!(e.contains(p));
            }
        }
        None => println!("  {} independent points", report.points().len()),
    }

    // Certified numbers from the analytic side: value ± error.
    if let Some(a) = report.analytic() {
        if let Some(omega) = a.real_period() {
            // Print only the digits the error bound justifies.
            println!("  Ω = {:.13} ± {:.1e}", omega.value(), omega.error());
        }
        println!("  analytic order: {:?}", a.analytic_order());
    }

    // Re-check the evidence with the documented default budget.
    let checks = verify_report_default(&report)?;
    println!(
        "  {} checks, all passed: {}",
        checks.checks.len(),
        checks.all_passed()
    );

    // A family scan handed back as typed reports.
    let family = Family::congruent_numbers(1, 12)?;
    for rec in scan(family.members(), &options, &ScanOptions::default())? {
        let r: ReportRecord = rec.record()?;
        println!(
            "  {}: rank in [{:?}, {:?}], {} point(s)",
            rec.parameter,
            r.rank_lower,
            r.rank_upper,
            r.points.len()
        );
        // A serde round trip: the typed record writes back the same line.
        let again: ReportRecord = serde_json::to_string(&r)?.parse()?;
        assert_eq!(again, r);
    }
    Ok(())
}
