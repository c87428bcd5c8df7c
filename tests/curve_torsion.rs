//! Curves layer: the torsion subgroup, checked against Kubert's
//! parametrisations, classical examples and Mazur's theorem.

use isodescent::curve::{torsion, two_torsion_points, Curve, Point, TorsionGroup};
use num_bigint::BigInt;
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
    assert!(in_mazur_list(g.structure()), "{e}: {:?}", g.structure());
    assert_eq!(g.points()[0], Point::Infinity);
    for p in g.points() {
        assert!(e.contains(p));
        assert!(e.mul(p, &BigInt::from(n1 as i64)).is_infinity());
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

/// True iff the structure `(n, m)` (the group Z/n × Z/m, m | n) is one of
/// the fifteen torsion groups of Mazur's theorem (Mazur, "Modular curves
/// and the Eisenstein ideal", 1977; docs/references.md [Maz77]): Z/n for
/// n = 1…10, 12 and Z/2k × Z/2 for k = 1…4.
fn in_mazur_list((n, m): (u32, u32)) -> bool {
    match m {
        1 => (1..=10).contains(&n) || n == 12,
        2 => matches!(n, 2 | 4 | 6 | 8),
        _ => false,
    }
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
            let g = torsion(&e);
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
        assert_eq!(torsion(&e).structure(), (12, 1), "t={t}");
    }
}

#[test]
fn two_by_2n_families_have_the_full_structure() {
    // Kubert 1976, Table 3 (from memory): Z/2 x Z/4 is E(b, 0) with
    // b = v^2 - 1/16; Z/2 x Z/6 is E(c + c^2, c) with c = (10 - 2v)/(v^2 - 9).
    for v in [q(1, 1), q(3, 1), q(1, 3), q(5, 7), q(-7, 2), q(2, 9)] {
        let b = &v * &v - q(1, 16);
        if let Some(e) = tate_normal(&b, &z(0)) {
            let g = torsion(&e);
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
            let g = torsion(&e);
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
        let g = torsion(&e);
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
    let g = torsion(&e);
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
    let g = torsion(&e);
    assert_eq!(g.order() % 7, 0);
    check_group_is_consistent(&e, &g);
}

/// The model y² = x³ + b2x² + 8·b4·x + 16·b6 of E (the scaling u = 1/2 after
/// completing the square, [Sil09, III.1]): integral with a1 = a3 = 0 when E
/// is integral, and with a2 ≠ 0 in general.
fn completed_square_model(e: &Curve) -> Curve {
    // b2 = a1² + 4a2, b4 = 2a4 + a1a3, b6 = a3² + 4a6 [Sil09, III.1].
    let [a1, a2, a3, a4, a6] = e.coefficients();
    let b2 = a1 * a1 + z(4) * a2;
    let b4 = z(2) * a4 + a1 * a3;
    let b6 = a3 * a3 + z(4) * a6;
    Curve::new([
        BigRational::zero(),
        b2,
        BigRational::zero(),
        b4 * z(8),
        b6 * z(16),
    ])
    .unwrap()
}

#[test]
fn kubert_families_keep_their_structure_on_the_completed_square_model() {
    // The torsion structure is an invariant of the curve, so the general
    // model E(b, c) and its model y² = x³ + b2x² + 8·b4·x + 16·b6 must agree;
    // the second is integral with a2 ≠ 0, the shape the descent uses.
    let ts = small_rationals();
    for n in [4u32, 5, 6, 7, 8, 9, 10, 12] {
        let mut tested = 0;
        for t in ts.iter().take(12) {
            let Some((b, c)) = kubert(n, t) else { continue };
            let Some(e) = tate_normal(&b, &c) else {
                continue;
            };
            let (e_int, _) = isodescent::curve::clear_denominators(&e);
            let m = completed_square_model(&e_int);
            assert!(
                m.coefficients().iter().all(|c| c.is_integer())
                    && m.coefficients()[0].is_zero()
                    && m.coefficients()[2].is_zero()
            );
            let g = torsion(&m);
            assert_eq!(g.structure(), torsion(&e).structure(), "N={n} t={t}");
            assert_eq!(g.order() % n, 0);
            check_group_is_consistent(&m, &g);
            tested += 1;
        }
        assert!(tested >= 4, "N={n}: only {tested} nonsingular members");
    }
}

#[test]
fn torsion_points_move_with_a_change_of_model() {
    // τ maps E(Q)_tors onto E′(Q)_tors (common practice): the points found on
    // an integral a1 = a3 = 0 model (computed there directly) and on a moved
    // general model (computed via the short model) must correspond.
    let ch = isodescent::curve::ModelChange::new(q(2, 3), q(1, 2), q(-1, 1), q(3, 4)).unwrap();
    for a in [
        [0, 0, 0, -1, 0],
        [0, 1, 0, -4, -4],
        [0, 0, 0, 4, 0],
        [0, -1, 0, -4, 4],
        [0, 5, 0, 4, 0],
        [0, 0, 0, -25, 0],
        [0, 2, 0, -3, 0],
    ] {
        let e = Curve::from_ints(a).unwrap();
        let e2 = ch.apply_to_curve(&e);
        let g = torsion(&e);
        let g2 = torsion(&e2);
        assert_eq!(g.structure(), g2.structure(), "{e}");
        let mut moved: Vec<Point> = g.points().iter().map(|p| ch.to_new(p)).collect();
        moved.sort();
        assert_eq!(moved, g2.points(), "{e}");
        check_group_is_consistent(&e, &g);
    }
}

#[test]
fn torsion_of_small_a_b_curves_matches_a_nagell_lutz_search() {
    // Oracle: on y² = F(x) = x³ + ax² + bx with integer coefficients a
    // torsion point has integer coordinates and y = 0 or y² | disc F
    // (Nagell–Lutz, Silverman–Tate, Rational Points on Elliptic Curves,
    // II.5). With disc F = b²(a² − 4b), the bound |x| ≤ max(1 + |a| + |b|,
    // √|disc F|) + 1 follows since F(x) ≥ x² once x ≥ 1 + |a| + |b|, and
    // F(x) < 0 below the least real root, which is ≥ −(1 + |a| + |b|)
    // (Cauchy's bound). The candidates of finite order are those with
    // nP = O for some n ≤ 12 (Mazur [Maz77]: every torsion point has order
    // at most 12).
    let mut checked = 0;
    for a in -12i64..=12 {
        for b in -12i64..=12 {
            let Ok(e) = Curve::from_ints([0, a, 0, b, 0]) else {
                continue;
            };
            let disc = (b * b * (a * a - 4 * b)).abs();
            let bound = (1 + a.abs() + b.abs()).max((disc as f64).sqrt() as i64 + 1) + 1;
            let mut found = vec![Point::Infinity];
            for x in -bound..=bound {
                let fx = x * x * x + a * x * x + b * x;
                if fx < 0 {
                    continue;
                }
                let y = (fx as f64).sqrt().round() as i64;
                let y = (y - 2..=y + 2).find(|y| *y >= 0 && y * y == fx);
                let Some(y) = y else { continue };
                if y != 0 && disc % (y * y) != 0 {
                    continue;
                }
                for yy in if y == 0 { vec![0] } else { vec![-y, y] } {
                    let p = Point::from_ints(x, yy);
                    if (1..=12).any(|n| e.mul(&p, &BigInt::from(n)).is_infinity()) {
                        found.push(p);
                    }
                }
            }
            found.sort();
            let g = torsion(&e);
            assert_eq!(g.points(), found.as_slice(), "a={a} b={b}");
            checked += 1;
        }
    }
    assert!(checked > 500);
}
