//! # isodescent
//!
//! Mordell–Weil information for elliptic curves over Q that have a rational
//! point of order 2, by descent via 2-isogeny: exact Selmer groups from local
//! solvability at every place, a sieved search for global points, and
//! certified lower and upper bounds for the rank, with evidence a reader can
//! re-check.
//!
//! # Layers
//!
//! The modules are layers, lowest first; each uses only the ones in the
//! rows above its own (rustdoc lists the modules alphabetically below,
//! this table is the order that matters).
//!
//! | layer | module | holds |
//! |---|---|---|
//! | — | `error`, [`budget`] | the one error enum [`Error`] (with `Result`; the module is crate-private, both live at the crate root); deterministic effort budgets |
//! | 1 | [`arith`] | primality, factoring, square-free parts, integer roots, certified reals |
//! | 2 | [`local`] | places, valuations, symbols, modular square roots, square classes, Hilbert symbols |
//! | 3 | [`curve`] | Weierstrass models, points, 2-torsion, the checked `ReducedModel`, 2-isogenies, rational 3-isogenies (Vélu), torsion, Tate's algorithm |
//! | 3a | [`analytic`] | a_p and a_n, root number, real period, certified L-values, the BSD ledger |
//! | 3b | [`height`] | canonical heights, the height pairing, regulators, LLL, lower bounds, saturation |
//! | 3c | [`heegner`] | Heegner points on curves of analytic rank one: the congruent-number twists and the curve's own level |
//! | 4 | [`conic`] | Legendre's equation, zeros and parametrisations of conics |
//! | 4b | [`cubic`] | plane cubics `F(u, v) = c·w³` over Q_p, Eisenstein integers, quadratic fields (class groups, units) |
//! | 5 | [`quartic`] | binary quartics, local solubility at every place, local images, point search |
//! | 6 | [`selmer`] | F2 linear algebra, Q(S,2), Selmer groups from local images, local-image sizes |
//! | 7 | [`second`] | the second descent: lifting pairing, class lifts, 4-coverings, twist obstructions |
//! | 8 | [`descent`] | both sides of each 2-isogeny, rank bounds, the typed report, its verification |
//! | 8b | [`descent3`] | descent via 3-isogeny on y² = x³ + k and on any curve with a rational 3-isogeny (y² = x³ + D(αx + β)²): Selmer groups over F3, rank bounds |
//! | 9 | [`output`] | reports as text and JSON, input lines as curves, batches |
//! | 10 | [`family`] | twists, congruent numbers, boxes; ordered, parallel, sharded scans |
//!
//! Layers 3a and 3b sit side by side: neither uses the other; so do 4 and
//! 4b. Layer 3c sits above both 3a and 3b, and 8b above 8 (its
//! `descend_by_isogeny` hands a curve with a point of order 2 to the
//! 2-isogeny descent). `tests/layers.rs` checks the imports against this
//! table. The guides in `docs/` are included in, or cited from, the
//! rustdoc of the module they explain; docs/references.md lists the literature cited as
//! `[Author00]`, and docs/performance.md the measured figures with the
//! commands that produced them.
//!
//! # Example
//!
//! ```
//! use isodescent::{descend, Curve, DescentOptions};
//!
//! fn main() -> Result<(), isodescent::Error> {
//!     let e: Curve = "y^2 = x^3 - 36x".parse()?; // or "0 0 0 -36 0"
//!     let report = descend(&e, &DescentOptions::default())?;
//!     assert_eq!((report.rank_bounds().lower(), report.rank_bounds().upper()), (1, 1));
//!     for p in report.points() {
//!         assert!(e.contains(p)); // points come back on your model
//!     }
//!     println!("{report}");
//!     Ok(())
//! }
//! ```
//!
//! The list of references below is `docs/references.md`, included verbatim.
#![doc = include_str!("../docs/references.md")]
#![forbid(unsafe_code)]
#![warn(missing_docs, clippy::unwrap_used)]
#![cfg_attr(test, allow(clippy::unwrap_used))]

// Cross-cutting: the error enum and deterministic effort budgets.
pub mod budget;
pub(crate) mod error;

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

// Layer 4b: plane cubics F(u, v) = c·w³ over Q_p, Eisenstein integers.
pub mod cubic;

// Layer 5: quartic homogeneous spaces — local solvability, local images, point search.
pub mod quartic;

// Layer 6: F2 vector spaces, Q(S,2), Selmer groups, local-image counts.
pub mod selmer;

// Layer 7: the second descent — 4-coverings, the lifting pairing, twist obstructions.
pub mod second;

// Layer 8: the descent — both sides of each 2-isogeny, rank bounds, reports.
pub mod descent;

// Layer 8b: descent via 3-isogeny on y^2 = x^3 + k and on y^2 = x^3 + D(ax + b)^2 (Selmer groups over F3, rank bounds).
pub mod descent3;

// Layer 9: the edge — reports as text and JSON, input lines as curves.
pub mod output;

// Layer 10: families of curves — twists, congruent numbers, boxes; streaming, parallel, sharded scans.
pub mod family;

pub use budget::Budget;
pub use curve::{Curve, Point};
pub use descent::{
    descend, Completion, DescentOptions, DescentReport, Generators, RankBounds, RankProof,
};
pub use error::{Error, Result};
