//! Square-free parts and kernels (radicals).

use super::factor::factor;
use crate::budget::Budget;
use crate::error::{Error, Result};
use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};

/// The square-free part `s` of a nonzero integer: `n = s·m²` with `s`
/// square-free and of the sign of `n`.
///
/// Statement: every nonzero `n` is `s·m²` for exactly one square-free `s`
/// with the sign of `n` (unique factorisation): `s = sign(n)·∏ p` over the
/// primes with odd exponent in `n`. So `s` represents the class of `n` in
/// `Q*/Q*²`.
///
/// # Errors
/// [`Error::Zero`] for `n = 0`; [`Error::FactorBudgetExhausted`]
/// when factoring `n` runs out of budget (see [`factor`] for the units).
///
/// Example: `squarefree_part(−72) = −2` (`−72 = −2·6²`),
/// `squarefree_part(1) = 1`.
pub fn squarefree_part(n: &BigInt, budget: &mut Budget) -> Result<BigInt> {
    if n.is_zero() {
        return Err(Error::Zero {
            what: "argument of the square-free part".into(),
        });
    }
    let f = factor(n, budget)?;
    let mut s = BigInt::from(f.sign());
    for (p, e) in f.factors() {
        if e % 2 == 1 {
            s *= p;
        }
    }
    Ok(s)
}

/// The square-free integer in the class of the nonzero rational `x` in
/// `Q*/Q*²`.
///
/// Statement: for `x = a/b`, `x = ab/b²`, so `x` and the integer `ab` have
/// the same class, and the answer is `squarefree_part(a·b)`. (The factors
/// of `a` and `b` are found separately, so the cost is that of factoring
/// `a` and `b`, not their product.)
///
/// # Errors
/// [`Error::Zero`] for `x = 0`; [`Error::ZeroDenominator`] for a
/// zero denominator (only possible through `BigRational::new_raw`);
/// [`Error::FactorBudgetExhausted`] as in [`squarefree_part`].
///
/// Example: `squarefree_part_rational(3/8) = 6` (`3/8 = 6/16`),
/// `squarefree_part_rational(−1/4) = −1`.
pub fn squarefree_part_rational(x: &BigRational, budget: &mut Budget) -> Result<BigInt> {
    let (a, b) = (x.numer(), x.denom());
    if b.is_zero() {
        return Err(Error::ZeroDenominator {
            context: "argument of the rational square-free part".into(),
        });
    }
    if a.is_zero() {
        return Err(Error::Zero {
            what: "argument of the rational square-free part".into(),
        });
    }
    let sa = squarefree_part(a, budget)?;
    let sb = squarefree_part(b, budget)?;
    // sa·sb is a square times the square-free part: divide out gcd².
    let g = sa.gcd(&sb);
    Ok((&sa / &g) * (&sb / &g))
}

/// The square-free kernel (radical) `rad(n) = ∏_{p | n} p > 0` of a
/// nonzero integer.
///
/// # Errors
/// [`Error::Zero`] for `n = 0`; [`Error::FactorBudgetExhausted`]
/// as in [`squarefree_part`].
///
/// Example: `squarefree_kernel(−72) = 6`, `squarefree_kernel(±1) = 1`.
pub fn squarefree_kernel(n: &BigInt, budget: &mut Budget) -> Result<BigInt> {
    if n.is_zero() {
        return Err(Error::Zero {
            what: "argument of the square-free kernel".into(),
        });
    }
    let f = factor(n, budget)?;
    Ok(f.primes().fold(BigInt::one(), |acc, p| acc * p))
}

/// True iff the nonzero integer `n` is square-free (`±1` are).
///
/// # Errors
/// as in [`squarefree_part`].
///
/// Example: `is_squarefree(30)` is true, `is_squarefree(−12)` false.
pub fn is_squarefree(n: &BigInt, budget: &mut Budget) -> Result<bool> {
    Ok(squarefree_part(n, budget)?.abs() == n.abs())
}
