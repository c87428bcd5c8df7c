//! Exact signs of integer polynomials at binary64 points.
//!
//! Certified root brackets (heights, periods) test the sign of a cubic at
//! floating-point guesses. Every finite `f64` is a dyadic rational
//! `m·2^e` (IEEE 754-2008, §3.4), so the sign is that of an integer
//! expression: no fractions, no gcds.

use num_bigint::BigInt;
use num_traits::Zero;

/// The sign of `Σ c_i x^i` at a finite `f64` `x`, exactly, in integers:
/// `x = m·2^e` with `m`, `e` integers (IEEE 754 binary64 is dyadic), and
/// for `e = −k < 0` the sign is that of `Σ c_i m^i 2^{k(d − i)}` (the value
/// times `2^{kd} > 0`, `d` the degree). Same answer as evaluating at the
/// rational `x` without the fractions' gcds. `None` for a
/// non-finite `x`.
pub fn sign_at_f64(c: &[BigInt], x: f64) -> Option<std::cmp::Ordering> {
    if !x.is_finite() {
        return None;
    }
    if x == 0.0 {
        return Some(
            c.first()
                .map_or(std::cmp::Ordering::Equal, |c0| c0.cmp(&BigInt::zero())),
        );
    }
    let bits = x.to_bits();
    let exp_field = ((bits >> 52) & 0x7ff) as i64;
    let frac = bits & ((1u64 << 52) - 1);
    let (mant, exp) = if exp_field == 0 {
        (frac, -1074)
    } else {
        (frac | (1u64 << 52), exp_field - 1075)
    };
    let mut m = BigInt::from(mant);
    if bits >> 63 == 1 {
        m = -m;
    }
    let acc = if exp >= 0 {
        let x = m << (exp as usize);
        c.iter().rev().fold(BigInt::zero(), |acc, a| acc * &x + a)
    } else {
        // Horner in m with the powers of 2^k spread over the terms:
        // Σ c_i m^i 2^{k(d−i)} = ((c_d·m + c_{d−1}·2^k)·m + c_{d−2}·2^{2k})…
        let k = (-exp) as usize;
        let mut acc = BigInt::zero();
        for (j, a) in c.iter().rev().enumerate() {
            acc = acc * &m + (a << (k * j));
        }
        acc
    };
    Some(acc.cmp(&BigInt::zero()))
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_rational::BigRational;

    fn eval_exact(c: &[BigInt], x: &BigRational) -> BigRational {
        let mut acc = BigRational::zero();
        for a in c.iter().rev() {
            acc = acc * x + BigRational::from_integer(a.clone());
        }
        acc
    }

    #[test]
    fn the_dyadic_sign_agrees_with_rational_evaluation() {
        // Two exact evaluations of the same value (common practice: every
        // finite f64 is a dyadic rational, IEEE 754-2008 §3.4).
        let polys: Vec<Vec<BigInt>> = vec![
            vec![(-7).into(), 0.into(), 3.into(), 4.into()],
            vec![
                BigInt::from(10).pow(30),
                (-5).into(),
                (-(1i64 << 40)).into(),
                4.into(),
            ],
            vec![0.into(), 0.into(), 0.into(), 4.into()],
            vec![1.into(), 1.into()],
            vec![],
        ];
        let xs = [
            0.0,
            -0.0,
            1.5,
            -2.75,
            1e-300,
            -3e-310,
            5e-324,
            1e18,
            -1.234567E12,
            0.1,
            7.0e200,
            f64::MAX,
            -f64::MAX,
        ];
        for c in &polys {
            for &x in &xs {
                let q = BigRational::from_float(x).unwrap();
                let exact = eval_exact(c, &q).cmp(&BigRational::zero());
                assert_eq!(sign_at_f64(c, x), Some(exact), "c = {c:?}, x = {x:e}");
            }
            assert_eq!(sign_at_f64(c, f64::NAN), None);
            assert_eq!(sign_at_f64(c, f64::INFINITY), None);
        }
    }
}
