//! Tate's algorithm against conductors found independently by the
//! functional equation (tests/data/curve_values.txt) and Ogg's formula, on
//! non-minimal and non-integral input, and on bad input.

use isodescent::curve::{
    global_local_data, local_reduction, local_reduction_rational, weierstrass_invariants, Kodaira,
    ReductionKind,
};
use isodescent::local::Prime;
use isodescent::{Budget, Error};
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Zero};

mod values;

fn ints(a: [i64; 5]) -> [BigInt; 5] {
    a.map(BigInt::from)
}

fn rats(a: [i64; 5]) -> [BigRational; 5] {
    a.map(|c| BigRational::from_integer(c.into()))
}

fn prime(p: u64) -> Prime {
    Prime::small(p).unwrap()
}

/// The number of irreducible components of the special fibre of a
/// Kodaira type [Sil94, IV.9, Table 4.1].
fn components(k: Kodaira) -> u64 {
    match k {
        Kodaira::I0 | Kodaira::II => 1,
        Kodaira::In(n) => n,
        Kodaira::III => 2,
        Kodaira::IV => 3,
        Kodaira::I0Star => 5,
        Kodaira::InStar(n) => n + 5,
        Kodaira::IVStar => 7,
        Kodaira::IIIStar => 8,
        Kodaira::IIStar => 9,
    }
}

#[test]
fn conductors_agree_with_the_functional_equation_and_ogg_s_formula() {
    // The conductor of each curve in tests/data/curve_values.txt was found
    // by tests/data/gen_curve_values.py (mpmath) as the unique N for which
    // the theta relation of the functional equation holds, from a_n by
    // point counting. Here it must equal Tate's algorithm's conductor, and
    // each exponent must satisfy Ogg's formula f_p = v_p(Δ) + 1 − m_p
    // (Ogg, Amer. J. Math. 89 (1967); [Sil94, IV.11.1]) with m_p the
    // component count of the Kodaira type found.
    let tags = values::conductor_tags();
    assert!(tags.len() >= 15, "{tags:?}");
    for tag in tags {
        let a = values::curve(tag);
        let g = global_local_data(&rats(a), &mut Budget::unlimited()).unwrap();
        assert_eq!(
            g.conductor,
            BigInt::from(values::integer("conductor", &[tag])),
            "{tag} {a:?}"
        );
        let mut ogg = BigInt::one();
        for lr in &g.primes {
            let f = lr.disc_valuation + 1 - components(lr.kodaira);
            assert_eq!(
                u64::from(lr.conductor_exponent),
                f,
                "{tag} at {:?}",
                lr.prime
            );
            ogg *= lr.prime.get().pow(lr.conductor_exponent);
        }
        assert_eq!(ogg, g.conductor, "{tag}");
    }
}

/// #E(F_p) for y² + a1xy + a3y = x³ + a2x² + a4x + a6 by counting
/// (including the point at infinity; common practice).
fn count_points(a: [i64; 5], p: i64) -> i64 {
    let [a1, a2, a3, a4, a6] = a;
    let mut n = 1;
    for x in 0..p {
        for y in 0..p {
            let f = y * y + a1 * x * y + a3 * y - x * x * x - a2 * x * x - a4 * x - a6;
            if f.rem_euclid(p) == 0 {
                n += 1;
            }
        }
    }
    n
}

#[test]
fn y2_plus_y_equals_x3_minus_x2_minus_10x_minus_20_is_split_i5_at_11() {
    // Δ = −161051 = −11⁵ (from the invariants of [Sil09, III.1]); c4 = 496
    // is prime to 11, so the reduction is multiplicative, of type I5 on
    // this minimal model, and split because a_11 = 12 − #E(F_11) = +1
    // (counted here; [Sil09, Exercise 3.5]); split I_n has c = n
    // [Sil94, IV.9, Table 4.1].
    let a = [0, -1, 1, -10, -20];
    assert_eq!(
        weierstrass_invariants(&ints(a)).discriminant,
        BigInt::from(-161051)
    );
    assert_eq!(12 - count_points(a, 11), 1);
    let lr = local_reduction(&ints(a), &prime(11)).unwrap();
    assert_eq!(lr.kodaira, Kodaira::In(5));
    assert_eq!(lr.reduction, ReductionKind::SplitMultiplicative);
    assert_eq!(lr.tamagawa, 5);
    assert_eq!(lr.conductor_exponent, 1);
    assert!(lr.minimal_at_input);
}

#[test]
fn multiplicative_primes_have_type_i_n_with_n_the_valuation_of_the_discriminant() {
    // y² + xy + y = x³ − 3x + 2 (a curve of our own): Δ = −1588 = −2²·397
    // and the conductor 794 = 2·397 found by the functional equation
    // (tests/data/curve_values.txt) make both primes multiplicative, so
    // the types are I2 and I1 (Tate; [Sil94, IV.9, Table 4.1]), split or not
    // as a_p = p + 1 − #E(F_p) is +1 or −1 (counted here).
    let a = values::curve("own_a");
    assert_eq!(a, [1, 0, 1, -3, 2]);
    assert_eq!(values::integer("conductor", &["own_a"]), 794);
    assert_eq!(
        weierstrass_invariants(&ints(a)).discriminant,
        BigInt::from(-1588)
    );
    for (p, n) in [(2u64, 2u64), (397, 1)] {
        let lr = local_reduction(&ints(a), &prime(p)).unwrap();
        assert_eq!(lr.kodaira, Kodaira::In(n), "at {p}");
        let ap = p as i64 + 1 - count_points(a, p as i64);
        let want = if ap == 1 {
            ReductionKind::SplitMultiplicative
        } else {
            assert_eq!(ap, -1);
            ReductionKind::NonSplitMultiplicative
        };
        assert_eq!(lr.reduction, want, "at {p}");
    }
}

#[test]
fn y2_equals_x3_minus_x_at_2_is_type_iii_with_two_components_in_the_group() {
    // Δ = 64, N = 32 (tests/data/curve_values.txt, the functional
    // equation), so Ogg's formula gives m = 6 − 5 + 1 = 2:
    // type III, whose component group has order 2 [Sil94, IV.9 Table 4.1].
    let lr = local_reduction(&ints([0, 0, 0, -1, 0]), &prime(2)).unwrap();
    assert_eq!(lr.kodaira, Kodaira::III);
    assert_eq!(lr.tamagawa, 2);
    assert_eq!(lr.conductor_exponent, 5);
    assert_eq!(lr.disc_valuation, 6);
}

#[test]
fn y2_equals_x3_plus_1_is_type_iv_at_2_and_iii_at_3() {
    // Δ = −432 = −2⁴·3³ and N = 36 (tests/data/curve_values.txt, the
    // functional equation): Ogg's formula gives
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
    // y² = x³ − 16x: y² = x³ − x scaled by u = 1/2, whose conductor 32 is
    // in tests/data/curve_values.txt (the functional equation).
    let e = Curve::from_ints([0, 0, 0, -16, 0]).unwrap();
    let g = e.tate_data(&mut Budget::unlimited()).unwrap();
    assert_eq!(g.conductor, BigInt::from(32));
    let at2 = local_reduction_rational(e.coefficients(), &prime(2)).unwrap();
    assert_eq!(at2, g.primes[0]);
    let (m, ch) = e.to_minimal(&mut Budget::unlimited()).unwrap();
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
