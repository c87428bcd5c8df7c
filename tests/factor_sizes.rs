//! Products of two primes of 8 to 22 digits each: the numbers timed in
//! docs/performance.md (group `factor_sizes` of benches/arith.rs) and a
//! few more, and random products at every size.
//!
//! Reference: the factorisations in `VECTORS` are sympy 1.14.0
//! `factorint`, cross-checked with python-flint 0.9.0 `fmpz.factor`; the
//! numbers were drawn with sympy 1.14.0 `nextprime(rng.randrange(10**(d-1),
//! 10**d))`, `rng = random.Random(7)` for the first fifteen (one per size,
//! as in benches/arith.rs) and `random.Random(99)` for the rest.
//! The random products are checked by multiplying back and by primality
//! of the factors (the definition of a factorisation; common practice).

use isodescent::arith::{factor, factor_u64, is_prime};
use isodescent::Budget;
use num_bigint::BigInt;
use num_traits::ToPrimitive;
use proptest::prelude::*;

/// (digits of each prime, n = p·q, p, q) with p < q.
const VECTORS: [(u32, &str, &str, &str); 27] = [
    (8, "1617112384513319", "30246691", "53464109"),
    (9, "418593139362162697", "523938529", "798935593"),
    (10, "6881212980518412671", "1207388627", "5699252773"),
    (11, "1387963942594134081079", "16798022753", "82626625943"),
    (
        12,
        "80551254091020886344251",
        "139576827361",
        "577110510491",
    ),
    (
        13,
        "5786066816834635098394559",
        "2230156682407",
        "2594466506537",
    ),
    (
        14,
        "1912614221021085043121289191",
        "27422815957723",
        "69745361817317",
    ),
    (
        15,
        "283334206502604836738363188807",
        "351345555427429",
        "806426044461883",
    ),
    (
        16,
        "59106137351597839651530909133361",
        "6198078924959993",
        "9536202760112377",
    ),
    (
        17,
        "1122591703439096732752496344774529",
        "16713271056388507",
        "67167683671952147",
    ),
    (
        18,
        "115553126415904632093306783016014461",
        "266314784907375307",
        "433896775412203223",
    ),
    (
        19,
        "8022874210350435847575463436375479729",
        "2086441597939901479",
        "3845242645790811751",
    ),
    (
        20,
        "3447453260913698249602873997444564308381",
        "40232617326934127471",
        "85688018577050572211",
    ),
    (
        21,
        "571966649857784659082929989519912463753813",
        "747433319483790684749",
        "765241038829803856937",
    ),
    (
        22,
        "17778604110573035003702769146759503953219199",
        "2948326839328910214619",
        "6030065552236993643821",
    ),
    (8, "3924146792516243", "61103767", "64221029"),
    (8, "3333612690708403", "36853679", "90455357"),
    (8, "1390717972380949", "33998443", "40905343"),
    (8, "1208591874089917", "27883783", "43343899"),
    (9, "177426454207736369", "318790397", "556561477"),
    (9, "329623373649364229", "489265211", "673711039"),
    (9, "111348715947414199", "186775999", "596161801"),
    (9, "205404362599075421", "312686681", "656901541"),
    (10, "18998725169633558989", "2740880419", "6931614031"),
    (10, "19437965655894854933", "3750641681", "5182570693"),
    (10, "54972844699175988323", "7197520903", "7637747141"),
    (10, "7237127992559856883", "1239735169", "5837640307"),
];

#[test]
fn products_of_two_primes_factor_as_sympy_and_flint_say() {
    for (digits, n, p, q) in VECTORS {
        let n: BigInt = n.parse().unwrap();
        let p: BigInt = p.parse().unwrap();
        let q: BigInt = q.parse().unwrap();
        let f = factor(&n, &mut Budget::unlimited()).unwrap();
        assert_eq!(
            f.factors(),
            &[(p.clone(), 1), (q.clone(), 1)][..],
            "{digits} digits: {n}"
        );
        if let Some(small) = n.to_u64() {
            let (p, q) = (p.to_u64().unwrap(), q.to_u64().unwrap());
            assert_eq!(
                factor_u64(small),
                vec![(p, 1), (q, 1)],
                "factor_u64({small})"
            );
        }
    }
}

/// The least prime `≥ x` (x ≥ 2), by the crate's own test (exact below
/// 2^64, Baillie–PSW above).
fn next_prime(mut x: BigInt) -> BigInt {
    if x.clone() % 2u32 == BigInt::from(0) {
        x += 1u32;
    }
    while !is_prime(&x) {
        x += 2u32;
    }
    x
}

/// A number of exactly `digits` digits from a random 128-bit seed.
fn with_digits(seed: u128, digits: u32) -> BigInt {
    let lo = BigInt::from(10u32).pow(digits - 1);
    let span = BigInt::from(10u32).pow(digits) - &lo;
    // Two seeds' worth of bits so that 22-digit ranges are covered evenly.
    let wide = BigInt::from(seed) * BigInt::from(seed.rotate_left(64) | 1);
    lo + wide % span
}

fn check_product(digits: u32, s1: u128, s2: u128) -> Result<(), TestCaseError> {
    let p = next_prime(with_digits(s1, digits));
    let q = next_prime(with_digits(s2, digits));
    let n = &p * &q;
    let f = factor(&n, &mut Budget::unlimited()).unwrap();
    prop_assert_eq!(f.value(), n.clone());
    for (r, _) in f.factors() {
        prop_assert!(is_prime(r), "{} is listed as a prime of {}", r, n);
    }
    let want = if p == q {
        vec![(p, 2)]
    } else if p < q {
        vec![(p, 1), (q, 1)]
    } else {
        vec![(q, 1), (p, 1)]
    };
    prop_assert_eq!(f.factors(), &want[..]);
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 4, ..ProptestConfig::default() })]

    #[test]
    fn random_products_of_two_primes_of_every_size_from_8_to_22_digits(
        s1 in any::<u128>(),
        s2 in any::<u128>(),
    ) {
        for d in 8u32..=22 {
            check_product(d, s1.rotate_left(d), s2.rotate_left(2 * d))?;
        }
    }
}

/// Word-size edge cases of the ECM and Montgomery paths, with their
/// factorisations from sympy 1.14.0 `factorint` (primes from `prevprime`).
#[test]
fn word_size_edge_cases_factor_as_sympy_says() {
    let cases: [(u64, &[(u64, u32)]); 9] = [
        (0, &[]),
        (1, &[]),
        (2, &[(2, 1)]),
        // 2^64 − 59 = prevprime(2^64).
        (18446744073709551557, &[(18446744073709551557, 1)]),
        // (2^32 − 5)·(2^32 − 17): the two largest primes below 2^32.
        (18446743979220271189, &[(4294967279, 1), (4294967291, 1)]),
        // (2^32 − 5)²: a square just below 2^64.
        (18446744030759878681, &[(4294967291, 2)]),
        // prevprime(2^21)³.
        (9223253290108583207, &[(2097143, 3)]),
        (
            u64::MAX,
            &[
                (3, 1),
                (5, 1),
                (17, 1),
                (257, 1),
                (641, 1),
                (65537, 1),
                (6700417, 1),
            ],
        ),
        // 2^63 + 1.
        (
            9223372036854775809,
            &[(3, 3), (19, 1), (43, 1), (5419, 1), (77158673929, 1)],
        ),
    ];
    for (n, want) in cases {
        assert_eq!(factor_u64(n), want.to_vec(), "factor_u64({n})");
        if n > 0 {
            let f = factor(&BigInt::from(n), &mut Budget::unlimited()).unwrap();
            let got: Vec<(u64, u32)> = f
                .factors()
                .iter()
                .map(|(p, e)| (p.to_u64().unwrap(), *e))
                .collect();
            assert_eq!(got, want.to_vec(), "factor({n})");
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 256, ..ProptestConfig::default() })]

    /// Any word: the factors multiply back to it, are prime and ascending
    /// (the definition of a factorisation; common practice).
    #[test]
    fn every_word_factors_into_ascending_primes(n in 1u64..) {
        let f = factor_u64(n);
        let mut back = 1u128;
        for w in f.windows(2) {
            prop_assert!(w[0].0 < w[1].0);
        }
        for &(p, e) in &f {
            prop_assert!(is_prime(&BigInt::from(p)), "{} in factor_u64({})", p, n);
            back *= (p as u128).pow(e);
        }
        prop_assert_eq!(back, n as u128);
    }

    /// Products of two primes of 20 to 32 bits (the ECM range of
    /// `factor_u64`), from random words.
    #[test]
    fn products_of_two_word_primes_split(a in 1u64 << 19..1 << 32, b in 1u64 << 19..1 << 32) {
        let p = next_prime(BigInt::from(a)).to_u64().unwrap();
        let q = next_prime(BigInt::from(b)).to_u64().unwrap();
        let n = p.checked_mul(q);
        prop_assume!(n.is_some());
        let n = n.unwrap();
        let want = match p.cmp(&q) {
            std::cmp::Ordering::Less => vec![(p, 1), (q, 1)],
            std::cmp::Ordering::Equal => vec![(p, 2)],
            std::cmp::Ordering::Greater => vec![(q, 1), (p, 1)],
        };
        prop_assert_eq!(factor_u64(n), want);
    }
}
