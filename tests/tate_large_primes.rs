//! Tate's algorithm at a 40-digit prime: every Kodaira type, with the
//! Tamagawa numbers read from quadratic and cubic residuosity computed by
//! sympy 1.14 (`legendre_symbol`, `galoistools.gf_factor`).

use isodescent::curve::{local_reduction, Kodaira, ReductionKind};
use isodescent::local::Prime;
use num_bigint::BigInt;
use num_rational::BigRational;

/// p = 10³⁹ + 3, prime (sympy 1.14 `isprime`), p ≡ 3 mod 4, p ≡ 1 mod 3.
fn p() -> BigInt {
    "1000000000000000000000000000000000000003".parse().unwrap()
}

fn prime() -> Prime {
    Prime::new(p()).unwrap()
}

fn pw(k: u32) -> BigInt {
    p().pow(k)
}

/// y² = x³ + A·x + B.
fn short(a: BigInt, b: BigInt) -> [BigInt; 5] {
    [BigInt::from(0), BigInt::from(0), BigInt::from(0), a, b]
}

fn run(a: BigInt, b: BigInt) -> (Kodaira, u64, u32, u64) {
    let lr = local_reduction(&short(a, b), &prime()).unwrap();
    assert!(lr.minimal_at_input);
    (
        lr.kodaira,
        lr.tamagawa,
        lr.conductor_exponent,
        lr.disc_valuation,
    )
}

// sympy 1.14 at p = 10³⁹ + 3: legendre_symbol(2, p) = legendre_symbol(3, p)
// = legendre_symbol(−1, p) = −1; gf_factor: T³ − 2 is irreducible,
// T³ − T − 1 = (linear)(irreducible quadratic), T³ − 7T + 6 splits.

#[test]
fn types_ii_and_iii_at_a_40_digit_prime() {
    assert_eq!(run(pw(1), pw(1)), (Kodaira::II, 1, 2, 2));
    assert_eq!(run(pw(1), pw(2)), (Kodaira::III, 2, 2, 3));
}

#[test]
fn type_iv_at_a_40_digit_prime_has_c_3_exactly_when_b_over_p2_is_a_square() {
    // Step 5: the quadratic T² − B/p² [Sil94, IV.9.4].
    assert_eq!(run(pw(2), pw(2)), (Kodaira::IV, 3, 2, 4));
    assert_eq!(run(pw(2), 2 * pw(2)), (Kodaira::IV, 1, 2, 4));
}

#[test]
fn type_i0_star_at_a_40_digit_prime_counts_the_roots_of_the_cubic() {
    // c = 1 + #roots of T³ + (A/p²)T + B/p³ in F_p [Sil94, IV.9.4, step 6].
    assert_eq!(run(-7 * pw(2), 6 * pw(3)), (Kodaira::I0Star, 4, 2, 6));
    assert_eq!(run(-pw(2), -pw(3)), (Kodaira::I0Star, 2, 2, 6));
    assert_eq!(run(BigInt::from(0), -2 * pw(3)), (Kodaira::I0Star, 1, 2, 6));
}

#[test]
fn type_in_star_at_a_40_digit_prime_has_n_equal_to_v_of_4a3_plus_27b2() {
    // A = −3p², B = p³(2 + pⁿ): 4A³ + 27B² = p⁶(108pⁿ + 27p²ⁿ), so
    // v(Δ) = 6 + n and (v(c4), v(c6)) = (2, 3): I_n* [Sil94, IV.9 Table 4.1].
    for n in [1u32, 2, 3, 7, 20] {
        let (k, c, f, v) = run(-3 * pw(2), pw(3) * (2 + pw(n)));
        assert_eq!(k, Kodaira::InStar(u64::from(n)));
        assert!(c == 2 || c == 4);
        assert_eq!((f, v), (2, 6 + u64::from(n)));
    }
}

#[test]
fn types_iv_star_iii_star_and_ii_star_at_a_40_digit_prime() {
    assert_eq!(run(pw(3), pw(4)), (Kodaira::IVStar, 3, 2, 8));
    assert_eq!(run(pw(3), 3 * pw(4)), (Kodaira::IVStar, 1, 2, 8));
    assert_eq!(run(pw(3), pw(5)), (Kodaira::IIIStar, 2, 2, 9));
    assert_eq!(run(pw(4), pw(5)), (Kodaira::IIStar, 1, 2, 10));
}

#[test]
fn a_model_with_p4_and_p6_is_scaled_to_good_reduction_at_a_40_digit_prime() {
    let lr = local_reduction(&short(pw(4), pw(6)), &prime()).unwrap();
    assert_eq!(lr.kodaira, Kodaira::I0);
    assert!(!lr.minimal_at_input);
    assert_eq!(lr.change[0], BigRational::from_integer(p()));
}

#[test]
fn multiplicative_reduction_at_a_40_digit_prime_is_split_according_to_the_tangents() {
    // y² = x³ + x² + pᵏ: node x²(x + 1), tangents y = ±x: split, c = k.
    let a = [0.into(), 1.into(), 0.into(), 0.into(), pw(9)];
    let lr = local_reduction(&a, &prime()).unwrap();
    assert_eq!(lr.kodaira, Kodaira::In(9));
    assert_eq!(lr.reduction, ReductionKind::SplitMultiplicative);
    assert_eq!(lr.tamagawa, 9);
    // y² = x³ − 3x + 2 + pᵏ: node (x − 1)²(x + 2), tangent slopes ±√3, and
    // 3 is a non-residue: non-split, c = 1 (k odd) or 2 (k even).
    for (k, c) in [(5u32, 1u64), (6, 2)] {
        let lr = local_reduction(&short((-3).into(), 2 + pw(k)), &prime()).unwrap();
        assert_eq!(lr.kodaira, Kodaira::In(u64::from(k)));
        assert_eq!(lr.reduction, ReductionKind::NonSplitMultiplicative);
        assert_eq!(lr.tamagawa, c);
    }
}
