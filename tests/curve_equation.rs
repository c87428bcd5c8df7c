//! Curves print as equations and the printed text parses back (round
//! trip), for integral and rational models; the five-number form stays an
//! accepted input. (Properties of the text form itself: common practice.)

use isodescent::curve::Curve;
use num_bigint::BigInt;
use num_rational::BigRational;
use proptest::prelude::*;

fn coefficient() -> impl Strategy<Value = BigRational> {
    prop_oneof![
        3 => Just(BigRational::from_integer(BigInt::from(0))),
        5 => (-1000i64..1000).prop_map(|n| BigRational::from_integer(n.into())),
        2 => (-50i64..50, 1i64..20).prop_map(|(n, d)| BigRational::new(n.into(), d.into())),
        1 => any::<i64>().prop_map(|n| BigRational::from_integer(BigInt::from(n) * BigInt::from(n))),
    ]
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2000))]
    #[test]
    fn what_is_printed_parses_back(a in proptest::array::uniform5(coefficient())) {
        if let Ok(e) = Curve::new(a) {
            let text = e.to_string();
            prop_assert!(!text.contains('['), "{}", text);
            prop_assert!(!text.contains("(-"), "{}", text);
            prop_assert!(!text.contains(" 0x") && !text.contains("+ 1x"), "{}", text);
            let back: Curve = text.parse().unwrap();
            prop_assert_eq!(back, e);
        }
    }
}

#[test]
fn the_documented_examples_print_as_stated() {
    let e = Curve::from_ints([1, -2, 3, 5, -7]).unwrap();
    assert_eq!(e.to_string(), "y^2 + xy + 3y = x^3 - 2x^2 + 5x - 7");
    let e = Curve::from_ints([0, -30, 0, 3, 0]).unwrap();
    assert_eq!(e.to_string(), "y^2 = x^3 - 30x^2 + 3x");
}

#[test]
fn equation_and_coefficient_inputs_agree() {
    for (eq, five) in [
        ("y^2 + xy + 3y = x^3 - 2x^2 + 5x - 7", "1 -2 3 5 -7"),
        ("y**2 = x**3 + 1/2*x**2 - 7/4", "0 1/2 0 0 -7/4"),
        ("y^2=x^3+(1/2)x^2-7/4", "0,1/2,0,0,-7/4"),
        ("y^2 - x^3 = 3x", "0 0 0 3 0"),
    ] {
        let a: Curve = eq.parse().unwrap();
        let b: Curve = five.parse().unwrap();
        assert_eq!(a, b, "{eq}");
    }
}

#[test]
fn singular_equations_are_rejected_with_a_typed_error() {
    assert!(matches!(
        "y^2 = x^3".parse::<Curve>(),
        Err(isodescent::Error::SingularCurve { .. })
    ));
    assert!(matches!(
        "y^2 = x^3 + x^4".parse::<Curve>(),
        Err(isodescent::Error::Parse { .. })
    ));
}
