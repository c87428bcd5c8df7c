//! Curves layer: rational 2-torsion, the reduced model y² = x³ + ax² + bx
//! and the 2-isogeny with its dual.

use isodescent::curve::{
    first_two_torsion_model, two_torsion_model, two_torsion_points, Curve, Point, ReducedModel,
    TwoIsogeny,
};
use isodescent::Error;
use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::Zero;

fn q(n: i64, d: i64) -> BigRational {
    BigRational::new(n.into(), d.into())
}

/// No prime p < 1000 with p² | a and p⁴ | b (the reduction condition).
fn is_reduced_at_small_primes(a: &BigInt, b: &BigInt) -> bool {
    (2u64..1000).all(|p| {
        let p = BigInt::from(p);
        let p2 = &p * &p;
        !(a.is_multiple_of(&p2) && b.is_multiple_of(&(&p2 * &p2)))
    })
}

#[test]
fn two_torsion_of_a_general_model_with_a1_and_a3_nonzero() {
    // Start from y^2 = (x - 1)(x + 2)(x - 5) and apply a change of model
    // with s, t nonzero: the three points of order 2 must come back.
    let base = Curve::from_ints([0, -4, 0, -7, 10]).unwrap(); // (x-1)(x+2)(x-5)
    let ch = isodescent::curve::ModelChange::new(q(1, 3), q(1, 2), q(-2, 1), q(5, 7)).unwrap();
    let e = ch.apply_to_curve(&base);
    assert!(!e.coefficients()[0].is_zero() && !e.coefficients()[2].is_zero());
    let pts = two_torsion_points(&e);
    assert_eq!(pts.len(), 3);
    let mut back: Vec<Point> = pts.iter().map(|p| ch.to_old(p)).collect();
    back.sort();
    assert_eq!(
        back,
        vec![
            Point::from_ints(-2, 0),
            Point::from_ints(1, 0),
            Point::from_ints(5, 0)
        ]
    );
    for p in &pts {
        assert!(e.add(p, p).is_infinity());
    }
}

#[test]
fn curves_with_one_or_no_two_torsion_point() {
    // y^2 = x^3 + 1: x^3 + 1 = (x + 1)(x^2 - x + 1), one point (-1, 0);
    // y^2 = x^3 - 2: x^3 - 2 irreducible over Q (Eisenstein at 2).
    assert_eq!(
        two_torsion_points(&Curve::from_ints([0, 0, 0, 0, 1]).unwrap()),
        vec![Point::from_ints(-1, 0)]
    );
    let e = Curve::from_ints([0, 0, 0, 0, -2]).unwrap();
    assert!(two_torsion_points(&e).is_empty());
    assert_eq!(first_two_torsion_model(&e), Err(Error::NoTwoTorsion));
}

#[test]
fn two_torsion_with_hundred_digit_coefficients_is_exact() {
    // y^2 = (x - r1)(x - r2)(x - r3) with 34-digit roots: coefficients of
    // about 100 digits.
    let r1: BigInt = "1234567890123456789012345678901234".parse().unwrap();
    let r2: BigInt = "-987654321098765432109876543210987".parse().unwrap();
    let r3 = BigInt::from(17);
    let a2 = -(&r1 + &r2 + &r3);
    let a4 = &r1 * &r2 + &r1 * &r3 + &r2 * &r3;
    let a6 = -(&r1 * &r2 * &r3);
    let e = Curve::from_bigints([BigInt::zero(), a2, BigInt::zero(), a4, a6]).unwrap();
    let xs: Vec<BigRational> = two_torsion_points(&e)
        .iter()
        .map(|p| p.x().unwrap().clone())
        .collect();
    let mut want = vec![r1, r2, r3];
    want.sort();
    assert_eq!(
        xs,
        want.into_iter()
            .map(BigRational::from_integer)
            .collect::<Vec<_>>()
    );
}

#[test]
fn reduced_model_divides_out_primes_with_p2_dividing_a_and_p4_dividing_b() {
    // E: y^2 = x^3 + 4·3·x^2 + 16·(-7)·x = E(a=3, b=-7) scaled by u = 2, and
    // further by 5 and 3: a = 3·(2·5·3)^2, b = -7·(2·5·3)^4 must reduce to (3, -7).
    let k = BigInt::from(30);
    let a = BigInt::from(3) * &k * &k;
    let b = BigInt::from(-7) * k.pow(4);
    let e = Curve::from_bigints([BigInt::zero(), a, BigInt::zero(), b, BigInt::zero()]).unwrap();
    let m = two_torsion_model(&e, &Point::from_ints(0, 0)).unwrap();
    assert_eq!(
        (m.reduced().a().clone(), m.reduced().b().clone()),
        (BigInt::from(3), BigInt::from(-7))
    );
    // p = 2 with p^2 | a but p^4 ∤ b must stay.
    let e = Curve::from_ints([0, 4, 0, 8, 0]).unwrap();
    let m = two_torsion_model(&e, &Point::from_ints(0, 0)).unwrap();
    assert_eq!(
        (m.reduced().a().clone(), m.reduced().b().clone()),
        (BigInt::from(4), BigInt::from(8))
    );
}

#[test]
fn reduced_model_of_a_rational_general_model_is_integral_reduced_and_consistent() {
    let base = Curve::from_ints([0, -4, 0, -7, 10]).unwrap();
    for (u, r, s, t) in [
        (q(1, 3), q(1, 2), q(-2, 1), q(5, 7)),
        (q(6, 1), q(-3, 4), q(1, 1), q(0, 1)),
        (q(-2, 5), q(0, 1), q(1, 3), q(-1, 9)),
    ] {
        let ch = isodescent::curve::ModelChange::new(u, r, s, t).unwrap();
        let e = ch.apply_to_curve(&base);
        for tp in two_torsion_points(&e) {
            let m = two_torsion_model(&e, &tp).unwrap();
            assert!(is_reduced_at_small_primes(m.reduced().a(), m.reduced().b()));
            assert_eq!(m.change().apply_to_curve(&e), *m.curve());
            assert_eq!(m.from_input(&tp), Point::from_ints(0, 0));
            assert_eq!(m.to_input(&Point::from_ints(0, 0)), tp);
            assert_eq!(m.curve().j_invariant(), e.j_invariant());
            // The reduced curve is y^2 = x^3 + a x^2 + b x.
            let c = m.curve().coefficients();
            assert_eq!(c[1], BigRational::from_integer(m.reduced().a().clone()));
            assert_eq!(c[3], BigRational::from_integer(m.reduced().b().clone()));
            let short = c[0].is_zero() && c[1].is_zero() && c[2].is_zero();
            assert!(c[4].is_zero() && short == m.reduced().a().is_zero());
        }
    }
}

#[test]
fn two_torsion_model_rejects_points_not_of_order_two() {
    let e = Curve::from_ints([0, 0, 0, 0, 1]).unwrap();
    assert!(matches!(
        two_torsion_model(&e, &Point::from_ints(2, 3)),
        Err(Error::InvalidArgument { .. })
    ));
    assert!(matches!(
        two_torsion_model(&e, &Point::from_ints(1, 1)),
        Err(Error::PointNotOnCurve { .. })
    ));
    assert!(matches!(
        two_torsion_model(&e, &Point::Infinity),
        Err(Error::InvalidArgument { .. })
    ));
}

#[test]
fn isogenous_curve_of_the_isogenous_curve_is_the_curve_scaled_by_two() {
    // Silverman–Tate, Rational Points on Elliptic Curves, III.4: applying
    // the construction twice gives y^2 = x^3 + 4a x^2 + 16b x.
    for (a, b) in [(0i64, -1i64), (2, -3), (-5, 4), (7, 11)] {
        let phi = ReducedModel::new(a.into(), b.into())
            .and_then(|m| TwoIsogeny::from_reduced(&m))
            .unwrap();
        let next = phi.next().unwrap();
        let c = next.codomain().coefficients();
        let z = |n: i64| BigRational::from_integer(n.into());
        assert_eq!((&c[1], &c[3]), (&z(4 * a), &z(16 * b)));
    }
}

#[test]
fn isogeny_sends_the_kernel_to_zero_and_rejects_singular_input() {
    let phi = ReducedModel::new(2.into(), (-3).into())
        .and_then(|m| TwoIsogeny::from_reduced(&m))
        .unwrap();
    assert_eq!(phi.image(&Point::from_ints(0, 0)), Point::Infinity);
    assert_eq!(phi.image(&Point::Infinity), Point::Infinity);
    assert_eq!(phi.dual_image(&Point::from_ints(0, 0)), Point::Infinity);
    assert!(matches!(
        ReducedModel::new(2.into(), 0.into()).and_then(|m| TwoIsogeny::from_reduced(&m)),
        Err(Error::SingularCurve { .. })
    ));
    assert!(matches!(
        ReducedModel::new(2.into(), 1.into()).and_then(|m| TwoIsogeny::from_reduced(&m)),
        Err(Error::SingularCurve { .. })
    ));
}

#[test]
fn images_of_the_other_two_torsion_points_are_the_codomain_two_torsion() {
    // y^2 = x^3 + 2x^2 - 3x = x(x - 1)(x + 3): φ((1,0)) = φ((-3,0)) = (0,0)
    // on E' (they differ by T, and y = 0 gives x' = 0) [ST92, III.4].
    let phi = ReducedModel::new(2.into(), (-3).into())
        .and_then(|m| TwoIsogeny::from_reduced(&m))
        .unwrap();
    assert_eq!(phi.image(&Point::from_ints(1, 0)), Point::from_ints(0, 0));
    assert_eq!(phi.image(&Point::from_ints(-3, 0)), Point::from_ints(0, 0));
    // A point of infinite order: (3, 6) on y^2 = x^3 + 2x^2 - 3x.
    let p = Point::from_ints(3, 6);
    assert!(phi.domain().contains(&p));
    let img = phi.image(&p);
    assert!(phi.codomain().contains(&img));
    assert_eq!(img, Point::from_ints(4, -8));
    assert_eq!(phi.dual_image(&img), phi.domain().add(&p, &p));
}

#[test]
fn the_direct_reduced_model_of_an_integral_a_b_curve_agrees_with_the_general_construction() {
    // For y^2 = x^3 + a2 x^2 + a4 x + a6 with integer coefficients and an
    // integer root e the reduced model is built directly; moving the same
    // curve by a change with s, t ≠ 0 forces the general construction.
    // E_T is unique up to u = ±1 (a ↦ a/u², b ↦ b/u⁴) once integral and
    // reduced (common practice), so both must give the same (a, b).
    let cases: [[i64; 5]; 5] = [
        [0, -4, 0, -7, 10], // (x - 1)(x + 2)(x - 5)
        [0, 0, 0, -1, 0],   // y^2 = x^3 - x
        [0, 3, 0, -10, 0],  // x(x - 2)(x + 5)
        [0, 0, 0, 0, 1],    // y^2 = x^3 + 1: one point (-1, 0)
        [0, 12, 0, 32, 0],  // x(x + 4)(x + 8): p = 2 divides out
    ];
    let moved = isodescent::curve::ModelChange::new(q(1, 1), q(3, 1), q(1, 1), q(-2, 1)).unwrap();
    for a in cases {
        let e = Curve::from_ints(a).unwrap();
        let e2 = moved.apply_to_curve(&e);
        let ts = two_torsion_points(&e);
        assert!(!ts.is_empty());
        for t in ts {
            let direct = two_torsion_model(&e, &t).unwrap();
            let general = two_torsion_model(&e2, &moved.to_new(&t)).unwrap();
            assert_eq!(
                (&direct.reduced().a(), &direct.reduced().b()),
                (&general.reduced().a(), &general.reduced().b()),
                "{e}, T = {t}"
            );
            assert_eq!(direct.change().apply_to_curve(&e), *direct.curve());
            assert_eq!(direct.from_input(&t), Point::from_ints(0, 0));
        }
    }
}

#[test]
fn reduction_finds_a_prime_above_the_trial_division_limit() {
    // 4099 is prime (checked by trial division below); with a = 3·4099² and
    // b = 5·4099⁴, gcd(a², b) = 4099⁴ ≥ 4096⁴ is left after trial division,
    // so the factoring step must find D = 4099. With the cofactor k the
    // Mersenne prime 2^61 − 1 (prime: from memory, a classical fact) the gcd
    // 4099⁴k² exceeds 2^128 (the big-integer phase) and D is still 4099.
    let p = BigInt::from(4099);
    assert!((2..65).all(|d| 4099 % d != 0));
    let p2 = &p * &p;
    let m61 = (BigInt::from(1) << 61) - 1;
    for k in [BigInt::from(1), m61] {
        let a = BigInt::from(3) * &p2 * &k;
        let b = BigInt::from(5) * &p2 * &p2 * &k * &k;
        let e =
            Curve::from_bigints([BigInt::zero(), a, BigInt::zero(), b, BigInt::zero()]).unwrap();
        let m = two_torsion_model(&e, &Point::from_ints(0, 0)).unwrap();
        assert_eq!(*m.reduced().a(), BigInt::from(3) * &k, "k = {k}");
        assert_eq!(*m.reduced().b(), BigInt::from(5) * &k * &k, "k = {k}");
        assert!(is_reduced_at_small_primes(m.reduced().a(), m.reduced().b()));
    }
}
