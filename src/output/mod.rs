//! Layer 9: the edge where reports become text and JSON, and where input
//! lines become curves. Nothing below this layer writes or reads text
//! other than a curve's equation.
//!
//! * `text`: the report for a person — the answer first (equation, rank
//!   with what proves each end, points, torsion), then per isogeny the
//!   derivation of the bounds, then local data, then evidence.
//! * `json`: the one JSON schema (`docs/report.schema.json`), written with
//!   serde; every line carries `format_version`.
//! * `batch`: one curve per input line, one JSON line out; invalid bytes
//!   and panics become that line's error and the batch goes on.
//!
//! ---
//!
//! The guide below is `docs/report_format.md`, included verbatim.
#![doc = include_str!("../../docs/report_format.md")]

pub(crate) mod batch;
pub(crate) mod json;
pub(crate) mod record;
pub(crate) mod text;

use std::fmt;

use crate::descent::DescentReport;

pub use batch::{json_for_bytes, json_for_line, json_for_line_with};
pub use json::{error_line, report_line, FORMAT_VERSION, MAX_ECHOED_INPUT_BYTES};
pub use record::{RecordPoint, RecordTorsion, ReportRecord};

/// How much evidence a report shows.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash)]
#[non_exhaustive]
pub enum Detail {
    /// One summary line per side: spaces searched, points found, how many
    /// 4-coverings are insoluble and where. Spaces with points are shown
    /// with their equations.
    #[default]
    Summary,
    /// Everything: local images at every place, every space searched with
    /// its equation, every 4-covering with the place where it is insoluble
    /// (or, for a twist with no quartic model, its conic and the place).
    Full,
}

/// A report with a chosen [`Detail`], for `{}` formatting.
pub struct ReportText<'a> {
    report: &'a DescentReport,
    detail: Detail,
}

impl DescentReport {
    /// The text report with the given detail (`{report}` is the summary).
    pub fn text(&self, detail: Detail) -> ReportText<'_> {
        ReportText {
            report: self,
            detail,
        }
    }
}

impl fmt::Display for ReportText<'_> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        text::write_report(f, self.report, self.detail)
    }
}

impl fmt::Display for DescentReport {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        text::write_report(f, self, Detail::Summary)
    }
}
