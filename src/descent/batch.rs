//! Line-oriented batch processing: one curve per line in, one JSON object
//! per curve out. A bad line, or a panic inside one curve's computation,
//! becomes that line's error object; the batch always goes on.

use std::panic::{catch_unwind, AssertUnwindSafe};

use super::descend;
use super::options::DescentOptions;
use super::report::DescentReport;
use crate::curve::Curve;

/// True for lines the batch skips: blank, or starting with `#` (after
/// leading white space).
pub fn is_skipped_line(line: &str) -> bool {
    let t = line.trim();
    t.is_empty() || t.starts_with('#')
}

/// The JSON object for one input line (which must not be a skipped line):
/// the report of [`descend`] on the parsed curve, or an object whose
/// `error` says why the line could not be processed. Never panics: a panic
/// inside the computation is caught and reported as the line's error.
pub fn json_for_line(line: &str, options: &DescentOptions) -> String {
    let input = line.trim_end_matches(['\n', '\r']);
    let result = catch_unwind(AssertUnwindSafe(|| {
        let curve: Curve = match input.trim().parse() {
            Ok(c) => c,
            Err(e) => return DescentReport::error_json(input, &e.to_string()),
        };
        match descend(&curve, options) {
            Ok(r) => r.to_json(input),
            Err(e) => DescentReport::error_json(input, &e.to_string()),
        }
    }));
    match result {
        Ok(s) => s,
        Err(payload) => {
            let msg = payload
                .downcast_ref::<&str>()
                .map(|s| s.to_string())
                .or_else(|| payload.downcast_ref::<String>().cloned())
                .unwrap_or_else(|| "unknown panic".to_string());
            DescentReport::error_json(input, &format!("internal error (panic): {msg}"))
        }
    }
}
