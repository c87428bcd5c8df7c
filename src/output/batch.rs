//! Line-oriented batch processing: one curve per line in, one JSON object
//! per curve out. A bad line, a line that is not valid UTF-8, or a panic
//! inside one curve's computation becomes that line's error object; the
//! batch always goes on.
//!
//! # Which lines are skipped
//! A line is skipped when, after removing white space, it is empty or
//! starts with `#`. White space is Unicode's (`char::is_whitespace`), so a
//! line holding only line or paragraph separators (U+2028, U+2029), tabs or
//! no-break spaces is blank and skipped, exactly like an empty line. Every
//! other line gets exactly one output line.

use std::panic::{catch_unwind, AssertUnwindSafe};

use super::json::{error_line, report_line};
use super::Detail;
use crate::curve::Curve;
use crate::descent::{descend, DescentOptions};
use num_traits::Zero;

/// What one raw input line is.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum LineKind<'a> {
    /// Blank or a `#` comment: no output.
    Skipped,
    /// A line to process.
    Text(&'a str),
    /// Not valid UTF-8: its lossy decoding and the error message.
    Invalid {
        /// The line with invalid bytes replaced by U+FFFD.
        lossy: String,
        /// What is wrong, with the byte offset.
        reason: String,
    },
}

/// Classifies a raw line (without its line terminator).
pub fn classify_line(bytes: &[u8]) -> LineKind<'_> {
    match std::str::from_utf8(bytes) {
        Ok(s) if is_skipped_line(s) => LineKind::Skipped,
        Ok(s) => LineKind::Text(s),
        Err(e) => LineKind::Invalid {
            lossy: String::from_utf8_lossy(bytes).into_owned(),
            reason: format!(
                "the line is not valid UTF-8 (invalid byte at offset {})",
                e.valid_up_to()
            ),
        },
    }
}

/// True for lines the batch skips (module docs).
pub fn is_skipped_line(line: &str) -> bool {
    let t = line.trim();
    t.is_empty() || t.starts_with('#')
}

/// The JSON object for one input line (which must not be a skipped line),
/// with summary evidence: see [`json_for_line_with`].
pub fn json_for_line(line: &str, options: &DescentOptions) -> String {
    json_for_line_with(line, options, Detail::Summary)
}

/// The JSON object for one input line (which must not be a skipped line):
/// the report of [`descend`] on the parsed curve, or an object whose
/// `error` says why the line could not be processed. Never panics: a panic
/// inside the computation is caught and reported as the line's error.
pub fn json_for_line_with(line: &str, options: &DescentOptions, detail: Detail) -> String {
    let input = line.trim_end_matches(['\n', '\r']);
    let result = catch_unwind(AssertUnwindSafe(|| {
        let curve: Curve = match input.trim().parse() {
            Ok(c) => c,
            Err(e) => return error_line(input, &e.to_string()),
        };
        line_for_curve(&curve, input, options, detail)
    }));
    match result {
        Ok(s) => s,
        Err(payload) => {
            let msg = payload
                .downcast_ref::<&str>()
                .map(|s| s.to_string())
                .or_else(|| payload.downcast_ref::<String>().cloned())
                .unwrap_or_else(|| "unknown panic".to_string());
            error_line(input, &format!("internal error (panic): {msg}"))
        }
    }
}

/// The output line for one raw input line, or `None` for a skipped line.
pub fn json_for_bytes(bytes: &[u8], options: &DescentOptions, detail: Detail) -> Option<String> {
    let bytes = bytes.strip_suffix(b"\n").unwrap_or(bytes);
    let bytes = bytes.strip_suffix(b"\r").unwrap_or(bytes);
    match classify_line(bytes) {
        LineKind::Skipped => None,
        LineKind::Text(s) => Some(json_for_line_with(s, options, detail)),
        LineKind::Invalid { lossy, reason } => Some(error_line(&lossy, &reason)),
    }
}

/// The options of the descent via 3-isogeny that follow from those of the
/// 2-isogeny descent: the same analytic side, saturation, clock, factoring
/// and local budgets; the rest at their defaults.
pub(crate) fn isogeny3_options(options: &DescentOptions) -> crate::descent3::Isogeny3Options {
    crate::descent3::Isogeny3Options {
        analytic: options.analytic.clone(),
        time_limit: options.time_limit,
        factor_units: options.factor_units,
        saturation: options.saturation.clone(),
        ..Default::default()
    }
}

/// The output line of one parsed curve: the 2-isogeny descent, or, on a
/// curve without a rational point of order 2, the descent via 3-isogeny
/// (y² = x³ + k); an error line when neither applies.
pub(crate) fn line_for_curve(
    curve: &Curve,
    input: &str,
    options: &DescentOptions,
    detail: Detail,
) -> String {
    match descend(curve, options) {
        Ok(r) => report_line(input, &r, detail),
        Err(crate::Error::NoTwoTorsion) => {
            let three = isogeny3_options(options);
            if curve.c4().is_zero() {
                match crate::descent3::descend_3isogeny(curve, &three) {
                    Ok(r) => super::json::isogeny3_line(input, &r, detail),
                    Err(e) => error_line(input, &format!("no rational point of order 2, and {e}")),
                }
            } else {
                match crate::descent3::descend_3isogeny_general(curve, &three) {
                    Ok(r) => super::json::isogeny3_general_line(input, &r, detail),
                    Err(e) => error_line(input, &format!("no rational point of order 2, and {e}")),
                }
            }
        }
        Err(e) => error_line(input, &e.to_string()),
    }
}
