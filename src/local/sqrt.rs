//! Square roots modulo p and modulo p^k.
//!
//! Modulo an odd prime: Tonelli–Shanks ([Cohen93, Alg. 1.5.1]), with the
//! least non-residue found by trying 2, 3, 4, …. Modulo p^k: Hensel lifting
//! y ↦ y − (y² − u)/(2y), valid because 2y is a unit at odd p. Modulo 2^k:
//! an odd u is a square mod 2^k iff u ≡ 1 mod 2^min(k,3) (k ≤ 2 weaker), and
//! a root lifts bit by bit ([Serre73, II.3.3]).

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, ToPrimitive, Zero};

use super::place::Prime;
use super::symbols::jacobi;
use super::valuation::split_valuation;
use crate::arith::word::{inv_mod, mul_mod, sqrt_mod};

/// A square root of a modulo the odd prime p, in [0, p), or `None` when a
/// is a non-residue. For p = 2 returns a mod 2.
///
/// Cost: O(log² p) multiplications mod p. Example (a unit test in
/// `src/local/tests/layer.rs`): a root of 2 modulo 7 squares to 2.
pub fn sqrt_mod_prime(a: &BigInt, p: &Prime) -> Option<BigInt> {
    if let Some(pw) = p.to_u64() {
        let r = residue_u64(a, pw);
        return sqrt_mod(r, pw).map(BigInt::from);
    }
    sqrt_mod_prime_big(a, p)
}

/// [`sqrt_mod_prime`] on `BigInt`s (any p).
fn sqrt_mod_prime_big(a: &BigInt, p: &Prime) -> Option<BigInt> {
    let p = p.get();
    let a = a.mod_floor(p);
    if p == &BigInt::from(2) || a.is_zero() {
        return Some(a);
    }
    if jacobi(&a, p).ok()? != 1 {
        return None;
    }
    let pm1: BigInt = p - 1u32;
    let s = pm1.trailing_zeros().unwrap_or(0);
    let q = &pm1 >> s;
    if s == 1 {
        let e: BigInt = (p + 1u32) >> 2;
        return Some(a.modpow(&e, p));
    }
    // least non-residue; exists and is < 2 log^2 p under GRH, found quickly
    let mut z = BigInt::from(2);
    while jacobi(&z, p).ok()? != -1 {
        z += 1u32;
    }
    let mut m = s;
    let mut c = z.modpow(&q, p);
    let mut t = a.modpow(&q, p);
    let e: BigInt = (&q + 1u32) >> 1;
    let mut r = a.modpow(&e, p);
    while !t.is_one() {
        let mut i = 0u64;
        let mut t2 = t.clone();
        while !t2.is_one() {
            t2 = (&t2 * &t2) % p;
            i += 1;
            if i >= m {
                return None;
            }
        }
        let mut b = c.clone();
        for _ in 0..(m - i - 1) {
            b = (&b * &b) % p;
        }
        m = i;
        c = (&b * &b) % p;
        t = (&t * &c) % p;
        r = (&r * &b) % p;
    }
    Some(r)
}

/// x with x² ≡ a (mod p^k), in [0, p^k), or `None` if a is not a square
/// modulo p^k. Works for every prime p including 2 and every integer a.
///
/// If a ≡ 0 mod p^k the answer is 0. Otherwise a = p^v u with v < k; a
/// root exists iff v is even and u is a square modulo p^(k−v) (with the
/// 2-adic rule at p = 2: u ≡ 1 mod 2^min(k−v, 3), except only u odd is
/// needed when k − v = 1 and u ≡ 1 mod 4 when k − v = 2).
///
/// Cost: O(k) lifting steps.
pub fn sqrt_mod_prime_power(a: &BigInt, p: &Prime, k: u32) -> Option<BigInt> {
    if k == 0 {
        return Some(BigInt::zero());
    }
    if let Some(pk) = p.to_u64().and_then(|pw| pw.checked_pow(k)) {
        let r = residue_u64(a, pk);
        return sqrt_mod_prime_power_word(r, p.to_u64()?, k, pk).map(BigInt::from);
    }
    sqrt_mod_prime_power_big(a, p, k)
}

/// [`sqrt_mod_prime_power`] on `BigInt`s (any p^k).
fn sqrt_mod_prime_power_big(a: &BigInt, p: &Prime, k: u32) -> Option<BigInt> {
    let pk = p.get().pow(k);
    let a = a.mod_floor(&pk);
    if a.is_zero() {
        return Some(a);
    }
    let (v, u) = split_valuation(&a, p)?;
    if v % 2 == 1 {
        return None;
    }
    let m = k - v as u32; // precision left for the unit part
    let y = if p.is_two() {
        sqrt_unit_mod_two_power(&u, m)?
    } else {
        let y0 = sqrt_mod_prime(&u, p)?;
        lift_unit_root(&u, y0, p, m)?
    };
    let x = (y * p.get().pow((v / 2) as u32)).mod_floor(&pk);
    Some(x)
}

/// The root `y ∈ [0, p^m)` of `y² ≡ u (mod p^m)` with `y ≡ y₀ (mod p)`,
/// for odd `p`, `u` a unit and `y₀² ≡ u (mod p)`, `y₀ ≢ 0`. The root is
/// unique (Hensel's lemma: `2y₀` is a unit), so any correct lift returns
/// this very number. Newton–Hensel doubling [Cohen93, §1.5]
/// `y ← y − (y² − u)·w` with `w ≡ (2y)⁻¹` kept by `w ← w(2 − 2y·w)` (no
/// inversion per step): in `u128` words when `p^⌈m/2⌉ < 2^63` and
/// `p^m < 2^127` ([`lift_unit_root_words`]), else in `BigInt`.
fn lift_unit_root(u: &BigInt, y0: BigInt, p: &Prime, m: u32) -> Option<BigInt> {
    if let (Some(pw), Some(y0w)) = (p.to_u64(), y0.to_u64()) {
        if let Some(y) = lift_unit_root_words(u, y0w, pw, m) {
            return Some(BigInt::from(y));
        }
    }
    let pb = p.get();
    let mut y = y0;
    let mut w = mod_inverse(&((&y * 2u32) % pb), pb)?;
    let mut j = 1u32;
    while j < m {
        j = (2 * j).min(m);
        let pj = pb.pow(j);
        y = (&y - (&y * &y - u) * &w).mod_floor(&pj);
        w = (&w * (BigInt::from(2) - BigInt::from(2) * &y * &w)).mod_floor(&pj);
    }
    Some(y.mod_floor(&pb.pow(m)))
}

/// [`lift_unit_root`] in words; `None` when `p^⌈m/2⌉ ≥ 2^63` or
/// `p^m ≥ 2^127`. Doubling modulo `P = p^⌈m/2⌉` (all products below
/// `2^126`), then one step to `p^m`: with `y₁` the root modulo `P`,
/// `(y₁ + P·t)² ≡ y₁² + 2y₁·P·t (mod p^m)` because `P² ≡ 0`, so
/// `t ≡ ((u − y₁²)/P)·w (mod p^(m − ⌈m/2⌉))`.
fn lift_unit_root_words(u: &BigInt, y0: u64, p: u64, m: u32) -> Option<u128> {
    let k1 = m.div_ceil(2);
    let m1 = p.checked_pow(k1).filter(|&v| v < 1 << 63)?;
    let full = u128::from(p).checked_pow(m).filter(|&v| v < 1 << 127)?;
    let u_full = match u.to_i128() {
        Some(x) => x.rem_euclid(i128::try_from(full).ok()?) as u128,
        None => u.mod_floor(&BigInt::from(full)).to_u128()?,
    };
    let mm = u128::from(m1);
    let um = u_full % mm;
    let (mut y, mut w) = (u128::from(y0), u128::from(inv_mod(mul_mod(2, y0, p), p)?));
    let mut j = 1u32;
    while j < k1 {
        j = (2 * j).min(k1);
        let mj = u128::from(p.pow(j));
        let e = (y * y + mm * mm - um) % mj;
        y = (y + mj - e * w % mj) % mj;
        let t = 2 * y % mj * w % mj;
        w = w * ((2 + mj - t) % mj) % mj;
    }
    if k1 == m {
        return Some(y % mm);
    }
    // w ≡ (2y₁)⁻¹ mod p^k1, and p^(m − k1) | p^k1.
    let m2 = u128::from(p.pow(m - k1));
    let e = (u_full + full - y * y % full) % full;
    debug_assert_eq!(e % mm, 0);
    let t = (e / mm) % m2 * (w % m2) % m2;
    Some(y + mm * t)
}

// ---------------------------------------------------------------------
// The same algorithms in machine words, for p^k < 2^64: every step below
// mirrors the `BigInt` code step for step (Tonelli–Shanks with the same
// non-residue, the same Hensel lifts), so the root returned is the same
// number, not merely another root. Products are taken in u128.
// ---------------------------------------------------------------------

/// a mod m (m > 0) as a word: the least non-negative residue.
fn residue_u64(a: &BigInt, m: u64) -> u64 {
    use num_traits::ToPrimitive;
    match a.to_i128() {
        Some(x) => x.rem_euclid(i128::from(m)) as u64,
        None => a.mod_floor(&BigInt::from(m)).to_u64().unwrap_or(0),
    }
}

/// [`sqrt_mod_prime_power_big`] in words: `a` reduced mod `pk` = p^k.
fn sqrt_mod_prime_power_word(a: u64, p: u64, k: u32, pk: u64) -> Option<u64> {
    if a == 0 {
        return Some(0);
    }
    let mut u = a;
    let mut v = 0u32;
    while u % p == 0 {
        u /= p;
        v += 1;
    }
    if v % 2 == 1 {
        return None;
    }
    let m = k - v;
    let y = if p == 2 {
        sqrt_unit_mod_two_power_word(u, m)?
    } else {
        let mut y = sqrt_mod(u % p, p)?;
        let mut j = 1u32;
        while j < m {
            j = (2 * j).min(m);
            let pj = p.pow(j);
            let inv = inv_mod(mul_mod(y, 2, pj), pj)?;
            let w = u128::from(pj);
            let diff = ((u128::from(mul_mod(y, y, pj)) + w - u128::from(u % pj)) % w) as u64;
            let corr = mul_mod(diff, inv, pj);
            y = ((u128::from(y) % w + w - u128::from(corr)) % w) as u64;
        }
        y
    };
    Some(mul_mod(y, p.pow(v / 2), pk))
}

/// [`sqrt_unit_mod_two_power`] in words (m ≤ 63 since 2^m ≤ p^k < 2^64).
fn sqrt_unit_mod_two_power_word(u: u64, m: u32) -> Option<u64> {
    match m {
        0 | 1 => return Some(1),
        2 => return (u % 4 == 1).then_some(1),
        _ => {}
    }
    if u % 8 != 1 {
        return None;
    }
    let mut y: u64 = 1;
    for j in 3..m {
        let modulus = 1u128 << (j + 1);
        let y2 = u128::from(y) * u128::from(y);
        if (y2 % modulus + modulus - u128::from(u) % modulus) % modulus != 0 {
            y += 1u64 << (j - 1);
        }
    }
    Some(y % (1u64 << m))
}

/// Root of an odd u modulo 2^m.
fn sqrt_unit_mod_two_power(u: &BigInt, m: u32) -> Option<BigInt> {
    let u8v = u.mod_floor(&BigInt::from(8));
    match m {
        0 | 1 => return Some(BigInt::one()),
        2 => {
            return if u.mod_floor(&BigInt::from(4)).is_one() {
                Some(BigInt::one())
            } else {
                None
            }
        }
        _ => {}
    }
    if !u8v.is_one() {
        return None;
    }
    // y² ≡ u mod 2^j, extend to 2^{j+1} by possibly adding 2^{j−1}.
    let mut y = BigInt::one();
    for j in 3..m {
        let modulus = BigInt::one() << (j + 1);
        if !((&y * &y - u).mod_floor(&modulus)).is_zero() {
            y += BigInt::one() << (j - 1);
        }
    }
    Some(y.mod_floor(&(BigInt::one() << m)))
}

/// Inverse of a modulo m (gcd must be 1).
pub(crate) fn mod_inverse(a: &BigInt, m: &BigInt) -> Option<BigInt> {
    let e = a.mod_floor(m).extended_gcd(m);
    if e.gcd.is_one() {
        Some(e.x.mod_floor(m))
    } else {
        None
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The word routes return the very same roots as the `BigInt` routes
    /// (not merely roots): all residues for small p^k, and random residues
    /// for p^k near 2^32, 2^63 and just below 2^64, p = 2 included.
    #[test]
    fn word_roots_are_the_big_integer_roots() {
        let mut x = 0x9E37_79B9_7F4A_7C15u64;
        let mut next = || {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            x
        };
        let mut compared = 0;
        for (p, k) in [
            (2u64, 1u32),
            (2, 3),
            (2, 6),
            (3, 4),
            (5, 3),
            (7, 2),
            (13, 2),
            (17, 1),
            (41, 2),
        ] {
            let pr = Prime::small(p).unwrap();
            let pk = p.pow(k);
            for a in 0..pk {
                let big_a = BigInt::from(a);
                assert_eq!(
                    sqrt_mod_prime_power(&big_a, &pr, k),
                    sqrt_mod_prime_power_big(&big_a, &pr, k),
                    "{a} mod {p}^{k}"
                );
                assert_eq!(sqrt_mod_prime(&big_a, &pr), sqrt_mod_prime_big(&big_a, &pr));
                compared += 1;
            }
        }
        // (p, k) with p^k just below a word boundary: 2^63, 2^32 + 15 (prime),
        // 3^40 < 2^64, 65521^4 < 2^64 (65521 prime), (2^32 − 5)² (2^32 − 5 prime),
        // 2^64 − 59 (prime); primality from sympy 1.14.
        for (p, k) in [
            (2u64, 63u32),
            (4_294_967_311, 1),
            (3, 40),
            (65521, 4),
            (4_294_967_291, 2),
            (18_446_744_073_709_551_557, 1),
        ] {
            let pr = Prime::small(p).unwrap();
            let pk = BigInt::from(p).pow(k);
            for i in 0..300 {
                // Random residues, random squares (so that roots exist), and
                // multiples of p² (valuation part), some negative or > p^k.
                let r = BigInt::from(next()) * BigInt::from(next());
                let a = match i % 4 {
                    0 => r.clone(),
                    1 => &r * &r,
                    2 => &r * &r * p * p,
                    _ => -(&r * &r) - &pk * 3,
                };
                let word = sqrt_mod_prime_power(&a, &pr, k);
                assert_eq!(
                    word,
                    sqrt_mod_prime_power_big(&a, &pr, k),
                    "{a} mod {p}^{k}"
                );
                if let Some(y) = &word {
                    assert_eq!((y * y - &a).mod_floor(&pk), BigInt::zero());
                }
                assert_eq!(sqrt_mod_prime(&a, &pr), sqrt_mod_prime_big(&a, &pr));
                compared += 1;
            }
        }
        // Above 2^64 the BigInt route runs (2^64 + 13 is prime, sympy 1.14).
        let big_p = Prime::new("18446744073709551629".parse().unwrap()).unwrap();
        let nine = BigInt::from(9);
        let y = sqrt_mod_prime_power(&nine, &big_p, 2).unwrap();
        assert_eq!(
            (&y * &y - &nine).mod_floor(&big_p.get().pow(2)),
            BigInt::zero()
        );
        assert!(compared > 2000);
    }

    /// The Hensel steps of the first version of this module, one inverse
    /// per step (kept as the reference for the lifts above).
    fn lift_by_inverses(u: &BigInt, y0: BigInt, p: &Prime, m: u32) -> Option<BigInt> {
        let mut y = y0;
        let mut j = 1u32;
        while j < m {
            j = (2 * j).min(m);
            let pj = p.get().pow(j);
            let inv = mod_inverse(&((&y * 2u32) % &pj), &pj)?;
            let corr = ((&y * &y - u) * inv).mod_floor(&pj);
            y = (&y - corr).mod_floor(&pj);
        }
        Some(y)
    }

    /// The lifts with a kept inverse (in words and in `BigInt`) give the
    /// same roots as the lifts with one inversion per step, for `p^m` on
    /// both sides of 2^127 and `p^⌈m/2⌉` on both sides of 2^63, and the
    /// roots square to `u`.
    #[test]
    fn kept_inverse_lifts_are_the_inverse_per_step_lifts() {
        let mut x = 0x2545_f491_4f6c_dd1du64;
        let mut next = || {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            x
        };
        let mut compared = 0;
        // 2^61 − 1 and 2^64 − 59 are prime (sympy 1.14 isprime).
        for (p, ms) in [
            (3u64, &[1u32, 2, 5, 40, 79, 80, 81, 120][..]),
            (7, &[3, 22, 45, 46, 60]),
            (19_997, &[2, 5, 8, 9, 10, 14]),
            (1_000_003, &[2, 3, 6, 7, 9]),
            ((1 << 61) - 1, &[1, 2, 3]),
            (18_446_744_073_709_551_557, &[1, 2, 3]),
        ] {
            let pr = Prime::small(p).unwrap();
            for &m in ms {
                let pm = BigInt::from(p).pow(m);
                for _ in 0..40 {
                    let r = BigInt::from(next()) * BigInt::from(next()) * BigInt::from(next());
                    let u = (&r * &r).mod_floor(&pm);
                    if (&u % p).is_zero() {
                        continue;
                    }
                    let y0 = sqrt_mod_prime(&u, &pr).unwrap();
                    let want = lift_by_inverses(&u, y0.clone(), &pr, m).unwrap();
                    let got = lift_unit_root(&u, y0, &pr, m).unwrap();
                    assert_eq!(got, want, "{u} mod {p}^{m}");
                    assert!((&got * &got - &u).mod_floor(&pm).is_zero());
                    compared += 1;
                }
            }
        }
        assert!(compared > 800, "{compared}");
    }

    #[test]
    fn roots_mod_primes_square_back() {
        for p in [3u64, 5, 13, 17, 41, 97, 257, 65537, 1_000_000_007] {
            let pr = Prime::small(p).unwrap();
            for a in 0u64..60 {
                let big_a = BigInt::from(a);
                match sqrt_mod_prime(&big_a, &pr) {
                    Some(x) => assert_eq!((&x * &x) % p, big_a.mod_floor(&BigInt::from(p))),
                    None => assert_eq!(jacobi(&big_a, pr.get()).unwrap(), -1),
                }
            }
        }
    }

    #[test]
    fn roots_mod_prime_powers_square_back_including_two() {
        for (p, k) in [
            (2u64, 1u32),
            (2, 2),
            (2, 3),
            (2, 10),
            (3, 5),
            (5, 4),
            (7, 3),
        ] {
            let pr = Prime::small(p).unwrap();
            let pk = BigInt::from(p).pow(k);
            for a in -200i64..200 {
                let big_a = BigInt::from(a);
                let brute = (0..pk.to_string().parse::<i64>().unwrap())
                    .any(|x| (BigInt::from(x * x) - &big_a).mod_floor(&pk).is_zero());
                match sqrt_mod_prime_power(&big_a, &pr, k) {
                    Some(x) => {
                        assert!(
                            (&x * &x - &big_a).mod_floor(&pk).is_zero(),
                            "a={a} p={p} k={k}"
                        )
                    }
                    None => assert!(!brute, "missed a root: a={a} p={p} k={k}"),
                }
            }
        }
    }
}
