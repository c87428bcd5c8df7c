//! Unit tests of the local layer (sympy vectors, Hilbert reciprocity) that
//! reach its crate-private symbols, square classes and modular roots.

mod hilbert_reciprocity;
mod layer;
