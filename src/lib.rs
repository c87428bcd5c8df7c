//! # isodescent
//!
//! Mordell–Weil information for elliptic curves over Q that have a rational
//! point of order 2, by descent via 2-isogeny: exact Selmer groups from local
//! solvability at every place, a sieved search for global points, and
//! certified lower and upper bounds for the rank, with evidence a reader can
//! re-check.
//!
//! The modules are layers; each uses only the ones above it in this list.
#![forbid(unsafe_code)]
#![warn(missing_docs, clippy::unwrap_used)]
#![cfg_attr(test, allow(clippy::unwrap_used))]

pub mod budget; // deterministic effort budgets (cross-cutting)
pub mod error; // the crate's one error enum (cross-cutting)

pub mod arith; // layer 1: integers and rationals — factoring, square-free parts, roots
pub mod local; // layer 2: p-adic and real places — valuations, symbols, square classes, Hilbert symbols
pub mod curve; // layer 3: Weierstrass models, points, 2-torsion, 2-isogenies, torsion
pub mod conic; // layer 4: rational conics — Legendre's equation, parametrisation
pub mod quartic; // layer 4: quartic homogeneous spaces — local solvability, point search
pub mod selmer; // layer 5: F2 vector spaces, Q(S,2), Selmer groups
pub mod descent; // layer 6: exact-sequence bookkeeping, rank bounds, reports
pub mod family; // layer 7: families of curves — twists, congruent numbers, boxes; streaming, parallel, sharded scans

pub use budget::Budget;
pub use error::{Error, Result};
