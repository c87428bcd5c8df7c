//! Primality testing.

use num_bigint::BigInt;
use num_traits::{One, Signed, ToPrimitive, Zero};

/// True iff `n` is a prime (negative numbers, 0 and 1 are not prime).
///
/// Miller–Rabin with the first 13 prime bases: deterministic below
/// 3.3 · 10^24 (Sorenson–Webster 2015), a strong probable-prime test beyond.
pub fn is_prime(n: &BigInt) -> bool {
    if n.is_negative() || n.is_zero() || n.is_one() {
        return false;
    }
    const BASES: [u32; 13] = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41];
    for &p in &BASES {
        if n == &BigInt::from(p) {
            return true;
        }
        if (n % p).is_zero() {
            return false;
        }
    }
    if let Some(small) = n.to_u64() {
        if small < 43 * 43 {
            return true;
        }
    }
    let nm1 = n - 1u32;
    let s = nm1.trailing_zeros().unwrap_or(0);
    let d = &nm1 >> s;
    'bases: for &a in &BASES {
        let mut x = BigInt::from(a).modpow(&d, n);
        if x.is_one() || x == nm1 {
            continue;
        }
        for _ in 1..s {
            x = (&x * &x) % n;
            if x == nm1 {
                continue 'bases;
            }
        }
        return false;
    }
    true
}
