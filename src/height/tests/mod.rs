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
