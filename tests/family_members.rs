//! The families' enumerations and the twist formula.

use isodescent::curve::{weierstrass_invariants, Curve};
use isodescent::family::{is_squarefree_u64, twist_by, Family, Parameter, Shard};
use isodescent::Error;
use num_bigint::BigInt;
use num_rational::BigRational;

fn q(n: i64) -> BigRational {
    BigRational::from_integer(BigInt::from(n))
}

#[test]
fn squarefree_test_agrees_with_the_definition_up_to_3000() {
    // Definition (common practice): n is square-free iff no p² with p ≥ 2 divides n.
    for n in 1u64..=3000 {
        let by_definition = (2..=n).take_while(|k| k * k <= n).all(|k| n % (k * k) != 0);
        assert_eq!(is_squarefree_u64(n), by_definition, "n = {n}");
    }
    assert!(!is_squarefree_u64(0));
}

#[test]
fn congruent_family_up_to_ten_is_the_seven_squarefree_n_in_order() {
    let fam = Family::congruent_numbers(1, 10).unwrap();
    let params: Vec<Parameter> = fam.members().map(|m| m.parameter).collect();
    let want: Vec<Parameter> = [1, 2, 3, 5, 6, 7, 10].map(Parameter::Congruent).to_vec();
    assert_eq!(params, want);
    let indices: Vec<u64> = fam.members().map(|m| m.index).collect();
    assert_eq!(indices, (0..7).collect::<Vec<u64>>());
    assert_eq!(fam.count(), 7);
    let m = fam.members().nth(3).unwrap();
    assert_eq!(m.line(), "y^2 = x^3 - 25x");
}

#[test]
fn squarefree_count_up_to_ten_thousand_is_6083() {
    // Q(10^4) = 6083 square-free integers ≤ 10^4: OEIS A071172 (from memory),
    // recounted with sympy 1.14 `factorint`; ≈ 6/π² · 10^4 = 6079.
    assert_eq!(Family::congruent_numbers(1, 10_000).unwrap().count(), 6083);
}

#[test]
fn the_box_of_bound_one_has_six_nonsingular_members_and_skips_singular_pairs() {
    let fam = Family::pair_box(1).unwrap();
    let params: Vec<Parameter> = fam.members().map(|m| m.parameter).collect();
    let want =
        [(-1, -1), (-1, 1), (0, -1), (0, 1), (1, -1), (1, 1)].map(|(a, b)| Parameter::Pair(a, b));
    assert_eq!(params, want.to_vec());
    // Bound 2: 5·5 pairs, minus 5 with b = 0, minus (±2, 1): 18 members.
    let fam2 = Family::pair_box(2).unwrap();
    assert_eq!(fam2.count(), 18);
    assert!(fam2.members().all(|m| match m.parameter {
        Parameter::Pair(a, b) => b != 0 && a * a != 4 * b,
        _ => false,
    }));
}

#[test]
fn twisting_y2_x3_minus_x_by_five_gives_the_congruent_curve_for_five() {
    let e = Curve::from_ints([0, 0, 0, -1, 0]).unwrap();
    let t = twist_by(&e, 5).unwrap();
    assert_eq!(t, Curve::from_ints([0, 0, 0, -25, 0]).unwrap());
    // y² = x³ + x² + x + 1 twisted by −2: (0, −2, 0, 4, −8).
    let f = Curve::from_ints([0, 1, 0, 1, 1]).unwrap();
    assert_eq!(
        twist_by(&f, -2).unwrap(),
        Curve::from_ints([0, -2, 0, 4, -8]).unwrap()
    );
}

/// c4 of an integral model, from `weierstrass_invariants`.
fn c4(e: &Curve) -> BigRational {
    assert!(e.coefficients().iter().all(|c| c.is_integer()));
    let a = e.coefficients().clone().map(|c| c.to_integer());
    BigRational::from_integer(weierstrass_invariants(&a).c4)
}

/// c6 of an integral model, from `weierstrass_invariants`.
fn c6(e: &Curve) -> BigRational {
    assert!(e.coefficients().iter().all(|c| c.is_integer()));
    let a = e.coefficients().clone().map(|c| c.to_integer());
    BigRational::from_integer(weierstrass_invariants(&a).c6)
}

#[test]
fn twists_scale_c4_and_c6_by_d_squared_and_d_cubed_and_keep_j() {
    // [Sil09, X.5]: E^(d) has c4 = d²c4(E), c6 = d³c6(E) up to the scaling
    // u of the model (u⁻⁴, u⁻⁶), so the same j-invariant.
    let short = Curve::from_ints([0, 3, 0, -4, 0]).unwrap();
    let general = Curve::from_ints([1, 0, 0, -1, 0]).unwrap(); // (0, 0) has order 2
    for d in [-7i64, -1, 2, 3, 30] {
        let t = twist_by(&short, d).unwrap();
        assert_eq!(c4(&t), c4(&short) * q(d * d));
        assert_eq!(c6(&t), c6(&short) * q(d * d * d));
        let g = twist_by(&general, d).unwrap();
        // The general model is rescaled by u = 1/2: c4 ·16, c6 ·64.
        assert_eq!(c4(&g), c4(&general) * q(16 * d * d));
        assert_eq!(c6(&g), c6(&general) * q(64 * d * d * d));
        assert_eq!(g.j_invariant(), general.j_invariant());
        assert!(g.coefficients().iter().all(|c| c.is_integer()));
    }
}

#[test]
fn twist_family_of_a_curve_without_two_torsion_is_refused() {
    // y² + y = x³ − x² − 10x − 20 has 2-division polynomial
    // 4x³ − 4x² − 40x − 79 with no rational root (rational root test:
    // ±1, ±79 over 1, 2, 4; common practice), so no point of order 2.
    let e = Curve::from_ints([0, -1, 1, -10, -20]).unwrap();
    assert_eq!(
        Family::quadratic_twists(&e, 1, 10),
        Err(Error::NoTwoTorsion)
    );
    let f = Curve::from_ints([0, 0, 0, -1, 0]).unwrap();
    let fam = Family::quadratic_twists(&f, -6, 6).unwrap();
    let ds: Vec<Parameter> = fam.members().map(|m| m.parameter).collect();
    let want: Vec<Parameter> = [-6, -5, -3, -2, -1, 1, 2, 3, 5, 6]
        .map(Parameter::Twist)
        .to_vec();
    assert_eq!(ds, want);
}

#[test]
fn bad_family_parameters_get_typed_errors() {
    assert!(matches!(
        Family::congruent_numbers(0, 5),
        Err(Error::NotPositive { .. })
    ));
    assert!(matches!(
        Family::congruent_numbers(9, 5),
        Err(Error::InvalidArgument { .. })
    ));
    assert!(matches!(
        Family::pair_box(u64::MAX),
        Err(Error::InvalidArgument { .. })
    ));
    let e = Curve::from_ints([0, 0, 0, -1, 0]).unwrap();
    assert!(matches!(
        Family::quadratic_twists(&e, i64::MIN, 0),
        Err(Error::InvalidArgument { .. })
    ));
    assert!(matches!(twist_by(&e, 0), Err(Error::Zero { .. })));
}

#[test]
fn shards_parse_as_k_over_n_and_partition_the_indices() {
    let s: Shard = "2/3".parse().unwrap();
    assert_eq!((s.number(), s.count()), (2, 3));
    assert_eq!(s.to_string(), "2/3");
    for bad in ["0/3", "4/3", "1/0", "x/2", "3", ""] {
        assert!(bad.parse::<Shard>().is_err(), "{bad:?} accepted");
    }
    let shards: Vec<Shard> = (1..=3).map(|k| Shard::new(k, 3).unwrap()).collect();
    for i in 0..100u64 {
        assert_eq!(shards.iter().filter(|s| s.contains(i)).count(), 1);
    }
    assert!(Shard::new(2, 3).unwrap().contains(4));
}
