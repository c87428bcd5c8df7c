//! The group Q(S, 2) as an F2 vector space.
//!
//! For a finite set S of primes, Q(S, 2) is the subgroup of Q*/Q*^2 of
//! classes with even valuation outside S. Every class has exactly one
//! square-free integer representative d = ±∏ p (p ∈ S), so Q(S, 2) ≅
//! F2^(1+|S|) with basis {−1, p_1, …, p_n}: coordinate 0 is the sign,
//! coordinate i is v_{p_i}(d) mod 2 ([Silverman09, X.1]).

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};

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
    pub fn basis_element(&self, i: usize) -> Option<BigInt> {
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

    /// The coordinate vector of a nonzero rational (class of numerator ·
    /// denominator).
    ///
    /// # Errors
    /// As [`QS2::vector`].
    pub fn vector_rational(&self, x: &BigRational) -> Result<BitVec> {
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
