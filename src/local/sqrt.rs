//! Square roots modulo p and modulo p^k.
//!
//! Modulo an odd prime: Tonelli–Shanks ([Cohen93, Alg. 1.5.1]), with the
//! least non-residue found by trying 2, 3, 4, …. Modulo p^k: Hensel lifting
//! y ↦ y − (y² − u)/(2y), valid because 2y is a unit at odd p. Modulo 2^k:
//! an odd u is a square mod 2^k iff u ≡ 1 mod 2^min(k,3) (k ≤ 2 weaker), and
//! a root lifts bit by bit ([Serre73, II.3.3]).

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Zero};

use super::place::Prime;
use super::symbols::jacobi;
use super::valuation::split_valuation;
use crate::budget::Budget;
use crate::error::{Error, Result};

/// A square root of a modulo the odd prime p, in [0, p), or `None` when a
/// is a non-residue. For p = 2 returns a mod 2.
///
/// Cost: O(log² p) multiplications mod p.
///
/// ```
/// use isodescent::local::{sqrt_mod_prime, Prime};
/// let x = sqrt_mod_prime(&2.into(), &Prime::small(7).unwrap()).unwrap();
/// assert_eq!((&x * &x) % 7, 2.into());
/// ```
pub fn sqrt_mod_prime(a: &BigInt, p: &Prime) -> Option<BigInt> {
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
        let mut y = sqrt_mod_prime(&u, p)?;
        // Hensel: y ← y − (y² − u)·(2y)^{-1} mod p^m, one digit at a time is
        // enough here and keeps the code obviously right.
        let mut j = 1u32;
        while j < m {
            j = (2 * j).min(m);
            let pj = p.get().pow(j);
            let inv = mod_inverse(&((&y * 2u32) % &pj), &pj)?;
            let corr = ((&y * &y - &u) * inv).mod_floor(&pj);
            y = (&y - corr).mod_floor(&pj);
        }
        y
    };
    let x = (y * p.get().pow((v / 2) as u32)).mod_floor(&pk);
    Some(x)
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

/// The inverse of `a` modulo `m > 1`, charging `budget` by operand size
/// first: `64·w²` units for a `w`-word modulus (the extended Euclidean
/// algorithm takes about `bits(m)` division steps on `w`-word numbers,
/// counted in 64-bit word products), so that a deadline or a unit limit
/// stops work on huge moduli before it starts.
///
/// `Ok(None)` when `gcd(a, m) ≠ 1` (or `m ≤ 1`).
///
/// Errors: [`Error::BudgetExhausted`] (stage "modular inverse") when the
/// budget has run out.
///
/// Example: `mod_inverse_with_budget(3, 7, …) = Ok(Some(5))`.
pub fn mod_inverse_with_budget(
    a: &BigInt,
    m: &BigInt,
    budget: &mut Budget,
) -> Result<Option<BigInt>> {
    if m <= &BigInt::one() {
        return Ok(None);
    }
    let w = m.bits().div_ceil(64).max(1);
    budget
        .spend(64 * w * w)
        .map_err(|_| Error::BudgetExhausted {
            stage: "modular inverse".into(),
        })?;
    Ok(mod_inverse(a, m))
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

    #[test]
    fn budgeted_inverses_invert_and_stop_on_an_empty_budget() {
        // 3·5 = 15 ≡ 1 (mod 7); gcd(4, 8) = 4 has no inverse (common practice).
        let mut b = Budget::unlimited();
        let inv = mod_inverse_with_budget(&BigInt::from(3), &BigInt::from(7), &mut b);
        assert_eq!(inv.unwrap(), Some(BigInt::from(5)));
        let none = mod_inverse_with_budget(&BigInt::from(4), &BigInt::from(8), &mut b);
        assert_eq!(none.unwrap(), None);
        let huge = (BigInt::one() << 100_000u32) + 1u32;
        let mut tiny = Budget::with_units(1000);
        assert!(matches!(
            mod_inverse_with_budget(&BigInt::from(3), &huge, &mut tiny),
            Err(Error::BudgetExhausted { .. })
        ));
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
