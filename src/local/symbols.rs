//! Legendre, Jacobi and Kronecker symbols.
//!
//! All three are computed by the binary reciprocity algorithm
//! ([Cohen93, Alg. 1.4.10]): pull out factors of 2 using (2/n) =
//! (−1)^((n²−1)/8), swap with quadratic reciprocity, reduce, repeat. Cost
//! O(log² n) bit operations; machine words take a `u64` fast path.

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Signed, ToPrimitive, Zero};

use super::place::Prime;
use crate::arith::jacobi_big;
use crate::arith::word::jacobi_u64;
use crate::error::{Error, Result};

/// Legendre symbol (a/p) for an odd prime p: 0 if p | a, 1 if a is a
/// nonzero square mod p, −1 otherwise.
///
/// # Errors
/// [`Error::InvalidArgument`] for p = 2, where the symbol is not defined.
///
/// ```
/// use isodescent::local::{legendre, Prime};
/// let p = Prime::small(7).unwrap();
/// assert_eq!(legendre(&2.into(), &p).unwrap(), 1);   // 3^2 = 2 mod 7
/// assert_eq!(legendre(&3.into(), &p).unwrap(), -1);
/// ```
pub fn legendre(a: &BigInt, p: &Prime) -> Result<i8> {
    if p.is_two() {
        return Err(Error::InvalidArgument {
            reason: "the Legendre symbol needs an odd prime, got 2".into(),
        });
    }
    Ok(jacobi_big(a, p.get()))
}

/// Legendre symbol for machine words. The caller promises p is an odd prime
/// (for odd composite p this returns the Jacobi symbol; for even p, 0).
pub fn legendre_u64(a: u64, p: u64) -> i8 {
    if p % 2 == 0 {
        return 0;
    }
    jacobi_u64(a, p)
}

/// Jacobi symbol (a/n) for odd positive n.
///
/// # Errors
/// [`Error::InvalidArgument`] when n is even or not positive.
pub fn jacobi(a: &BigInt, n: &BigInt) -> Result<i8> {
    if !n.is_positive() || n.is_even() {
        return Err(Error::InvalidArgument {
            reason: format!("the Jacobi symbol needs an odd positive modulus, got {n}"),
        });
    }
    Ok(jacobi_big(a, n))
}

/// Kronecker symbol (a/n) for any integers a, n ([Cohen93, Def. 1.4.8]):
/// (a/0) = 1 if a = ±1 else 0; (a/−1) = sign of a (1 for a = 0 is not
/// used: (0/−1) = 1); (a/2) = 0 for even a, 1 for a ≡ ±1 mod 8, −1 for
/// a ≡ ±3 mod 8; multiplicative in n.
pub fn kronecker(a: &BigInt, n: &BigInt) -> i8 {
    if n.is_zero() {
        return if a.abs().is_one() { 1 } else { 0 };
    }
    let mut t = 1i8;
    let mut m = n.clone();
    if m.is_negative() {
        m = -m;
        if a.is_negative() {
            t = -t;
        }
    }
    let z = m.trailing_zeros().unwrap_or(0);
    if z > 0 {
        if a.is_even() {
            return 0;
        }
        let a8 = a.mod_floor(&BigInt::from(8)).to_u32().unwrap_or(0);
        if z % 2 == 1 && (a8 == 3 || a8 == 5) {
            t = -t;
        }
        m >>= z;
    }
    t * jacobi_big(a, &m)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn euler(a: i64, p: i64) -> i8 {
        let r = BigInt::from(a).modpow(&BigInt::from((p - 1) / 2), &BigInt::from(p));
        if r.is_zero() {
            0
        } else if r.is_one() {
            1
        } else {
            -1
        }
    }

    #[test]
    fn legendre_agrees_with_eulers_criterion_for_small_primes() {
        // Euler's criterion, [Serre73, I.3.2].
        for p in [3i64, 5, 7, 11, 13, 97, 101] {
            let pr = Prime::small(p as u64).unwrap();
            for a in -50i64..50 {
                let e = euler(a.rem_euclid(p), p);
                assert_eq!(legendre(&BigInt::from(a), &pr).unwrap(), e, "a={a} p={p}");
            }
        }
    }

    #[test]
    fn legendre_refuses_the_prime_two() {
        assert!(legendre(&BigInt::from(3), &Prime::two()).is_err());
    }

    #[test]
    fn big_and_word_jacobi_paths_agree() {
        let n = BigInt::from(1_000_000_007u64) * BigInt::from(998_244_353u64);
        for a in [2u64, 3, 12345, 999_999_999_999] {
            let big = jacobi_big(&BigInt::from(a), &n);
            let prod = jacobi_u64(a, 1_000_000_007) * jacobi_u64(a, 998_244_353);
            assert_eq!(big, prod);
        }
    }

    #[test]
    fn kronecker_at_two_and_minus_one() {
        assert_eq!(kronecker(&BigInt::from(3), &BigInt::from(2)), -1);
        assert_eq!(kronecker(&BigInt::from(7), &BigInt::from(2)), 1);
        assert_eq!(kronecker(&BigInt::from(-3), &BigInt::from(-1)), -1);
        assert_eq!(kronecker(&BigInt::from(4), &BigInt::from(6)), 0);
    }
}
