//! The homogeneous spaces `C_d` of [`super::image::local_image`] in
//! machine words.
//!
//! For `E: y² = x³ + ax² + bx` and a class representative `d`, the
//! integral quartic of `C_d` is `[d·d₁², 0, a·d₁², 0, (b/h)·d₁]` with
//! `h = gcd(d, b) > 0` and `d₁ = d/h` (see
//! [`super::form::Quartic::two_isogeny_space`]). When `a`, `b` and `d` fit
//! in `i128` and every product does (checked, [`Ck`]), this module builds
//! those five coefficients in words and runs the local tests on them
//! directly: the class trees of Lemmas P and T start from the words
//! (`padic_word`), and the witness is finished in words
//! (`solubility::finish_word_coeffs`). Anything that leaves `i128` is
//! handed to the `BigInt` route, which gives the same answer (the tests
//! below compare whole local images with the word paths on and off).

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{ToPrimitive, Zero};

use super::padic_word;
use super::solubility::{finish_word_coeffs, padic_sqrt_of, LocalPoint, LocalSolubility};
use super::{fp, padic};
use crate::arith::word::isqrt_u128;
use crate::arith::word::Ck;
use crate::budget::Budget;
use crate::error::Result;
use crate::local::{Place, Prime};

/// The coefficients `[c4, c3, c2, c1, c0]` of `C_d` in words, or `None`
/// when `d = 0`, `b(a² − 4b) = 0` (the `BigInt` route reports those), or
/// something leaves `i128`.
#[cfg(test)]
pub(crate) fn space_coeffs(d: &BigInt, a: i128, b: i128) -> Option<[i128; 5]> {
    SpaceWords::new(a, b)?.coeffs(d)
}

/// `a` and `b` of a non-singular `y² = x³ + ax² + bx` in words, for the
/// spaces `C_d` of one local image.
#[derive(Debug, Clone, Copy)]
pub(crate) struct SpaceWords {
    a: i128,
    b: i128,
}

impl SpaceWords {
    /// `None` when `b(a² − 4b) = 0` (the `BigInt` route reports it) or
    /// `a² − 4b` leaves `i128`.
    pub(crate) fn new(a: i128, b: i128) -> Option<SpaceWords> {
        let disc = Ck::new(a) * a - Ck::new(4) * b;
        (b != 0 && disc.get()? != 0).then_some(SpaceWords { a, b })
    }

    /// `a`.
    pub(crate) fn a(&self) -> i128 {
        self.a
    }

    /// `b`.
    pub(crate) fn b(&self) -> i128 {
        self.b
    }

    /// The coefficients of `C_d`; `None` for `d = 0` or when something
    /// leaves `i128`.
    pub(crate) fn coeffs(&self, d: &BigInt) -> Option<[i128; 5]> {
        let (a, b) = (self.a, self.b);
        if let (Some(d), Ok(a64), Ok(b64)) = (d.to_i64(), i64::try_from(a), i64::try_from(b)) {
            // Everything but two products fits without checks:
            // |d₁|, |b/h| < 2^63, so d₁² and (b/h)·d₁ fit in i128.
            if d == 0 {
                return None;
            }
            let h = d.unsigned_abs().gcd(&b64.unsigned_abs());
            let h = i64::try_from(h).ok()?;
            let d1 = i128::from(d / h);
            let d1sq = d1 * d1;
            return Some([
                i128::from(d).checked_mul(d1sq)?,
                0,
                i128::from(a64).checked_mul(d1sq)?,
                0,
                i128::from(b64 / h) * d1,
            ]);
        }
        let d = d.to_i128()?;
        if d == 0 {
            return None;
        }
        let h = d.unsigned_abs().gcd(&b.unsigned_abs());
        let h = i128::try_from(h).ok()?;
        let d1 = Ck::new(d / h);
        let d1sq = d1 * d1;
        Some([
            (Ck::new(d) * d1sq).get()?,
            0,
            (Ck::new(a) * d1sq).get()?,
            0,
            (Ck::new(b / h) * d1).get()?,
        ])
    }
}

/// Local solubility of `y² = g(x, z)` for `g` with coefficients `coeffs`
/// (non-zero discriminant) at `place`, in words, with the same answer and
/// the same budget charges as `solubility::locally_soluble` on the same
/// quartic. `None` when this routine does not cover the case (the real
/// place with `c4 ≤ 0` and `c0 ≤ 0`; primes `≥ 2^63`); the caller then runs
/// the `BigInt` route.
pub(crate) fn soluble_words(
    coeffs: &[i128; 5],
    place: &Place,
    budget: &mut Budget,
) -> Option<Result<LocalSolubility>> {
    match place {
        Place::Real => {
            // As `real::real_witness`: (1, 0) when c4 > 0, else (0, 1) when
            // c0 > 0; then y = ⌊√g⌋.
            let (x, z, g) = if coeffs[0] > 0 {
                (1, 0, coeffs[0])
            } else if coeffs[4] > 0 {
                (0, 1, coeffs[4])
            } else {
                match biquadratic_words(coeffs)? {
                    Some(w) => w,
                    None => return Some(Ok(LocalSolubility::Insoluble { place: Place::Real })),
                }
            };
            let y = BigInt::from(g).sqrt();
            Some(Ok(LocalSolubility::Soluble(LocalPoint::new(
                Place::Real,
                BigInt::from(x),
                BigInt::from(z),
                y,
                0,
            ))))
        }
        Place::Finite(p) if p.is_two() => Some(
            padic_word::two_adic_witness_coeffs(coeffs, budget)
                .and_then(|w| finish_coeffs(coeffs, p, w)),
        ),
        Place::Finite(p) => {
            let f = p
                .to_u64()
                .filter(|&v| v < fp::WORD_LIMIT)
                .map(fp::WordField::new)?;
            Some(
                padic_word::odd_prime_witness_coeffs(coeffs, p, f, budget)
                    .and_then(|w| finish_coeffs(coeffs, p, w)),
            )
        }
    }
}

/// `solubility::finish` for a quartic given by its coefficients in words.
fn finish_coeffs(
    coeffs: &[i128; 5],
    p: &Prime,
    w: Option<(BigInt, BigInt)>,
) -> Result<LocalSolubility> {
    let place = Place::Finite(p.clone());
    let Some((x, z)) = w else {
        return Ok(LocalSolubility::Insoluble { place });
    };
    if let Some((y, precision)) = finish_word_coeffs(coeffs, p, &x, &z) {
        return Ok(LocalSolubility::Soluble(LocalPoint::new(
            place, x, z, y, precision,
        )));
    }
    // g(x, z) exactly, then the BigInt square root of `finish`.
    let mut g = BigInt::zero();
    let mut zp = BigInt::from(1);
    let mut xp = [
        BigInt::from(1),
        x.clone(),
        BigInt::zero(),
        BigInt::zero(),
        BigInt::zero(),
    ];
    for i in 2..5 {
        xp[i] = &xp[i - 1] * &x;
    }
    for (i, &c) in coeffs.iter().enumerate() {
        g += BigInt::from(c) * &xp[4 - i] * &zp;
        zp *= &z;
    }
    debug_assert!(padic::is_padic_square(&g, p));
    let (y, precision) = padic_sqrt_of(&g, p, &x, &z)?;
    Ok(LocalSolubility::Soluble(LocalPoint::new(
        place, x, z, y, precision,
    )))
}

/// The real search of `real::real_witness` for `c4 < 0`, `c0 < 0`,
/// `c3 = c1 = 0` in words: `Some(None)` for no real point (`c2 ≤ 0` or
/// `c2² ≤ 4c4c0`), `Some(Some((x, z, g(x, z))))` with `g(x, z) > 0` at the
/// same `(x, z)` as the `BigInt` search (`z = 1, 2, 4, …`,
/// `x = ⌊√(z²c2/(2|c4|))⌋` or that plus one), and `None` when the form
/// has another shape or a value leaves `i128`.
fn biquadratic_words(c: &[i128; 5]) -> Option<Option<(i128, i128, i128)>> {
    let (c4, c2, c0) = (c[0], c[2], c[4]);
    if !(c[1] == 0 && c[3] == 0 && c4 < 0 && c0 < 0) {
        return None;
    }
    let c2sq = (Ck::new(c2) * c2).get()?;
    let four_ac = (Ck::new(4) * c4 * c0).get()?;
    if c2 <= 0 || c2sq <= four_ac {
        return Some(None);
    }
    let two_abs_c4 = (Ck::new(c4) * -2).get()?;
    let mut z: i128 = 1;
    for _ in 0..4096 {
        let t_scaled = (Ck::new(z) * z * c2).get()? / two_abs_c4;
        let x0 = i128::try_from(isqrt_u128(u128::try_from(t_scaled).ok()?)).ok()?;
        for x in [x0, x0.checked_add(1)?] {
            let x2 = Ck::new(x) * x;
            let z2 = Ck::new(z) * z;
            let g =
                (Ck::new(c4) * x2 * x2 + Ck::new(c2) * x2 * z2 + Ck::new(c0) * z2 * z2).get()?;
            if g > 0 {
                return Some(Some((x, z, g)));
            }
        }
        z = z.checked_mul(2)?;
    }
    None
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;
    use crate::arith::word::set_word_paths;
    use crate::curve::ReducedModel;
    use crate::error::Error;
    use crate::local::class_representatives;
    use crate::quartic::form::Quartic;
    use crate::quartic::image::local_image;
    use crate::quartic::solubility::locally_soluble;
    use proptest::prelude::*;

    /// Odd primes on both sides of the bounds of the word routes: enumeration
    /// below 64; the one-step root lift below 235 (`p^8 < 2^63`); the
    /// two-step lift up to 55103 (`55103^4 < 2^63`) and not from 55109 on;
    /// large primes. Primality: sympy 1.14 `isprime` (55103 is
    /// `prevprime(55109)`, 55109 is `nextprime(55103)`).
    const PRIMES: [u64; 12] = [
        3,
        5,
        7,
        17,
        61,
        101,
        257,
        10_007,
        55_103,
        55_109,
        1_000_003,
        (1 << 61) - 1,
    ];

    fn place_of(i: usize) -> Place {
        match i {
            0 => Place::Real,
            1 => Place::Finite(Prime::two()),
            _ => Place::Finite(Prime::new(BigInt::from(PRIMES[i - 2])).unwrap()),
        }
    }

    fn prime_of(place: &Place) -> BigInt {
        match place {
            Place::Real => BigInt::from(3),
            Place::Finite(p) => p.get().clone(),
        }
    }

    /// `c·p^e·2^shift`: small values with deep trees at `p`, and values
    /// that cross 2^63 and 2^127 (products in the spaces then leave i128).
    fn coefficient(raw: i64, bits: u32, p: &BigInt, e: u32, shift: u32) -> BigInt {
        let c = raw >> (64 - bits.clamp(1, 63));
        (BigInt::from(c) * num_traits::pow(p.clone(), e as usize)) << shift
    }

    /// Runs `f` with the word paths off, and restores the switch.
    fn without_words<T>(f: impl FnOnce() -> T) -> T {
        let old = set_word_paths(false);
        let out = f();
        set_word_paths(old);
        out
    }

    proptest! {
        #![proptest_config(ProptestConfig { cases: 1200, ..ProptestConfig::default() })]

        /// The whole local image (members, basis, and for every class the
        /// representative and the same witness or `Insoluble`) is the same
        /// with the word paths on and off; every witness verifies on the
        /// quartic of `Quartic::two_isogeny_space`.
        #[test]
        fn local_images_same_with_and_without_words(
            raw in any::<[i64; 2]>(),
            bits in any::<[u32; 2]>(),
            exps in proptest::array::uniform2(0u32..7),
            shifts in proptest::array::uniform2(prop_oneof![Just(0u32), Just(0), 0u32..130]),
            pi in 0usize..PRIMES.len() + 2,
        ) {
            let place = place_of(pi);
            let p = prime_of(&place);
            let a = coefficient(raw[0], bits[0] % 64, &p, exps[0], shifts[0]);
            let b = coefficient(raw[1], bits[1] % 64, &p, exps[1], shifts[1]);
            let Ok(model) = ReducedModel::new(a.clone(), b.clone()) else { return Ok(()) };
            let on = local_image(&model, &place, &mut Budget::unlimited()).unwrap();
            let off = without_words(|| local_image(&model, &place, &mut Budget::unlimited()).unwrap());
            prop_assert!(on.is_subgroup());
            for ev in &on.evidence {
                if let Some(pt) = ev.solubility.point() {
                    let q = Quartic::two_isogeny_space(&ev.representative, &a, &b).unwrap();
                    prop_assert!(pt.verify(&q));
                }
            }
            prop_assert_eq!(on, off);
        }

        /// Class by class under small budgets: the word route and the
        /// `BigInt` route (word paths off) give the same answer or the same
        /// error, and spend the same units.
        #[test]
        fn word_spaces_and_bigint_spaces_spend_alike(
            raw in any::<[i64; 2]>(),
            bits in any::<[u32; 2]>(),
            exps in proptest::array::uniform2(0u32..7),
            pi in 0usize..PRIMES.len() + 2,
            units in prop_oneof![Just(u64::MAX), 1u64..60, 60u64..2000],
        ) {
            let place = place_of(pi);
            let p = prime_of(&place);
            let a = coefficient(raw[0], bits[0] % 64, &p, exps[0], 0);
            let b = coefficient(raw[1], bits[1] % 64, &p, exps[1], 0);
            prop_assume!(ReducedModel::new(a.clone(), b.clone()).is_ok());
            let (Some(aw), Some(bw)) = (a.to_i128(), b.to_i128()) else { return Ok(()) };
            for d in class_representatives(&place) {
                let Some(c) = space_coeffs(&d, aw, bw) else { continue };
                let q = Quartic::two_isogeny_space(&d, &a, &b).unwrap();
                prop_assert_eq!(q.coeffs(), &c.map(BigInt::from));
                let mut wb = Budget::with_units(units);
                let Some(word) = soluble_words(&c, &place, &mut wb) else { continue };
                let mut bb = Budget::with_units(units);
                let big = without_words(|| locally_soluble(&q, &place, &mut bb));
                match (&word, &big) {
                    (Err(Error::BudgetExhausted { .. }), Err(Error::BudgetExhausted { .. })) => {}
                    _ => prop_assert_eq!(word.ok(), big.ok()),
                }
                prop_assert_eq!(wb.spent(), bb.spent());
            }
        }
    }

    /// `space_coeffs` declines what the `BigInt` constructor rejects, and
    /// products that leave i128.
    #[test]
    fn spaces_outside_the_words_are_declined() {
        assert_eq!(space_coeffs(&BigInt::from(0), 1, 2), None);
        assert_eq!(space_coeffs(&BigInt::from(2), 4, 4), None); // a² = 4b
        assert_eq!(space_coeffs(&BigInt::from(2), 4, 0), None); // b = 0
                                                                // d = 2^64 + 1 is prime to b = 3, d·d₁² ≈ 2^192.
        let d = (BigInt::from(1) << 64) + 1;
        assert_eq!(space_coeffs(&d, 0, 3), None);
        // C_2 for y² = x³ − 17x by the formula of [SilvermanTate92, III.5]
        // by hand: h = 1, d₁ = 2, so [2·4, 0, 0·4, 0, −17·2].
        assert_eq!(
            space_coeffs(&BigInt::from(2), 0, -17),
            Some([8, 0, 0, 0, -34])
        );
    }

    /// The closure rule of `local_image` (a class `c` is outside `W_v`
    /// when `c ⊕ m` is outside for a member `m`; `W_v` is a subgroup, the
    /// image of a homomorphism [SilvermanTate92, III.5]) against testing
    /// every class, over whole families: the congruent-number curves
    /// `y² = x³ − n²x` and their isogenous `y² = x³ + 4n²x` for square-free
    /// `n ≤ 400`, and the box `|a|, |b| ≤ 12`, at `R`, 2 and every odd
    /// prime of `b(a² − 4b)` (and 3, 5, 7 always).
    #[test]
    fn closure_skips_change_no_image() {
        use crate::quartic::image::local_image_with;
        let mut models = Vec::new();
        for n in 1i64..=400 {
            if (2..=20).any(|q| n % (q * q) == 0) {
                continue;
            }
            models.push((0, -n * n));
            models.push((0, 4 * n * n));
        }
        for a in -12i64..=12 {
            for b in -12i64..=12 {
                models.push((a, b));
            }
        }
        let mut compared = 0;
        let mut skipped_any = false;
        for (a, b) in models {
            let Ok(model) = ReducedModel::new(BigInt::from(a), BigInt::from(b)) else {
                continue;
            };
            let disc = (b * (a * a - 4 * b)).unsigned_abs();
            let mut places = vec![Place::Real, Place::Finite(Prime::two())];
            for p in (3u64..).step_by(2).take_while(|&p| p <= 401) {
                if (2..p).take_while(|q| q * q <= p).all(|q| p % q != 0)
                    && (disc % p == 0 || p <= 7)
                {
                    places.push(Place::Finite(Prime::new(BigInt::from(p)).unwrap()));
                }
            }
            for v in &places {
                let (mut b1, mut b2) = (Budget::unlimited(), Budget::unlimited());
                let fast = local_image_with(&model, v, &mut b1, true, None).unwrap();
                let full = local_image_with(&model, v, &mut b2, false, None).unwrap();
                skipped_any |= b1.spent() < b2.spent();
                assert_eq!(fast, full, "a = {a}, b = {b} at {v}");
                compared += 1;
            }
        }
        assert!(compared > 2000);
        assert!(skipped_any);
    }

    /// The closed form of `crate::local::kummer` against the class trees
    /// (every class tested, `by_closure` off) at odd primes below and
    /// above its residue-trying bound 17, on `(a, b) = (s·p^i, t·p^j)` with
    /// deep valuations (every order of the three valuations, all ties),
    /// on `a = 2u·p^i`, `b = p^{2i}(u² − r·p^e)`, where the residue
    /// polynomial has a double root (case 3 of the module docs), and on
    /// `f = (x − s·p^i)(x − t·p^j)` (rational roots).
    #[test]
    fn odd_closed_form_agrees_with_the_class_trees() {
        use crate::local::kummer::odd_image_members;
        use crate::quartic::image::local_image_with;
        let mut seed = 0x2545_f491_4f6c_dd1du64;
        let mut next = move |m: i64| {
            seed ^= seed << 13;
            seed ^= seed >> 7;
            seed ^= seed << 17;
            (seed % (2 * m as u64 + 1)) as i64 - m
        };
        let mut compared = 0;
        let mut seen = [0usize; 16];
        for p in [3i64, 5, 7, 11, 13, 17, 61, 67, 101, 257, 1009] {
            let mut cases: Vec<(i128, i128)> = Vec::new();
            for i in 0..6u32 {
                for j in 0..9u32 {
                    for _ in 0..36 {
                        let (s, t) = (next(40), next(40));
                        let a = if i == 5 {
                            0
                        } else {
                            i128::from(s) * i128::from(p).pow(i)
                        };
                        cases.push((a, i128::from(t) * i128::from(p).pow(j)));
                    }
                }
            }
            for i in 0..4u32 {
                for e in 1..7u32 {
                    for _ in 0..36 {
                        let (u, r) = (i128::from(next(30)), i128::from(next(30)));
                        let pi = i128::from(p).pow(i);
                        cases.push((2 * u * pi, pi * pi * (u * u - r * i128::from(p).pow(e))));
                    }
                }
            }
            // f = (x − e₁)(x − e₂) with e₁ = s·p^i, e₂ = t·p^j: a² − 4b is a
            // square in Z (the route without a square root mod p).
            for i in 0..5u32 {
                for j in 0..5u32 {
                    for _ in 0..24 {
                        let e1 = i128::from(next(40)) * i128::from(p).pow(i);
                        let e2 = i128::from(next(40)) * i128::from(p).pow(j);
                        cases.push((-(e1 + e2), e1 * e2));
                    }
                }
            }
            let prime = Prime::new(BigInt::from(p)).unwrap();
            let place = Place::Finite(prime);
            for (a, b) in cases {
                let Ok(model) = ReducedModel::new(BigInt::from(a), BigInt::from(b)) else {
                    continue;
                };
                let full = local_image_with(&model, &place, &mut Budget::unlimited(), false, None)
                    .unwrap();
                let want = full.members.iter().fold(0u8, |s, &m| s | 1 << m);
                let got = odd_image_members(a, b, p as u64);
                assert_eq!(got, Some(want), "a = {a}, b = {b}, p = {p}");
                seen[usize::from(want)] += 1;
                compared += 1;
            }
        }
        assert!(compared > 30_000, "{compared}");
        // Every subgroup of Q_p*/Q_p*² containing 1 occurred: {1}, the
        // three of order 2, and the whole group.
        for set in [0b0001, 0b0011, 0b0101, 0b1001, 0b1111] {
            assert!(seen[set] > 0, "{set:04b} never occurred: {seen:?}");
        }
    }

    /// The witnesses of `crate::local::kummer::OddWitnesses::witness` (case 1 of
    /// its module docs, no class tree) are points: `g(X, Z)` is a non-zero
    /// square in `Q_p` (`padic::is_padic_square`, Euler's criterion) with
    /// `p ∤ gcd(X, Z)`, on the quartic of `Quartic::two_isogeny_space`,
    /// and their classes lie in the closed-form image. Models
    /// `(s·p^i, t·p^j)` with deep valuations at eleven odd primes, every
    /// class representative; the route must find a witness for most
    /// classes of even valuation (it is not a stub).
    #[test]
    fn direct_witnesses_are_points_of_their_spaces() {
        use crate::local::kummer::{odd_image_members, OddWitnesses};
        use crate::quartic::padic::is_padic_square;
        let mut seed = 0x9e37_79b9_7f4a_7c15u64;
        let mut next = move |m: i64| {
            seed ^= seed << 13;
            seed ^= seed >> 7;
            seed ^= seed << 17;
            (seed % (2 * m as u64 + 1)) as i64 - m
        };
        let (mut found, mut tried, mut near_root) = (0, 0, 0);
        for p in [3i64, 5, 7, 11, 13, 17, 19, 61, 101, 257, 1009] {
            let prime = Prime::new(BigInt::from(p)).unwrap();
            let place = Place::Finite(prime.clone());
            let reps = class_representatives(&place);
            for i in 0..5u32 {
                for j in 0..7u32 {
                    for _ in 0..12 {
                        let (s, t) = (next(60), next(60));
                        let a = if i == 4 {
                            0
                        } else {
                            i128::from(s) * i128::from(p).pow(i)
                        };
                        let b = i128::from(t) * i128::from(p).pow(j);
                        let Ok(_) = ReducedModel::new(BigInt::from(a), BigInt::from(b)) else {
                            continue;
                        };
                        let members = odd_image_members(a, b, p as u64).unwrap();
                        for (mask, d) in reps.iter().enumerate() {
                            let dw = d.to_i128().unwrap();
                            tried += 1;
                            let Some(w) = OddWitnesses::new(a, b, p as u64).unwrap().witness(dw)
                            else {
                                continue;
                            };
                            let (x, z) = w.point;
                            found += 1;
                            near_root += usize::from(w.near_root);
                            assert!(w.tries >= 1);
                            let q =
                                Quartic::two_isogeny_space(d, &BigInt::from(a), &BigInt::from(b))
                                    .unwrap();
                            let g = q.eval(&BigInt::from(x), &BigInt::from(z));
                            assert!(
                                is_padic_square(&g, &prime)
                                    && (x % i128::from(p) != 0 || z % i128::from(p) != 0),
                                "a = {a}, b = {b}, p = {p}, d = {d}: ({x}, {z}) gives {g}"
                            );
                            assert!(
                                members >> mask & 1 == 1,
                                "a = {a}, b = {b}, p = {p}, d = {d}"
                            );
                        }
                    }
                }
            }
        }
        eprintln!("direct witnesses: {found} of {tried}, {near_root} near a root");
        assert!(found * 4 > tried, "{found} of {tried}");
        assert!(
            near_root > 500 && found - near_root > 500,
            "{near_root} of {found}"
        );
    }

    #[test]
    fn integer_square_roots_are_floors() {
        for n in (0u128..2000).chain([u128::MAX, u128::MAX - 1, 1 << 126, (1 << 64) - 1]) {
            let r = isqrt_u128(n);
            assert!(r * r <= n, "{n}");
            assert!((r + 1).checked_mul(r + 1).map_or(true, |s| s > n), "{n}");
        }
    }
}
