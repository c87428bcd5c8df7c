//! Invariance sweeps (bounded so CI stays fast): the descent gives the same
//! answer on every model of a curve and on its 2-isogenous curve, returned
//! points lie on the input curve, and the Selmer groups contain the images
//! of torsion.

use isodescent::curve::{Curve, ModelChange, ReducedModel, TwoIsogeny};
use isodescent::descent::{descend, descend_isogeny, ClassStatus, DescentOptions};
use num_bigint::BigInt;
use num_rational::BigRational;
use proptest::prelude::*;

fn q(n: i64) -> BigRational {
    BigRational::from_integer(BigInt::from(n))
}

fn curve_ab() -> impl Strategy<Value = (i64, i64)> {
    (-40i64..=40, -60i64..=60).prop_filter("nonsingular", |&(a, b)| b != 0 && a * a != 4 * b)
}

fn class_set(s: &isodescent::descent::SelmerSide) -> Vec<BigInt> {
    let mut v: Vec<BigInt> = s
        .group()
        .elements()
        .unwrap()
        .iter()
        .map(|x| s.qs2().integer(x))
        .collect();
    v.sort();
    v
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

    // Common practice: rank and Selmer groups are invariants of the curve,
    // not of the model.
    #[test]
    fn random_changes_of_model_give_identical_rank_bounds(
        (a, b) in curve_ab(),
        u in prop::sample::select(vec![(1i64, 1i64), (2, 1), (1, 3), (-2, 5), (6, 1)]),
        r in -5i64..5, s in -3i64..3, t in -5i64..5,
    ) {
        let opts = DescentOptions::default();
        let e = Curve::from_ints([0, a, 0, b, 0]).unwrap();
        let change = ModelChange::new(
            BigRational::new(u.0.into(), u.1.into()), q(r), q(s), q(t)).unwrap();
        let e2 = change.apply_to_curve(&e);
        let r1 = descend(&e, &opts).unwrap();
        let r2 = descend(&e2, &opts).unwrap();
        prop_assert_eq!((r1.rank_bounds().lower(), r1.rank_bounds().upper()), (r2.rank_bounds().lower(), r2.rank_bounds().upper()));
        for p in r2.descent_points() {
            prop_assert!(e2.contains(p), "point {:?} not on {}", p, e2);
        }
        prop_assert_eq!(r2.descent_points().len(), r2.rank_bounds().lower());
        prop_assert_eq!(r1.torsion().order(), r2.torsion().order());
    }

    // Isogenous curves have the same rank (common practice); both intervals
    // are proven, so they must overlap.
    #[test]
    fn the_isogenous_curve_gets_overlapping_rank_bounds((a, b) in curve_ab()) {
        let opts = DescentOptions::default();
        let e = Curve::from_ints([0, a, 0, b, 0]).unwrap();
        let e2 = Curve::from_ints([0, -2 * a, 0, a * a - 4 * b, 0]).unwrap();
        let r1 = descend(&e, &opts).unwrap();
        let r2 = descend(&e2, &opts).unwrap();
        prop_assert!(r1.rank_bounds().lower() <= r2.rank_bounds().upper() && r2.rank_bounds().lower() <= r1.rank_bounds().upper(),
            "[{}, {}] vs [{}, {}]", r1.rank_bounds().lower(), r1.rank_bounds().upper(), r2.rank_bounds().lower(), r2.rank_bounds().upper());
    }

    // The descent on E' through its point (0, 0) has E'' ≅ E as codomain
    // (the standard fact that the dual of the dual is the original), so its
    // two Selmer groups are E's swapped: the same classes exactly.
    #[test]
    fn a_descent_on_the_isogenous_curve_swaps_the_selmer_groups((a, b) in curve_ab()) {
        let opts = DescentOptions::default();
        let e = Curve::from_ints([0, a, 0, b, 0]).unwrap();
        let origin = isodescent::curve::Point::from_ints(0, 0);
        let d1 = descend_isogeny(&e, &origin, &opts).unwrap();
        let phi = ReducedModel::new(a.into(), b.into()).and_then(|m| TwoIsogeny::from_reduced(&m)).unwrap();
        let e2 = phi.codomain().clone();
        let d2 = descend_isogeny(&e2, &origin, &opts).unwrap();
        prop_assert_eq!(class_set(d1.domain()), class_set(d2.codomain()));
        prop_assert_eq!(class_set(d1.codomain()), class_set(d2.domain()));
    }

    // Silverman–Tate, Rational Points on Elliptic Curves, III.5: α is a
    // homomorphism into the Selmer group, so torsion images lie in it; and
    // |α(E_tors)|·|α'(E'_tors)| = 4 (from the exact sequence for finite groups).
    #[test]
    fn selmer_groups_contain_the_images_of_torsion((a, b) in curve_ab()) {
        let opts = DescentOptions::default();
        let e = Curve::from_ints([0, a, 0, b, 0]).unwrap();
        let r = descend(&e, &opts).unwrap();
        for d in r.isogenies() {
            for side in [d.domain(), d.codomain()] {
                for el in side.elements() {
                    let v = side.qs2().vector(&el.class).unwrap();
                    prop_assert!(side.group().contains(&v));
                    if let ClassStatus::TorsionImage { point } = &el.status {
                        prop_assert!(point.x().is_some());
                    }
                }
                // every Selmer class divides b (Silverman–Tate III.5: the
                // image lies in the divisors of b; the local conditions
                // at primes not dividing b force it).
                for c in class_set(side) {
                    prop_assert!((side.model().b() % &c) == BigInt::from(0), "{} does not divide {}", c, side.model().b());
                }
            }
            prop_assert_eq!(d.domain().torsion_dim() + d.codomain().torsion_dim(), 2);
        }
    }
}
