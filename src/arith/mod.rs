//! Layer 1: arithmetic over Z and Q.
//!
//! Primality, factorisation with an effort budget, square-free parts and
//! kernels, integer square roots.

pub mod prime;

pub use prime::is_prime;
