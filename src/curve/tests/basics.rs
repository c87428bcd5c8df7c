//! Curves layer: invariants, parsing, display, model changes, group law on
//! fixed examples, and bad input.

use crate::curve::{clear_denominators, Curve, ModelChange, Point};
use crate::Error;
use num_rational::BigRational;
use num_traits::Zero;

fn r(n: i64, d: i64) -> BigRational {
    BigRational::new(n.into(), d.into())
}
fn z(n: i64) -> BigRational {
    BigRational::from_integer(n.into())
}

#[test]
fn invariants_of_a_curve_with_all_five_coefficients_satisfy_the_classical_identities() {
    // Silverman, The Arithmetic of Elliptic Curves, III.1: 4 b8 = b2 b6 - b4^2
    // and 1728 Δ = c4^3 - c6^2.
    for s in [
        "1 -1 1 -10 -20",
        "1/2 3 -5/7 11 -13/3",
        "0 0 0 -25 0",
        "1 1 1 1 1",
    ] {
        let e: Curve = s.parse().unwrap();
        assert_eq!(z(4) * e.b8(), e.b2() * e.b6() - e.b4() * e.b4(), "{s}");
        let c4 = e.c4();
        let c6 = e.c6();
        assert_eq!(z(1728) * e.discriminant(), c4 * c4 * c4 - c6 * c6, "{s}");
        assert_eq!(e.j_invariant(), &(c4 * c4 * c4 / e.discriminant()), "{s}");
    }
}

#[test]
fn b_and_c_invariants_match_hand_computation_for_one_general_model() {
    // a = (1, 2, 3, 4, 5). Formulas of Silverman, AEC III.1 (from memory),
    // evaluated by hand: b2 = 1 + 8 = 9, b4 = 8 + 3 = 11, b6 = 9 + 20 = 29,
    // b8 = 5 + 40 - 12 + 18 - 16 = 35, c4 = 81 - 264 = -183,
    // c6 = -729 + 3564 - 6264 = -3429,
    // Δ = -81·35 - 8·1331 - 27·841 + 9·9·11·29 = -10351.
    let e = Curve::from_ints([1, 2, 3, 4, 5]).unwrap();
    assert_eq!(e.b2(), &z(9));
    assert_eq!(e.b4(), &z(11));
    assert_eq!(e.b6(), &z(29));
    assert_eq!(e.b8(), &z(35));
    assert_eq!(e.c4(), &z(-183));
    assert_eq!(e.c6(), &z(-3429));
    assert_eq!(e.discriminant(), &z(-10351));
}

#[test]
fn j_is_1728_for_y2_x3_plus_ax_and_0_for_y2_x3_plus_b() {
    // Classical (Silverman, AEC III.1, Prop. 1.4 and the examples after it).
    for a in [-25i64, -1, 2, 7, 1000] {
        let e = Curve::from_ints([0, 0, 0, a, 0]).unwrap();
        assert_eq!(e.j_invariant(), &z(1728));
    }
    for b in [-2i64, 1, 17, -432] {
        let e = Curve::from_ints([0, 0, 0, 0, b]).unwrap();
        assert!(e.j_invariant().is_zero());
    }
}

#[test]
fn the_conductor_eleven_curve_has_discriminant_minus_eleven_to_the_fifth() {
    // y^2 + y = x^3 - x^2 - 10x - 20: Δ = -11^5, j = -122023936/161051
    // (from memory; a standard example, e.g. Silverman, AEC, Appendix C).
    let e: Curve = "0 -1 1 -10 -20".parse().unwrap();
    assert_eq!(e.discriminant(), &z(-161051));
    assert_eq!(e.j_invariant(), &r(-122023936, 161051));
}

#[test]
fn singular_models_are_rejected_with_a_reason() {
    // y^2 = x^3 (cusp) and y^2 = x^3 + x^2 (node) [Silverman, AEC III.1.4].
    for s in ["0 0 0 0 0", "0 1 0 0 0", "0 -3 0 3 -1"] {
        match s.parse::<Curve>() {
            Err(Error::SingularCurve { reason }) => assert!(reason.contains("discriminant")),
            other => panic!("{s}: {other:?}"),
        }
    }
}

#[test]
fn parse_errors_say_what_is_wrong() {
    let cases: [(&str, &str); 6] = [
        ("0 0 0 1", "found 4"),
        ("0 0 0 1 2 3", "found 6"),
        ("0 0 x 1 2", "not a decimal integer"),
        ("0 0 1/-2 1 2", "denominator"),
        ("0 0 1.5 1 2", "not a decimal integer"),
        ("", "found 0"),
    ];
    for (s, needle) in cases {
        match s.parse::<Curve>() {
            Err(Error::Parse { reason, .. }) => assert!(reason.contains(needle), "{s}: {reason}"),
            other => panic!("{s}: {other:?}"),
        }
    }
    assert!(matches!(
        "0 0 0 1/0 2".parse::<Curve>(),
        Err(Error::ZeroDenominator { .. })
    ));
}

#[test]
fn coefficients_longer_than_the_digit_cap_are_a_parse_error() {
    let long = "7".repeat(crate::curve::MAX_COEFFICIENT_DIGITS + 1);
    let s = format!("0 0 0 {long} 1");
    match s.parse::<Curve>() {
        Err(Error::Parse { reason, input }) => {
            assert!(reason.contains("digits"));
            assert!(
                input.len() < 200,
                "the message must not copy the whole input"
            );
        }
        other => panic!("{other:?}"),
    }
}

#[test]
fn five_hundred_digit_coefficients_are_handled_exactly() {
    let big = format!("1{}", "0".repeat(499));
    let s = format!("0 0 0 -{big} {big}7");
    let e: Curve = s.parse().unwrap();
    assert_eq!(e.to_string().parse::<Curve>().unwrap(), e);
    let c4 = e.c4();
    let c6 = e.c6();
    assert_eq!(z(1728) * e.discriminant(), c4 * c4 * c4 - c6 * c6);
}

#[test]
fn display_round_trips_through_the_parser() {
    for s in [
        "0 -1 0 -4 4",
        "0,0,0,-25,0",
        "1/2, 0 0 3 -7/4",
        " -3/6 , 4/2 0 1 1 ",
    ] {
        let e: Curve = s.parse().unwrap();
        let back: Curve = e.to_string().parse().unwrap();
        assert_eq!(back, e);
    }
    let e: Curve = "1/2, 0 0 3 -7/4".parse().unwrap();
    assert_eq!(e.to_string(), "y^2 + (1/2)xy = x^3 + 3x - 7/4");
}

#[test]
fn integral_model_of_the_documented_rational_curve() {
    let e: Curve = "1/2, 0 0 3 -7/4".parse().unwrap();
    let (m, ch) = clear_denominators(&e);
    assert!(m.coefficients().iter().all(|c| c.is_integer()));
    assert_eq!(m.to_string(), "y^2 + 2xy = x^3 + 768x - 7168");
    assert_eq!(m.j_invariant(), e.j_invariant());
    assert_eq!(ch.apply_to_curve(&e), m);
}

#[test]
fn model_change_with_u_zero_is_rejected() {
    assert!(matches!(
        ModelChange::new(z(0), z(1), z(0), z(0)),
        Err(Error::Zero { .. })
    ));
}

#[test]
fn completing_the_square_and_cube_gives_the_c4_c6_short_model() {
    // Silverman, AEC III.1: (u, r, s, t) = (1/6, -b2/12, -a1/2, -(a1 r + a3)/2)
    // gives y^2 = x^3 - 27 c4 x - 54 c6.
    let e: Curve = "1 -1 1 -10 -20".parse().unwrap();
    let rr = -e.b2() / z(12);
    let s = -e.a1() / z(2);
    let t = -(e.a1() * &rr + e.a3()) / z(2);
    let ch = ModelChange::new(r(1, 6), rr, s, t).unwrap();
    let short = ch.apply_to_curve(&e);
    assert!(short.is_short());
    assert_eq!(short.a4(), &(z(-27) * e.c4()));
    assert_eq!(short.a6(), &(z(-54) * e.c6()));
}

#[test]
fn points_move_between_models_both_ways() {
    let e: Curve = "0 -1 1 -10 -20".parse().unwrap();
    let p = Point::from_ints(5, 5);
    assert!(e.contains(&p));
    let ch = ModelChange::new(r(2, 3), r(1, 5), r(-7, 2), r(3, 1)).unwrap();
    let e2 = ch.apply_to_curve(&e);
    let p2 = ch.to_new(&p);
    assert!(e2.contains(&p2));
    assert_eq!(ch.to_old(&p2), p);
    assert_eq!(ch.to_new(&Point::Infinity), Point::Infinity);
    assert!(ModelChange::identity().is_identity());
    assert!(ch.then(&ch.inverse()).is_identity());
}

#[test]
fn seven_torsion_point_of_a_classical_curve_has_order_seven() {
    // y^2 = x^3 - 43x + 166 has (3, 8) of order 7 (from memory; a standard
    // Nagell–Lutz example, e.g. Silverman–Tate, Rational Points on Elliptic
    // Curves, II.5).
    let e = Curve::from_ints([0, 0, 0, -43, 166]).unwrap();
    let p = Point::from_ints(3, 8);
    assert!(e.contains(&p));
    assert_eq!(e.order_up_to(&p, 20), Some(7));
    assert_eq!(e.mul_i64(&p, 2), Point::from_ints(-5, -16));
}

#[test]
fn point_constructor_rejects_points_off_the_curve() {
    let e = Curve::from_ints([0, 0, 0, -2, 0]).unwrap();
    assert!(matches!(
        e.point(z(1), z(1)),
        Err(Error::PointNotOnCurve { .. })
    ));
    assert!(e.point(z(2), z(2)).is_ok());
}
