//! Heegner points on the congruent-number curves y² = x³ − n²x with
//! square-free n ≡ 7 (mod 8), through the descent and on their own.

use num_bigint::BigInt;

use isodescent::curve::Curve;
use isodescent::descent::PointOrigin;
use isodescent::heegner::{
    class_number, heegner_forms, heegner_point, HeegnerOptions, HeegnerOutcome,
};
use isodescent::height::HeightContext;
use isodescent::{descend, Budget, DescentOptions};

fn congruent(n: i64) -> Curve {
    Curve::from_ints([0, 0, 0, -n * n, 0]).unwrap()
}

/// Class numbers h(−n) from the analytic class number formula, computed
/// with sympy 1.14.0 by tests/data/class_numbers.py (output committed).
const CLASS_NUMBERS: &str = include_str!("data/class_numbers.txt");

#[test]
fn class_numbers_and_heegner_forms_agree_with_the_class_number_formula() {
    let mut checked = 0;
    for line in CLASS_NUMBERS.lines().filter(|l| !l.starts_with('#')) {
        let mut it = line.split_whitespace().map(|w| w.parse::<i64>().unwrap());
        let (d, h) = (it.next().unwrap(), it.next().unwrap() as usize);
        assert_eq!(class_number(d).unwrap(), h, "D = {d}");
        let forms = heegner_forms(d, 32, &mut Budget::unlimited()).unwrap();
        // One Heegner form per class (Gross 1984, from memory): h forms,
        // each with 32 | A, the discriminant D and one common B mod 64.
        assert_eq!(forms.len(), h, "D = {d}");
        let b0 = forms[0].1.rem_euclid(64);
        for &(a, b, c) in &forms {
            assert_eq!(a % 32, 0);
            assert_eq!(b * b - 4 * a * c, d);
            assert_eq!(b.rem_euclid(64), b0);
        }
        checked += 1;
    }
    assert!(checked > 200, "{checked}");
}

#[test]
fn heegner_points_lie_exactly_on_the_curves_and_have_infinite_order() {
    for n in [7i64, 15, 23, 31, 39, 47, 55, 71, 79, 127, 263] {
        let e = congruent(n);
        let out = heegner_point(
            &e,
            None,
            &HeegnerOptions::default(),
            &mut Budget::unlimited(),
        )
        .unwrap();
        let HeegnerOutcome::Found(h) = out else {
            panic!("n = {n}: {out:?}");
        };
        // Exact checks: both points satisfy the equation; neither is
        // torsion (E_n(Q)_tors = E_n[2], Koblitz, Introduction to
        // Elliptic Curves and Modular Forms, Prop. I.9.17; from memory).
        assert!(
            e.contains(&h.point) && e.contains(&h.trace_point),
            "n = {n}"
        );
        assert!(h
            .point
            .y()
            .is_some_and(|y| *y != num_rational::BigRational::from_integer(BigInt::from(0))));
        assert_eq!(h.discriminant, -n);
        assert_eq!(h.class_number, class_number(-n).unwrap());
    }
}

#[test]
fn heegner_points_outside_the_route_are_declined_with_a_reason() {
    for (n, word) in [
        (5i64, "hypothesis"),
        (6, "hypothesis"),
        (1, "root number"),
        (3, "root number"),
    ] {
        let out = heegner_point(
            &congruent(n),
            None,
            &HeegnerOptions::default(),
            &mut Budget::unlimited(),
        )
        .unwrap();
        match out {
            HeegnerOutcome::NotApplicable(why) => assert!(why.contains(word), "n = {n}: {why}"),
            other => panic!("n = {n}: {other:?}"),
        }
    }
    let e = Curve::from_ints([0, 0, 1, -1, 0]).unwrap();
    assert!(matches!(
        heegner_point(
            &e,
            None,
            &HeegnerOptions::default(),
            &mut Budget::unlimited()
        )
        .unwrap(),
        HeegnerOutcome::NotApplicable(_)
    ));
}

#[test]
fn heegner_points_agree_with_the_searched_generators() {
    // For small n the search finds a generator P; the Heegner point must
    // be ±m·P + T with T torsion, checked in exact arithmetic, where m² is
    // the ratio of the canonical heights.
    for n in [7i64, 15, 23, 31] {
        let e = congruent(n);
        let mut opts = DescentOptions::default();
        opts.heegner = None;
        let r = descend(&e, &opts).unwrap();
        assert!(r.points_generate(), "n = {n}");
        let p = r.points()[0].clone();
        let HeegnerOutcome::Found(h) = heegner_point(
            &e,
            None,
            &HeegnerOptions::default(),
            &mut Budget::unlimited(),
        )
        .unwrap() else {
            panic!("n = {n}");
        };
        let ctx = HeightContext::new(&e, &mut Budget::unlimited()).unwrap();
        let ratio = ctx.height(&h.trace_point).unwrap().value() / ctx.height(&p).unwrap().value();
        let m = ratio.sqrt().round();
        assert!(
            (ratio - m * m).abs() < 1e-6 * ratio.max(1.0),
            "n = {n}: ratio {ratio}"
        );
        let mp = ctx.multiple(&p, &BigInt::from(m as i64)).unwrap();
        let torsion = r.torsion().points().to_vec();
        let ok = torsion.iter().any(|t| {
            let plus = e.add(&mp, t);
            plus == h.trace_point || e.neg(&plus) == h.trace_point
        });
        assert!(ok, "n = {n}: trace is not ±{m}·P + T");
        println!("n = {n}: Heegner trace = ±{m}·P + T");
    }
}

#[test]
fn the_descent_proves_a_heegner_generator_and_the_ledger_gives_a_square() {
    // n = 367, 503, 599: rank 1 by Gross–Zagier–Kolyvagin (w = −1,
    // L'(E,1) ≠ 0 certified) and no point from the searches; the Heegner
    // point becomes a proven generator, and the Birch–Swinnerton-Dyer
    // ledger with its regulator is within its error of a square.
    for n in [367i64, 503, 599] {
        let e = congruent(n);
        let mut opts = DescentOptions::default();
        opts.heegner = None;
        let without = descend(&e, &opts).unwrap();
        assert!(
            without.points().is_empty(),
            "n = {n}: the search found a point"
        );
        let r = descend(&e, &DescentOptions::default()).unwrap();
        assert!(
            matches!(r.points_origin(), PointOrigin::Heegner(_)),
            "n = {n}"
        );
        assert!(r.points_generate(), "n = {n}");
        assert!(e.contains(&r.points()[0]));
        let l = r.sha_ledger().expect("ledger");
        assert!(
            l.is_square_within_error && l.nearest_square.is_some(),
            "n = {n}: {l:?}"
        );
        assert!(l.value.error() < 1e-6);
    }
}
