//! Serialisation of reports (only with the `serde` feature).
#![cfg(feature = "serde")]

use isodescent::curve::Curve;
use isodescent::descent::{descend, DescentOptions};

#[test]
fn a_report_serialises_with_its_bounds_and_points() {
    let c: Curve = "0 0 0 -36 0".parse().unwrap();
    let r = descend(&c, &DescentOptions::default()).unwrap();
    let v: serde_json::Value = serde_json::to_value(&r).unwrap();
    assert_eq!(v["rank_lower"], 1);
    assert_eq!(v["rank_upper"], 1);
    assert_eq!(v["points"].as_array().unwrap().len(), 1);
    assert_eq!(v["isogenies"].as_array().unwrap().len(), 3);
    // the contract JSON line parses as JSON too
    let line: serde_json::Value = serde_json::from_str(&r.to_json("0 0 0 -36 0")).unwrap();
    assert_eq!(line["rank_lower"], 1);
    assert!(line["error"].is_null());
}
