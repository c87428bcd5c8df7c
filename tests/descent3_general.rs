//! Descent via a 3-isogeny with α ≠ 0 (`descent3::descend_3isogeny_general`)
//! on curves y² = x³ + D(αx + β)² and moved models of them.

use isodescent::curve::ModelChange;
use isodescent::descent3::{
    descend_3isogeny, descend_3isogeny_general, Isogeny3GeneralReport, Isogeny3Options, Rank3Proof,
};
use isodescent::{Curve, Error};
use num_bigint::BigInt;
use num_rational::BigRational;

fn q(n: i64) -> BigRational {
    BigRational::from_integer(BigInt::from(n))
}

fn flex(d: i64, a: i64, b: i64) -> Option<Curve> {
    Curve::from_ints([0, d * a * a, 0, 2 * d * a * b, d * b * b]).ok()
}

fn quick() -> Isogeny3Options {
    let mut o = Isogeny3Options::default();
    o.search_height = 15;
    o.analytic = None;
    o
}

fn squarefree(d: i64) -> bool {
    (2..)
        .take_while(|p: &i64| p * p <= d.abs())
        .all(|p| d % (p * p) != 0)
}

fn run(e: &Curve, o: &Isogeny3Options) -> Isogeny3GeneralReport {
    let r = descend_3isogeny_general(e, o).unwrap_or_else(|err| panic!("{err} on {e}"));
    r.recheck().unwrap_or_else(|err| panic!("{err} on {e}"));
    r
}

// Cassels' formula for an isogeny of odd degree ("Arithmetic on curves of
// genus 1, VIII", J. reine angew. Math. 217 (1965); Schaefer–Stoll 2004,
// Lemma 3.8 — from memory) on every curve of the box |D| ≤ 10,
// 1 ≤ α, β ≤ 4: the Selmer ratio from the plane cubics against Tamagawa
// numbers from Tate's algorithm. Also: the points found lie on the curve,
// and a positive lower bound comes with a point of infinite order (order
// above 12: Mazur's bound on rational torsion, from memory).
#[test]
fn cassels_ratio_on_hundreds_of_curves() {
    let (mut n, mut nontrivial, mut positive) = (0, 0, 0);
    for d in (-10i64..=10).filter(|&d| d != 0 && squarefree(d)) {
        for a in 1..=4 {
            for b in 1..=4 {
                let Some(e) = flex(d, a, b) else { continue };
                let r = run(&e, &quick());
                let t = r.tamagawa.as_ref().unwrap();
                assert!(t.holds(), "{e}: {} vs {}", t.selmer_ratio, t.formula);
                nontrivial += usize::from(t.selmer_ratio != q(1));
                assert!(r.rank_lower <= r.rank_upper);
                if r.rank_lower > 0 {
                    positive += 1;
                    assert!(
                        r.points.iter().any(|p| e.order_up_to(p, 12).is_none()),
                        "{e}: a point of infinite order"
                    );
                }
                n += 1;
            }
        }
    }
    assert!(n >= 200, "{n}");
    assert!(nontrivial >= 20, "{nontrivial}");
    assert!(positive >= 20, "{positive}");
}

/// A deterministic stream of small integers (common practice: a linear
/// congruential generator).
struct Lcg(u64);
impl Lcg {
    fn next(&mut self, m: i64) -> i64 {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        ((self.0 >> 33) % (2 * m as u64 + 1)) as i64 - m
    }
}

fn dims(r: &Isogeny3GeneralReport) -> (usize, usize, usize) {
    (
        r.sides[0].selmer_dim(),
        r.sides[1].selmer_dim(),
        r.rank_upper,
    )
}

// Model invariance: random changes of coordinates give the same model
// (D, α, β) and the same Selmer dimensions (common practice: the Selmer
// groups depend on the curve, not on its equation).
#[test]
fn model_invariance() {
    let mut rng = Lcg(314);
    for (d, a, b) in [
        (2, 1, 1),
        (-5, 2, 3),
        (3, 1, 2),
        (1, 2, 5),
        (-1, 3, 1),
        (7, 1, 4),
    ] {
        let e = flex(d, a, b).unwrap();
        let base = run(&e, &quick());
        for _ in 0..3 {
            let u = [q(1), q(-1), q(2), BigRational::new(1.into(), 3.into())]
                [rng.next(1).unsigned_abs() as usize % 4]
                .clone();
            let ch = ModelChange::new(u, q(rng.next(7)), q(rng.next(3)), q(rng.next(7))).unwrap();
            let moved = ch.apply_to_curve(&e);
            let r = run(&moved, &quick());
            assert_eq!(dims(&r), dims(&base), "{moved}");
            assert_eq!(
                (&r.model.d, &r.model.alpha, &r.model.beta),
                (&base.model.d, &base.model.alpha, &base.model.beta)
            );
            assert!(r.tamagawa.unwrap().holds());
        }
    }
}

// y² = x³ + (ax + b)²: the point (0, b) has order 3 (common practice), so
// D = 1 and the torsion correction counts it; the images of the points
// found (the kernel point included) lie in the Selmer groups.
#[test]
fn rational_three_torsion_family() {
    for a in 1..=5 {
        for b in 1..=5 {
            let Some(e) = flex(1, a, b) else { continue };
            let r = run(&e, &quick());
            assert_eq!(r.model.d, BigInt::from(1));
            assert!(r.sides[0].selmer_dim() >= r.sides[0].image_dim, "{e}");
            assert!(
                r.sides[0].generators.len() >= r.sides[0].selmer_dim(),
                "{e}"
            );
            assert!(r.tamagawa.unwrap().holds(), "{e}");
        }
    }
}

// j = 0: y² + y = x³ and y² = x³ + k are also curves with a rational
// 3-isogeny; the general descent (through the best of its isogenies)
// gives bounds compatible with the α = 0 descent (common practice: both
// bound the same rank).
#[test]
fn j_zero_curves_agree_with_the_alpha_zero_descent() {
    let mut curves: Vec<Curve> = vec!["y^2 + y = x^3".parse().unwrap()];
    for k in [2i64, -2, 17, -11, 28, -432, 10] {
        curves.push(Curve::from_ints([0, 0, 0, 0, k]).unwrap());
    }
    for e in &curves {
        let g = run(e, &quick());
        let z = descend_3isogeny(e, &quick()).unwrap();
        assert!(g.rank_upper <= z.rank_upper, "{e}");
        assert!(
            g.rank_lower <= z.rank_upper && z.rank_lower <= g.rank_upper,
            "{e}"
        );
        assert!(g.tamagawa.unwrap().holds(), "{e}");
    }
}

// With the analytic side on (the defaults), every rank proven lies in the
// descent's bounds (checked inside; an Internal error otherwise).
#[test]
fn analytic_side_within_the_bounds() {
    let mut settled = 0;
    let mut n = 0;
    for (d, a, b) in [
        (2, 1, 1),
        (-5, 2, 3),
        (3, 1, 2),
        (-1, 3, 1),
        (7, 1, 4),
        (5, 1, 1),
        (-2, 1, 3),
    ] {
        let e = flex(d, a, b).unwrap();
        let r = run(&e, &Isogeny3Options::default());
        n += 1;
        if let Some((rank, proof)) = r.rank {
            settled += 1;
            assert!(r.rank_lower <= rank && rank <= r.rank_upper);
            if proof == Rank3Proof::Descent {
                assert_eq!(r.rank_lower, r.rank_upper);
            }
        }
    }
    assert!(settled * 2 >= n, "{settled} of {n}");
}

// No rational 3-isogeny: a typed error.
#[test]
fn curves_without_a_three_isogeny() {
    let e: Curve = "0 0 0 -1 1".parse().unwrap();
    assert!(matches!(
        descend_3isogeny_general(&e, &quick()),
        Err(Error::NoSupportedIsogeny { .. })
    ));
}

// Generators on the α ≠ 0 path. y² = x³ + (x + 5)² has a point of
// infinite order with integral x in the search range and the descent
// proves rank 1; the found point is saturated into a proven generator,
// the torsion subgroup contains the kernel point (0, 5) of order 3
// (common practice), and the regulator does not depend on the model: the
// canonical height is invariant under a change of model (Silverman, "The
// Arithmetic of Elliptic Curves", 2nd ed., VIII.9, from memory).
#[test]
fn saturated_generators_and_a_model_free_regulator() {
    let e = flex(1, 1, 5).unwrap();
    let base = run(&e, &quick());
    assert_eq!(base.rank.map(|(r, _)| r), Some(1), "{e}");
    assert_eq!(base.independent_points.len(), 1);
    assert!(base.points_generate(), "saturation: {:?}", base.saturation);
    assert_eq!(base.torsion.order() % 3, 0);
    let reg = base.saturation.as_ref().unwrap().regulator;
    let ch = ModelChange::new(q(2), q(3), q(-1), q(5)).unwrap();
    let moved = ch.apply_to_curve(&e);
    let r = run(&moved, &quick());
    assert!(r.points_generate(), "{moved}");
    let reg2 = r.saturation.as_ref().unwrap().regulator;
    let gap = (reg.value() - reg2.value()).abs();
    assert!(
        gap <= reg.error() + reg2.error() + 1e-12,
        "regulators {} and {} on {e} and {moved}",
        reg.value(),
        reg2.value()
    );
    assert!(reg.value() > 0.1, "{}", reg.value());
}

// The checks of fuzz/fuzz_targets/descend_3isogeny_general.rs as a
// proptest: y² = x³ + D(αx + β)² with D, α ≠ 0, on the model given or
// moved by a change of model. No panic; only budget errors (these curves
// have a rational 3-isogeny); the points lie on the curve; the report
// re-checks (common practice).
mod sweep {
    use super::*;
    use proptest::prelude::*;

    proptest! {
        #![proptest_config(ProptestConfig { cases: 24, ..ProptestConfig::default() })]
        #[test]
        fn no_panic_and_reports_recheck(
            d in -10i64..11, alpha in -4i64..5, beta in -6i64..7,
            moved in any::<bool>(), u in 1i64..6, r in -30i64..30, s in -5i64..5, t in -30i64..30,
        ) {
            if d == 0 || alpha == 0 {
                return Ok(());
            }
            let Some(base) = flex(d, alpha, beta) else {
                return Ok(());
            };
            let curve = if moved {
                ModelChange::new(q(u), q(r), q(s), q(t)).unwrap().apply_to_curve(&base)
            } else {
                base
            };
            let mut opts = Isogeny3Options::default();
            opts.analytic = None;
            opts.local_units = 2_000_000;
            opts.search_units = 200_000;
            opts.factor_units = 2_000_000;
            let out = std::panic::catch_unwind(|| descend_3isogeny_general(&curve, &opts));
            prop_assert!(out.is_ok(), "panic on {}", curve);
            match out.unwrap() {
                Ok(rep) => {
                    prop_assert!(rep.rank_lower <= rep.rank_upper);
                    for p in &rep.points {
                        prop_assert!(curve.contains(p));
                    }
                    prop_assert!(rep.recheck().is_ok());
                }
                Err(Error::BudgetExhausted { .. }) | Err(Error::FactorBudgetExhausted { .. }) => {}
                Err(other) => prop_assert!(false, "{} on {}", other, curve),
            }
        }
    }
}

// The clock holds on both 3-isogeny paths: with a deadline that has
// passed when the descent starts, the answer is a typed budget error or
// a report that names the steps the clock cut (common practice: the
// contract of `Isogeny3Options::time_limit`).
#[test]
fn a_passed_deadline_stops_both_descents() {
    let mut o = Isogeny3Options::default();
    o.time_limit = Some(std::time::Duration::ZERO);
    // y² = x³ + 17 (α = 0, rank 2) and y² = x³ − 7(4x + 3)² (α ≠ 0).
    let e: Curve = "0 0 0 0 17".parse().unwrap();
    match descend_3isogeny(&e, &o) {
        Ok(r) => assert!(!r.cut.is_empty(), "{r}"),
        Err(Error::BudgetExhausted { .. }) | Err(Error::FactorBudgetExhausted { .. }) => {}
        Err(other) => panic!("{other}"),
    }
    let e = flex(-7, 4, 3).unwrap();
    match descend_3isogeny_general(&e, &o) {
        Ok(r) => assert!(!r.cut.is_empty(), "{:?}", r.cut),
        Err(Error::BudgetExhausted { .. }) | Err(Error::FactorBudgetExhausted { .. }) => {}
        Err(other) => panic!("{other}"),
    }
}
