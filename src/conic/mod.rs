//! Layer 4: rational conics.
pub mod legendre;
pub(crate) mod lattice;
pub use legendre::{insoluble_places, solve_diagonal, solve_diagonal_rational, solve_diagonal_with_primes, ConicSolution};
