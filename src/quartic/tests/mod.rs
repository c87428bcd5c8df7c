//! Unit tests of the quartic layer that reach its crate-private pieces:
//! the search entry points and the congruence sieve, the local tests at
//! one kind of place (R, odd p, 2) and the places a local image needs.

mod local;
mod local_image;
mod local_oracle;
mod real_even;
mod search;
