//! Factoring never gives up on the easy parts: trial division below 2^16, perfect powers,
//! primality tests on every cofactor and word-size cofactors succeed under a zero budget, and
//! numbers with 25-digit factors (including those of the curve from issue 17) factor under the
//! descent's default budget for their size.
//!
//! Expected factorisations: python-flint 0.9.0 `fmpz.factor` (sympy 1.14.0 `factorint` for the
//! perfect powers), every factor checked prime by
//! sympy 1.14.0 `isprime` (tests/data/gen_factor_easy_parts.py wrote
//! tests/data/factor_easy_parts.txt).

use isodescent::arith::factor;
use isodescent::curve::Curve;
use isodescent::descent::{descend, DescentOptions};
use isodescent::{Budget, Error};
use num_bigint::BigInt;

struct Case {
    label: String,
    budget: u64,
    n: BigInt,
    factors: Vec<(BigInt, u32)>,
}

fn cases() -> Vec<Case> {
    include_str!("data/factor_easy_parts.txt")
        .lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
        .map(|l| {
            let f: Vec<&str> = l.split_whitespace().collect();
            Case {
                label: f[0].to_string(),
                budget: f[1].parse().unwrap(),
                n: f[2].parse().unwrap(),
                factors: f[3]
                    .split('*')
                    .map(|pe| {
                        let (p, e) = pe.split_once('^').unwrap();
                        (p.parse().unwrap(), e.parse().unwrap())
                    })
                    .collect(),
            }
        })
        .collect()
}

#[test]
fn every_vector_factors_within_its_budget_as_flint_says() {
    let all = cases();
    assert_eq!(all.len(), 14);
    for c in &all {
        let mut budget = Budget::with_units(c.budget);
        let f = factor(&c.n, &mut budget)
            .unwrap_or_else(|e| panic!("{} ({} units): {e}", c.label, c.budget));
        assert_eq!(f.factors(), &c.factors[..], "{}", c.label);
        assert!(budget.spent() <= c.budget, "{}", c.label);
    }
}

#[test]
fn zero_budget_cases_spend_nothing() {
    // common practice: the cheap steps are free, so a zero budget is never charged.
    for c in cases().iter().filter(|c| c.budget == 0) {
        let mut budget = Budget::with_units(0);
        factor(&c.n, &mut budget).unwrap();
        assert_eq!(budget.spent(), 0, "{}", c.label);
    }
}

#[test]
fn a_hard_semiprime_under_a_tiny_budget_reports_itself_as_the_cofactor() {
    // p25·q25 from the vectors: no cheap step splits it, so 1000 units cannot; the error
    // carries the whole number as the cofactor (found primes times cofactor = n).
    let c = cases().into_iter().find(|c| c.label == "p25_q25").unwrap();
    match factor(&c.n, &mut Budget::with_units(1000)) {
        Err(Error::FactorBudgetExhausted { found, cofactor }) => {
            assert!(found.is_empty());
            assert_eq!(cofactor, c.n);
        }
        other => panic!("expected exhaustion, got {other:?}"),
    }
    // The smooth part of a number is still returned when the hard part is not split.
    let smooth = BigInt::from(2u32.pow(5) * 3u32.pow(4) * 7) * BigInt::from(65521u32);
    match factor(&(&c.n * &smooth), &mut Budget::with_units(1000)) {
        Err(Error::FactorBudgetExhausted { found, cofactor }) => {
            let primes: Vec<i64> = found.iter().map(|(p, _)| p.try_into().unwrap()).collect();
            assert_eq!(primes, vec![2, 3, 7, 65521]);
            assert_eq!(cofactor, c.n);
        }
        other => panic!("expected exhaustion, got {other:?}"),
    }
}

#[test]
fn the_issue_17_curve_gets_its_descent_under_the_default_options() {
    // y^2 = x^3 + a2 x^2 + a4 x from issue 17, item 3: "factorisation budget exhausted" before.
    let a2: BigInt = "15172737118322249941572073081813580686222403877575"
        .parse()
        .unwrap();
    let a4: BigInt = "133755489096113475297196275045671436418591897502573"
        .parse()
        .unwrap();
    let zero = BigInt::from(0);
    let curve = Curve::from_bigints([zero.clone(), a2, zero.clone(), a4, zero]).unwrap();
    let report = descend(&curve, &DescentOptions::default());
    assert!(report.is_ok(), "{:?}", report.err());
}
