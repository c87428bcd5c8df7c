//! Checked machine-word integers for the word-size paths of the Selmer
//! stage (Tate's algorithm, local images), and the crate-private switch
//! that turns those paths off for comparison tests.
//!
//! [`Ck`] is an `i128` that remembers overflow: every operation on it is
//! checked, and once one overflows the value is poisoned and stays so.
//! A word-size routine writes its formulas with `Ck` exactly as the
//! `BigInt` routine writes them, and reads the result with [`Ck::get`];
//! `None` means "some intermediate left i128", and the caller falls back
//! to the `BigInt` path. Nothing is ever truncated or wrapped.
//!
//! # The one word-size helper per job
//! `mul_mod`, `pow_mod`, `inv_mod`, `isqrt_u128`, `jacobi_u64` and the
//! Tonelli–Shanks square root `sqrt_mod` (with `sqrt_mod_with` for a field
//! that brings its own product) live here and nowhere else.
//!
//! # Deliberate twins: word-size paths beside the `BigInt` ones
//! These pairs compute the same thing twice on purpose, the word-size one
//! for speed, each checked against the other by a two-way test:
//! * Tate's algorithm: `curve::tate_word` beside `curve::tate`;
//! * the Weierstrass invariants in `i128` beside `BigInt`
//!   (`curve::weierstrass::integer_invariants`);
//! * p-adic solubility trees: `quartic::padic_word` beside `quartic::padic`;
//! * local images: `quartic::image_word` beside `quartic::image`;
//! * polynomials over `F_p`: the `WordField` paths of `quartic::fp`;
//! * modular square roots: the word paths of `local::sqrt` beside its
//!   `BigInt` ones;
//! * the Jacobi symbol: `jacobi_u64` beside `arith::prime::jacobi_big`;
//! * the elliptic-curve method: `arith::ecm64` beside `arith::ecm`.
//!
//! `family::word_sweep` compares whole families with these paths on and
//! off.

use std::cell::Cell;
use std::ops::{Add, Mul, Neg, Sub};

/// An `i128` with overflow tracking (`None` after any overflow).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct Ck(pub(crate) Option<i128>);

impl Ck {
    /// The value `x`.
    #[inline]
    pub(crate) fn new(x: i128) -> Ck {
        Ck(Some(x))
    }

    /// The value, or `None` if an operation overflowed.
    #[inline]
    pub(crate) fn get(self) -> Option<i128> {
        self.0
    }

    /// The exact quotient `self / d`; `None` (poisoned) when `d = 0`, the
    /// division is inexact, or it overflows.
    #[inline]
    pub(crate) fn exact_div(self, d: i128) -> Option<i128> {
        let x = self.0?;
        if d == 0 || x.checked_rem(d)? != 0 {
            return None;
        }
        x.checked_div(d)
    }
}

impl From<i128> for Ck {
    #[inline]
    fn from(x: i128) -> Ck {
        Ck(Some(x))
    }
}

macro_rules! ck_binop {
    ($tr:ident, $f:ident, $checked:ident) => {
        impl $tr for Ck {
            type Output = Ck;
            #[inline]
            fn $f(self, o: Ck) -> Ck {
                Ck(match (self.0, o.0) {
                    (Some(a), Some(b)) => a.$checked(b),
                    _ => None,
                })
            }
        }
        impl $tr<i128> for Ck {
            type Output = Ck;
            #[inline]
            fn $f(self, o: i128) -> Ck {
                Ck(self.0.and_then(|a| a.$checked(o)))
            }
        }
        impl $tr<Ck> for i128 {
            type Output = Ck;
            #[inline]
            fn $f(self, o: Ck) -> Ck {
                Ck(o.0.and_then(|b| self.$checked(b)))
            }
        }
    };
}

ck_binop!(Add, add, checked_add);
ck_binop!(Sub, sub, checked_sub);
ck_binop!(Mul, mul, checked_mul);

impl Neg for Ck {
    type Output = Ck;
    #[inline]
    fn neg(self) -> Ck {
        Ck(self.0.and_then(i128::checked_neg))
    }
}

/// `p^k` in `i128`, `None` when it does not fit.
#[inline]
pub(crate) fn pow_i128(p: i128, k: u32) -> Option<i128> {
    p.checked_pow(k)
}

/// `p^k | x`, exactly (true for `x = 0`; when `p^k` does not fit in
/// `i128` only `x = 0` is divisible, since `|x| < 2^127 ≤ p^k`).
#[inline]
pub(crate) fn divisible_pow(x: i128, p: i128, k: u32) -> bool {
    match pow_i128(p, k) {
        Some(pk) => x % pk == 0,
        None => x == 0,
    }
}

/// `x mod p` in `[0, p)` for `p > 0`.
#[inline]
pub(crate) fn residue(x: i128, p: u64) -> u64 {
    x.rem_euclid(i128::from(p)) as u64
}

/// `a·b mod p` (`p ≥ 1`): one 64-bit product when both factors are below
/// `2^32`, a 128-bit one otherwise. The one word-size modular product of
/// the crate.
#[inline]
pub(crate) fn mul_mod(a: u64, b: u64, p: u64) -> u64 {
    if (a | b) < (1 << 32) {
        a * b % p
    } else {
        (u128::from(a) * u128::from(b) % u128::from(p)) as u64
    }
}

/// `⌊√x⌋`, exactly, for any `u128` (a floating-point estimate, corrected
/// with checked squares). The one word-size integer square root.
pub(crate) fn isqrt_u128(x: u128) -> u128 {
    let mut r = (x as f64).sqrt() as u128;
    while r.checked_mul(r).map_or(true, |sq| sq > x) {
        r -= 1;
    }
    while (r + 1).checked_mul(r + 1).is_some_and(|sq| sq <= x) {
        r += 1;
    }
    r
}

/// The Jacobi symbol `(a/n)` for machine words, `n` odd and positive
/// (binary reciprocity, \[Cohen93, Alg. 1.4.10\]).
pub(crate) fn jacobi_u64(mut a: u64, mut n: u64) -> i8 {
    debug_assert!(n % 2 == 1);
    a %= n;
    let mut t = 1i8;
    while a != 0 {
        let z = a.trailing_zeros();
        a >>= z;
        if z % 2 == 1 && (n % 8 == 3 || n % 8 == 5) {
            t = -t;
        }
        if a % 4 == 3 && n % 4 == 3 {
            t = -t;
        }
        std::mem::swap(&mut a, &mut n);
        a %= n;
    }
    if n == 1 {
        t
    } else {
        0
    }
}

/// A square root of `a` modulo the prime `p < 2^64`, `None` for a
/// non-residue; `√0 = 0` and, for `p = 2`, `√a = a`.
///
/// The one Tonelli–Shanks of the crate (\[Cohen93, Alg. 1.5.1\]), with the
/// smallest non-residue as generator, so every caller gets the same root.
pub(crate) fn sqrt_mod(a: u64, p: u64) -> Option<u64> {
    sqrt_mod_with(a, p, |x, y| mul_mod(x, y, p), |x, e| pow_mod(x, e, p))
}

/// [`sqrt_mod`] with the field's own product and power (a Montgomery or
/// Barrett field passes its faster ones; both must work on plain residues).
#[inline]
pub(crate) fn sqrt_mod_with(
    a: u64,
    p: u64,
    mul: impl Fn(u64, u64) -> u64,
    pow: impl Fn(u64, u64) -> u64,
) -> Option<u64> {
    let a = a % p;
    if p == 2 || a == 0 {
        return Some(a);
    }
    if jacobi_u64(a, p) != 1 {
        return None;
    }
    let s = (p - 1).trailing_zeros();
    let q = (p - 1) >> s;
    if s == 1 {
        return Some(pow(a, (p + 1) / 4));
    }
    let mut z = 2u64;
    while jacobi_u64(z % p, p) != -1 {
        z += 1;
    }
    let mut m = s;
    let mut c = pow(z, q);
    let mut t = pow(a, q);
    let mut r = pow(a, q.div_ceil(2));
    while t != 1 {
        let mut i = 0u32;
        let mut t2 = t;
        while t2 != 1 {
            t2 = mul(t2, t2);
            i += 1;
            if i >= m {
                return None;
            }
        }
        let mut b = c;
        for _ in 0..(m - i - 1) {
            b = mul(b, b);
        }
        m = i;
        c = mul(b, b);
        t = mul(t, c);
        r = mul(r, b);
    }
    Some(r)
}

/// `a^e mod p` by square-and-multiply (`p ≥ 1`).
pub(crate) fn pow_mod(mut a: u64, mut e: u64, p: u64) -> u64 {
    let mut r = 1 % p;
    a %= p;
    while e > 0 {
        if e & 1 == 1 {
            r = mul_mod(r, a, p);
        }
        a = mul_mod(a, a, p);
        e >>= 1;
    }
    r
}

/// `a⁻¹ mod p` for `gcd(a, p) = 1`, `None` otherwise.
///
/// The one word-size modular inverse of the crate (extended Euclid; the
/// Bézout coefficients stay below `p` in absolute value, so `i64` suffices
/// for `p < 2^63`).
pub(crate) fn inv_mod(a: u64, p: u64) -> Option<u64> {
    inv_mod_or_gcd(a, p).ok()
}

/// [`inv_mod`], with `Err(g)`, `g = gcd(a, p) > 1`, when there is no
/// inverse (the factor the elliptic-curve method is after).
pub(crate) fn inv_mod_or_gcd(a: u64, p: u64) -> Result<u64, u64> {
    if let Ok(pi) = i64::try_from(p) {
        let (mut r0, mut r1) = (pi, (a % p) as i64);
        let (mut s0, mut s1) = (0i64, 1i64);
        while r1 != 0 {
            let q = r0 / r1;
            (r0, r1) = (r1, r0 - q * r1);
            (s0, s1) = (s1, s0 - q * s1);
        }
        return if r0 == 1 {
            Ok(s0.rem_euclid(pi) as u64)
        } else {
            Err(r0 as u64)
        };
    }
    let (mut r0, mut r1) = (i128::from(p), i128::from(a % p));
    let (mut s0, mut s1) = (0i128, 1i128);
    while r1 != 0 {
        let q = r0 / r1;
        (r0, r1) = (r1, r0 - q * r1);
        (s0, s1) = (s1, s0 - q * s1);
    }
    if r0 == 1 {
        Ok(s0.rem_euclid(i128::from(p)) as u64)
    } else {
        Err(r0 as u64)
    }
}

thread_local! {
    static WORD_PATHS: Cell<bool> = const { Cell::new(true) };
}

/// True unless a test on this thread has turned the word-size paths off.
#[inline]
pub(crate) fn word_paths_enabled() -> bool {
    WORD_PATHS.with(Cell::get)
}

/// Turns the word-size paths on or off for the current thread (tests
/// compare the outputs of both paths with it). Returns the old setting.
#[cfg(test)]
pub(crate) fn set_word_paths(on: bool) -> bool {
    WORD_PATHS.with(|c| c.replace(on))
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;

    #[test]
    fn overflow_poisons_and_exact_values_pass() {
        let big = Ck::new(i128::MAX);
        assert_eq!((big + 1).get(), None);
        assert_eq!((big + 1 - 5).get(), None);
        assert_eq!((Ck::new(3) * 4 - 2).get(), Some(10));
        assert_eq!((-Ck::new(i128::MIN)).get(), None);
        assert_eq!(Ck::new(12).exact_div(4), Some(3));
        assert_eq!(Ck::new(13).exact_div(4), None);
    }

    #[test]
    fn divisibility_by_huge_powers_is_exact() {
        assert!(divisible_pow(0, 3, 200));
        assert!(!divisible_pow(i128::MAX, 3, 200));
        assert!(divisible_pow(81, 3, 4));
        assert!(!divisible_pow(81, 3, 5));
    }

    #[test]
    fn inverses_modulo_primes() {
        for p in [3u64, 5, 7, 101, (1 << 61) - 1] {
            for a in [1u64, 2, 3, 4, 100, p - 1] {
                if a % p != 0 {
                    let i = inv_mod(a, p).unwrap();
                    assert_eq!(mul_mod(a % p, i, p), 1, "{a} mod {p}");
                }
            }
            assert_eq!(inv_mod(0, p), None);
        }
    }
}
