//! Primality testing: trial division, Miller–Rabin, Baillie–PSW.
//!
//! * `n < 2^64`: Miller–Rabin to a fixed set of bases that is known to
//!   admit no strong pseudoprime below `2^64` — the answer is a proof.
//! * `n ≥ 2^64`: the Baillie–PSW test \[BaillieWagstaff80, PomeranceSW80\]:
//!   a strong Fermat test to base 2 followed by a strong Lucas test with
//!   Selfridge's parameters. No composite passing it is known; it is
//!   deterministic (no random bases) but is not a proof of primality.

use super::mont::{with_ring, Ring};
use num_bigint::{BigInt, BigUint};
use num_integer::Integer;
use num_traits::{One, Signed, ToPrimitive, Zero};
use std::sync::{Arc, RwLock};

/// The primes below 100, used to reject most composites by one division.
const SMALL_PRIMES: [u64; 25] = [
    2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53, 59, 61, 67, 71, 73, 79, 83, 89, 97,
];

/// Miller–Rabin bases with no strong pseudoprime below `2^64`
/// (J. Sinclair's set, from memory; checked in `tests/arith_vectors.rs`
/// against sympy 1.14 on the pseudoprimes and random numbers of
/// `tests/data/prime_tricky.txt`).
const U64_BASES: [u64; 7] = [2, 325, 9375, 28178, 450775, 9780504, 1795265022];

/// True iff `n` is prime, for `n < 2^64`; the answer is exact.
///
/// Method: trial division by the primes below 100; then the strong
/// probable-prime (Miller–Rabin) test \[Riesel94, ch. 4\] with bases
/// `{2, 325, 9375, 28178, 450775, 9780504, 1795265022}` (J. Sinclair; no
/// strong pseudoprime below `2^64` passes all of them). A base that is
/// `≡ 0 mod n` is skipped, as it carries no information.
///
/// Cost: at most 7 modular exponentiations with 64-bit Montgomery
/// arithmetic (`src/arith/small.rs`), about a microsecond.
///
/// Example: `is_prime_u64(561) == false` (Carmichael, `561 = 3·11·17`),
/// `is_prime_u64(2^61 − 1) == true`.
pub fn is_prime_u64(n: u64) -> bool {
    if n < 2 {
        return false;
    }
    for &p in &SMALL_PRIMES {
        if n == p {
            return true;
        }
        if n % p == 0 {
            return false;
        }
    }
    if n < 97 * 97 {
        return true;
    }
    super::small::miller_rabin_u64(n, &U64_BASES)
}

/// True iff `n` is prime. Negative numbers, 0 and 1 are not prime.
///
/// Method: `n < 2^64` goes to [`is_prime_u64`] (exact). Larger `n`:
/// trial division by the primes below 100, then Baillie–PSW
/// \[BaillieWagstaff80, PomeranceSW80\]: `n` must be a strong probable prime
/// to base 2 and a strong Lucas probable prime for Selfridge's parameters
/// (`D` the first of `5, −7, 9, −11, …` with Jacobi symbol `(D/n) = −1`,
/// `P = 1`, `Q = (1 − D)/4`). No composite is known to pass; the test is
/// deterministic, but for `n ≥ 2^64` its "true" is not a proof.
///
/// Cost: about `3·log2 n` modular multiplications in Montgomery form.
///
/// Example: `is_prime(2^89 − 1) == true`; `is_prime(−7) == false`.
pub fn is_prime(n: &BigInt) -> bool {
    if n.is_negative() {
        return false;
    }
    if let Some(small) = n.to_u64() {
        return is_prime_u64(small);
    }
    let mag = n.magnitude();
    for &p in &SMALL_PRIMES {
        if rem_u64(mag, p) == 0 {
            return false;
        }
    }
    bpsw(mag)
}

/// `n mod p` for a small `p`, from the words of `n` (no allocation).
pub(crate) fn rem_u64(n: &BigUint, p: u64) -> u64 {
    let mut r: u128 = 0;
    for &w in n.to_u64_digits().iter().rev() {
        r = ((r << 64) | w as u128) % p as u128;
    }
    r as u64
}

/// Baillie–PSW for odd `n > 97` with no prime factor below 100.
fn bpsw(n: &BigUint) -> bool {
    with_ring!(n, |ring| {
        let nm1 = n - 1u32;
        let s = nm1.trailing_zeros().unwrap_or(0);
        let d = &nm1 >> s;
        let two = ring.elem_i64(2);
        strong_probable_prime_ring(&ring, &two, &d, s as u32) && strong_lucas_selfridge(&ring, n)
    })
    .unwrap_or(false)
}

/// Strong probable-prime test to base `a` (given in `ring`), where the
/// ring's modulus is `n = d·2^s + 1` with `d` odd.
pub(crate) fn strong_probable_prime_ring<R: Ring>(ring: &R, a: &R::E, d: &BigUint, s: u32) -> bool {
    let one = ring.one();
    let minus_one = ring.sub(&ring.zero(), &one);
    let mut x = ring.pow(a, d);
    if x == one || x == minus_one {
        return true;
    }
    for _ in 1..s {
        x = ring.sqr(&x);
        if x == minus_one {
            return true;
        }
        if x == one {
            return false;
        }
    }
    false
}

/// The Jacobi symbol `(a/n)` for odd `n > 0` \[Cohen93, Alg. 1.4.10\],
/// unchecked: the word-size [`super::word::jacobi_u64`] when both fit,
/// else on `BigInt`. The checked public symbol is `local::jacobi`.
pub(crate) fn jacobi_big(a: &BigInt, n: &BigInt) -> i8 {
    if let Some(m) = n.to_u64() {
        if let Some(x) = a.mod_floor(n).to_u64() {
            return super::word::jacobi_u64(x, m);
        }
    }
    let mut a = a.mod_floor(n);
    let mut n = n.clone();
    let mut t = 1i8;
    while !a.is_zero() {
        let z = a.trailing_zeros().unwrap_or(0);
        a >>= z;
        let n8 = (&n % 8u32).to_u32().unwrap_or(0);
        if z % 2 == 1 && (n8 == 3 || n8 == 5) {
            t = -t;
        }
        let a4 = (&a % 4u32).to_u32().unwrap_or(0);
        if a4 == 3 && (&n % 4u32).to_u32() == Some(3) {
            t = -t;
        }
        std::mem::swap(&mut a, &mut n);
        a = a.mod_floor(&n);
    }
    if n.is_one() {
        t
    } else {
        0
    }
}

/// Strong Lucas probable-prime test with Selfridge's method A parameters
/// \[BaillieWagstaff80, §4\]; `n` odd, not a perfect square is checked here.
fn strong_lucas_selfridge<R: Ring>(ring: &R, n: &BigUint) -> bool {
    let nb = BigInt::from(n.clone());
    // A perfect square has no D with (D/n) = -1: reject it first.
    if super::roots::is_perfect_square(&nb) {
        return false;
    }
    let mut dd: i64 = 5;
    loop {
        let j = jacobi_big(&BigInt::from(dd), &nb);
        if j == -1 {
            break;
        }
        if j == 0 && BigInt::from(dd.abs()) != nb {
            return false; // |D| shares a factor with n
        }
        dd = if dd > 0 { -(dd + 2) } else { -dd + 2 };
        if dd.abs() > 1_000_000 {
            return false; // unreachable for a non-square n in practice
        }
    }
    let p = ring.one();
    let q_int = (1 - dd) / 4;
    let q = ring.elem_i64(q_int);
    let d_el = ring.elem_i64(dd);
    // n + 1 = k·2^s with k odd.
    let np1 = n + 1u32;
    let s = np1.trailing_zeros().unwrap_or(0);
    let k = &np1 >> s;
    // Binary Lucas chain for U_k, V_k, Q^k.
    let mut u = ring.one();
    let mut v = p.clone();
    let mut qk = q.clone();
    let bits = k.bits();
    for i in (0..bits.saturating_sub(1)).rev() {
        u = ring.mul(&u, &v);
        v = ring.sub(&ring.sqr(&v), &ring.add(&qk, &qk));
        qk = ring.sqr(&qk);
        if k.bit(i) {
            let pu_v = ring.add(&ring.mul(&p, &u), &v);
            let du_pv = ring.add(&ring.mul(&d_el, &u), &ring.mul(&p, &v));
            u = ring.half(&pu_v);
            v = ring.half(&du_pv);
            qk = ring.mul(&qk, &q);
        }
    }
    if ring.is_zero(&u) || ring.is_zero(&v) {
        return true;
    }
    for _ in 1..s {
        v = ring.sub(&ring.sqr(&v), &ring.add(&qk, &qk));
        if ring.is_zero(&v) {
            return true;
        }
        qk = ring.sqr(&qk);
    }
    false
}

/// The strong Lucas test alone, for cross-checks in the tests: true iff odd `n > 1` is a strong Lucas probable prime for Selfridge's
/// parameters (a prime always is; `n` must be odd, else `false`).
#[cfg(test)]
pub(crate) fn is_strong_lucas_probable_prime(n: &BigInt) -> bool {
    if n <= &BigInt::one() || n.is_even() {
        return false;
    }
    let mag = n.magnitude();
    with_ring!(mag, |ring| strong_lucas_selfridge(&ring, mag)).unwrap_or(false)
}

/// True iff odd `n > 2` is a strong probable prime to base `a`
/// (Miller–Rabin round) \[Riesel94, ch. 4\]; `false` for even `n` or `n < 3`.
/// A prime always passes; a base `≡ 0 mod n` counts as a pass.
#[cfg(test)]
pub(crate) fn is_strong_probable_prime(n: &BigInt, a: &BigInt) -> bool {
    if n < &BigInt::from(3) || n.is_even() {
        return false;
    }
    let mag = n.magnitude();
    let nm1 = mag - 1u32;
    let s = nm1.trailing_zeros().unwrap_or(0);
    let d = &nm1 >> s;
    with_ring!(mag, |ring| {
        let base = ring.elem_big(a);
        ring.is_zero(&base) || strong_probable_prime_ring(&ring, &base, &d, s as u32)
    })
    .unwrap_or(false)
}

/// A table of the primes up to some bound (sieve of Eratosthenes on odd
/// numbers), shared between callers and grown on demand.
#[derive(Debug)]
pub(crate) struct PrimeTable {
    limit: u64,
    /// bit `i` set iff `2i + 1` is prime.
    bits: Vec<u64>,
}

impl PrimeTable {
    fn build(limit: u64) -> Self {
        let half = (limit / 2 + 1) as usize;
        let mut bits = vec![u64::MAX; half / 64 + 1];
        bits[0] &= !1; // 1 is not prime
        let mut i = 1usize;
        while (2 * i + 1) * (2 * i + 1) <= limit as usize {
            if bits[i / 64] >> (i % 64) & 1 == 1 {
                let p = 2 * i + 1;
                let mut j = (p * p) / 2;
                while j < half {
                    bits[j / 64] &= !(1u64 << (j % 64));
                    j += p;
                }
            }
            i += 1;
        }
        PrimeTable { limit, bits }
    }

    /// True iff `n ≤ limit` is prime.
    #[inline]
    pub(crate) fn is_prime(&self, n: u64) -> bool {
        if n < 3 {
            return n == 2;
        }
        if n % 2 == 0 || n > self.limit {
            return false;
        }
        let i = (n / 2) as usize;
        self.bits[i / 64] >> (i % 64) & 1 == 1
    }

    /// The primes in `[lo, hi]` (clipped to the table's limit), ascending.
    pub(crate) fn primes_in(&self, lo: u64, hi: u64) -> impl Iterator<Item = u64> + '_ {
        let hi = hi.min(self.limit);
        let start = if lo <= 2 { 2 } else { lo };
        (start..=hi).filter(move |&n| (n == 2 || n % 2 == 1) && self.is_prime(n))
    }
}

static TABLE: RwLock<Option<Arc<PrimeTable>>> = RwLock::new(None);

/// A prime table exact at least up to `limit` (built once, then reused).
pub(crate) fn prime_table(limit: u64) -> Arc<PrimeTable> {
    if let Ok(guard) = TABLE.read() {
        if let Some(t) = guard.as_ref() {
            if t.limit >= limit {
                return Arc::clone(t);
            }
        }
    }
    let old = TABLE
        .read()
        .ok()
        .and_then(|g| g.as_ref().map(|t| t.limit))
        .unwrap_or(0);
    let table = Arc::new(PrimeTable::build(
        limit.max(old.saturating_mul(2)).max(1 << 16),
    ));
    if let Ok(mut guard) = TABLE.write() {
        let replace = match guard.as_ref() {
            Some(t) => t.limit < table.limit,
            None => true,
        };
        if replace {
            *guard = Some(Arc::clone(&table));
        }
    }
    table
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_jacobi_symbol_matches_euler_criterion_for_small_primes() {
        // Euler's criterion: (a/p) = a^((p-1)/2) mod p \[Cohen93, Prop. 1.4.6\].
        for p in [3i64, 5, 7, 11, 13, 101] {
            for a in -20i64..20 {
                let e = BigInt::from(a).modpow(&BigInt::from((p - 1) / 2), &BigInt::from(p));
                let expected = if e.is_zero() {
                    0
                } else if e.is_one() {
                    1
                } else {
                    -1
                };
                assert_eq!(
                    jacobi_big(&BigInt::from(a), &BigInt::from(p)),
                    expected,
                    "({a}/{p})"
                );
            }
        }
    }

    #[test]
    fn the_prime_table_counts_the_primes_below_ten_thousand() {
        // pi(10^4) = 1229 \[Riesel94, Table 1\].
        let t = prime_table(10_000);
        assert_eq!(t.primes_in(1, 10_000).count(), 1229);
    }

    proptest::proptest! {
        #[test]
        fn the_word_size_test_agrees_with_baillie_psw(n in proptest::prelude::any::<u64>()) {
            // Two different algorithms: Miller-Rabin with fixed bases versus
            // the strong base-2 test plus the strong Lucas test
            // (Baillie-PSW; common practice).
            let n = n | 1;
            let bn = BigInt::from(n);
            let bpsw = n > 2
                && is_strong_probable_prime(&bn, &BigInt::from(2))
                && (n < 100 || is_strong_lucas_probable_prime(&bn) || bn == BigInt::from(5));
            if n > 100 {
                proptest::prop_assert_eq!(is_prime_u64(n), bpsw, "n = {}", n);
            }
        }
    }
}
