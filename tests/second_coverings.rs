//! The second descent (4-coverings of C_d) against outside sources: the
//! Lind–Reichardt curve, congruent numbers with large generators, and
//! soundness sweeps; plus its errors and the re-checking of its evidence.

use isodescent::curve::{Curve, Point};
use isodescent::descent::{descend_isogeny, ClassStatus, DescentOptions};
use isodescent::local::{Place, Prime};
use isodescent::quartic::{locally_soluble, Quartic};
use isodescent::quartic::{search, SearchOptions, SearchOutcome};
use isodescent::second::{
    second_descent, verify_obstruction, NoPointEvidence, ObstructedCurve, SecondDescentOptions,
    SecondDescentOutcome,
};
use isodescent::{Budget, Error};
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Zero};

/// The checked model y² = x³ + ax² + bx of a test curve (non-singular by choice).
fn rm(a: &num_bigint::BigInt, b: &num_bigint::BigInt) -> isodescent::curve::ReducedModel {
    isodescent::curve::ReducedModel::new(a.clone(), b.clone()).expect("a non-singular test curve")
}

fn big(n: i64) -> BigInt {
    BigInt::from(n)
}

fn run(a: i64, b: i64, d: i64) -> isodescent::Result<SecondDescentOutcome> {
    let model = isodescent::curve::ReducedModel::new(big(a), big(b))?;
    second_descent(
        &model,
        &big(d),
        &SecondDescentOptions::default(),
        &mut Budget::unlimited(),
    )
}

fn lind_evidence() -> NoPointEvidence {
    match run(0, -68, 2).unwrap() {
        SecondDescentOutcome::NoPoint(ev) => ev,
        other => panic!("expected NoPoint, got {other:?}"),
    }
}

// Lind (1940) and Reichardt (1942): 2Y² = 1 − 17X⁴ has points over R and
// every Q_p but no rational point. With X = e/M... precisely: for
// (X, Y) = (M/e, N/(2e²)), 2Y² = 1 − 17X⁴ becomes N² = 2e⁴ − 34M⁴, which is
// C_d: N² = d M⁴ + a M²e² + (b/d) e⁴ for E: y² = x³ − 68x, d = −34 (b/d = 2),
// or with M and e exchanged d = 2 (b/d = −34). The classes 2 and −34 differ
// by b = −68 ≡ −17, the image of the torsion point (0, 0).

#[test]
fn the_lind_reichardt_space_is_c_2_on_y2_equals_x3_minus_68x() {
    // N² = 2M⁴ − 34e⁴ is [2, 0, 0, 0, −34] = two_isogeny_space(2, 0, −68).
    let q = Quartic::two_isogeny_space(&big(2), &big(0), &big(-68)).unwrap();
    assert_eq!(q.coeffs(), &[2, 0, 0, 0, -34].map(BigInt::from));
    // And 2Y² = 1 − 17X⁴ at X = M/e, Y = N/(2e²): 2N²/(4e⁴) = 1 − 17M⁴/e⁴
    // ⇔ N² = 2e⁴ − 34M⁴: check on a few (M, e) that both sides agree.
    for (m, e) in [(1i64, 1i64), (2, 3), (5, 7)] {
        let n2 = 2 * e.pow(4) - 34 * m.pow(4);
        let x = BigRational::new(big(m), big(e));
        let lhs = BigRational::new(big(2 * n2), big(4 * e.pow(4)));
        let rhs = BigRational::one() - BigRational::from_integer(big(17)) * x.pow(4);
        assert_eq!(lhs, rhs);
    }
}

#[test]
fn the_lind_reichardt_class_is_locally_soluble_everywhere_and_left_undecided_by_the_first_descent()
{
    // Lind 1940, Reichardt 1942: everywhere locally soluble. Only R, 2 and
    // 17 can obstruct (the primes of 2·b·(a² − 4b) = 2·68·272).
    let q = Quartic::two_isogeny_space(&big(2), &big(0), &big(-68)).unwrap();
    for place in [
        Place::Real,
        Place::Finite(Prime::two()),
        Place::Finite(Prime::small(17).unwrap()),
    ] {
        let s = locally_soluble(&q, &place, &mut Budget::unlimited()).unwrap();
        assert!(s.is_soluble(), "insoluble at {place}");
        assert!(s.point().unwrap().verify(&q));
    }
    // The first descent finds no point on the class of 2 (and so leaves it
    // undecided, or it would have been a point image).
    let c = Curve::from_ints([0, 0, 0, -68, 0]).unwrap();
    let desc = descend_isogeny(&c, &Point::from_ints(0, 0), &{
        let mut o = DescentOptions::default();
        o.four_coverings = false;
        o
    })
    .unwrap();
    let undecided: Vec<&BigInt> = desc
        .domain()
        .elements()
        .iter()
        .filter(|e| e.status == ClassStatus::Undecided)
        .map(|e| &e.class)
        .collect();
    assert!(
        undecided.iter().any(|c| **c == big(2) || **c == big(-34)),
        "undecided classes: {undecided:?}"
    );
}

#[test]
fn the_second_descent_proves_the_lind_reichardt_class_is_not_an_image() {
    let ev = lind_evidence();
    assert!(verify_obstruction(
        &rm(&big(0), &big(-68)),
        &big(2),
        &ev,
        &mut Budget::unlimited()
    ));
    // The same for the other representative −34 of the coset.
    match run(0, -68, -34).unwrap() {
        SecondDescentOutcome::NoPoint(ev2) => {
            assert!(verify_obstruction(
                &rm(&big(0), &big(-68)),
                &big(-34),
                &ev2,
                &mut Budget::unlimited()
            ))
        }
        other => panic!("expected NoPoint for −34, got {other:?}"),
    }
}

#[test]
fn every_quartic_obstruction_of_the_lind_reichardt_class_rechecks_with_the_local_solubility_test() {
    let ev = lind_evidence();
    // Lemma Λ: the twists are the signed square-free products of the
    // primes of 2·d·Res, and each one has an obstruction.
    assert!(!ev.obstructions.is_empty());
    for o in &ev.obstructions {
        match (&o.curve, o.quartic_coefficients()) {
            (ObstructedCurve::Quartic { .. }, Some(coeffs)) => {
                let q = Quartic::new(coeffs.clone()).unwrap();
                let s = locally_soluble(&q, &o.place, &mut Budget::unlimited()).unwrap();
                assert!(!s.is_soluble(), "λ = {}: soluble at {}", o.lambda, o.place);
            }
            (ObstructedCurve::Conic { .. }, None) => {}
            other => panic!("λ = {}: {other:?}", o.lambda),
        }
    }
}

#[test]
fn tampered_evidence_does_not_verify() {
    let ev = lind_evidence();
    let ok = |e: &NoPointEvidence| {
        verify_obstruction(
            &rm(&big(0), &big(-68)),
            &big(2),
            e,
            &mut Budget::unlimited(),
        )
    };
    assert!(ok(&ev));
    // Drop one twist's obstruction.
    let mut e1 = ev.clone();
    e1.obstructions.pop();
    assert!(!ok(&e1));
    // Change a covering coefficient.
    let mut e2 = ev.clone();
    if let ObstructedCurve::Quartic { coeffs, .. } = &mut e2.obstructions[0].curve {
        coeffs[4] += 1;
    }
    assert!(!ok(&e2));
    // Claim the wrong place: R and 2 cannot both be the obstruction of one
    // quartic unless it is insoluble at both, so pick a good prime.
    let mut e3 = ev.clone();
    e3.obstructions[0].place = Place::Finite(Prime::small(101).unwrap());
    assert!(!ok(&e3));
    // Break the conic parametrisation.
    let mut e4 = ev.clone();
    e4.conic_forms[0][0] += 1;
    assert!(!ok(&e4));
    // The evidence belongs to d = 2, not to another class or curve.
    assert!(!verify_obstruction(
        &rm(&big(0), &big(-68)),
        &big(17),
        &ev,
        &mut Budget::unlimited()
    ));
    assert!(!verify_obstruction(
        &rm(&big(1), &big(-68)),
        &big(2),
        &ev,
        &mut Budget::unlimited()
    ));
}

/// A point of E_n: y² = x³ − n²x (or its isogenous curve) of infinite order
/// found through a 4-covering, beyond the first descent's height 128.
fn check_large_point(b: i64, d: i64, n: i64, min_height: i64) {
    let (a, b, d) = (big(0), big(b), big(d));
    // The first descent's search at its default height 128 finds nothing.
    let space = Quartic::two_isogeny_space(&d, &a, &b).unwrap();
    let out = search(
        space.coeffs(),
        &SearchOptions::up_to(128),
        &mut Budget::unlimited(),
    )
    .unwrap();
    assert_eq!(out, SearchOutcome::NoneUpTo { height: 128 }, "n = {n}");
    match second_descent(
        &rm(&a, &b),
        &d,
        &SecondDescentOptions::default(),
        &mut Budget::unlimited(),
    )
    .unwrap()
    {
        SecondDescentOutcome::Point {
            space_point,
            point_x,
            point_y,
            covering,
            covering_point,
            ..
        } => {
            assert!(covering_point.lies_on(&covering));
            assert!(space_point.lies_on(space.coeffs()));
            assert!(space_point.height() > big(min_height), "n = {n}");
            let bq = BigRational::from_integer(b.clone());
            assert_eq!(
                &point_y * &point_y,
                &point_x * &point_x * &point_x + bq * &point_x
            );
            // Not a 2-torsion point (y ≠ 0); the torsion of E_n and of its
            // 2-isogenous curve is 2-torsion only (Koblitz, Introduction to
            // Elliptic Curves and Modular Forms, I.9, Prop. 17; from memory),
            // so the point has infinite order and n is congruent.
            assert!(!point_y.is_zero());
        }
        other => panic!("n = {n}: expected a point, got {other:?}"),
    }
}

#[test]
fn a_covering_finds_the_point_of_53_that_the_first_search_misses() {
    // 53 ≡ 5 mod 8 is congruent (Tunnell's equality holds; in the classical
    // list of congruent numbers, from memory). The class 53 on
    // y² = x³ + 4·53²x (the curve 2-isogenous to E_53).
    check_large_point(4 * 53 * 53, 53, 53, 128);
}

#[test]
fn a_covering_finds_the_point_of_142_whose_space_point_has_height_above_8000() {
    // 142 ≡ 6 mod 8: root number −1, Tunnell's equality holds (checked in
    // tests/second_coverings_congruent.rs); the covering gives the point
    // (M, e) = (71291, 8183) on C_2 (found in a recorded run).
    check_large_point(-142 * 142, 2, 142, 8000);
}

#[test]
fn classes_with_a_known_point_are_never_declared_pointless() {
    // Soundness sweep (common practice): for small curves y² = x³ + ax² + bx
    // and every divisor d of b with a point of small height on C_d, the
    // second descent must not return NoPoint, and any point it returns must
    // lie on E.
    let mut checked = 0;
    for a in -4i64..=4 {
        for b in [-30i64, -21, -15, -12, -6, -5, -2, 2, 3, 6, 10, 14, 15, 21] {
            if a * a - 4 * b == 0 {
                continue;
            }
            for d in (1..=b.abs()).filter(|k| b % k == 0).flat_map(|k| [k, -k]) {
                let is_square = (0..=d).any(|r| r * r == d);
                if is_square {
                    continue;
                }
                let space = Quartic::two_isogeny_space(&big(d), &big(a), &big(b)).unwrap();
                let found = matches!(
                    search(
                        space.coeffs(),
                        &SearchOptions::up_to(30),
                        &mut Budget::unlimited()
                    )
                    .unwrap(),
                    SearchOutcome::Found(_)
                );
                if !found {
                    continue;
                }
                let out = run(a, b, d).unwrap();
                assert!(
                    !matches!(out, SecondDescentOutcome::NoPoint(_)),
                    "a = {a}, b = {b}, d = {d}"
                );
                if let SecondDescentOutcome::Point {
                    point_x, point_y, ..
                } = out
                {
                    let (aq, bq) = (
                        BigRational::from_integer(big(a)),
                        BigRational::from_integer(big(b)),
                    );
                    assert_eq!(
                        &point_y * &point_y,
                        &point_x * &point_x * &point_x + aq * &point_x * &point_x + bq * &point_x
                    );
                }
                checked += 1;
            }
        }
    }
    assert!(checked > 50, "only {checked} classes checked");
}

#[test]
fn a_zero_class_is_an_error() {
    assert!(matches!(run(0, -68, 0), Err(Error::Zero { .. })));
}

#[test]
fn a_class_not_dividing_b_is_an_error() {
    assert!(matches!(run(0, -68, 3), Err(Error::InvalidArgument { .. })));
}

#[test]
fn a_singular_curve_is_an_error() {
    // y² = x³ + 2x² + x = x(x + 1)²: a² − 4b = 0 (the checked model
    // refuses it before the second descent runs).
    assert!(matches!(run(2, 1, -1), Err(Error::SingularCurve { .. })));
    assert!(matches!(run(2, 0, 1), Err(Error::SingularCurve { .. })));
}

#[test]
fn the_square_class_is_an_error() {
    assert!(matches!(run(0, -68, 1), Err(Error::InvalidArgument { .. })));
    assert!(matches!(run(0, -68, 4), Err(Error::InvalidArgument { .. })));
}

#[test]
fn a_class_insoluble_over_the_reals_is_an_error() {
    // y² = x³ + x, d = −1: N² = −M⁴ − e⁴ has no real point.
    match run(0, 1, -1) {
        Err(Error::InvalidArgument { reason }) => assert!(reason.contains("R"), "{reason}"),
        other => panic!("expected an error, got {other:?}"),
    }
}

#[test]
fn a_tiny_budget_runs_out_with_a_typed_error() {
    let r = second_descent(
        &rm(&big(0), &big(-68)),
        &big(2),
        &SecondDescentOptions::default(),
        &mut Budget::with_units(5),
    );
    assert!(
        matches!(
            r,
            Err(Error::BudgetExhausted { .. }) | Err(Error::FactorBudgetExhausted { .. })
        ),
        "{r:?}"
    );
}

#[test]
fn the_undecided_classes_of_17_are_proven_not_images_on_a_rank_zero_curve() {
    // 17 ≡ 1 mod 8 fails Tunnell's equality (Tunnell, Invent. Math. 72,
    // 1983), so L(E_17, 1) ≠ 0 and E_17 has rank 0 (Coates–Wiles, Invent.
    // Math. 39, 1977); so does its 2-isogenous curve y² = x³ + 4·17²x. The
    // first descent leaves the classes 2 and 17 there undecided; the second
    // descent proves that neither they nor their product 34 is an image.
    for d in [2i64, 17, 34] {
        match run(0, 4 * 17 * 17, d).unwrap() {
            SecondDescentOutcome::NoPoint(ev) => assert!(verify_obstruction(
                &rm(&big(0), &big(4 * 17 * 17)),
                &big(d),
                &ev,
                &mut Budget::unlimited()
            )),
            other => panic!("d = {d}: expected NoPoint, got {other:?}"),
        }
    }
}
