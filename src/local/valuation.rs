//! p-adic valuations and unit parts.
//!
//! Every nonzero integer is n = p^v · u with p ∤ u; v = v_p(n) and u is the
//! unit part. For a rational x = r/s, v_p(x) = v_p(r) − v_p(s).

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{ToPrimitive, Zero};

use super::place::Prime;

/// v_p(n), or `None` for n = 0 (v_p(0) = +∞).
///
/// Cost: O(v) divisions, with a machine-word fast path.
///
/// ```
/// use isodescent::local::{valuation, Prime};
/// assert_eq!(valuation(&72.into(), &Prime::small(2).unwrap()), Some(3));
/// assert_eq!(valuation(&0.into(), &Prime::small(2).unwrap()), None);
/// ```
pub fn valuation(n: &BigInt, p: &Prime) -> Option<u64> {
    split_valuation(n, p).map(|(v, _)| v)
}

/// (v_p(n), u) with n = p^v · u and p ∤ u, or `None` for n = 0.
pub fn split_valuation(n: &BigInt, p: &Prime) -> Option<(u64, BigInt)> {
    if n.is_zero() {
        return None;
    }
    if p.is_two() {
        let v = n.trailing_zeros().unwrap_or(0);
        return Some((v, n >> v));
    }
    if let (Some(small), Some(q)) = (n.to_i128(), p.to_u64()) {
        let q = q as i128;
        let mut m = small;
        let mut v = 0u64;
        while m % q == 0 {
            m /= q;
            v += 1;
        }
        return Some((v, BigInt::from(m)));
    }
    let mut m = n.clone();
    let mut v = 0u64;
    loop {
        let (quo, rem) = m.div_rem(p.get());
        if !rem.is_zero() {
            return Some((v, m));
        }
        m = quo;
        v += 1;
    }
}

/// v_p(x) for a rational x, or `None` for x = 0.
pub fn valuation_rational(x: &BigRational, p: &Prime) -> Option<i64> {
    let vn = valuation(x.numer(), p)?;
    let vd = valuation(x.denom(), p)?;
    Some(vn as i64 - vd as i64)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn valuations_split_off_the_right_power() {
        let p = Prime::small(3).unwrap();
        assert_eq!(
            split_valuation(&BigInt::from(-162), &p),
            Some((4, BigInt::from(-2)))
        );
        let big = BigInt::from(3).pow(200) * 7;
        assert_eq!(split_valuation(&big, &p), Some((200, BigInt::from(7))));
        let x = BigRational::new(BigInt::from(5), BigInt::from(18));
        assert_eq!(valuation_rational(&x, &p), Some(-2));
    }
}
