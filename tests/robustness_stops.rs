//! Limits on four more paths: every step that a budget or the clock cuts
//! makes the report partial and names the step; partial bounds take every
//! proven bound; deadlines saturate; exact point arithmetic and the echoed
//! input are bounded. No test is timed: stops are forced by unit budgets
//! or by a deadline that has already passed (read at the first clock
//! check, so the outcome does not depend on the machine). The expectations
//! are the crate's own contract (docs/robustness.md) — common practice —
//! except where a source is named.

use std::time::Duration;

use isodescent::descent::verify_report;
use isodescent::output::{json_for_line, MAX_ECHOED_INPUT_BYTES};
use isodescent::{descend, Completion, Curve, DescentOptions, DescentReport};
use num_bigint::BigInt;

fn curve(line: &str) -> Curve {
    line.parse().unwrap_or_else(|e| panic!("{line}: {e}"))
}

/// The stopped step, or None for a complete report.
fn stopped(r: &DescentReport) -> Option<String> {
    match r.completion() {
        Completion::Partial { step, reason } => {
            assert!(!reason.is_empty());
            Some(step.clone())
        }
        _ => None,
    }
}

fn assert_stopped_at(line: &str, options: &DescentOptions, step: &str) -> DescentReport {
    let r = descend(&curve(line), options).unwrap_or_else(|e| panic!("{line}: {e}"));
    let s = stopped(&r).unwrap_or_else(|| panic!("{line}: complete, expected a stop at {step}"));
    assert!(
        s.contains(step),
        "{line}: stopped at {s:?}, expected {step:?}"
    );
    assert!(r.rank_bounds().lower() <= r.rank_bounds().upper());
    r
}

/// y² = x³ + a x² + x with a of 32 digits (an invented curve of the
/// shape that made the conic enumeration store gigabytes): with a small
/// 4-covering budget the run ends, and the classes that lost their
/// 4-covering evidence make the report partial.
#[test]
fn a_huge_a_with_small_b_ends_and_says_which_step_was_cut() {
    let mut o = DescentOptions::default();
    o.covering_units = 200_000;
    for line in [
        "0 28578968146050458675118783668447 0 1 0",
        "0 123456789012345678901234567 0 -3 0",
    ] {
        let r = assert_stopped_at(line, &o, "4-covering route");
        // Whatever was cut, the bounds stay proven: within the 2-Selmer bound.
        let s2 = r.selmer2_rank().expect("pairing computed");
        assert!(r.rank_bounds().upper() < s2, "{line}");
        let v = verify_report(&r, 1_000_000).unwrap();
        assert!(v.failures().is_empty(), "{line}: {:?}", v.failures());
    }
}

/// y² = x³ − 263² x: the analytic side settles rank 1 (Gross–Zagier and
/// Kolyvagin), the descent finds no point; a deep search without the
/// budget to find the generator must say it stopped. (263 ≡ 7 mod 8, so
/// the Heegner step would find the generator first: it is off here, and
/// the deep search is the only route to the point.)
#[test]
fn a_deep_search_cut_by_its_budget_makes_the_report_partial() {
    let line = "0 0 0 -69169 0";
    let mut o = DescentOptions::default();
    o.global_units = 1_000_000;
    // n = 263 ≡ 7 (mod 8): the Heegner step would find the point before
    // the deep search runs; this test is about the deep search.
    o.heegner = None;
    let r = assert_stopped_at(line, &o, "deep search for points");
    assert_eq!((r.rank_bounds().lower(), r.rank_bounds().upper()), (1, 1));
    assert!(r.points().is_empty() && r.generators().is_none());
    // With the default budget the generator is found and the report is
    // complete (the same options otherwise).
    let mut d = DescentOptions::default();
    d.heegner = None;
    let full = descend(&curve(line), &d).unwrap();
    assert_eq!(stopped(&full), None);
    assert_eq!(full.points().len(), 1);
}

#[test]
fn each_stopped_step_is_named() {
    let line = "0 -30 0 3 0";
    let d = DescentOptions::default();

    let mut o = d.clone();
    o.search_units = 1;
    assert_stopped_at(line, &o, "isogeny 1: point search");

    let mut o = d.clone();
    o.analytic = None;
    o.global_units = 1;
    assert_stopped_at(line, &o, "saturation");

    let mut o = d.clone();
    o.global_units = 1;
    assert_stopped_at(line, &o, "analytic side");

    // A deadline that has passed when the descent starts: Tate's algorithm
    // reads the clock before each prime, so it stops first; the descent
    // still answers (its units never reach a clock check on this curve),
    // without local data.
    let mut o = d.clone();
    o.time_limit = Some(Duration::ZERO);
    let r = assert_stopped_at(line, &o, "local data (Tate's algorithm)");
    assert!(r.tate_data().is_none());
    assert_eq!((r.rank_bounds().lower(), r.rank_bounds().upper()), (2, 2));
    let json = isodescent::output::report_line(line, &r, isodescent::Detail::Summary);
    let v: serde_json::Value = serde_json::from_str(&json).unwrap();
    assert_eq!(v["status"], "partial");
    assert!(v["conductor"].is_null() && v["minimal_model"].is_null());
}

/// A partial report's upper bound takes the 2-Selmer bound
/// rank ≤ dim Sel²(E) − dim E(Q)\[2\] (E(Q)/2E(Q) embeds in Sel²(E);
/// [Silverman, The Arithmetic of Elliptic Curves, X.4]) and the liftable
/// subgroups. Checked on the first descent alone over a box: the bound
/// holds, it is sharper than every isogeny's own bound on some curves, and
/// it never falls below the lower bound of the full run (which is proven
/// by points).
#[test]
fn partial_bounds_take_the_two_selmer_rank() {
    let local = DescentOptions::default().local_conditions_only();
    let full = DescentOptions::default().descent_only();
    let mut sharper = 0;
    for a in -9i64..=9 {
        for b in -9i64..=9 {
            if b == 0 || a * a == 4 * b {
                continue;
            }
            let c = Curve::from_ints([0, a, 0, b, 0]).unwrap();
            let r = descend(&c, &local).unwrap();
            let s2 = r
                .selmer2_rank()
                .expect("the pairing runs under local conditions");
            let (_, n2) = r.torsion().structure();
            let two = if n2 <= 1 { 1 } else { 2 };
            assert!(r.rank_bounds().upper() <= s2 - two, "0 {a} 0 {b} 0");
            let own = r
                .isogenies()
                .iter()
                .map(|d| d.rank_bounds().upper())
                .min()
                .unwrap();
            if own > r.rank_bounds().upper() {
                sharper += 1;
            }
            let f = descend(&c, &full).unwrap();
            assert!(
                f.rank_bounds().lower() <= r.rank_bounds().upper(),
                "0 {a} 0 {b} 0"
            );
            let v = verify_report(&r, 1_000_000).unwrap();
            assert!(v.failures().is_empty(), "0 {a} 0 {b} 0: {:?}", v.failures());
        }
    }
    assert!(sharper > 0);
}

/// y² = x³ − n²x with n the product of the first 60 primes: with a local
/// budget too small for the local images at 60 primes every first descent
/// stops, and the answer is partial with the bound of the classes'
/// supports, r ≤ ω(b) + ω(a² − 4b) ([Silverman–Tate, Rational Points on
/// Elliptic Curves, III.6]: the images lie in the groups generated by −1
/// and the primes of b, resp. a² − 4b), here 60 + 60 (n is even, so
/// 4n² has the same primes as n²).
#[test]
fn a_congruent_curve_with_many_primes_gets_a_partial_answer() {
    let mut primes = Vec::new();
    let mut k = 2u64;
    while primes.len() < 60 {
        if (2..k).take_while(|d| d * d <= k).all(|d| k % d != 0) {
            primes.push(k);
        }
        k += 1;
    }
    let n: BigInt = primes.iter().map(|&p| BigInt::from(p)).product();
    let line = format!("0 0 0 {} 0", -(&n * &n));
    let mut o = DescentOptions::default();
    o.local_units = 2_000;
    let r = descend(&curve(&line), &o).expect("a partial answer, not an error");
    assert!(stopped(&r).is_some());
    assert!(r.isogenies().is_empty());
    assert_eq!((r.rank_bounds().lower(), r.rank_bounds().upper()), (0, 120));
    let v = verify_report(&r, 1_000_000).unwrap();
    assert!(v.failures().is_empty(), "{:?}", v.failures());
}

#[test]
fn an_unrepresentable_time_limit_is_no_limit() {
    let c = curve("0 -30 0 3 0");
    let plain = descend(&c, &DescentOptions::default()).unwrap();
    for limit in [Duration::MAX, Duration::from_secs(u64::MAX)] {
        let mut o = DescentOptions::default();
        o.time_limit = Some(limit);
        let r = descend(&c, &o).unwrap();
        assert_eq!(stopped(&r), None);
        assert_eq!(r.rank_bounds(), plain.rank_bounds());
    }
}

#[test]
fn a_long_input_line_is_echoed_cut_with_its_length() {
    let long = format!("0 0 0 {} 0", "7".repeat(100_000));
    let out = json_for_line(&long, &DescentOptions::default());
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let input = v["input"].as_str().unwrap();
    assert!(input.len() < 400, "{} bytes echoed", input.len());
    assert!(input.ends_with(&format!("({} bytes in all)", long.len())));
    assert!(long.starts_with(input.split('…').next().unwrap()));
    assert!(v["error"].is_string());
    // A line the parser accepts is echoed whole.
    let ok = "0 -30 0 3 0";
    let v: serde_json::Value =
        serde_json::from_str(&json_for_line(ok, &DescentOptions::default())).unwrap();
    assert_eq!(v["input"], ok);
    // The longest line the parser accepts (padded with spaces) is echoed
    // whole too.
    let longest = format!("{ok:<width$}", width = MAX_ECHOED_INPUT_BYTES);
    let v: serde_json::Value =
        serde_json::from_str(&json_for_line(&longest, &DescentOptions::default())).unwrap();
    assert!(v["error"].is_null(), "{}", v["error"]);
    assert_eq!(v["input"].as_str().unwrap().len(), MAX_ECHOED_INPUT_BYTES);
}
