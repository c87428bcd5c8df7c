//! Unit tests of the quartic layer that reach its crate-private search
//! entry points and the congruence sieve.

mod search;
