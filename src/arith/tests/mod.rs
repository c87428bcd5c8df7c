//! Unit tests of the arithmetic layer that reach its crate-private integer
//! roots (properties checked against exact integer arithmetic).

mod props;
