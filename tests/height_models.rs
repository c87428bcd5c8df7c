//! The canonical height does not depend on the model, and doubles across
//! a 2-isogeny.

use isodescent::curve::{torsion, Curve, ModelChange, Point, ReducedModel, TwoIsogeny};
use isodescent::height::HeightContext;
use isodescent::Budget;
use num_bigint::BigInt;
use num_rational::BigRational;
use proptest::prelude::*;

fn q(n: i64, d: i64) -> BigRational {
    BigRational::new(n.into(), d.into())
}

/// Non-torsion points with small integral x on y² = x³ + ax² + bx, for
/// (a, b) in a small box (found by direct search; torsion removed with
/// the curve layer's torsion).
fn box_points() -> Vec<(BigInt, BigInt, Point)> {
    let mut out = Vec::new();
    for a in -6i64..=6 {
        for b in -12i64..=12 {
            if b == 0 || a * a - 4 * b == 0 {
                continue;
            }
            let e = Curve::from_ints([0, a, 0, b, 0]).unwrap();
            let tors = torsion(&e);
            for x in -20i64..=60 {
                let rhs = x * x * x + a * x * x + b * x;
                if rhs < 0 {
                    continue;
                }
                let y = (rhs as f64).sqrt().round() as i64;
                if y * y != rhs {
                    continue;
                }
                let p = Point::from_ints(x, y);
                if !tors.points().contains(&p) {
                    out.push((a.into(), b.into(), p));
                    break;
                }
            }
        }
    }
    out
}

/// ĥ(φ(P)) = 2ĥ(P) and ĥ(φ̂(Q)) = 2ĥ(Q) for the 2-isogeny φ and its dual:
/// for an isogeny ψ, ĥ(ψ(P)) = deg(ψ)·ĥ(P) (Silverman, AEC 2nd ed.,
/// Exercise 8.8(b), from memory; it follows from h∘ψ = deg ψ·h + O(1)).
#[test]
fn heights_double_across_each_two_isogeny() {
    let pts = box_points();
    assert!(pts.len() >= 60, "only {} curves with points", pts.len());
    for (a, b, p) in pts {
        let phi = ReducedModel::new(a.clone(), b.clone())
            .and_then(|m| TwoIsogeny::from_reduced(&m))
            .unwrap();
        let e = phi.domain();
        let e2 = phi.codomain();
        let c1 = HeightContext::new(e, &mut Budget::unlimited()).unwrap();
        let c2 = HeightContext::new(e2, &mut Budget::unlimited()).unwrap();
        for k in 1..=3i64 {
            let pk = c1.multiple(&p, &BigInt::from(k)).unwrap();
            let img = phi.image(&pk);
            let (h1, h2) = (c1.height(&pk).unwrap(), c2.height(&img).unwrap());
            assert!(
                (h2.value() - 2.0 * h1.value()).abs() <= h2.error() + 2.0 * h1.error(),
                "y² = x³ + {a}x² + {b}x, P = {pk}: ĥ(φP) = {h2}, 2ĥ(P) = {}",
                2.0 * h1.value()
            );
            let back = phi.dual_image(&img);
            let h3 = c1.height(&back).unwrap();
            assert!(
                (h3.value() - 2.0 * h2.value()).abs() <= h3.error() + 2.0 * h2.error(),
                "dual: {h3} vs 2·{h2}"
            );
        }
    }
}

/// Curves and points for the model changes.
fn base() -> Vec<(Curve, Point)> {
    vec![
        (
            Curve::from_ints([0, 0, 1, -1, 0]).unwrap(),
            Point::from_ints(0, 0),
        ),
        (
            Curve::from_ints([0, 1, 1, -2, 0]).unwrap(),
            Point::from_ints(-1, 1),
        ),
        (
            Curve::from_ints([0, 0, 0, -36, 0]).unwrap(),
            Point::from_ints(-3, 9),
        ),
        (
            Curve::from_ints([0, 1, 0, -4, 0]).unwrap(),
            Point::from_ints(-1, 2),
        ),
        (
            Curve::from_ints([0, 0, 1, -7, 6]).unwrap(),
            Point::from_ints(2, 0),
        ),
    ]
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 300, .. ProptestConfig::default() })]

    /// ĥ is an invariant of the point on the abstract curve: the same for
    /// every Weierstrass model, x(P) written in any coordinates
    /// (Silverman, AEC 2nd ed., VIII.9: ĥ is defined from the divisor
    /// class of 2(O), independent of the model; common practice).
    #[test]
    fn heights_do_not_depend_on_the_model(
        k in 0usize..5, m in 1i64..=4, un in 1i64..=3, ud in 1i64..=3, neg in any::<bool>(),
        r in (-9i64..=9, 1i64..=4), s in (-9i64..=9, 1i64..=3), t in (-9i64..=9, 1i64..=4)
    ) {
        let (e, p) = &base()[k];
        let u = q(if neg { -un } else { un }, ud);
        let ch = ModelChange::new(u, q(r.0, r.1), q(s.0, s.1), q(t.0, t.1)).unwrap();
        let e2 = ch.apply_to_curve(e);
        let c1 = HeightContext::new(e, &mut Budget::unlimited()).unwrap();
        let c2 = HeightContext::new(&e2, &mut Budget::unlimited()).unwrap();
        let pm = c1.multiple(p, &BigInt::from(m)).unwrap();
        let p2 = ch.to_new(&pm);
        prop_assert!(e2.contains(&p2));
        let (h1, h2) = (c1.height(&pm).unwrap(), c2.height(&p2).unwrap());
        prop_assert!(h1.overlaps(&h2), "{h1} vs {h2} on {e2}");
        // And the exact arithmetic on the new model agrees with the old.
        let back = ch.to_old(&c2.multiple(&p2, &BigInt::from(3)).unwrap());
        prop_assert_eq!(back, c1.multiple(&pm, &BigInt::from(3)).unwrap());
    }
}
