//! Fuzz target: the JSON front end's line handling.
//!
//! The first two bytes pick small budgets (so each run is quick); the rest
//! is a raw batch of lines, bytes as read (invalid UTF-8 anywhere). Checks
//! that every non-blank line gets exactly one line of valid JSON
//! (serde_json) holding the contract keys, that the batch goes on past a
//! bad line, and that no panic was caught on the way (a caught panic would
//! show up in `error`; libfuzzer-sys also aborts on any panic, caught or
//! not).
#![no_main]

use isodescent::descent::DescentOptions;
use isodescent::output::{json_for_bytes, Detail};
use libfuzzer_sys::fuzz_target;

const KEYS: [&str; 8] = [
    "input",
    "rank_lower",
    "rank_upper",
    "points",
    "torsion_order",
    "torsion",
    "selmer",
    "error",
];

fuzz_target!(|data: &[u8]| {
    if data.len() < 2 {
        return;
    }
    let mut options = DescentOptions::default();
    options.search_height = u64::from(data[0] % 32);
    options.search_units = 1_000 * u64::from(data[1] % 64 + 1);
    options.local_units = 200_000;
    options.factor_units = 200_000;
    options.four_coverings = data[0] & 0x80 != 0;
    options.covering_units = 200_000;
    options.covering_search_height = 8;
    for raw in data[2..].split(|&b| b == b'\n').take(4) {
        let Some(out) = json_for_bytes(raw, &options, Detail::Summary) else {
            continue;
        };
        assert!(!out.contains('\n'), "output spans lines: {out}");
        let v: serde_json::Value = match serde_json::from_str(&out) {
            Ok(v) => v,
            Err(e) => panic!("invalid JSON ({e}): {out}"),
        };
        let obj = v.as_object().expect("output is a JSON object");
        for k in KEYS {
            assert!(obj.contains_key(k), "key {k} missing: {out}");
        }
        if let Some(err) = obj["error"].as_str() {
            assert!(!err.contains("panic"), "caught panic: {out}");
        }
    }
});
