//! Layer 4: rational conics.
pub(crate) mod lattice;
pub mod legendre;
pub mod param;
pub mod ternary;
pub use legendre::{
    insoluble_places, solve_diagonal, solve_diagonal_rational, solve_diagonal_with_primes,
    ConicSolution,
};
pub use param::{parametrise, parametrise_diagonal, ConicParametrisation};
pub use ternary::{solve_ternary, TernaryForm};
