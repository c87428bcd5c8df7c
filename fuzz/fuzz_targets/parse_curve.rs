//! Fuzz target: the curve parser on arbitrary text.
//!
//! Checks that `str::parse::<Curve>` never panics, and that whatever parses
//! prints back (Display) to text that parses to an equal curve.
#![no_main]

use isodescent::curve::Curve;
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let text = String::from_utf8_lossy(data);
    if let Ok(curve) = text.parse::<Curve>() {
        let printed = curve.to_string();
        match printed.parse::<Curve>() {
            Ok(again) => assert_eq!(again, curve, "round trip changed {printed:?}"),
            Err(e) => panic!("Display output {printed:?} does not parse: {e}"),
        }
    }
});
