//! Layer 2: the places of Q — p-adic valuations, Legendre/Jacobi/Kronecker
//! symbols, square roots modulo p^k, the square-class groups
//! Q_v*/Q_v*^2 with a fixed basis, and Hilbert symbols.
//!
//! # Canonical form
//! Every nonzero rational x is written x = p^v · u with u a p-adic unit
//! (numerator and denominator prime to p). Everything at an odd prime is
//! read off (v, u mod p); everything at 2 is read off (v, u mod 8); at the
//! real place only the sign matters.
//!
//! # The square-class basis
//! | place | dim | bit 0 | bit 1 | bit 2 |
//! |---|---|---|---|---|
//! | R | 1 | x < 0 | | |
//! | odd p | 2 | v odd | u non-residue mod p | |
//! | 2 | 3 | v odd | u ≡ 3 mod 4 | u ≡ ±3 mod 8 |
//!
//! So at 2 the basis is {2, −1, 5}, at odd p it is {p, n} with n the least
//! positive non-residue, and at R it is {−1} ([Serre73, II.3.3]).

pub(crate) mod hilbert;
pub(crate) mod known_primes;
pub(crate) mod kummer;
pub(crate) mod place;
pub(crate) mod sqrt;
pub(crate) mod square_class;
pub(crate) mod symbols;
pub(crate) mod valuation;

pub use hilbert::{hilbert_symbol, hilbert_symbol_int};
pub use place::{Place, Prime};
pub use square_class::{is_square_in, square_class};
pub use symbols::legendre;
pub use valuation::valuation;

pub(crate) use sqrt::{sqrt_mod_prime, sqrt_mod_prime_power};
pub(crate) use square_class::{class_dimension, class_representatives, square_class_int};
#[cfg(test)]
pub(crate) use symbols::jacobi;
pub(crate) use symbols::{kronecker, legendre_u64};
pub(crate) use valuation::{split_valuation, valuation_rational};

#[cfg(test)]
mod tests;
