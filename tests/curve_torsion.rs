//! Curves layer: the torsion subgroup, checked against Kubert's
//! parametrisations, classical examples and Mazur's theorem.

use isodescent::curve::{torsion_subgroup, two_torsion_points, Curve, Point, TorsionGroup};
use num_rational::BigRational;
use num_traits::{One, Zero};

fn q(n: i64, d: i64) -> BigRational {
    BigRational::new(n.into(), d.into())
}
fn z(n: i64) -> BigRational {
    BigRational::from_integer(n.into())
}

/// Tate normal form E(b, c): y² + (1 − c)xy − by = x³ − bx², on which (0, 0)
/// is a point of order ≥ 4 for generic b, c.
fn tate_normal(b: &BigRational, c: &BigRational) -> Option<Curve> {
    Curve::new([
        BigRational::one() - c,
        -b.clone(),
        -b.clone(),
        BigRational::zero(),
        BigRational::zero(),
    ])
    .ok()
}

/// The (b, c) of Kubert's table for torsion Z/N (Kubert, Universal bounds on
/// the torsion of elliptic curves, Proc. London Math. Soc. 1976, Table 3;
/// the formulas below are from memory and are validated in each test by
/// checking that (0, 0) has exact order N with the group law).
fn kubert(n: u32, t: &BigRational) -> Option<(BigRational, BigRational)> {
    let one = BigRational::one();
    let two = z(2);
    let three = z(3);
    match n {
        4 => Some((t.clone(), BigRational::zero())),
        5 => Some((t.clone(), t.clone())),
        6 => Some((t + t * t, t.clone())),
        7 => Some((t * t * t - t * t, t * t - t)),
        8 => {
            if t.is_zero() {
                return None;
            }
            let b = (&two * t - &one) * (t - &one);
            Some((b.clone(), b / t))
        }
        9 => {
            let c = t * t * (t - &one);
            Some((&c * (t * t - t + &one), c))
        }
        10 => {
            let d = t * t - &three * t + &one;
            if d.is_zero() {
                return None;
            }
            let base = t * (t - &one) * (&two * t - &one);
            Some((&base * t * t / (&d * &d), -base / d))
        }
        12 => {
            let m = t - &one;
            if m.is_zero() {
                return None;
            }
            let f = &three * t * t - &three * t + &one;
            let c = -(t * (&two * t - &one) * &f) / (&m * &m * &m);
            let b =
                t * (&two * t - &one) * (&two * t * t - &two * t + &one) * &f / (&m * &m * &m * &m);
            Some((b, c))
        }
        _ => None,
    }
}

fn small_rationals() -> Vec<BigRational> {
    let mut v = Vec::new();
    for n in -9i64..=9 {
        for d in 1i64..=5 {
            let x = q(n, d);
            if !v.contains(&x) {
                v.push(x);
            }
        }
    }
    v
}

fn check_group_is_consistent(e: &Curve, g: &TorsionGroup) {
    let (n1, n2) = g.structure();
    assert_eq!(g.points().len() as u32, g.order());
    assert!(g.is_in_mazur_list(), "{e}: {:?}", g.structure());
    assert_eq!(g.points()[0], Point::Infinity);
    for p in g.points() {
        assert!(e.contains(p));
        assert!(e.mul_i64(p, n1 as i64).is_infinity());
    }
    // Closed under addition (spot check: all sums with the generators).
    for gen in g.generators() {
        for p in g.points() {
            assert!(g.points().contains(&e.add(p, gen)));
        }
    }
    assert_eq!(
        g.generators().len(),
        usize::from(n1 > 1) + usize::from(n2 > 1)
    );
    assert_eq!(g.reduction_bound() % g.order(), 0);
}

#[test]
fn kubert_families_have_torsion_divisible_by_n_with_the_point_zero_zero_inside() {
    let ts = small_rationals();
    for n in [4u32, 5, 6, 7, 8, 9, 10, 12] {
        let mut tested = 0;
        for t in ts.iter().take(24) {
            let Some((b, c)) = kubert(n, t) else { continue };
            let Some(e) = tate_normal(&b, &c) else {
                continue;
            };
            let p = Point::new(z(0), z(0));
            // Validate the parametrisation itself with the group law.
            assert_eq!(e.order_up_to(&p, 12), Some(n), "N={n} t={t}: {e}");
            let g = torsion_subgroup(&e);
            assert_eq!(g.order() % n, 0, "N={n} t={t}: {e}");
            assert!(g.points().contains(&p));
            check_group_is_consistent(&e, &g);
            tested += 1;
        }
        assert!(tested >= 8, "N={n}: only {tested} nonsingular members");
    }
}

#[test]
fn twelve_torsion_family_members_have_exactly_z_mod_12() {
    // Z/12 is maximal among cyclic groups in Mazur's list, and no Z/2 x Z/12
    // exists, so the structure must be exactly (12, 1) [Mazur 1977].
    for t in [q(2, 1), q(3, 1), q(-1, 1), q(1, 3), q(5, 2)] {
        let (b, c) = kubert(12, &t).unwrap();
        let e = tate_normal(&b, &c).unwrap();
        assert_eq!(torsion_subgroup(&e).structure(), (12, 1), "t={t}");
    }
}

#[test]
fn two_by_2n_families_have_the_full_structure() {
    // Kubert 1976, Table 3 (from memory): Z/2 x Z/4 is E(b, 0) with
    // b = v^2 - 1/16; Z/2 x Z/6 is E(c + c^2, c) with c = (10 - 2v)/(v^2 - 9).
    for v in [q(1, 1), q(3, 1), q(1, 3), q(5, 7), q(-7, 2), q(2, 9)] {
        let b = &v * &v - q(1, 16);
        if let Some(e) = tate_normal(&b, &z(0)) {
            let g = torsion_subgroup(&e);
            assert_eq!(two_torsion_points(&e).len(), 3, "v={v}");
            assert_eq!(g.structure().1, 2, "v={v}");
            assert_eq!(g.structure().0 % 4, 0, "v={v}");
            check_group_is_consistent(&e, &g);
        }
    }
    for v in [q(1, 1), q(2, 1), q(7, 1), q(1, 2), q(-5, 3), q(11, 4)] {
        let den = &v * &v - z(9);
        if den.is_zero() {
            continue;
        }
        let c = (z(10) - z(2) * &v) / den;
        let b = &c + &c * &c;
        if let Some(e) = tate_normal(&b, &c) {
            let g = torsion_subgroup(&e);
            assert_eq!(g.structure(), (6, 2), "v={v}: {e}");
            check_group_is_consistent(&e, &g);
        }
    }
}

#[test]
fn classical_small_examples_have_their_known_torsion() {
    // From memory; standard examples (Silverman, AEC, VIII.7 and its
    // exercises; Silverman–Tate, Rational Points on Elliptic Curves, II.4–5).
    let cases: [([i64; 5], (u32, u32)); 8] = [
        ([0, 0, 0, 0, -2], (1, 1)),    // y^2 = x^3 - 2
        ([0, 0, 0, 0, 1], (6, 1)),     // y^2 = x^3 + 1
        ([0, 0, 0, -1, 0], (2, 2)),    // y^2 = x^3 - x
        ([0, 0, 0, 0, 4], (3, 1)),     // y^2 = x^3 + 4
        ([0, 0, 0, -43, 166], (7, 1)), // y^2 = x^3 - 43x + 166
        ([0, 0, 0, 4, 0], (4, 1)),     // y^2 = x^3 + 4x: (2, ±4) of order 4
        ([0, -1, 1, 0, 0], (5, 1)),    // y^2 + y = x^3 - x^2
        ([0, 0, 0, -2, 0], (2, 1)),    // y^2 = x^3 - 2x
    ];
    for (a, s) in cases {
        let e = Curve::from_ints(a).unwrap();
        let g = torsion_subgroup(&e);
        assert_eq!(g.structure(), s, "{e}");
        check_group_is_consistent(&e, &g);
    }
}

#[test]
fn torsion_points_are_reported_on_the_input_model_even_with_a1_a3_nonzero() {
    // E(b, c) with b = c = 2 (the Z/5 family at t = 2):
    // y^2 - xy - 2y = x^3 - 2x^2; check all reported points lie on the
    // input curve, not on an internal model.
    let e = Curve::from_ints([-1, -2, -2, 0, 0]).unwrap();
    let g = torsion_subgroup(&e);
    assert!(g.points().contains(&Point::new(z(0), z(0))));
    check_group_is_consistent(&e, &g);
}

#[test]
fn torsion_of_curves_with_thirty_digit_coefficients_is_found_quickly_and_exactly() {
    // The Z/7 family member at t = 10^10 + 1/3 has large coefficients; the
    // torsion must still contain (0, 0) of order 7.
    let t = BigRational::new(
        num_bigint::BigInt::from(3 * 10_000_000_000i64 + 1),
        3.into(),
    );
    let (b, c) = kubert(7, &t).unwrap();
    let e = tate_normal(&b, &c).unwrap();
    let g = torsion_subgroup(&e);
    assert_eq!(g.order() % 7, 0);
    check_group_is_consistent(&e, &g);
}
