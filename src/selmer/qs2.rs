//! The group Q(S, 2) as an F2 vector space.
//!
//! For a finite set S of primes, Q(S, 2) is the subgroup of Q*/Q*^2 of
//! classes with even valuation outside S. Every class has exactly one
//! square-free integer representative d = ±∏ p (p ∈ S), so Q(S, 2) ≅
//! F2^(1+|S|) with basis {−1, p_1, …, p_n}: coordinate 0 is the sign,
//! coordinate i is v_{p_i}(d) mod 2 ([Silverman09, X.1]).

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive, Zero};

use super::f2::BitVec;
use crate::error::{Error, Result};
use crate::local::{split_valuation, Prime};

/// Q(S, 2) for an ordered set of primes S.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct QS2 {
    primes: Vec<Prime>,
}

impl QS2 {
    /// Q(S, 2) for the given primes (sorted and deduplicated here).
    pub fn new(mut primes: Vec<Prime>) -> Self {
        primes.sort();
        primes.dedup();
        QS2 { primes }
    }

    /// The primes of S, ascending.
    pub fn primes(&self) -> &[Prime] {
        &self.primes
    }

    /// dim_F2 Q(S, 2) = 1 + |S|.
    pub fn dim(&self) -> usize {
        1 + self.primes.len()
    }

    /// The basis element for coordinate i: −1 for i = 0, p_i otherwise.
    pub(crate) fn basis_element(&self, i: usize) -> Option<BigInt> {
        if i == 0 {
            Some(-BigInt::one())
        } else {
            self.primes.get(i - 1).map(|p| p.get().clone())
        }
    }

    /// The coordinate vector of a nonzero integer whose odd-valuation
    /// primes all lie in S.
    ///
    /// # Errors
    /// [`Error::Zero`] for 0; [`Error::InvalidArgument`] when a prime
    /// outside S divides n to an odd power.
    ///
    /// ```
    /// use isodescent::selmer::QS2;
    /// use isodescent::local::Prime;
    /// let q = QS2::new(vec![Prime::small(2).unwrap(), Prime::small(5).unwrap()]);
    /// assert_eq!(q.vector(&(-20).into()).unwrap().to_string(), "101");
    /// assert_eq!(q.integer(&q.vector(&(-20).into()).unwrap()), (-5).into());
    /// ```
    pub fn vector(&self, n: &BigInt) -> Result<BitVec> {
        if n.is_zero() {
            return Err(Error::Zero {
                what: "element of Q(S,2)".into(),
            });
        }
        match self.vector_word(n) {
            Some(v) => Ok(v),
            None => self.vector_general(n),
        }
    }

    /// [`QS2::vector`] on `BigInt`s (any size).
    fn vector_general(&self, n: &BigInt) -> Result<BitVec> {
        let mut v = BitVec::zeros(self.dim());
        v.set(0, n.is_negative());
        let mut rest = n.abs();
        for (i, p) in self.primes.iter().enumerate() {
            if let Some((e, u)) = split_valuation(&rest, p) {
                v.set(i + 1, e % 2 == 1);
                rest = u;
            }
        }
        if !rest.is_one() && !crate::arith::is_perfect_square(&rest) {
            return Err(Error::InvalidArgument {
                reason: format!("{n} is not in Q(S,2) for S = {{{}}}", self.primes_text()),
            });
        }
        Ok(v)
    }

    /// [`QS2::vector`] in machine words, when |n| < 2^128 and every prime
    /// of S fits in a `u64`; `None` otherwise, and also when the cofactor
    /// left after dividing out S is not 1 (the general route then decides
    /// between a square and an error).
    fn vector_word(&self, n: &BigInt) -> Option<BitVec> {
        let mut rest = n.magnitude().to_u128()?;
        if rest == 0 {
            return None;
        }
        let mut v = BitVec::zeros(self.dim());
        v.set(0, n.is_negative());
        for (i, p) in self.primes.iter().enumerate() {
            let p = u128::from(p.to_u64()?);
            let mut e = 0u32;
            while rest % p == 0 {
                rest /= p;
                e += 1;
            }
            v.set(i + 1, e % 2 == 1);
        }
        (rest == 1).then_some(v)
    }

    /// The coordinate vector of a nonzero rational (class of numerator ·
    /// denominator).
    ///
    /// # Errors
    /// As [`QS2::vector`].
    pub(crate) fn vector_rational(&self, x: &BigRational) -> Result<BitVec> {
        self.vector(&(x.numer() * x.denom()))
    }

    /// The square-free integer representative of a coordinate vector.
    pub fn integer(&self, v: &BitVec) -> BigInt {
        let mut d = BigInt::one();
        for i in v.ones() {
            if let Some(b) = self.basis_element(i) {
                d *= b;
            }
        }
        d
    }

    fn primes_text(&self) -> String {
        self.primes
            .iter()
            .map(|p| p.to_string())
            .collect::<Vec<_>>()
            .join(", ")
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;

    /// The word route of `vector` against the `BigInt` route: products
    /// of the primes of S (and a square outside S) with |n| near 2^63,
    /// 2^64 and 2^127, both signs; the word route must answer whenever
    /// |n| < 2^128 is a signed product of primes of S.
    #[test]
    fn word_and_general_coordinate_vectors_agree() {
        // 4294967311 and 2^64 − 59 are prime (sympy 1.14 isprime).
        let primes: Vec<Prime> = [2u64, 3, 5, 7, 4_294_967_311, 18_446_744_073_709_551_557]
            .iter()
            .map(|&p| Prime::small(p).unwrap())
            .collect();
        let q = QS2::new(primes.clone());
        let mut x = 0x2545_F491_4F6C_DD1Du64;
        let mut next = || {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            x
        };
        let mut word_answers = 0;
        for _ in 0..3000 {
            let mut n = BigInt::one();
            for p in &primes {
                for _ in 0..(next() % 4) {
                    if n.bits() + p.get().bits() <= 129 {
                        n *= p.get();
                    }
                }
            }
            if next() % 5 == 0 {
                n *= 121; // 11², a square outside S
            }
            if next() % 2 == 0 {
                n = -n;
            }
            let general = q.vector_general(&n);
            match q.vector_word(&n) {
                Some(v) => {
                    assert_eq!(Ok(v), general, "{n}");
                    word_answers += 1;
                }
                None => {
                    assert!(n.magnitude().bits() > 128 || n.magnitude() % 121u32 == 0u32.into())
                }
            }
            assert_eq!(q.vector(&n), general);
        }
        assert!(word_answers > 1000, "{word_answers}");
    }
}
