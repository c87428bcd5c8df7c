//! The quartic form type, real solubility and p-adic solubility: known
//! values, bad input, evidence re-checks.

use crate::local::{Place, Prime};
use crate::quartic::{
    locally_soluble, odd_prime_soluble, real_root_count, real_soluble, two_adic_soluble,
    LocalPoint, LocalSolubility, Quartic,
};
use crate::{Budget, Error};
use num_bigint::BigInt;
use num_rational::BigRational;

fn big(s: &str) -> BigInt {
    s.parse().unwrap()
}

fn q(c: [i64; 5]) -> Quartic {
    Quartic::from_i64(c).unwrap()
}

fn place(p: u64) -> Place {
    Place::Finite(Prime::small(p).unwrap())
}

fn soluble_with_valid_point(q: &Quartic, pl: &Place) -> bool {
    let ans = locally_soluble(q, pl, &mut Budget::unlimited()).unwrap();
    match &ans {
        LocalSolubility::Soluble(pt) => {
            assert!(
                pt.verify(q),
                "witness {pt} fails verification for {q} at {pl}"
            );
            assert_eq!(pt.place(), pl);
            true
        }
        LocalSolubility::Insoluble { place } => {
            assert_eq!(place, pl);
            false
        }
    }
}

// ---------------------------------------------------------------- the form

/// Discriminants and real-root counts from sympy 1.14 (`discriminant`,
/// `real_roots`); for `c4 = 0` the binary-form discriminant is
/// `c3²·disc(g(x, 1))` and the root at infinity is counted.
const SYMPY_TABLE: [([i64; 5], &str, usize); 7] = [
    ([1, 0, 0, 0, -17], "-1257728", 2),
    ([-34, 0, 0, 0, 2], "-80494592", 2),
    ([3, -7, 2, 11, -5], "-1661852", 2),
    ([0, 1, 0, -1, 0], "4", 4),
    ([2, 0, -3, 0, 5], "153760", 0),
    ([1, 2, 3, 4, 5], "10800", 0),
    ([0, 2, -1, 5, 7], "-29996", 2),
];

#[test]
fn the_discriminant_from_i_and_j_matches_sympy() {
    for (c, disc, _) in SYMPY_TABLE {
        assert_eq!(q(c).discriminant(), big(disc), "{c:?}");
    }
}

#[test]
fn sturm_counts_match_sympy_real_roots() {
    for (c, _, n) in SYMPY_TABLE {
        assert_eq!(real_root_count(&q(c)), n, "{c:?}");
    }
}

#[test]
fn degenerate_forms_are_rejected_with_a_typed_error() {
    for c in [
        [0, 0, 0, 0, 0],
        [1, -2, 1, 0, 0], // x⁴ − 2x³z + x²z² = x²(x − z)²
        [1, 0, -2, 0, 1], // (x² − z²)²
        [0, 0, 1, 0, -1], // double root at infinity
        [1, 0, 0, 0, 0],  // x⁴
        [2, 4, 2, 0, 0],  // 2x²(x + z)²
    ] {
        assert!(
            matches!(Quartic::from_i64(c), Err(Error::Degenerate { .. })),
            "{c:?}"
        );
    }
}

#[test]
fn the_two_isogeny_space_rejects_d_zero_and_singular_curves() {
    let z = BigInt::from(0);
    assert!(matches!(
        Quartic::two_isogeny_space(&z, &BigInt::from(1), &BigInt::from(2)),
        Err(Error::Zero { .. })
    ));
    // b = 0 and a² = 4b are singular.
    for (a, b) in [(1, 0), (2, 1), (-4, 4)] {
        assert!(matches!(
            Quartic::two_isogeny_space(&BigInt::from(1), &BigInt::from(a), &BigInt::from(b)),
            Err(Error::Degenerate { .. })
        ));
    }
}

#[test]
fn the_two_isogeny_space_has_the_silverman_tate_shape() {
    // [SilvermanTate92, III.5]: N² = dM⁴ + aM²e² + (b/d)e⁴ when d | b.
    let sp =
        Quartic::two_isogeny_space(&BigInt::from(-3), &BigInt::from(5), &BigInt::from(12)).unwrap();
    assert_eq!(sp.coeffs(), &[-3, 0, 5, 0, -4].map(BigInt::from));
    // d ∤ b: multiply by d₁² with d₁ = d/gcd(d, b): d = 6, b = 4, h = 2, d₁ = 3:
    // 6·9 M⁴ + 5·9 M²e² + 2·3 e⁴.
    let sp =
        Quartic::two_isogeny_space(&BigInt::from(6), &BigInt::from(5), &BigInt::from(4)).unwrap();
    assert_eq!(sp.coeffs(), &[54, 0, 45, 0, 6].map(BigInt::from));
    // Its discriminant is 16·d₁¹²·b·(a² − 4b)² (sympy 1.14, symbolic).
    assert_eq!(
        sp.discriminant(),
        BigInt::from(16) * BigInt::from(3).pow(12) * 4 * 81
    );
}

#[test]
fn clearing_denominators_scales_by_an_exact_square() {
    let r = |n: i64, d: i64| BigRational::new(n.into(), d.into());
    let (qq, s) =
        Quartic::from_rationals(&[r(1, 2), r(0, 1), r(0, 1), r(0, 1), r(-17, 2)]).unwrap();
    assert_eq!(s, BigInt::from(2));
    assert_eq!(qq.coeffs(), &[2, 0, 0, 0, -34].map(BigInt::from));
    let (qq, s) = Quartic::from_rationals(&[r(1, 3), r(1, 2), r(0, 1), r(0, 1), r(5, 1)]).unwrap();
    assert_eq!(s, BigInt::from(6));
    assert_eq!(qq.coeffs(), &[12, 18, 0, 0, 180].map(BigInt::from));
}

#[test]
fn evaluation_and_display_are_as_documented() {
    let g = q([1, 0, 0, 0, -17]);
    assert_eq!(g.eval(&BigInt::from(2), &BigInt::from(1)), BigInt::from(-1));
    assert_eq!(g.to_string(), "y^2 = x^4 - 17*z^4");
    assert_eq!(
        q([-2, 1, 0, -1, 3]).to_string(),
        "y^2 = -2*x^4 + x^3*z - x*z^3 + 3*z^4"
    );
}

// ------------------------------------------------------ Lind–Reichardt

/// `2Y² = 1 − 17X⁴` [Lind40], [Reichardt42] has points over R and every
/// Q_p but none over Q. With `y = 2Y`, `(x, z) = (X, 1)`: `y² = 2 − 34x⁴`.
#[test]
fn the_lind_reichardt_quartic_is_soluble_everywhere_locally() {
    let g = q([-34, 0, 0, 0, 2]);
    assert!(soluble_with_valid_point(&g, &Place::Real));
    for p in [
        2u64, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53, 59, 61, 67, 71, 73, 97, 101,
        257, 65537,
    ] {
        assert!(
            soluble_with_valid_point(&g, &place(p)),
            "Lind–Reichardt at {p}"
        );
    }
    let big_p = Prime::new(big("100000000000000000039")).unwrap();
    assert!(soluble_with_valid_point(&g, &Place::Finite(big_p)));
}

// ------------------------------------------------------------ real place

#[test]
fn real_solubility_follows_the_signs_and_the_real_roots() {
    // Lemma R: c4 > 0 or c0 > 0 or a real root.
    assert!(soluble_with_valid_point(
        &q([1, 0, 0, 0, -17]),
        &Place::Real
    ));
    assert!(soluble_with_valid_point(
        &q([-1, 0, 0, 0, 17]),
        &Place::Real
    ));
    assert!(!soluble_with_valid_point(
        &q([-1, 0, 0, 0, -1]),
        &Place::Real
    ));
    assert!(!soluble_with_valid_point(
        &q([-2, 0, -3, 0, -5]),
        &Place::Real
    ));
    // −x⁴ + 5x²z² − 4z⁴ = −(x² − z²)(x² − 4z²) > 0 only for 1 < |x/z| < 2.
    let g = q([-1, 0, 5, 0, -4]);
    let pt = match real_soluble(&g, &mut Budget::unlimited()).unwrap() {
        LocalSolubility::Soluble(pt) => pt,
        other => panic!("{other:?}"),
    };
    assert!(pt.verify(&g));
    // −(x² − 1000²z²)(x² − 1001²z²): positive only for 1000 < |x/z| < 1001.
    let g = q([-1, 0, 2_002_001, 0, -1_002_001_000_000]);
    assert!(soluble_with_valid_point(&g, &Place::Real));
    // Root at infinity (c4 = 0): always soluble.
    assert!(soluble_with_valid_point(
        &q([0, -1, 0, 0, -1]),
        &Place::Real
    ));
}

// --------------------------------------------------------- finite places

#[test]
fn hand_checked_p_adic_cases_come_out_right() {
    // 3x⁴ + 3z⁴ at 3: x⁴ + z⁴ ≢ 0 mod 3 for primitive (x, z): v = 1 always.
    assert!(!soluble_with_valid_point(&q([3, 0, 0, 0, 3]), &place(3)));
    // 3x⁴ + 3z⁴ at 2: ≡ 3 mod 8 or v₂ = 1 (see two_adic_soluble docs).
    assert!(!soluble_with_valid_point(&q([3, 0, 0, 0, 3]), &place(2)));
    // x⁴ + z⁴ everywhere: g(0, 1) = 1.
    for p in [2, 3, 5, 7] {
        assert!(soluble_with_valid_point(&q([1, 0, 0, 0, 1]), &place(p)));
    }
    // 2x⁴ + 2z⁴ at 2: x = z = 1 gives 4, a square.
    assert!(soluble_with_valid_point(&q([2, 0, 0, 0, 2]), &place(2)));
    // 5x⁴ + 5z⁴ at 2: one of x, z even: ≡ 5 mod 8; both odd: v₂ = 1.
    // Insoluble.
    assert!(!soluble_with_valid_point(&q([5, 0, 0, 0, 5]), &place(2)));
    // −x⁴ − z⁴ at 5: fourth powers of units are 1 mod 5, so primitive values
    // are −1 (a residue, 5 ≡ 1 mod 4) or −2 (non-residue): soluble.
    assert!(soluble_with_valid_point(&q([-1, 0, 0, 0, -1]), &place(5)));
    // 2x⁴ + 2z⁴ at 3: 3 | x gives 2 (non-residue), both units give 4 ≡ 1: soluble.
    assert!(soluble_with_valid_point(&q([2, 0, 0, 0, 2]), &place(3)));
    // 3² divides everything: 9·(x⁴ − 17z⁴) at 3 behaves like x⁴ − 17z⁴.
    assert!(soluble_with_valid_point(&q([9, 0, 0, 0, -153]), &place(3)));
}

#[test]
fn large_primes_are_decided_by_hand_checked_families() {
    // p ≡ 3 mod 4 (checked with sympy 1.14: isprime, p % 4):
    let p = big("100000000000000000039");
    assert_eq!(&p % 4, BigInt::from(3));
    let pr = Prime::new(p.clone()).unwrap();
    let pl = Place::Finite(pr.clone());
    let one = BigInt::from(1);
    let zero = BigInt::from(0);
    // p(x⁴ + z⁴): x⁴ ≡ −z⁴ needs −1 to be a 4th power, impossible for p ≡ 3 mod 4;
    // so v_p = 1 on every primitive pair: insoluble.
    let g = Quartic::new([
        p.clone(),
        zero.clone(),
        zero.clone(),
        zero.clone(),
        p.clone(),
    ])
    .unwrap();
    assert!(!soluble_with_valid_point(&g, &pl));
    // x⁴ + p z⁴: g(1, 0) = 1: soluble.
    let g = Quartic::new([
        one.clone(),
        zero.clone(),
        zero.clone(),
        zero.clone(),
        p.clone(),
    ])
    .unwrap();
    assert!(soluble_with_valid_point(&g, &pl));
    // −x⁴ + p z⁴: −1 is a non-residue, so x a unit gives a non-square unit;
    // p | x gives v_p = 1: insoluble.
    let g = Quartic::new([
        -one.clone(),
        zero.clone(),
        zero.clone(),
        zero.clone(),
        p.clone(),
    ])
    .unwrap();
    assert!(!soluble_with_valid_point(&g, &pl));
    // −x⁴ + p²z⁴: x = p, z = 1 gives p²(1 − p²) and 1 − p² ≡ 1: soluble.
    let p2 = &p * &p;
    let g = Quartic::new([-one.clone(), zero.clone(), zero.clone(), zero.clone(), p2]).unwrap();
    assert!(soluble_with_valid_point(&g, &pl));
    // Good reduction ⇒ soluble (Hasse–Weil + Hensel) [Silverman09, V.1.1].
    let g = q([-7, 3, -5, 2, -11]);
    assert_ne!(g.discriminant() % &p, BigInt::from(0));
    assert!(soluble_with_valid_point(&g, &pl));
}

#[test]
fn a_soluble_answer_at_a_forty_digit_prime_carries_a_checkable_point() {
    // 2^127 − 1 is prime [Lucas 1876]; 10^40-size p, 30-digit coefficients.
    let p: BigInt = (BigInt::from(1) << 127u32) - BigInt::from(1);
    let pl = Place::Finite(Prime::new(p.clone()).unwrap());
    let c = big("123456789012345678901234567890");
    let g = Quartic::new([
        -c.clone(),
        c.clone() + 7,
        -BigInt::from(3) * &c,
        BigInt::from(5),
        -&c - 1,
    ])
    .unwrap();
    // Good reduction at p (Δ ≢ 0 mod p), so soluble by Hasse–Weil + Hensel.
    assert_ne!(g.discriminant() % &p, BigInt::from(0));
    assert!(soluble_with_valid_point(&g, &pl));
    // p·(x⁴ + z⁴) with p ≡ 3 mod 4 (−1 is not a fourth power): insoluble.
    let z = BigInt::from(0);
    let g = Quartic::new([p.clone(), z.clone(), z.clone(), z, p]).unwrap();
    assert!(!soluble_with_valid_point(&g, &pl));
}

#[test]
fn verification_rejects_tampered_evidence() {
    let g = q([-34, 0, 0, 0, 2]);
    let p17 = place(17);
    // (0, 1): G = 2 ≡ 6² mod 17.
    assert!(LocalPoint::new(p17.clone(), 0.into(), 1.into(), 6.into(), 1).verify(&g));
    assert!(!LocalPoint::new(p17.clone(), 0.into(), 1.into(), 5.into(), 1).verify(&g));
    assert!(!LocalPoint::new(p17.clone(), 17.into(), 17.into(), 0.into(), 1).verify(&g));
    // precision must exceed v_p(G).
    assert!(!LocalPoint::new(p17.clone(), 0.into(), 1.into(), 6.into(), 0).verify(&g));
    // (1, 0): G = −34 has odd valuation at 17.
    assert!(!LocalPoint::new(p17, 1.into(), 0.into(), 0.into(), 3).verify(&g));
    // At 2: (1, 1): G = −32, v = 5 odd.
    assert!(!LocalPoint::new(place(2), 1.into(), 1.into(), 0.into(), 8).verify(&g));
    // Real place: g(1, 0) = −34 < 0.
    assert!(!LocalPoint::new(Place::Real, 1.into(), 0.into(), 0.into(), 0).verify(&g));
    assert!(LocalPoint::new(Place::Real, 0.into(), 1.into(), 1.into(), 0).verify(&g));
}

#[test]
fn asking_the_odd_prime_routine_about_two_is_an_error() {
    let g = q([1, 0, 0, 0, 1]);
    assert!(matches!(
        odd_prime_soluble(&g, &Prime::two(), &mut Budget::unlimited()),
        Err(Error::InvalidArgument { .. })
    ));
    assert!(two_adic_soluble(&g, &mut Budget::unlimited())
        .unwrap()
        .is_soluble());
}

#[test]
fn an_exhausted_budget_is_reported_not_guessed() {
    // 2^12·(…) forces many 2-adic refinements.
    let g = q([3, 0, 0, 0, 3 * 4096]);
    let r = locally_soluble(&g, &place(2), &mut Budget::with_units(1));
    assert!(matches!(r, Err(Error::BudgetExhausted { .. })), "{r:?}");
    let r = locally_soluble(&g, &place(3), &mut Budget::with_units(1));
    assert!(matches!(r, Err(Error::BudgetExhausted { .. })), "{r:?}");
}

#[test]
fn the_hand_checked_families_come_out_the_same_at_word_size_primes_and_past_them() {
    // Primes p ≡ 3 (mod 4) on both sides of 2^32, near 2^61 and 2^63, and
    // just above 2^63 (where the machine-word route stops); primality and
    // p % 4 checked with sympy 1.14 (`isprime`, `nextprime`).
    for s in [
        "1000000007",
        "4294967311",
        "2305843009213693951",
        "9223372036854775783",
        "9223372036854775907",
    ] {
        let p = big(s);
        assert_eq!(&p % 4, BigInt::from(3));
        let pl = Place::Finite(Prime::new(p.clone()).unwrap());
        let z = BigInt::from(0);
        let one = BigInt::from(1);
        // p(x⁴ + z⁴): −1 is not a fourth power mod p, v_p = 1: insoluble.
        let g = Quartic::new([p.clone(), z.clone(), z.clone(), z.clone(), p.clone()]).unwrap();
        assert!(!soluble_with_valid_point(&g, &pl), "p(x⁴ + z⁴) at {p}");
        // −x⁴ + p z⁴: −1 a non-residue, and p | x gives v_p = 1: insoluble.
        let g = Quartic::new([-one.clone(), z.clone(), z.clone(), z.clone(), p.clone()]).unwrap();
        assert!(!soluble_with_valid_point(&g, &pl), "−x⁴ + pz⁴ at {p}");
        // −x⁴ + p²z⁴: (p, 1) gives p²(1 − p²), a square: soluble.
        let g = Quartic::new([-one.clone(), z.clone(), z.clone(), z.clone(), &p * &p]).unwrap();
        assert!(soluble_with_valid_point(&g, &pl), "−x⁴ + p²z⁴ at {p}");
        // Good reduction ⇒ soluble (Hasse–Weil + Hensel) [Silverman09, V.1.1].
        let g = q([-7, 3, -5, 2, -11]);
        assert_ne!(g.discriminant() % &p, BigInt::from(0));
        assert!(soluble_with_valid_point(&g, &pl), "good reduction at {p}");
    }
}

#[test]
fn witnesses_of_high_valuation_carry_square_roots_that_check_out() {
    // g = p^(2k)·(u x⁴ + p z⁴) with u a non-zero square (mod 8 at 2): the
    // witness value has valuation ≥ 2k, and y must satisfy
    // y² ≡ g(x, z) mod p^(v + 8); `verify` re-checks it independently.
    for (p, u) in [(2u64, 9i64), (3, 4), (5, 4), (61, 4), (1_000_000_007, 4)] {
        let pb = BigInt::from(p);
        let pl = place(p);
        for k in [1usize, 5, 12] {
            let s = num_traits::pow(pb.clone(), 2 * k);
            let z = BigInt::from(0);
            let g = Quartic::new([&s * u, z.clone(), z.clone(), z, &s * &pb]).unwrap();
            let ans = locally_soluble(&g, &pl, &mut Budget::unlimited()).unwrap();
            let pt = ans.point().expect("soluble: g(1, 0) is a square");
            assert!(pt.verify(&g), "{pt} for {g}");
            assert!(pt.precision() >= 2 * k as u32 + 8);
        }
    }
}

#[test]
fn the_two_isogeny_space_discriminant_is_the_symbolic_formula() {
    // Δ = 16·d₁¹²·b·(a² − 4b)² with d₁ = d/gcd(d, b) (sympy 1.14
    // `discriminant` of the integral form, symbolically); the constructor
    // relies on it instead of recomputing I and J.
    use num_integer::Integer;
    for d in [-30i64, -7, -2, -1, 1, 2, 3, 6, 10, 35] {
        for a in -4i64..=4 {
            for b in [-36i64, -12, -5, -1, 1, 2, 5, 9, 18, 20] {
                if b * (a * a - 4 * b) == 0 {
                    continue;
                }
                let (db, ab, bb) = (BigInt::from(d), BigInt::from(a), BigInt::from(b));
                let sp = Quartic::two_isogeny_space(&db, &ab, &bb).unwrap();
                let d1 = &db / db.gcd(&bb);
                let want = BigInt::from(16)
                    * num_traits::pow(d1, 12)
                    * &bb
                    * num_traits::pow(&ab * &ab - BigInt::from(4) * &bb, 2);
                assert_eq!(sp.discriminant(), want, "d = {d}, a = {a}, b = {b}");
                assert_eq!(Quartic::new(sp.coeffs().clone()).unwrap(), sp);
            }
        }
    }
}
