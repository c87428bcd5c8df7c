//! Layer 1: arithmetic over Z and Q.
//!
//! Primality, factorisation with an effort budget, square-free parts and
//! kernels, integer square roots.
//!
//! * `prime`: exact primality below `2^64`, Baillie–PSW above;
//! * `factor`: trial division, Pollard–Brent rho, ECM, the
//!   self-initialising quadratic sieve;
//! * `roots`: integer and rational square roots, perfect squares;
//! * `squarefree`: square-free parts and kernels;
//! * `real_roots`: certified isolation of the real roots of integer
//!   polynomials (Sturm sequences, bisection at dyadic points);
//! * `decimal`: decimal strings of certified numbers whose printed
//!   interval contains the certified one.
//! * `certified`: [`Certified`] reals, a midpoint with a proven error
//!   radius, shared by the analytic side and the heights.

pub(crate) mod certified;
pub(crate) mod decimal;
pub(crate) mod dyadic;
pub(crate) mod ecm;
pub(crate) mod ecm64;
pub(crate) mod factor;
pub(crate) mod meter;
pub(crate) mod mont;
pub(crate) mod prime;
pub(crate) mod real_roots;
pub(crate) mod rho;
pub(crate) mod roots;
pub(crate) mod siqs;
pub(crate) mod small;
pub(crate) mod squarefree;
pub(crate) mod word;

#[cfg(test)]
mod tests;

pub use certified::Certified;
pub(crate) use dyadic::sign_at_f64;
pub use factor::{factor, factor_u64, Factorization};
pub(crate) use prime::jacobi_big;
pub use prime::{is_prime, is_prime_u64};
pub(crate) use roots::{is_perfect_square, isqrt, rational_sqrt_exact, sqrt_exact};
pub use squarefree::{is_squarefree, squarefree_kernel, squarefree_part, squarefree_part_rational};
