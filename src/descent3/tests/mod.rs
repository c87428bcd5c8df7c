//! Unit tests of the 3-isogeny descent that reach its crate-private maps
//! φ: E_k → E_{−27k} and φ̂.

use num_bigint::BigInt;
use num_rational::BigRational;

use super::{descend_3isogeny, dual_three_isogeny, three_isogeny, Isogeny3Options};
use crate::curve::{Curve, Point};

fn cube_sum_curve(n: i64) -> Curve {
    format!("0 0 0 0 {}", -432 * n * n).parse().unwrap()
}

fn quick() -> Isogeny3Options {
    Isogeny3Options {
        analytic: None,
        ..Default::default()
    }
}

fn run(e: &Curve, o: &Isogeny3Options) -> super::Isogeny3Report {
    descend_3isogeny(e, o).unwrap_or_else(|err| panic!("{e}: {err}"))
}

// φ̂∘φ = [3] (common practice) on the points found.
#[test]
fn the_dual_isogeny_composes_to_multiplication_by_3() {
    for n in [6i64, 7, 19] {
        let r = run(&cube_sum_curve(n), &quick());
        let k = r.k.clone();
        let ek = Curve::from_bigints(
            [0, 0, 0, 0]
                .map(BigInt::from)
                .into_iter()
                .chain([k.clone()])
                .collect::<Vec<_>>()
                .try_into()
                .unwrap(),
        )
        .unwrap();
        let k2 = BigInt::from(-27) * &k;
        for f in &r.sides[0].finds {
            let p: &Point = &f.point;
            let image = three_isogeny(&k, p);
            let (x, y) = (image.x().unwrap(), image.y().unwrap());
            assert_eq!(y * y, x * x * x + BigRational::from_integer(k2.clone()));
            assert_eq!(dual_three_isogeny(&k, &image), ek.mul(p, &BigInt::from(3)));
        }
    }
}
