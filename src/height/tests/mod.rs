//! Unit tests of the height layer that reach its crate-private budgeted
//! forms of the exact point arithmetic.

use num_bigint::BigInt;

use super::HeightContext;
use crate::curve::{Curve, Point};
use crate::{Budget, Error};

/// y² + y = x³ − x with P = (0, 0) (common practice): [1000]P has about
/// 10⁶ times the digits of P; the default budget refuses it instead of
/// computing for minutes, and small multiples agree with repeated addition.
#[test]
fn exact_multiples_are_budgeted() {
    let e = Curve::from_ints([0, 0, 1, -1, 0]).unwrap();
    let p = Point::from_ints(0, 0);
    let ctx = HeightContext::new(&e, &mut Budget::unlimited()).unwrap();
    match ctx.multiple(&p, &BigInt::from(1000)) {
        Err(Error::BudgetExhausted { .. }) => {}
        other => panic!("expected a budget stop, got {other:?}"),
    }
    let small = ctx
        .multiple_with_budget(&p, &BigInt::from(5), &mut Budget::with_units(10_000))
        .unwrap();
    let mut sum = p.clone();
    for _ in 0..4 {
        sum = e.add(&sum, &p);
    }
    assert_eq!(small, sum);
    let c = ctx
        .combination_with_budget(
            std::slice::from_ref(&p),
            &[BigInt::from(5)],
            &mut Budget::with_units(10),
        )
        .is_err();
    assert!(c, "a ten-unit budget cannot pay for [5]P");
}

/// The naive height h(P) = log max(|p|, |q|) for x(P) = p/q in lowest terms,
/// h(O) = 0 (Silverman, The Arithmetic of Elliptic Curves, VIII.6), with
/// its rounding bound: log 4 for x = −1/4, and 2000·log 10 for x = 10⁻²⁰⁰⁰.
#[test]
fn naive_height_is_log_of_the_larger_of_numerator_and_denominator() {
    use num_bigint::BigInt;
    use num_rational::BigRational;
    use num_traits::{One, Pow};
    let r = |a: i64, b: i64| BigRational::new(a.into(), b.into());
    let p = Point::new(r(-1, 4), r(1, 8));
    let h = super::naive_height(&p);
    assert!(h.contains(4f64.ln()) && h.error() < 1e-12);
    assert_eq!(super::naive_height(&Point::Infinity).value(), 0.0);
    let big: BigInt = BigInt::from(10).pow(2000u32);
    let q = Point::new(BigRational::new(BigInt::one(), big), r(0, 1));
    assert!((super::naive_height(&q).value() - 2000.0 * 10f64.ln()).abs() < 1e-6);
}
