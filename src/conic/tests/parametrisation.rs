//! Parametrisations of conics by binary quadratic forms, and zeros of
//! general ternary forms.

#![allow(clippy::needless_range_loop)] // index loops mirror the matrix formulas

use crate::conic::{
    parametrise, parametrise_diagonal, solve_diagonal, solve_ternary, ConicSolution, TernaryForm,
};
use crate::local::{hilbert_symbol_int, Place, Prime};
use crate::{Budget, Error};
use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};
use proptest::prelude::*;

/// The diagonal entries of q after symmetric Gaussian elimination over Q
/// on its Gram matrix (pivot on a nonzero diagonal entry; if all are zero,
/// first replace x_i by x_i + x_j for some nonzero off-diagonal entry).
fn diag_over_q(q: &TernaryForm) -> Vec<BigRational> {
    let h = q.doubled_gram();
    let mut m: Vec<Vec<BigRational>> = h
        .iter()
        .map(|r| {
            r.iter()
                .map(|x| BigRational::from_integer(x.clone()))
                .collect()
        })
        .collect();
    let mut out = Vec::new();
    let mut idx: Vec<usize> = vec![0, 1, 2];
    while !idx.is_empty() {
        if let Some(pos) = idx.iter().position(|&i| !m[i][i].is_zero()) {
            let p = idx.remove(pos);
            let piv = m[p][p].clone();
            for &i in &idx {
                for &j in &idx {
                    let t = &m[i][p] * &m[p][j] / &piv;
                    m[i][j] = &m[i][j] - t;
                }
            }
            out.push(piv);
        } else {
            // all remaining diagonal entries are 0: add row/col j to i
            let (i, j) = idx
                .iter()
                .flat_map(|&i| idx.iter().map(move |&j| (i, j)))
                .find(|&(i, j)| i != j && !m[i][j].is_zero())
                .expect("nondegenerate");
            for k in 0..3 {
                let t = m[j][k].clone();
                m[i][k] = &m[i][k] + t;
            }
            for k in 0..3 {
                let t = m[k][j].clone();
                m[k][i] = &m[k][i] + t;
            }
        }
    }
    out
}

fn big(x: i64) -> BigInt {
    BigInt::from(x)
}

fn proportional(a: &[BigInt; 3], b: &[BigInt; 3]) -> bool {
    // all 2×2 minors vanish
    (0..3).all(|i| (0..3).all(|j| (&a[i] * &b[j] - &a[j] * &b[i]).is_zero()))
}

#[test]
fn pythagorean_triples_are_all_in_the_image_of_the_circle_parametrisation() {
    // Primitive Pythagorean triples, from memory (Euclid's formula table:
    // Hardy & Wright, Thm. 225).
    let triples = [
        (3, 4, 5),
        (5, 12, 13),
        (8, 15, 17),
        (7, 24, 25),
        (20, 21, 29),
        (12, 35, 37),
        (9, 40, 41),
        (28, 45, 53),
        (11, 60, 61),
        (33, 56, 65),
    ];
    let q = TernaryForm::diagonal(big(1), big(1), big(-1));
    let par = parametrise(&q, &[big(1), big(0), big(1)]).unwrap();
    for (x, y, z) in triples {
        let r = [big(x), big(y), big(z)];
        assert!(q.evaluate(&r).is_zero());
        let (u, v) = par.parameter_of(&r).unwrap();
        let img = par.evaluate(&u, &v);
        assert!(
            proportional(&img, &r),
            "({x},{y},{z}) ↦ ({u},{v}) ↦ {img:?}"
        );
    }
}

#[test]
fn the_base_point_is_the_image_of_the_tangent_direction() {
    let q = TernaryForm::diagonal(big(1), big(1), big(-5));
    let p = [big(1), big(2), big(1)];
    let par = parametrise(&q, &p).unwrap();
    let (u, v) = par.parameter_of(&p).unwrap();
    let img = par.evaluate(&u, &v);
    assert!(!img.iter().all(|c| c.is_zero()));
    assert!(proportional(&img, &p));
}

#[test]
fn parametrising_needs_a_point_on_a_nondegenerate_conic() {
    let q = TernaryForm::diagonal(big(1), big(1), big(-5));
    assert!(matches!(
        parametrise(&q, &[big(1), big(1), big(1)]),
        Err(Error::PointNotOnCurve { .. })
    ));
    assert!(matches!(
        parametrise(&q, &[big(0), big(0), big(0)]),
        Err(Error::InvalidArgument { .. })
    ));
    // x² − y² = 0 is a line pair: determinant 0
    let lines = TernaryForm::diagonal(big(1), big(-1), big(0));
    assert!(matches!(
        parametrise(&lines, &[big(1), big(1), big(0)]),
        Err(Error::Degenerate { .. })
    ));
    assert!(matches!(
        solve_ternary(&lines, &mut Budget::unlimited()),
        Err(Error::Degenerate { .. })
    ));
}

#[test]
fn a_non_symmetric_matrix_is_rejected() {
    let m = [
        [big(1), big(2), big(0)],
        [big(3), big(1), big(0)],
        [big(0), big(0), big(-1)],
    ];
    assert!(matches!(
        TernaryForm::from_symmetric_matrix(&m),
        Err(Error::InvalidArgument { .. })
    ));
}

#[test]
fn xy_minus_z2_and_friends_have_points() {
    // common practice: xy = z² contains (1, 0, 0); x² + xy + y² = z² contains (1, 0, 1).
    for q in [
        TernaryForm::new(big(0), big(0), big(-1), big(0), big(0), big(1)),
        TernaryForm::new(big(1), big(1), big(-1), big(0), big(0), big(1)),
        TernaryForm::new(big(0), big(0), big(0), big(1), big(1), big(1)),
    ] {
        let s = solve_ternary(&q, &mut Budget::unlimited()).unwrap();
        let p = s.point().unwrap();
        assert!(q.evaluate(p).is_zero());
    }
}

#[test]
fn a_positive_definite_ternary_form_fails_at_the_real_place() {
    // common practice: x² + y² + z² + xy is positive definite (leading
    // minors of H: 2, 3, 6, all positive; Sylvester's criterion).
    let q = TernaryForm::new(big(1), big(1), big(1), big(0), big(0), big(1));
    let s = solve_ternary(&q, &mut Budget::unlimited()).unwrap();
    assert_eq!(s, ConicSolution::Insoluble { place: Place::Real });
}

fn nz(r: i64) -> impl Strategy<Value = i64> {
    prop_oneof![(1..=r), (-r..=-1)]
}

/// Bad places of a diagonal conic by Hilbert symbols (Serre, A Course in
/// Arithmetic, IV.2.2 Thm. 6), over R, 2 and primes up to `bound`.
fn locally_soluble_diag(a: &BigInt, b: &BigInt, c: &BigInt) -> bool {
    let u = -(a * c);
    let w = -(b * c);
    let mut places = vec![Place::Real];
    let n = (a * b * c).abs();
    let mut p = 2u64;
    while BigInt::from(p) <= n {
        if (&n % p).is_zero() || p == 2 {
            places.push(Place::Finite(Prime::small(p).unwrap()));
        }
        p += 1;
        while !crate::arith::is_prime_u64(p) {
            p += 1;
        }
    }
    places
        .iter()
        .all(|v| hilbert_symbol_int(&u, &w, v).unwrap() == 1)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(400))]

    #[test]
    fn random_parameters_give_points_on_the_conic(
        a in nz(60), b in nz(60), c in nz(60), u in -50i64..50, v in -50i64..50,
    ) {
        let (a, b, c) = (big(a), big(b), big(c));
        if let ConicSolution::Point(p) = solve_diagonal(&a, &b, &c, &mut Budget::unlimited()).unwrap() {
            let par = parametrise_diagonal(&a, &b, &c, &p).unwrap();
            let (u, v) = (big(u), big(v));
            let r = par.evaluate(&u, &v);
            let q = TernaryForm::diagonal(a.clone(), b.clone(), c.clone());
            prop_assert!(q.evaluate(&r).is_zero());
            if !(u.is_zero() && v.is_zero()) {
                prop_assert!(!r.iter().all(|x| x.is_zero()));
                // and the parameter is recovered
                let (s, t) = par.parameter_of(&r).unwrap();
                let g = u.gcd(&v);
                let (u0, v0) = (&u / &g, &v / &g);
                prop_assert!((s == u0.clone() && t == v0.clone()) || (s == -u0 && t == -v0));
            }
            // the known point is in the image
            let (s, t) = par.parameter_of(&p).unwrap();
            prop_assert!(proportional(&par.evaluate(&s, &t), &p));
        }
    }

    #[test]
    fn general_ternary_forms_get_zeros_that_check(
        a in -40i64..40, b in -40i64..40, c in -40i64..40,
        d in -40i64..40, e in -40i64..40, f in -40i64..40,
    ) {
        let q = TernaryForm::new(big(a), big(b), big(c), big(d), big(e), big(f));
        match solve_ternary(&q, &mut Budget::unlimited()) {
            Err(Error::Degenerate { .. }) => prop_assert!(q.doubled_determinant().is_zero()),
            Err(other) => prop_assert!(false, "unexpected error {other}"),
            Ok(ConicSolution::Point(p)) => {
                prop_assert!(!p.iter().all(|x| x.is_zero()));
                prop_assert!(q.evaluate(&p).is_zero());
                let par = parametrise(&q, &p).unwrap();
                let r = par.evaluate(&big(3), &big(-7));
                prop_assert!(q.evaluate(&r).is_zero());
                prop_assert!(!r.iter().all(|x| x.is_zero()));
            }
            Ok(ConicSolution::Insoluble { place }) => {
                // cross-check by a second diagonalisation (symmetric
                // Gaussian elimination over Q, common practice) and
                // Hilbert symbols (Serre, A Course in Arithmetic, IV.2.2
                // Thm. 6): the diagonal form must fail at `place` too.
                let dg = diag_over_q(&q);
                let l = dg.iter().fold(BigInt::one(), |l, x| l.lcm(x.denom()));
                let ints: Vec<BigInt> = dg.iter().map(|x| (x * BigRational::from_integer(l.clone())).to_integer()).collect();
                let u = -(&ints[0] * &ints[2]);
                let w = -(&ints[1] * &ints[2]);
                prop_assert_eq!(hilbert_symbol_int(&u, &w, &place).unwrap(), -1);
            }
        }
    }

    #[test]
    fn insoluble_diagonal_conics_really_are_locally_insoluble(
        a in nz(40), b in nz(40), c in nz(40),
    ) {
        let (a, b, c) = (big(a), big(b), big(c));
        let s = solve_ternary(&TernaryForm::diagonal(a.clone(), b.clone(), c.clone()), &mut Budget::unlimited()).unwrap();
        prop_assert_eq!(s.is_soluble(), locally_soluble_diag(&a, &b, &c));
    }
}

#[test]
fn the_parametrisation_of_the_circle_has_small_integer_forms() {
    let q = TernaryForm::diagonal(big(1), big(1), big(-1));
    let par = parametrise(&q, &[big(1), big(0), big(1)]).unwrap();
    // each coordinate is a binary quadratic form; check one value by hand:
    // (u, v) = (1, 0) and (0, 1) give points of the circle.
    for (u, v) in [(1, 0), (0, 1), (1, 1)] {
        let r = par.evaluate(&big(u), &big(v));
        assert!(q.evaluate(&r).is_zero());
        assert!(!r.iter().all(|x| x.is_zero()));
    }
    assert!(par
        .forms
        .iter()
        .flatten()
        .all(|c| c.abs() <= BigInt::one() * 2));
}

/// The circle x² + y² = z² through (1, 0, 1): the point of parameter
/// (2 : 1) lies on it (common practice).
#[test]
fn the_circle_is_parametrised_through_a_rational_point() {
    let q = TernaryForm::diagonal(1.into(), 1.into(), (-1).into());
    let par = parametrise(&q, &[1.into(), 0.into(), 1.into()]).unwrap();
    let r = par.evaluate(&BigInt::from(2), &BigInt::from(1));
    assert_eq!(q.evaluate(&r), 0.into());
}
