//! Certified primes and the places of Q.

use std::fmt;

use num_bigint::BigInt;
use num_traits::ToPrimitive;

use crate::arith::is_prime;
use crate::error::{Error, Result};

/// A positive rational prime, certified when constructed.
///
/// Invariant: the wrapped integer passes [`is_prime`]. Values that are not
/// prime cannot be built through the public API.
#[derive(Debug, Clone, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Prime(BigInt);

impl Prime {
    /// Certifies `p` as a prime.
    ///
    /// # Errors
    /// [`Error::NotPrime`] when `p` is not a positive prime.
    ///
    /// ```
    /// use isodescent::local::Prime;
    /// assert!(Prime::new(7.into()).is_ok());
    /// assert!(Prime::new(9.into()).is_err());
    /// ```
    pub fn new(p: BigInt) -> Result<Prime> {
        if is_prime(&p) {
            Ok(Prime(p))
        } else {
            Err(Error::NotPrime { value: p })
        }
    }

    /// Wraps an integer the caller has already certified as prime (for
    /// example a prime factor returned by [`crate::arith::factor`]).
    /// Crate-internal: the public API only builds primes through a test.
    pub(crate) fn certified(p: BigInt) -> Prime {
        debug_assert!(is_prime(&p));
        Prime(p)
    }

    /// The prime 2.
    pub fn two() -> Prime {
        Prime(BigInt::from(2))
    }

    /// Certifies a machine-word `p`.
    ///
    /// # Errors
    /// [`Error::NotPrime`] when `p` is not prime.
    pub fn small(p: u64) -> Result<Prime> {
        Prime::new(BigInt::from(p))
    }

    /// The prime as an integer.
    pub fn get(&self) -> &BigInt {
        &self.0
    }

    /// The prime as a `u64`, when it fits.
    pub fn to_u64(&self) -> Option<u64> {
        self.0.to_u64()
    }

    /// True for p = 2.
    pub fn is_two(&self) -> bool {
        self.to_u64() == Some(2)
    }
}

impl fmt::Display for Prime {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.0)
    }
}

/// A place of Q: the real place or a finite prime.
///
/// Ordered with the real place first, then primes ascending.
#[derive(Debug, Clone, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Place {
    /// The archimedean place, completion R.
    Real,
    /// The p-adic place, completion Q_p.
    Finite(Prime),
}

impl Place {
    /// The finite place at `p`.
    pub fn prime(p: Prime) -> Place {
        Place::Finite(p)
    }
}

impl fmt::Display for Place {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Place::Real => write!(f, "R"),
            Place::Finite(p) => write!(f, "{p}"),
        }
    }
}
