//! Layer 10: families of curves — quadratic twists, the congruent-number
//! curves, boxes of y² = x³ + a x² + b x — and scans of the descent over
//! them that stream, run on all cores, split into shards and resume.
//!
//! # Pieces
//! * [`Family`] enumerates the members of a family in a fixed order,
//!   lazily ([`Family::members`]); the member's index in that order is the
//!   key everything else uses.
//! * [`scan()`](fn@scan) runs [`crate::output::json_for_line`] on each member and
//!   hands the [`ScanRecord`]s back in family order, with memory bounded
//!   independently of the family size; with the `parallel` feature on a
//!   rayon pool (see `scan` for how order is kept).
//! * [`Shard`] `k/N` is the members with index ≡ k − 1 (mod N).
//! * `records`: the output line format, [`Tally`] (summary counts and
//!   the cumulative decided share), [`read_for_resume`] (continue an
//!   interrupted output file without losing or duplicating a line) and
//!   [`merge_shards`] (shard files → one file in family order, with a
//!   check that every member is present exactly once).
//!
//! # Example
//! The congruent-number curves for square-free n ≤ 10 (n = 1, 2, 3, 5, 6,
//! 7, 10): n = 5, 6, 7 are congruent numbers, so those curves have rank 1;
//! 1, 2, 3 and 10 are not, rank 0 [Kob93, I.1 and I.9].
//! ```
//! use isodescent::descent::DescentOptions;
//! use isodescent::family::{scan, Family, RecordLine, ScanOptions};
//! let fam = Family::congruent_numbers(1, 10).unwrap();
//! let records: Vec<_> = scan(fam.members(), &DescentOptions::default(), &ScanOptions::default())
//!     .unwrap()
//!     .map(|r| RecordLine::parse(&r.to_line()).unwrap())
//!     .collect();
//! let ranks: Vec<_> = records.iter().map(|r| (r.parameter.clone(), r.rank_lower)).collect();
//! assert_eq!(ranks[3], ("n=5".to_string(), Some(1)));
//! assert_eq!(ranks[0], ("n=1".to_string(), Some(0)));
//! ```
//!
//! ---
//!
//! The guide below is `docs/families.md`, included verbatim.
#![doc = include_str!("../../docs/families.md")]

pub(crate) mod members;
pub(crate) mod records;
pub(crate) mod scan;
mod word_sweep;

pub use members::{is_squarefree_u64, twist_by, Family, Member, Members, Parameter};
pub use records::{
    congruent_selmer_limit_law, merge_shards, read_for_resume, IndexList, LawComparison,
    MergeReport, RecordLine, ResumeState, Tally,
};
pub use scan::{scan, scan_member, Scan, ScanOptions, ScanRecord, Shard};
