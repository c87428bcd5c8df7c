//! Heegner points on the congruent-number curves y² = x³ − n²x with
//! square-free n ≡ 5, 6, 7 (mod 8), through the descent and on their own.

use num_bigint::BigInt;

use isodescent::curve::Curve;
use isodescent::descent::PointOrigin;
use isodescent::heegner::{class_number, heegner_point, HeegnerOptions, HeegnerOutcome};
use isodescent::height::HeightContext;
use isodescent::{descend, Budget, DescentOptions};

fn congruent(n: i64) -> Curve {
    Curve::from_ints([0, 0, 0, -n * n, 0]).unwrap()
}

/// E_n[2] = {O, (0, 0), (±n, 0)}.
fn torsion(n: i64) -> Vec<isodescent::curve::Point> {
    use isodescent::curve::Point;
    let q = |v: i64| num_rational::BigRational::from_integer(BigInt::from(v));
    vec![
        Point::Infinity,
        Point::new(q(0), q(0)),
        Point::new(q(n), q(0)),
        Point::new(q(-n), q(0)),
    ]
}

/// Class numbers h(−n) from the analytic class number formula, computed
/// with sympy 1.14.0 by tests/data/class_numbers.py (output committed).
const CLASS_NUMBERS: &str = include_str!("data/class_numbers.txt");

#[test]
fn class_numbers_agree_with_the_class_number_formula() {
    let mut checked = 0;
    for line in CLASS_NUMBERS.lines().filter(|l| !l.starts_with('#')) {
        let mut it = line.split_whitespace().map(|w| w.parse::<i64>().unwrap());
        let (d, h) = (it.next().unwrap(), it.next().unwrap() as usize);
        assert_eq!(class_number(d).unwrap(), h, "D = {d}");
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
        (1i64, "root number"),
        (2, "root number"),
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
    // Other curves go to the route at their own level, which is declined
    // when its series would exceed the term limit.
    let e = Curve::from_ints([0, 0, 1, -1, 0]).unwrap();
    let mut o = HeegnerOptions::default();
    o.max_own_level_terms = 10;
    assert!(matches!(
        heegner_point(&e, None, &o, &mut Budget::unlimited()).unwrap(),
        HeegnerOutcome::NotApplicable(_)
    ));
}

#[test]
fn heegner_points_agree_with_the_searched_generators() {
    // For small n the search finds a generator P; the Heegner point must
    // be ±m·P + T with T torsion, checked in exact arithmetic, where m² is
    // the ratio of the canonical heights; and the point it is divided down
    // to must be ±P + T (P generates modulo torsion: saturation in the
    // descent). n = 5, 6, 13, 14, 21, 22 use the order of conductor 4.
    for n in [7i64, 15, 23, 31, 5, 6, 13, 14, 21, 22] {
        let e = congruent(n);
        let mut opts = DescentOptions::default();
        opts.heegner = None;
        let r = descend(&e, &opts).unwrap();
        assert!(r.generators().is_some(), "n = {n}");
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
        let ok = torsion.iter().any(|t| {
            let plus = e.add(&p, t);
            plus == h.point || e.neg(&plus) == h.point
        });
        assert!(ok, "n = {n}: the divided point is not ±P + T");
        println!("n = {n}: Heegner trace = ±{m}·P + T");
    }
}

#[test]
fn the_descent_proves_a_heegner_generator_and_the_ledger_gives_a_square() {
    // n = 367, 503, 599: rank 1 by Gross–Zagier–Kolyvagin (w = −1,
    // L'(E,1) ≠ 0 certified) and no point from the searches; the Heegner
    // point becomes a proven generator, and the Birch–Swinnerton-Dyer
    // ledger with its regulator is within its error of a square.
    // n = 157, 677 (≡ 5 mod 8) and 478, 862 (≡ 6 mod 8) go through the
    // order of conductor 4.
    for n in [367i64, 503, 599, 157, 677, 478, 862] {
        let e = congruent(n);
        let mut opts = DescentOptions::default();
        opts.heegner = None;
        // The Heegner step runs before the deep search (which finds some
        // of these generators, slower): without both, no point is known.
        opts.deep_search = None;
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
        assert!(r.generators().is_some(), "n = {n}");
        assert!(e.contains(&r.points()[0]));
        let l = r.sha_ledger().expect("ledger");
        assert!(
            l.is_square_within_error && l.nearest_square.is_some(),
            "n = {n}: {l:?}"
        );
        assert!(l.value.error() < 1e-6);
    }
}

#[test]
fn conductor_four_heegner_points_for_n_5_and_6_mod_8() {
    // n ≡ 5, 6 (mod 8): 2 ramifies in K = Q(√−n), and the Heegner points
    // come from the order of conductor 4, D = 16·(−4n) = −64n. Its class
    // number is h(D_K)·f·∏_{p | f}(1 − (D_K/p)/p)/[O_K*: O*] = 4·h(−4n)
    // for n > 1 (Cox, "Primes of the form x² + ny²", Thm. 7.24; from
    // memory). The points are checked on the curve exactly and are not
    // 2-torsion (E_n(Q)_tors = E_n[2]: Koblitz, Prop. I.9.17; from memory).
    for n in [5i64, 6, 13, 14, 29, 30, 37, 38, 101, 102, 157, 158] {
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
        assert_eq!(h.discriminant, -64 * n, "n = {n}");
        assert_eq!(h.conductor, 4);
        assert_eq!(h.level, 32);
        assert_eq!(h.class_number, 4 * class_number(-4 * n).unwrap(), "n = {n}");
        assert_eq!(h.class_number, class_number(-64 * n).unwrap());
        assert!(
            e.contains(&h.point) && e.contains(&h.trace_point),
            "n = {n}"
        );
        let zero = num_rational::BigRational::from_integer(BigInt::from(0));
        assert!(h.point.y().is_some_and(|y| *y != zero), "n = {n}");
        // trace_point = ±index·point + T, T ∈ E_n[2], exactly.
        let m = e.mul(&h.point, &BigInt::from(h.index));
        assert!(
            torsion(n).iter().any(|t| {
                let plus = e.add(&m, t);
                plus == h.trace_point || e.neg(&plus) == h.trace_point
            }),
            "n = {n}"
        );
    }
}

#[test]
fn the_heegner_generator_for_157_matches_the_published_triangle() {
    // The right triangle of area 157 with sides
    // a = 6803298487826435051217540/411340519227716149383203 and
    // b = 411340519227716149383203/21666555693714761309610 (Zagier's
    // computation, printed in Koblitz, "Introduction to Elliptic Curves and
    // Modular Forms", §I.1; from memory, and re-checked here: ab/2 = 157
    // and a² + b² is a rational square) gives the point x = (c/2)² of
    // E_157. The Heegner generator G must satisfy ±m·G + T = that point,
    // with m² the ratio of canonical heights (exact multiplication).
    use num_rational::BigRational;
    let r = |p: &str, q: &str| BigRational::new(p.parse().unwrap(), q.parse().unwrap());
    let a = r("6803298487826435051217540", "411340519227716149383203");
    let b = r("411340519227716149383203", "21666555693714761309610");
    let two = BigRational::from_integer(BigInt::from(2));
    assert_eq!(&a * &b / &two, BigRational::from_integer(BigInt::from(157)));
    let c2 = &a * &a + &b * &b;
    let x = &c2 / BigRational::from_integer(BigInt::from(4));
    let e = congruent(157);
    let rhs = &x * &x * &x - BigRational::from_integer(BigInt::from(157 * 157)) * &x;
    let sq = |q: &BigRational| {
        let (n, d) = (q.numer().sqrt(), q.denom().sqrt());
        (&n * &n == *q.numer() && &d * &d == *q.denom()).then(|| BigRational::new(n, d))
    };
    let y = sq(&rhs).expect("a² + b² and x³ − n²x are squares");
    let tri = isodescent::curve::Point::new(x, y);
    assert!(e.contains(&tri));
    let HeegnerOutcome::Found(h) = heegner_point(
        &e,
        None,
        &HeegnerOptions::default(),
        &mut Budget::unlimited(),
    )
    .unwrap() else {
        panic!("157");
    };
    let ctx = HeightContext::new(&e, &mut Budget::unlimited()).unwrap();
    let ratio = ctx.height(&tri).unwrap().value() / ctx.height(&h.point).unwrap().value();
    let m = ratio.sqrt().round();
    assert!((ratio - m * m).abs() < 1e-6 * ratio, "ratio {ratio}");
    let mg = ctx.multiple(&h.point, &BigInt::from(m as i64)).unwrap();
    let ok = torsion(157).iter().any(|t| {
        let plus = e.add(&mg, t);
        plus == tri || e.neg(&plus) == tri
    });
    assert!(ok, "the triangle's point is not ±{m}·G + T");
}
