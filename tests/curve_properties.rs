//! Curves layer: property tests (proptest) of the group law, changes of
//! model, the 2-isogeny and its dual, the parser, and Mazur's theorem.

use isodescent::curve::{torsion, Curve, ModelChange, Point, ReducedModel, TwoIsogeny};
use num_bigint::BigInt;
use num_rational::BigRational;
use proptest::prelude::*;

fn q(n: i64, d: i64) -> BigRational {
    BigRational::new(n.into(), d.into())
}

/// A curve through two chosen rational points: a1, a2, a3 free, a4 and a6
/// solved from the two linear conditions (common practice).
fn curve_through(
    a1: i64,
    a2: i64,
    a3: i64,
    p1: (i64, i64),
    p2: (i64, i64),
) -> Option<(Curve, Point, Point)> {
    let (x1, y1, x2, y2) = (q(p1.0, 1), q(p1.1, 1), q(p2.0, 1), q(p2.1, 1));
    if x1 == x2 {
        return None;
    }
    let (a1, a2, a3) = (q(a1, 1), q(a2, 1), q(a3, 1));
    // g(x, y) = y^2 + a1 xy + a3 y - x^3 - a2 x^2 = a4 x + a6.
    let g =
        |x: &BigRational, y: &BigRational| y * y + &a1 * x * y + &a3 * y - x * x * x - &a2 * x * x;
    let (g1, g2) = (g(&x1, &y1), g(&x2, &y2));
    let a4 = (&g1 - &g2) / (&x1 - &x2);
    let a6 = g1 - &a4 * &x1;
    let e = Curve::new([a1, a2, a3, a4, a6]).ok()?;
    let (p, qq) = (Point::new(x1, y1), Point::new(x2, y2));
    Some((e, p, qq))
}

fn small() -> impl Strategy<Value = i64> {
    -6i64..=6
}

/// True iff the structure `(n, m)` (the group Z/n × Z/m, m | n) is one of
/// the fifteen torsion groups of Mazur's theorem (Mazur, "Modular curves
/// and the Eisenstein ideal", 1977; docs/references.md [Maz77]): Z/n for
/// n = 1…10, 12 and Z/2k × Z/2 for k = 1…4.
fn in_mazur_list((n, m): (u32, u32)) -> bool {
    match m {
        1 => (1..=10).contains(&n) || n == 12,
        2 => matches!(n, 2 | 4 | 6 | 8),
        _ => false,
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(48))]

    #[test]
    fn group_law_is_commutative_and_associative(
        a1 in small(), a2 in small(), a3 in small(),
        x1 in small(), y1 in small(), x2 in small(), y2 in small(),
        i in -3i64..=3, j in -3i64..=3, k in -3i64..=3,
    ) {
        let Some((e, p, qq)) = curve_through(a1, a2, a3, (x1, y1), (x2, y2)) else { return Ok(()) };
        prop_assert!(e.contains(&p) && e.contains(&qq));
        let u = e.add(&e.mul(&p, &BigInt::from(i)), &e.mul(&qq, &BigInt::from(j)));
        let v = e.mul(&qq, &BigInt::from(k));
        let w = e.add(&p, &qq);
        prop_assert!(e.contains(&u) && e.contains(&v) && e.contains(&w));
        prop_assert_eq!(e.add(&u, &v), e.add(&v, &u));
        prop_assert_eq!(e.add(&e.add(&u, &v), &w), e.add(&u, &e.add(&v, &w)));
        prop_assert_eq!(e.add(&u, &e.neg(&u)), Point::Infinity);
        prop_assert_eq!(e.mul(&u, &BigInt::from(3)), e.add(&e.add(&u, &u), &u));
        prop_assert_eq!(e.mul(&u, &BigInt::from(i + j)), e.add(&e.mul(&u, &BigInt::from(i)), &e.mul(&u, &BigInt::from(j))));
    }

    #[test]
    fn model_changes_preserve_j_and_commute_with_the_group_law(
        a1 in small(), a2 in small(), a3 in small(),
        x1 in small(), y1 in small(), x2 in small(), y2 in small(),
        un in prop_oneof![-5i64..=-1, 1i64..=5], ud in 1i64..=4,
        rn in small(), sn in small(), tn in small(), d in 1i64..=3,
    ) {
        let Some((e, p, qq)) = curve_through(a1, a2, a3, (x1, y1), (x2, y2)) else { return Ok(()) };
        let ch = ModelChange::new(q(un, ud), q(rn, d), q(sn, d), q(tn, d)).unwrap();
        let e2 = ch.apply_to_curve(&e);
        prop_assert_eq!(e2.j_invariant(), e.j_invariant());
        let u = q(un, ud);
        let u12 = (0..12).fold(q(1, 1), |acc, _| acc * &u);
        prop_assert_eq!(e2.discriminant() * &u12, e.discriminant().clone());
        let (p2, q2) = (ch.to_new(&p), ch.to_new(&qq));
        prop_assert!(e2.contains(&p2) && e2.contains(&q2));
        prop_assert_eq!(ch.to_new(&e.add(&p, &qq)), e2.add(&p2, &q2));
        prop_assert_eq!(ch.to_new(&e.add(&p, &p)), e2.add(&p2, &p2));
        prop_assert_eq!(ch.to_old(&p2), p.clone());
        // Composition and inverse.
        let ch2 = ModelChange::new(q(1, 2), q(1, 1), q(-1, 1), q(2, 3)).unwrap();
        let both = ch.then(&ch2);
        prop_assert_eq!(both.apply_to_curve(&e), ch2.apply_to_curve(&e2));
        prop_assert_eq!(both.to_new(&p), ch2.to_new(&p2));
        prop_assert_eq!(ch.inverse().apply_to_curve(&e2), e.clone());
        prop_assert!(ch.then(&ch.inverse()).is_identity());
        prop_assert!(ch.inverse().then(&ch).is_identity());
    }

    #[test]
    fn dual_isogeny_after_isogeny_is_multiplication_by_two(
        a in -20i64..=20, x0 in prop_oneof![-9i64..=-1, 1i64..=9], k in -5i64..=5, n in 1i64..=3,
    ) {
        // E: y^2 = x^3 + a x^2 + b x through (x0, x0 k): b = x0 k^2 - x0^2 - a x0.
        let b = x0 * k * k - x0 * x0 - a * x0;
        let Ok(phi) = ReducedModel::new(a.into(), b.into()).and_then(|m| TwoIsogeny::from_reduced(&m)) else { return Ok(()) };
        let e = phi.domain();
        let p = e.mul(&Point::from_ints(x0, x0 * k), &BigInt::from(n));
        prop_assert!(e.contains(&p));
        let img = phi.image(&p);
        prop_assert!(phi.codomain().contains(&img));
        prop_assert_eq!(phi.dual_image(&img), e.add(&p, &p));
        // φ ∘ φ̂ = [2] on E' and φ is a homomorphism.
        let ep = phi.codomain();
        prop_assert_eq!(phi.image(&phi.dual_image(&img)), ep.add(&img, &img));
        let t = Point::from_ints(0, 0);
        prop_assert_eq!(phi.image(&e.add(&p, &t)), img.clone());
        let p3 = e.mul(&p, &BigInt::from(3));
        prop_assert_eq!(phi.image(&e.add(&p, &p3)), ep.add(&img, &phi.image(&p3)));
    }

    #[test]
    fn torsion_structure_is_always_in_mazurs_list(
        a1 in small(), a2 in small(), a3 in small(), a4 in -30i64..=30, a6 in -30i64..=30,
    ) {
        // Mazur, Modular curves and the Eisenstein ideal, Publ. IHES 47 (1977).
        let Ok(e) = Curve::from_ints([a1, a2, a3, a4, a6]) else { return Ok(()) };
        let g = torsion(&e);
        prop_assert!(in_mazur_list(g.structure()), "{}: {:?}", e, g.structure());
        prop_assert_eq!(g.points().len() as u32, g.order());
        for p in g.points() {
            prop_assert!(e.contains(p));
            prop_assert!(e.mul(p, &BigInt::from(g.structure().0 as i64)).is_infinity());
        }
    }

    #[test]
    fn the_parser_never_panics_on_arbitrary_text(s in ".*") {
        let _ = s.parse::<Curve>();
    }

    #[test]
    fn the_parser_never_panics_on_curve_like_text(
        s in "[ ,0-9/+-]{0,40}",
    ) {
        if let Ok(e) = s.parse::<Curve>() {
            prop_assert_eq!(e.to_string().parse::<Curve>().unwrap(), e);
        }
    }

    #[test]
    fn formatted_coefficients_parse_back_to_the_same_curve(
        nums in proptest::collection::vec(-10_000i64..=10_000, 5),
        dens in proptest::collection::vec(1i64..=50, 5),
        seps in proptest::collection::vec(prop_oneof![Just(" "), Just(","), Just(", "), Just("  ,\t")], 4),
    ) {
        let coeffs: Vec<BigRational> = nums.iter().zip(&dens).map(|(&n, &d)| q(n, d)).collect();
        let mut s = String::new();
        for (i, c) in coeffs.iter().enumerate() {
            if i > 0 { s.push_str(seps[i - 1]); }
            s.push_str(&c.to_string());
        }
        let arr: [BigRational; 5] = coeffs.clone().try_into().unwrap();
        match (s.parse::<Curve>(), Curve::new(arr)) {
            (Ok(e), Ok(f)) => prop_assert_eq!(e, f),
            (Err(a), Err(b)) => prop_assert_eq!(a, b),
            (x, y) => prop_assert!(false, "{:?} vs {:?}", x, y),
        }
    }
}
