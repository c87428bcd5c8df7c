//! L-values, periods, root numbers, ranks and the ledger on classical
//! curves, and the behaviour on bad input and small budgets.

use crate::analytic::{
    analyse, sha_analytic, AnalyticData, AnalyticOptions, AnalyticOrder, RankTheorem,
    RootNumberRoute, Series, Skip,
};
use crate::arith::Certified;
use crate::curve::{torsion, Curve, Point};
use crate::{Budget, Error};
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::Signed;

/// The committed reference values (shared with the integration tests).
#[path = "../../../tests/values/mod.rs"]
mod reference;

fn run(a: [i64; 5]) -> AnalyticData {
    let e = Curve::from_ints(a).unwrap();
    let mut b = Budget::unlimited();
    let local = e.tate_data(&mut b).unwrap();
    analyse(&e, &local, &AnalyticOptions::default(), &mut b).unwrap()
}

/// The true value lies within the bound and the bound is small.
fn close(x: Certified, expected: f64, expected_accuracy: f64, slack: f64) {
    assert!(
        (x.value() - expected).abs() <= x.error() + expected_accuracy,
        "{x} vs {expected}"
    );
    assert!(x.error() <= slack, "{x}: bound larger than {slack}");
}

/// The conductor, root number, periods and the first non-zero
/// L-derivative computed by `tests/data/gen_curve_values.py` (mpmath,
/// from point counts; see `tests/values/mod.rs`) for the curve `tag`.
fn check_against_reference(tag: &str, d: &AnalyticData, order: usize, slack: f64) {
    assert_eq!(
        d.conductor(),
        &BigInt::from(reference::integer("conductor", &[tag])),
        "{tag}"
    );
    let w = reference::integer("root_number", &[tag]);
    assert_eq!(d.root_number().map(i64::from), Some(w), "{tag}");
    assert_eq!(
        d.real_component_count().map(i64::from),
        Some(reference::integer("components", &[tag])),
        "{tag}"
    );
    close(
        d.least_real_period().unwrap(),
        reference::real("least_period", &[tag]),
        2e-15,
        1e-13,
    );
    close(
        d.real_period().unwrap(),
        reference::real("real_period", &[tag]),
        4e-15,
        1e-13,
    );
    let r = order.to_string();
    close(
        d.l_value(order).unwrap(),
        reference::real("l_derivative", &[tag, &r]),
        2e-14,
        slack,
    );
}

#[test]
fn rank_zero_and_one_values_match_the_independent_computation() {
    let d = run(reference::curve("five_torsion"));
    check_against_reference("five_torsion", &d, 0, 1e-12);
    assert_eq!(
        d.root_number_route(),
        Some(RootNumberRoute::FunctionalEquationAndFormula)
    );
    assert_eq!(d.analytic_rank(), Some(0));
    assert_eq!(
        d.rank_proven(),
        Some((0, RankTheorem::GrossZagierKolyvagin))
    );

    let d = run(reference::curve("rank1_small_conductor"));
    check_against_reference("rank1_small_conductor", &d, 1, 1e-12);
    assert_eq!(
        d.rank_proven(),
        Some((1, RankTheorem::GrossZagierKolyvagin))
    );
    assert!(d.rank_proven().unwrap().1.name().contains("Kolyvagin"));
}

#[test]
fn rank_two_and_three_derivatives_match_the_independent_computation() {
    let d = run(reference::curve("rank2_small_conductor"));
    assert!(d.l_value(0).unwrap().may_be_zero());
    check_against_reference("rank2_small_conductor", &d, 2, 1e-6);
    // only "at most 2" is proven: L''(E,1) is certified non-zero, L(E,1) is
    // small but not proven to vanish
    assert_eq!(d.analytic_order(), Some(AnalyticOrder::AtMost(2)));
    assert_eq!(d.analytic_rank(), None);
    assert_eq!(d.rank_proven(), None);

    let d = run(reference::curve("rank3_small_conductor"));
    assert!(d.l_value(1).unwrap().may_be_zero());
    check_against_reference("rank3_small_conductor", &d, 3, 1e-6);
    assert_eq!(d.analytic_order(), Some(AnalyticOrder::AtMost(3)));
    assert_eq!(d.analytic_rank(), None);
    assert_eq!(d.rank_proven(), None);
}

#[test]
fn lemniscate_period_of_y2_x3_minus_x() {
    // y² = x³ − x: e = 1, 0, −1, ω₁ = π/M(√2, 1), two real components,
    // so Ω = 2ω₁; all values from the script. The curve has CM by Z[i]
    // (j = 1728; Silverman, AEC, III.10.2(b)), so Coates–Wiles applies.
    let d = run(reference::curve("lemniscatic"));
    check_against_reference("lemniscatic", &d, 0, 1e-12);
    assert_eq!(
        d.root_number_route(),
        Some(RootNumberRoute::FunctionalEquation)
    );
    assert_eq!(d.rank_proven(), Some((0, RankTheorem::CoatesWiles)));
    // Ledger: |tors| = 4, c_2 = 2 (Tate's algorithm), Sha_an = 1.
    let e = Curve::from_ints([0, 0, 0, -1, 0]).unwrap();
    let l = e.tate_data(&mut Budget::unlimited()).unwrap();
    let cp: BigInt = l.primes.iter().map(|p| BigInt::from(p.tamagawa)).product();
    let s = sha_analytic(&d, 0, torsion(&e).order(), &cp, None).unwrap();
    assert_eq!(s.nearest_square, Some(1));
    assert!(s.is_square_within_error && s.value.error() < 1e-12);
}

#[test]
fn a_wrong_conductor_or_root_number_fails_the_split_check() {
    // Λ(1) does not depend on the splitting parameter exactly when N and w
    // are right (the functional equation; Cremona, Algorithms, §2.11).
    let e = Curve::from_ints([0, -1, 1, -10, -20]).unwrap();
    let l = e.tate_data(&mut Budget::unlimited()).unwrap();
    let an = crate::analytic::dirichlet_coefficients(&l, 400, &mut Budget::unlimited()).unwrap();
    let mut b = Budget::unlimited();
    for (n, w, ok) in [
        (11u64, 1i8, true),
        (11, -1, false),
        (22, 1, false),
        (121, 1, false),
    ] {
        let s = Series::new(&an, n).unwrap();
        let one = s.g_sum(0, &mut b).unwrap().value() * (1.0 + f64::from(w));
        let base = Certified::new(one, s.g_sum(0, &mut b).unwrap().error() * 2.0).unwrap();
        let split = s.completed_value_split(w, 1.3, &mut b).unwrap();
        assert_eq!(
            split.overlaps(&base),
            ok,
            "N = {n}, w = {w}: {split} vs {base}"
        );
    }
}

/// ĥ(P) = lim h(x(2^n P))/4^n with h(a/b) = log max(|a|, |b|), estimated
/// by the n-th term (its error is O(4^{−n}); Silverman, AEC, VIII.9).
fn naive_canonical_height(e: &Curve, p: &Point, n: u32) -> f64 {
    let mut q = p.clone();
    for _ in 0..n {
        q = e.double(&q);
    }
    let x: &BigRational = q.x().unwrap();
    let m = x.numer().abs().max(x.denom().abs());
    let bits = m.bits() as f64;
    let lead = (&m >> (m.bits().saturating_sub(60) as usize))
        .to_string()
        .parse::<f64>()
        .unwrap();
    let log = lead.ln() + (bits - 60.0).max(0.0) * std::f64::consts::LN_2;
    log / 4f64.powi(n as i32)
}

#[test]
fn rank_one_ledgers_are_squares_with_the_stated_regulator_normalisation() {
    // Points of infinite order (from memory, checked on the curve below):
    // y² + y = x³ − x (0, 0); y² = x³ − 36x (−3, 9); y² = x³ − 25x (−4, 6);
    // y² = x³ − 2 (3, 5). With Reg = lim h(x(2^nP))/4^n, the BSD quotient
    // must be a square, here 1 (that these points generate and that Sha of
    // these curves is trivial: from memory).
    for (a, (x, y)) in [
        ([0, 0, 1, -1, 0], (0, 0)),
        ([0, 0, 0, -36, 0], (-3, 9)),
        ([0, 0, 0, -25, 0], (-4, 6)),
        ([0, 0, 0, 0, -2], (3, 5)),
    ] {
        let e = Curve::from_ints(a).unwrap();
        let p = Point::from_ints(x, y);
        assert!(e.contains(&p));
        let l = e.tate_data(&mut Budget::unlimited()).unwrap();
        let d = analyse(
            &e,
            &l,
            &AnalyticOptions::default(),
            &mut Budget::unlimited(),
        )
        .unwrap();
        assert_eq!(d.rank_proven().map(|r| r.0), Some(1), "{a:?}");
        let h = naive_canonical_height(&e, &p, 7);
        let reg = Certified::new(h, 2e-3 * h).unwrap();
        let cp: BigInt = l.primes.iter().map(|p| BigInt::from(p.tamagawa)).product();
        let s = sha_analytic(&d, 1, torsion(&e).order(), &cp, Some(reg)).unwrap();
        assert_eq!(s.nearest_square, Some(1), "{a:?}: {}", s.value);
        assert!(s.is_square_within_error, "{a:?}: {}", s.value);
        // The other conventions are off by a factor 2.
        let twice = sha_analytic(
            &d,
            1,
            torsion(&e).order(),
            &cp,
            Some(Certified::new(2.0 * h, 4e-3 * h).unwrap()),
        )
        .unwrap();
        assert!(
            !twice.is_square_within_error || twice.nearest_square == Some(0),
            "{a:?}"
        );
        // A missing regulator leaves the entry empty.
        assert!(sha_analytic(&d, 1, 1, &cp, None).is_none());
    }
}

#[test]
fn limits_and_budgets_give_no_value_rather_than_a_guess() {
    let e = Curve::from_ints([0, 0, 1, -7, 6]).unwrap();
    let l = e.tate_data(&mut Budget::unlimited()).unwrap();
    // Conductor above the limit: skipped, nothing computed.
    let o = AnalyticOptions {
        conductor_limit: 1000,
        ..Default::default()
    };
    let d = analyse(&e, &l, &o, &mut Budget::unlimited()).unwrap();
    assert_eq!(d.skipped(), Some(Skip::ConductorAboveLimit));
    assert!(d.l_values().is_empty() && d.analytic_rank().is_none());
    // Five terms: the bounds are huge, so nothing is certified non-zero.
    let o = AnalyticOptions {
        max_terms: 5,
        ..Default::default()
    };
    let d = analyse(&e, &l, &o, &mut Budget::unlimited()).unwrap();
    assert!(d.analytic_rank().is_none() && d.rank_proven().is_none());
    for (_, v) in d.l_values() {
        assert!(v.may_be_zero());
    }
    // A tiny budget is an error, never a value.
    let r = analyse(
        &e,
        &l,
        &AnalyticOptions::default(),
        &mut Budget::with_units(50),
    );
    assert!(matches!(r, Err(Error::BudgetExhausted { .. })));
    // Options out of range.
    for o in [
        AnalyticOptions {
            max_terms: 0,
            ..Default::default()
        },
        AnalyticOptions {
            tolerance: 0.0,
            ..Default::default()
        },
        AnalyticOptions {
            tolerance: f64::NAN,
            ..Default::default()
        },
    ] {
        let r = analyse(&e, &l, &o, &mut Budget::unlimited());
        assert!(matches!(r, Err(Error::InvalidArgument { .. })));
    }
    assert!(Certified::new(1.0, -1.0).is_err());
    assert!(Series::new(&[0, 1], 0).is_err());
}

/// `p ± e` from a `Display` string, as exact rationals.
fn printed(c: &Certified) -> (BigRational, BigRational) {
    let s = c.to_string();
    let (p, e) = s.split_once(" ± ").unwrap();
    (reference::exact_decimal(p), reference::exact_decimal(e))
}

/// The period of y² + xy = x³ + 29x to 40 digits, computed independently
/// with mpmath 1.3.0 (tests/data/gen_period_digits.py): the printed value is
/// within the printed error of it (it was not when the value was rounded
/// to the last digit of the error bar).
#[test]
fn printed_period_is_within_its_printed_error_of_the_true_value() {
    let d = run([1, 0, 0, 29, 0]);
    let omega = d.real_period().unwrap();
    let truth = reference::exact_decimal("1.589561513112141427003747519363278507374");
    let (p, e) = printed(&omega);
    assert!((truth - p).abs() <= e, "{omega}");
}

proptest::proptest! {
    /// The printed interval `p ± e` contains the certified `value ± error`
    /// exactly (parsed back as rationals): |true − p| ≤ e follows
    /// (docs/analytic.md, "Printed values"; common practice for outward
    /// rounding).
    #[test]
    fn printed_interval_contains_the_certified_interval(
        m in -1.0e6f64..1.0e6,
        s in -18i32..8,
        em in 0.0f64..10.0,
        es in -19i32..2,
    ) {
        let value = m * 10f64.powi(s);
        let error = em * 10f64.powi(es);
        let c = Certified::new(value, error).unwrap();
        let (p, e) = printed(&c);
        let v = BigRational::from_float(value).unwrap();
        let r = BigRational::from_float(error).unwrap();
        proptest::prop_assert!(&p - &e <= &v - &r && &v + &r <= &p + &e, "{} from {:e} ± {:e}", c, value, error);
    }
}
