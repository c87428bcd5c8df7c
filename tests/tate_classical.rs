//! Tate's algorithm on classical curves whose conductors and local data are
//! known, on non-minimal and non-integral input, and on bad input.

use isodescent::curve::{
    global_local_data, local_reduction, weierstrass_invariants, Kodaira, ReductionKind,
};
use isodescent::local::Prime;
use isodescent::{Budget, Error};
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Zero};

fn ints(a: [i64; 5]) -> [BigInt; 5] {
    a.map(BigInt::from)
}

fn rats(a: [i64; 5]) -> [BigRational; 5] {
    a.map(|c| BigRational::from_integer(c.into()))
}

fn conductor(a: [i64; 5]) -> BigInt {
    global_local_data(&rats(a), &mut Budget::unlimited())
        .unwrap()
        .conductor
}

fn prime(p: u64) -> Prime {
    Prime::small(p).unwrap()
}

#[test]
fn the_four_classical_curves_have_their_known_conductors() {
    // From memory: y² = x³ − x has N = 32; y² = x³ + 1 has N = 36;
    // y² + y = x³ − x has N = 37; y² + y = x³ − x² has N = 11.
    assert_eq!(conductor([0, 0, 0, -1, 0]), BigInt::from(32));
    assert_eq!(conductor([0, 0, 0, 0, 1]), BigInt::from(36));
    assert_eq!(conductor([0, 0, 1, -1, 0]), BigInt::from(37));
    assert_eq!(conductor([0, -1, 1, 0, 0]), BigInt::from(11));
}

#[test]
fn further_curves_of_small_conductor_have_their_known_conductors() {
    // From memory (the first curves of small conductor, as usually listed):
    let table: [([i64; 5], i64); 14] = [
        ([0, -1, 1, -10, -20], 11),
        ([1, 0, 1, 4, -6], 14),
        ([1, 1, 1, -10, -10], 15),
        ([1, -1, 1, -1, -14], 17),
        ([0, 1, 1, -9, -15], 19),
        ([0, 1, 0, 4, 4], 20),
        ([0, -1, 0, -4, 4], 24),
        ([1, 0, 1, -5, -8], 26),
        ([0, 0, 1, 0, -7], 27),
        ([0, 0, 1, 0, 0], 27),
        ([0, 1, 1, 0, 0], 43),
        ([1, -1, 1, 0, 0], 53),
        ([0, 1, 1, -2, 0], 389),
        ([0, 0, 1, -7, 6], 5077),
    ];
    for (a, n) in table {
        assert_eq!(conductor(a), BigInt::from(n), "curve {a:?}");
    }
}

#[test]
fn y2_plus_y_equals_x3_minus_x2_minus_10x_minus_20_is_split_i5_at_11() {
    // From memory: Δ = −11⁵, split multiplicative, c_11 = 5.
    let lr = local_reduction(&ints([0, -1, 1, -10, -20]), &prime(11)).unwrap();
    assert_eq!(lr.kodaira, Kodaira::In(5));
    assert_eq!(lr.reduction, ReductionKind::SplitMultiplicative);
    assert_eq!(lr.tamagawa, 5);
    assert_eq!(lr.conductor_exponent, 1);
    assert!(lr.minimal_at_input);
}

#[test]
fn the_curve_of_conductor_14_has_types_i6_and_i3() {
    // From memory: y² + xy + y = x³ + 4x − 6 has Δ = −21952 = −2⁶·7³.
    let a = ints([1, 0, 1, 4, -6]);
    assert_eq!(
        weierstrass_invariants(&a).discriminant,
        BigInt::from(-21952)
    );
    assert_eq!(
        local_reduction(&a, &prime(2)).unwrap().kodaira,
        Kodaira::In(6)
    );
    assert_eq!(
        local_reduction(&a, &prime(7)).unwrap().kodaira,
        Kodaira::In(3)
    );
}

#[test]
fn y2_equals_x3_minus_x_at_2_is_type_iii_with_two_components_in_the_group() {
    // Δ = 64, N = 32 (from memory), so Ogg's formula gives m = 6 − 5 + 1 = 2:
    // type III, whose component group has order 2 [Sil94, IV.9 Table 4.1].
    let lr = local_reduction(&ints([0, 0, 0, -1, 0]), &prime(2)).unwrap();
    assert_eq!(lr.kodaira, Kodaira::III);
    assert_eq!(lr.tamagawa, 2);
    assert_eq!(lr.conductor_exponent, 5);
    assert_eq!(lr.disc_valuation, 6);
}

#[test]
fn y2_equals_x3_plus_1_is_type_iv_at_2_and_iii_at_3() {
    // Δ = −432 = −2⁴·3³ and N = 36 (from memory): Ogg's formula gives
    // m_2 = 4 − 2 + 1 = 3 (IV) and m_3 = 3 − 2 + 1 = 2 (III).
    let a = ints([0, 0, 0, 0, 1]);
    let at2 = local_reduction(&a, &prime(2)).unwrap();
    let at3 = local_reduction(&a, &prime(3)).unwrap();
    assert_eq!((at2.kodaira, at2.conductor_exponent), (Kodaira::IV, 2));
    assert_eq!((at3.kodaira, at3.conductor_exponent), (Kodaira::III, 2));
}

#[test]
fn a_model_scaled_by_two_is_recognised_as_non_minimal_and_reduced() {
    // y² = x³ − 16x is y² = x³ − x with u = 1/2 (a4 · 2⁴).
    let lr = local_reduction(&ints([0, 0, 0, -16, 0]), &prime(2)).unwrap();
    assert!(!lr.minimal_at_input);
    assert_eq!(lr.disc_valuation, 6);
    assert_eq!(lr.change[0], BigRational::from_integer(2.into()));
    assert_eq!(lr.kodaira, Kodaira::III);
    let g = global_local_data(&rats([0, 0, 0, -16, 0]), &mut Budget::unlimited()).unwrap();
    assert_eq!(g.minimal_model, ints([0, 0, 0, -1, 0]));
    assert_eq!(g.conductor, BigInt::from(32));
}

#[test]
fn a_heavily_scaled_model_at_a_large_prime_comes_back_to_the_minimal_one() {
    // y² + y = x³ − x scaled by u = 1/p⁵⁰ for p = 10³⁹ + 3 (prime by
    // sympy 1.14 isprime): a_i ↦ p^(50 i).
    let p: BigInt = "1000000000000000000000000000000000000003".parse().unwrap();
    let pr = Prime::new(p.clone()).unwrap();
    let base = [0i64, 0, 1, -1, 0];
    let weights = [1usize, 2, 3, 4, 6];
    let scaled: [BigInt; 5] = std::array::from_fn(|i| {
        BigInt::from(base[i]) * num_traits::pow(p.clone(), 50 * weights[i])
    });
    let lr = local_reduction(&scaled, &pr).unwrap();
    assert_eq!(lr.kodaira, Kodaira::I0);
    assert_eq!(lr.disc_valuation, 0);
    assert!(!lr.minimal_at_input);
    assert_eq!(
        lr.change[0],
        BigRational::from_integer(num_traits::pow(p, 50))
    );
}

#[test]
fn a_huge_multiplicative_valuation_is_read_exactly() {
    // y² + xy = x³ + B with B = 2^200: b2 = 1, b4 = 0, b6 = 4B, b8 = B, so
    // Δ = −B(1 + 432B) and v_2(Δ) = 200. Mod 2 the node is at (0, 0) with
    // tangents y = 0 and y = −x, both rational: split I_200, c_2 = 200
    // [Sil94, IV.9, Algorithm 9.4, step 2].
    let big = num_traits::pow(BigInt::from(2), 200);
    let a = [
        BigInt::one(),
        BigInt::zero(),
        BigInt::zero(),
        BigInt::zero(),
        big,
    ];
    let disc = weierstrass_invariants(&a).discriminant;
    let v = isodescent::local::valuation(&disc, &prime(2)).unwrap();
    assert_eq!(v, 200);
    let lr = local_reduction(&a, &prime(2)).unwrap();
    assert_eq!(lr.kodaira, Kodaira::In(200));
    assert_eq!(lr.reduction, ReductionKind::SplitMultiplicative);
    assert_eq!(lr.tamagawa, 200);
}

#[test]
fn a_non_integral_model_gets_an_integral_minimal_model_and_the_right_conductor() {
    // y² = x³ − x/16 is y² = x³ − x after the change u = 1/2
    // (a4' = a4/u⁴ = −1).
    let a = [0, 0, 0, 0, 0].map(|c: i64| BigRational::from_integer(c.into()));
    let mut a = a;
    a[3] = BigRational::new((-1).into(), 16.into());
    let g = global_local_data(&a, &mut Budget::unlimited()).unwrap();
    assert_eq!(g.conductor, BigInt::from(32));
    // The minimal model has Δ = 64 (that of y² = x³ − x), and the bad
    // prime 2 records that the input was not minimal (it is not 2-integral).
    assert_eq!(
        weierstrass_invariants(&g.minimal_model).discriminant,
        BigInt::from(64)
    );
    assert_eq!(g.primes.len(), 1);
    assert!(!g.primes[0].minimal_at_input);
}

#[test]
fn a_singular_model_is_rejected_with_a_typed_error() {
    // y² = x³ (cusp) and y² = x³ + x² (node).
    for a in [[0, 0, 0, 0, 0], [0, 1, 0, 0, 0]] {
        assert!(matches!(
            local_reduction(&ints(a), &prime(2)),
            Err(Error::SingularCurve { .. })
        ));
        assert!(matches!(
            global_local_data(&rats(a), &mut Budget::unlimited()),
            Err(Error::SingularCurve { .. })
        ));
    }
}

#[test]
fn kodaira_symbols_print_in_the_usual_notation() {
    let shown: Vec<String> = [
        Kodaira::I0,
        Kodaira::In(5),
        Kodaira::II,
        Kodaira::III,
        Kodaira::IV,
        Kodaira::I0Star,
        Kodaira::InStar(1),
        Kodaira::IVStar,
        Kodaira::IIIStar,
        Kodaira::IIStar,
    ]
    .iter()
    .map(|k| k.to_string())
    .collect();
    assert_eq!(
        shown,
        ["I0", "I5", "II", "III", "IV", "I0*", "I1*", "IV*", "III*", "II*"]
    );
}

#[test]
fn an_exhausted_budget_is_reported_not_a_panic() {
    // Δ of this model has two ~25-digit prime factors; 10 units cannot
    // factor it.
    let big: BigInt = "1000000000000000000000000000000000000003".parse().unwrap();
    let mut a = rats([0, 0, 1, -1, 0]);
    a[4] = BigRational::from_integer(big.clone() * &big + 1);
    let r = global_local_data(&a, &mut Budget::with_units(10));
    assert!(matches!(
        r,
        Err(Error::FactorBudgetExhausted { .. }) | Err(Error::BudgetExhausted { .. })
    ));
}

#[test]
fn the_curve_wrappers_give_the_same_data_as_the_coefficient_functions() {
    use isodescent::curve::Curve;
    // y² = x³ − 16x (from memory: conductor 32 after minimalisation).
    let e = Curve::from_ints([0, 0, 0, -16, 0]).unwrap();
    let g = e.local_data(&mut Budget::unlimited()).unwrap();
    assert_eq!(g.conductor, BigInt::from(32));
    let at2 = e.local_data_at(&prime(2)).unwrap();
    assert_eq!(at2, g.primes[0]);
    let (m, ch) = e.global_minimal_model(&mut Budget::unlimited()).unwrap();
    assert_eq!(m, Curve::from_ints([0, 0, 0, -1, 0]).unwrap());
    // The other layer's change of model agrees with ours.
    assert_eq!(ch.apply_to_curve(&e), m);
}

#[test]
fn a_rational_model_at_a_prime_of_its_denominators_is_not_minimal() {
    use isodescent::curve::local_reduction_rational;
    // y² + y = x³ − x moved by u = 1/3 and then by u = 5 (a non-integral
    // model at 5, a non-minimal one at 3): a_i ↦ 3^i a_i / 5^i.
    let base = [0i64, 0, 1, -1, 0];
    let w = [1u32, 2, 3, 4, 6];
    let a: [BigRational; 5] = std::array::from_fn(|i| {
        BigRational::new(
            BigInt::from(base[i]) * BigInt::from(3).pow(w[i]),
            BigInt::from(5).pow(w[i]),
        )
    });
    for p in [3u64, 5, 37] {
        let lr = local_reduction_rational(&a, &prime(p)).unwrap();
        assert_eq!(lr.minimal_at_input, p == 37, "at {p}");
        let want = if p == 37 { Kodaira::In(1) } else { Kodaira::I0 };
        assert_eq!(lr.kodaira, want);
    }
    let g = global_local_data(&a, &mut Budget::unlimited()).unwrap();
    assert_eq!(g.minimal_model, ints(base));
    assert_eq!(g.conductor, BigInt::from(37));
}

#[test]
fn tamagawa_numbers_of_i1_star_and_i2_star_at_5_match_step_7_worked_by_hand() {
    // Step 7 of [Sil94, IV.9.4] by hand at p = 5 for y² = x³ + 5x² + a4·x + a6:
    // P(T) = T³ + T² has the double root 0.
    // * a4 = 0, a6 = 5⁴·b: level 1 quadratic Y² − b, distinct roots since
    //   5 ∤ b: I1*, c = 4 iff b is a square mod 5 (1 is, 2 is not).
    // * a4 = 0, a6 = 5⁵·d: level 1 gives the double root 0; level 2 is
    //   X² + d: I2*, c = 4 iff −d is a square mod 5 (−1 ≡ 4 is, −2 ≡ 3 not).
    // * a4 = 5³, a6 = 0: level 2 is X² + X = X(X + 1): I2*, c = 4.
    let cases: [([i64; 5], Kodaira, u64); 5] = [
        ([0, 5, 0, 0, 625], Kodaira::InStar(1), 4),
        ([0, 5, 0, 0, 1250], Kodaira::InStar(1), 2),
        ([0, 5, 0, 0, 3125], Kodaira::InStar(2), 4),
        ([0, 5, 0, 0, 6250], Kodaira::InStar(2), 2),
        ([0, 5, 0, 125, 0], Kodaira::InStar(2), 4),
    ];
    for (a, k, c) in cases {
        let lr = local_reduction(&ints(a), &prime(5)).unwrap();
        assert_eq!((lr.kodaira, lr.tamagawa), (k, c), "{a:?}");
        assert_eq!(lr.conductor_exponent, 2);
    }
}
