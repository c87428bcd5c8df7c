//! Every limit holds: hostile inputs answer under a small wall-clock limit
//! (with a generous margin for noisy machines), and a budget that runs out
//! gives a partial report whose bounds contain the complete run's.
//! (Inputs found by trying the front end as a user would; the
//! expectations are the crate's own contract, docs/robustness.md —
//! common practice.)

use std::time::{Duration, Instant};

use isodescent::{descend, Completion, Curve, DescentOptions, Error};
use proptest::prelude::*;

/// The first k odd primes multiplied.
fn odd_primorial(k: usize) -> num_bigint::BigInt {
    let mut primes = Vec::new();
    let mut n = 3u64;
    while primes.len() < k {
        if (2..n).take_while(|d| d * d <= n).all(|d| n % d != 0) {
            primes.push(n);
        }
        n += 2;
    }
    primes
        .iter()
        .map(|&p| num_bigint::BigInt::from(p))
        .product()
}

fn corpus() -> Vec<String> {
    let n = odd_primorial(24);
    vec![
        "y^2 = x^3 - x^2 - 497668710x".to_string(),
        "0 0 0 -3350578859899071649 0".to_string(),
        // y^2 = x(x - n)(x - 2n) = x^3 - 3n x^2 + 2n^2 x
        format!("0 {} 0 {} 0", -3 * &n, 2 * &n * &n),
        "0 15172737118322249941572073081813580686222403877575 0 133755489096113475297196275045671436418591897502573 0".to_string(),
        format!("0 {}/7 0 {}/11 0", "9".repeat(300), "8".repeat(300)),
    ]
}

#[test]
fn hostile_lines_answer_within_the_limit_plus_margin() {
    let limit = Duration::from_secs(2);
    let mut opts = DescentOptions::default();
    opts.time_limit = Some(limit);
    for line in corpus() {
        let c: Curve = line.parse().unwrap_or_else(|e| panic!("{line}: {e}"));
        let t = Instant::now();
        let result = descend(&c, &opts);
        let took = t.elapsed();
        // The documented margin is a quarter of the limit (at least 1 s)
        // for the first-descent fallback; machines are noisy, so allow far
        // more here: the point is that nothing runs unbounded.
        assert!(took < limit * 15, "{line}: {took:?}");
        match result {
            Ok(r) => {
                assert!(r.rank_bounds().lower() <= r.rank_bounds().upper(), "{line}");
                if let Completion::Partial { step, reason } = r.completion() {
                    assert!(!step.is_empty() && !reason.is_empty(), "{line}");
                }
            }
            Err(e) => assert!(
                matches!(
                    e,
                    Error::BudgetExhausted { .. } | Error::FactorBudgetExhausted { .. }
                ),
                "{line}: {e}"
            ),
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(24))]
    /// For any budget, a report is complete or says which step stopped, and
    /// its bounds contain the bounds of the complete run.
    #[test]
    fn a_partial_report_contains_the_complete_bounds(
        a in -20i64..20,
        b in -40i64..40,
        units in prop_oneof![Just(1u64), 10u64..1000, 1000u64..100_000],
    ) {
        let Ok(c) = Curve::from_ints([0, a, 0, b, 0]) else { return Ok(()); };
        let full = descend(&c, &DescentOptions::default().descent_only()).unwrap();
        let mut small = DescentOptions::default().descent_only();
        small.local_units = units;
        small.search_units = units;
        small.covering_units = units;
        match descend(&c, &small) {
            Ok(r) => {
                if r.completion().is_complete() {
                    prop_assert!(r.rank_bounds().lower() <= full.rank_bounds().lower());
                } else {
                    let partial = matches!(r.completion(), Completion::Partial { .. });
                    prop_assert!(partial);
                }
                prop_assert!(r.rank_bounds().lower() <= full.rank_bounds().lower());
                prop_assert!(r.rank_bounds().upper() >= full.rank_bounds().upper());
            }
            Err(e) => prop_assert!(matches!(e, Error::BudgetExhausted { .. }), "{}", e),
        }
    }
}
