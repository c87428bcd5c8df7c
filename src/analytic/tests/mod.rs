//! Unit tests of the analytic layer that reach the crate-private series
//! (`Series`) and the evidence accessors of the root number and period.

mod values;
