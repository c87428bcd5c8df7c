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

#[test]
fn common_typographic_forms_parse() {
    let want: Curve = "0 0 0 -36 0".parse().unwrap();
    for text in [
        "y² = x³ − 36x",
        "y\u{b2} = x\u{b3} \u{2212} 36x",
        "\u{feff}y^2 = x^3 - 36x",
        "\u{feff}0 0 0 -36 0",
        "[0,0,0,-36,0]",
        "[0, 0, 0, \u{2212}36, 0]",
        "0 0 0 \u{2212}36 0",
        "x^3 - 36x = y^2",
        "x³ − 36x = y²",
        "Y^2 = X^3 - 36X",
    ] {
        let e: Curve = text.parse().unwrap_or_else(|err| panic!("{text:?}: {err}"));
        assert_eq!(e, want, "{text:?}");
    }
    let e: Curve = "x^3 + 2x^2 + 3 = y^2 + xy".parse().unwrap();
    assert_eq!(e, "1 2 0 0 3".parse::<Curve>().unwrap());
}

#[test]
fn error_positions_count_characters_of_the_callers_line() {
    // '#' is the 15th character of the line, after a multi-byte '²' and
    // spaces; the message names it without mangling.
    let err = "y² = x^3 + 3x #".parse::<Curve>().unwrap_err().to_string();
    assert!(err.contains("character 15"), "{err}");
    let err = "y^2 = x^3 € 1".parse::<Curve>().unwrap_err().to_string();
    assert!(err.contains("'€'") && err.contains("character 11"), "{err}");
    assert!(!err.contains('â'), "{err}");
    // On the right-hand side the position still counts from the start.
    let err = "y^2 = x^3 + 2x + )"
        .parse::<Curve>()
        .unwrap_err()
        .to_string();
    assert!(err.contains("character 18"), "{err}");
}
