//! Unit tests of the conic layer that reach its crate-private
//! parametrisations and general ternary forms.

mod parametrisation;
