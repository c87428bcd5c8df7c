//! Unit tests of the curve layer that reach crate-private accessors
//! (the b- and c-invariants of a rational model, the short model) or
//! spend a budget directly.

mod basics;
mod budgets;
