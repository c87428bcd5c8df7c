//! # isodescent
//!
//! Mordell–Weil information for elliptic curves over Q that have a rational
//! point of order 2, by descent via 2-isogeny: exact Selmer groups from local
//! solvability at every place, a sieved search for global points, and
//! certified lower and upper bounds for the rank, with evidence a reader can
//! re-check.
//!
//! The modules are layers; each uses only the ones above it in this list.
//!
//! ```
//! use isodescent::{descend, Curve, DescentOptions};
//!
//! fn main() -> Result<(), isodescent::Error> {
//!     let e: Curve = "y^2 = x^3 - 36x".parse()?; // or "0 0 0 -36 0"
//!     let report = descend(&e, &DescentOptions::default())?;
//!     assert_eq!((report.rank_lower(), report.rank_upper()), (1, 1));
//!     for p in report.points() {
//!         assert!(e.contains(p)); // points come back on your model
//!     }
//!     println!("{report}");
//!     Ok(())
//! }
//! ```
#![forbid(unsafe_code)]
#![warn(missing_docs, clippy::unwrap_used)]
#![cfg_attr(test, allow(clippy::unwrap_used))]

// Cross-cutting: the error enum and deterministic effort budgets.
pub mod budget;
pub mod error;

// The layers, lowest first; each uses only the ones above it here.

// Layer 1: integers and rationals — primality, factoring, square-free parts, roots.
pub mod arith;

// Layer 2: the places of Q — valuations, symbols, square classes, Hilbert symbols.
pub mod local;

// Layer 3: Weierstrass models, points, 2-torsion, 2-isogenies, torsion, Tate's algorithm.
pub mod curve;

// Layer 3a: the analytic side — a_n, root number, period, certified L-values, BSD ledger.
pub mod analytic;

// Layer 3b: canonical heights, the height pairing, regulators, saturation.
pub mod height;

// Layer 3c: Heegner points for curves of analytic rank one (above 3a and 3b).
pub mod heegner;

// Layer 4: rational conics — Legendre's equation, parametrisation.
pub mod conic;

// Layer 5: quartic homogeneous spaces — local solvability, point search, 4-coverings.
pub mod quartic;

// Layer 6: F2 vector spaces, Q(S,2), Selmer groups, local-image counts.
pub mod selmer;

// Layer 7: the descent — both sides of each 2-isogeny, rank bounds, reports.
pub mod descent;

// Layer 8: the edge — reports as text and JSON, input lines as curves.
pub mod output;

// Layer 9: families of curves — twists, congruent numbers, boxes; streaming, parallel, sharded scans.
pub mod family;

pub use budget::Budget;
pub use curve::{Curve, Point};
pub use descent::{descend, Completion, DescentOptions, DescentReport, RankBounds, RankProof};
pub use error::{Error, Result};
pub use local::{Place, Prime};
pub use output::Detail;
