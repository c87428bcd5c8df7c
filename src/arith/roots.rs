//! Integer and rational square roots, perfect squares and perfect powers.

use crate::error::{Error, Result};
use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};

/// `⌊√n⌋` for `n ≥ 0`.
///
/// Method: Newton's iteration on integers (as implemented by
/// `num-integer`'s `Roots`), which converges to `⌊√n⌋` from above
/// \[Cohen93, Alg. 1.7.1\].
///
/// # Errors
/// [`Error::NotPositive`] for `n < 0` (the message names the value).
///
/// Cost: `O(log log n)` big-integer divisions.
///
/// Example: `isqrt(99) = 9`, `isqrt(100) = 10`, `isqrt(0) = 0`.
pub fn isqrt(n: &BigInt) -> Result<BigInt> {
    if n.is_negative() {
        return Err(Error::NotPositive {
            what: "argument of the integer square root (must be >= 0)".into(),
            value: n.clone(),
        });
    }
    Ok(n.sqrt())
}

/// Quadratic-residue masks: bit `r` is set iff `r` is a square mod `m`.
fn square_mask(m: u64) -> u128 {
    let mut mask = 0u128;
    for x in 0..m {
        mask |= 1u128 << ((x * x) % m);
    }
    mask
}

/// True iff `n` cannot be a square because of its residues modulo 64, 63,
/// 65 and 11 (common practice; the four moduli pass about 1 in 167 non-squares).
fn rejected_by_residues(n: &BigInt) -> bool {
    let mag = n.magnitude();
    let low = mag.iter_u64_digits().next().unwrap_or(0);
    if square_mask(64) >> (low % 64) & 1 == 0 {
        return true;
    }
    // 63·65·11 = 45045; one reduction, then the three tests.
    let r = super::prime::rem_u64(mag, 45045);
    square_mask(63) >> (r % 63) & 1 == 0
        || square_mask(65) >> (r % 65) & 1 == 0
        || square_mask(11) >> (r % 11) & 1 == 0
}

/// True iff `n = m²` for an integer `m` (negative `n` never is; 0 is).
///
/// Method: reject by the quadratic residues modulo 64, 63, 65 and 11 first
/// (a non-square survives all four with probability about 0.6%), then
/// compare `⌊√n⌋²` with `n`.
///
/// Example: `is_perfect_square(144)` is true, `is_perfect_square(145)` and
/// `is_perfect_square(−4)` are false.
pub fn is_perfect_square(n: &BigInt) -> bool {
    sqrt_exact(n).is_some()
}

/// `Some(m)` with `m ≥ 0` and `m² = n` when `n` is a perfect square, else
/// `None` (so `None` for every negative `n`).
///
/// Method as in [`is_perfect_square`].
///
/// Example: `sqrt_exact(169) = Some(13)`, `sqrt_exact(170) = None`.
pub fn sqrt_exact(n: &BigInt) -> Option<BigInt> {
    if n.is_negative() {
        return None;
    }
    if n.is_zero() {
        return Some(BigInt::zero());
    }
    if rejected_by_residues(n) {
        return None;
    }
    let r = n.sqrt();
    if &r * &r == *n {
        Some(r)
    } else {
        None
    }
}

/// `Some(y)` with `y ≥ 0` and `y² = x` when the rational `x` is a square in
/// `Q`, else `None`.
///
/// Method: with `x = a/b` in lowest terms and `b > 0`, `x` is a square iff
/// both `a` and `b` are squares (unique factorisation), and then
/// `√x = √a/√b`. The input is reduced first, so an unreduced `BigRational`
/// built with `new_raw` is handled correctly.
///
/// Input cases: `x < 0` gives `None`; `x = 0` gives `Some(0)`; a zero
/// denominator (possible only through `new_raw`) gives `None`.
///
/// Example: `rational_sqrt_exact(9/4) = Some(3/2)`,
/// `rational_sqrt_exact(2/9) = None`.
pub fn rational_sqrt_exact(x: &BigRational) -> Option<BigRational> {
    let (mut a, mut b) = (x.numer().clone(), x.denom().clone());
    if b.is_zero() {
        return None;
    }
    if b.is_negative() {
        a = -a;
        b = -b;
    }
    let g = a.gcd(&b);
    if !g.is_zero() && !g.is_one() {
        a /= &g;
        b /= &g;
    }
    let ra = sqrt_exact(&a)?;
    let rb = sqrt_exact(&b)?;
    Some(BigRational::new_raw(ra, rb))
}

/// `Some(r)` with `r^k = n` when `n ≥ 0` is a perfect `k`-th power, `k ≥ 1`.
pub(crate) fn exact_root(n: &BigInt, k: u32) -> Option<BigInt> {
    if n.is_negative() || k == 0 {
        return None;
    }
    if k == 1 {
        return Some(n.clone());
    }
    if k == 2 {
        return sqrt_exact(n);
    }
    let r = n.nth_root(k);
    if num_traits::pow(r.clone(), k as usize) == *n {
        Some(r)
    } else {
        None
    }
}

/// Perfect powers:
/// `Some((r, k))` with `r^k = n`, `k ≥ 2` the largest exponent
/// whose prime factors are all `≤ max_exp`; else `None`. Tries each prime
/// exponent `k ≤ min(max_exp, log2 n)`, taking roots repeatedly. With
/// `max_exp = u32::MAX` this finds the largest `k`; a smaller `max_exp`
/// is enough when every prime factor of `n` exceeds `2^(bits(n)/max_exp)`
/// (e.g. after trial division).
pub(crate) fn perfect_power_up_to(n: &BigInt, max_exp: u32) -> Option<(BigInt, u32)> {
    if n <= &BigInt::one() {
        return None;
    }
    let bits = n.bits();
    let mut base = n.clone();
    let mut exp = 1u32;
    let mut k = 2u32;
    while (k as u64) <= bits && k <= max_exp {
        if is_small_prime(k) {
            while base.bits() >= k as u64 {
                match exact_root(&base, k) {
                    Some(r) if r > BigInt::one() => {
                        base = r;
                        exp *= k;
                    }
                    _ => break,
                }
            }
        }
        k += 1;
        if (k as u64) > base.bits() {
            break;
        }
    }
    if exp > 1 {
        Some((base, exp))
    } else {
        None
    }
}

fn is_small_prime(k: u32) -> bool {
    k >= 2 && (2..k).take_while(|d| d * d <= k).all(|d| k % d != 0)
}

/// `⌊√n⌋` for a `u64` (through [`super::word::isqrt_u128`]).
pub(crate) fn isqrt_u64(n: u64) -> u64 {
    super::word::isqrt_u128(u128::from(n)) as u64
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_residue_filter_never_rejects_a_square() {
        for m in 0u64..5000 {
            assert!(!rejected_by_residues(&BigInt::from(m * m)), "{m}^2");
        }
    }

    #[test]
    fn perfect_powers_report_the_largest_exponent() {
        assert_eq!(
            perfect_power_up_to(&BigInt::from(64), u32::MAX),
            Some((BigInt::from(2), 6))
        );
        assert_eq!(
            perfect_power_up_to(&BigInt::from(3u64.pow(10) * 7u64.pow(5)), u32::MAX),
            Some((BigInt::from(63), 5))
        );
        assert_eq!(perfect_power_up_to(&BigInt::from(72), u32::MAX), None);
        assert_eq!(isqrt_u64(u64::MAX), 4294967295);
    }
}
