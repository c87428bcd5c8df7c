use isodescent::curve::{Curve, ModelChange};
use num_rational::BigRational;
fn q(a: i64, b: i64) -> BigRational { BigRational::new(a.into(), b.into()) }
fn main() {
    let e = Curve::from_ints([0, -30, 0, 3, 0]).unwrap();
    let c = ModelChange::new(q(1,1), q(2,1), q(1,1), q(-3,1)).unwrap();
    println!("{}", c.apply_to_curve(&e));
    let e = Curve::from_ints([0, -28, 0, 1, 0]).unwrap();
    let c = ModelChange::new(q(2,1), q(0,1), q(0,1), q(0,1)).unwrap();
    println!("{}", c.apply_to_curve(&e));
    let e = Curve::from_ints([0, 13, 0, -7, 0]).unwrap();
    let c = ModelChange::new(q(1,1), q(-1,1), q(1,1), q(1,1)).unwrap();
    println!("{}", c.apply_to_curve(&e));
}
