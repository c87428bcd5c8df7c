//! Every JSON line the crate writes validates against the checked-in
//! schema `docs/report.schema.json` (JSON Schema draft 2020-12; the
//! validator below implements the keywords the schema uses: type, const,
//! enum, properties, required, additionalProperties, items, oneOf, $ref,
//! minimum — common practice).

use isodescent::curve::Curve;
use isodescent::descent::{descend, DescentOptions};
use isodescent::family::{scan_member, Family};
use isodescent::output::{json_for_bytes, json_for_line, Detail, FORMAT_VERSION};
use serde_json::Value;

const SCHEMA: &str = include_str!("../docs/report.schema.json");

fn type_ok(t: &str, v: &Value) -> bool {
    match t {
        "object" => v.is_object(),
        "array" => v.is_array(),
        "string" => v.is_string(),
        "integer" => v.is_i64() || v.is_u64(),
        "number" => v.is_number(),
        "boolean" => v.is_boolean(),
        "null" => v.is_null(),
        _ => false,
    }
}

fn resolve<'a>(root: &'a Value, r: &str) -> &'a Value {
    let path = r.strip_prefix("#/").expect("local $ref");
    path.split('/').fold(root, |v, k| &v[k])
}

fn validate(root: &Value, schema: &Value, v: &Value, at: &str, errors: &mut Vec<String>) {
    if let Some(r) = schema.get("$ref").and_then(Value::as_str) {
        validate(root, resolve(root, r), v, at, errors);
        return;
    }
    if let Some(t) = schema.get("type") {
        let ok = match t {
            Value::String(s) => type_ok(s, v),
            Value::Array(ts) => ts.iter().any(|t| type_ok(t.as_str().unwrap_or(""), v)),
            _ => false,
        };
        if !ok {
            errors.push(format!("{at}: {v} is not of type {t}"));
            return;
        }
    }
    if let Some(c) = schema.get("const") {
        if c != v {
            errors.push(format!("{at}: {v} is not {c}"));
        }
    }
    if let Some(Value::Array(e)) = schema.get("enum") {
        if !e.contains(v) {
            errors.push(format!("{at}: {v} is not one of {e:?}"));
        }
    }
    if let (Some(min), Some(x)) = (schema.get("minimum").and_then(Value::as_f64), v.as_f64()) {
        if x < min {
            errors.push(format!("{at}: {x} < {min}"));
        }
    }
    if let Some(Value::Array(alts)) = schema.get("oneOf") {
        let passing = alts
            .iter()
            .filter(|s| {
                let mut e = Vec::new();
                validate(root, s, v, at, &mut e);
                e.is_empty()
            })
            .count();
        if passing != 1 {
            errors.push(format!("{at}: {passing} alternatives of oneOf match {v}"));
        }
    }
    if let (Some(items), Some(arr)) = (schema.get("items"), v.as_array()) {
        for (i, x) in arr.iter().enumerate() {
            validate(root, items, x, &format!("{at}[{i}]"), errors);
        }
    }
    if let Some(obj) = v.as_object() {
        if let Some(Value::Array(req)) = schema.get("required") {
            for k in req {
                let k = k.as_str().unwrap_or("");
                if !obj.contains_key(k) {
                    errors.push(format!("{at}: missing key {k}"));
                }
            }
        }
        let props = schema.get("properties").and_then(Value::as_object);
        for (k, x) in obj {
            match props.and_then(|p| p.get(k)) {
                Some(s) => validate(root, s, x, &format!("{at}.{k}"), errors),
                None => match schema.get("additionalProperties") {
                    Some(Value::Bool(false)) => {
                        errors.push(format!("{at}: key {k} is not in the schema"))
                    }
                    Some(s @ Value::Object(_)) => {
                        validate(root, s, x, &format!("{at}.{k}"), errors)
                    }
                    _ => {}
                },
            }
        }
    }
}

fn assert_valid(line: &str) {
    let root: Value = serde_json::from_str(SCHEMA).expect("the schema file is JSON");
    let v: Value = serde_json::from_str(line).unwrap_or_else(|e| panic!("not JSON ({e}): {line}"));
    let mut errors = Vec::new();
    validate(&root, &root, &v, "$", &mut errors);
    assert!(errors.is_empty(), "{line}\n{}", errors.join("\n"));
    assert_eq!(v["format_version"], FORMAT_VERSION);
}

/// Curves of our own choosing that reach every kind of field: points,
/// three 2-torsion points, classes proven not images, rational
/// coefficients, errors.
const LINES: &[&str] = &[
    "y^2 = x^3 - 30x^2 + 3x",
    "y^2 + 2xy + 2y = x^3 + 3x^2 - 10x + 2",
    "0 -7 0 1/16 0",
    "y^2 = x^3 - 29x^2 - 30x",
    "y^2 = x^3 - 30x^2 - 8x",
    "y**2 = x**3 - 1154*x",
    "0 1 1 -2 0",
    "y^2 = x^3",
    "not a curve",
    // No rational point of order 2: the descent via 3-isogeny.
    "y^2 = x^3 + 17",
    "0 0 0 0 -2",
    // No rational point of order 2, a rational 3-isogeny with α ≠ 0: the
    // point (0, 1) of y² = x³ + (x + 1)² has order 3 (common practice).
    "y^2 = x^3 + x^2 + 2x + 1",
    // The same with D = 1, α = 1, β = 5 (y² = x³ + (x + 5)²), where the
    // search finds a point of infinite order.
    "y^2 = x^3 + x^2 + 10x + 25",
];

#[test]
fn every_batch_line_validates_in_both_details() {
    let opts = DescentOptions::default();
    for line in LINES {
        assert_valid(&json_for_line(line, &opts));
        let full = json_for_bytes(line.as_bytes(), &opts, Detail::Full).unwrap();
        assert_valid(&full);
    }
}

/// A twist with no quartic model is printed as its conic with the Hilbert
/// symbol pair, and that variant validates too (y² = x³ − 289x has such
/// twists; the curve of issue 27's example).
#[test]
fn conic_obstructions_validate() {
    let line = json_for_bytes(b"0 0 0 -289 0", &DescentOptions::default(), Detail::Full).unwrap();
    assert_valid(&line);
    assert!(
        line.contains("\"conic\":[") && line.contains("\"hilbert_symbol\":["),
        "{line}"
    );
    assert!(line.contains("\"quartic\":["), "{line}");
}

#[test]
fn full_evidence_carries_the_four_covering_quartics() {
    // y^2 = x^3 - 29x^2 - 30x has classes proven not images (demo data).
    let line = json_for_bytes(
        b"y^2 = x^3 - 29x^2 - 30x",
        &DescentOptions::default(),
        Detail::Full,
    )
    .unwrap();
    let v: Value = serde_json::from_str(&line).unwrap();
    let coverings: usize = v["selmer"]
        .as_array()
        .unwrap()
        .iter()
        .flat_map(|iso| [&iso["curve"], &iso["isogenous"]])
        .map(|side| side["evidence"]["four_coverings"].as_array().unwrap().len())
        .sum();
    let proven = line.matches("\"proven_not_image\"").count();
    assert!(proven > 0, "{line}");
    assert!(coverings > 0, "{line}");
}

#[test]
fn invalid_utf8_gets_an_error_line_that_validates() {
    let out = json_for_bytes(
        b"0 0 0 \xFF\xFE -1 0\n",
        &DescentOptions::default(),
        Detail::Summary,
    )
    .unwrap();
    assert_valid(&out);
    let v: Value = serde_json::from_str(&out).unwrap();
    assert!(v["error"].as_str().unwrap().contains("UTF-8"), "{out}");
}

#[test]
fn separator_only_lines_are_blank_lines() {
    let opts = DescentOptions::default();
    for raw in ["\u{2028}", "\u{2029}\u{2028}", " \t", "", "# comment"] {
        assert!(
            json_for_bytes(raw.as_bytes(), &opts, Detail::Summary).is_none(),
            "{raw:?}"
        );
    }
}

#[test]
fn family_scan_lines_validate() {
    let fam = Family::congruent_numbers(1, 30).unwrap();
    for m in fam.members() {
        assert_valid(&scan_member(&m, &DescentOptions::default()).to_line());
    }
    // The families of the descent via 3-isogeny.
    for fam in [
        Family::mordell(-6, 6).unwrap(),
        Family::cube_sums(1, 10).unwrap(),
    ] {
        for m in fam.members() {
            assert_valid(&scan_member(&m, &DescentOptions::default()).to_line());
        }
    }
}

#[test]
fn the_serde_view_of_a_report_is_the_line_of_its_equation() {
    let c: Curve = "0 0 0 -36 0".parse().unwrap();
    let r = descend(&c, &DescentOptions::default()).unwrap();
    let v = serde_json::to_value(&r).unwrap();
    assert_eq!(v["input"], "y^2 = x^3 - 36x");
    let mut line: Value =
        serde_json::from_str(&json_for_line("0 0 0 -36 0", &DescentOptions::default())).unwrap();
    line["input"] = Value::String("y^2 = x^3 - 36x".into());
    assert_eq!(v, line);
    // the keys test harnesses read
    for k in HARNESS_KEYS {
        let mut at = &line;
        for part in k.split('.') {
            at = at.get(part).unwrap_or_else(|| panic!("{k}"));
        }
    }
    assert!(line["points"][0]["height"].is_string(), "{line}");
    assert_eq!(line["rank_lower"], 1);
    assert_eq!(
        line["points"][0]["x"]
            .as_str()
            .map(|s| s.contains('/') || s.parse::<i64>().is_ok()),
        Some(true)
    );
}

/// The keys external harnesses read; format 3 keeps them as they were.
const HARNESS_KEYS: &[&str] = &[
    "input",
    "rank_lower",
    "rank_upper",
    "points",
    "error",
    "status",
    "stopped",
    "format_version",
    "torsion.order",
    "points_generate",
    "root_number",
    "rank_settled_by",
    "selmer2_rank",
    "conductor",
    "reduction",
    "analytic.conductor",
    "analytic.real_period",
    "analytic.real_components",
    "analytic.l_values",
    "selmer",
];

/// Every key path of a JSON value: `a.b` for object keys, `a[]` for array
/// items; the bad primes keying `reduction` become `<p>`, and the two sides
/// of an isogeny (`curve`, `isogenous`) share the paths `selmer[].<side>`.
fn key_paths(v: &Value, at: &str, out: &mut std::collections::BTreeSet<String>) {
    match v {
        Value::Object(m) => {
            for (k, x) in m {
                let k = if at == "reduction" { "<p>" } else { k.as_str() };
                let mut p = if at.is_empty() {
                    k.to_string()
                } else {
                    format!("{at}.{k}")
                };
                out.insert(p.clone());
                if p == "selmer[].curve" || p == "selmer[].isogenous" {
                    p = "selmer[].<side>".to_string();
                }
                key_paths(x, &p, out);
            }
        }
        Value::Array(a) => {
            for x in a {
                key_paths(x, &format!("{at}[]"), out);
            }
        }
        _ => {}
    }
}

/// The key paths listed in docs/report_format.md: the first cell of each
/// table row between `<!-- keys -->` and `<!-- /keys -->`.
fn documented_paths() -> std::collections::BTreeSet<String> {
    let doc = include_str!("../docs/report_format.md");
    let start = doc.find("<!-- keys -->").expect("key table start marker");
    let end = doc.find("<!-- /keys -->").expect("key table end marker");
    doc[start..end]
        .lines()
        .filter_map(|l| l.strip_prefix("| `"))
        .filter_map(|l| l.split('`').next())
        .map(str::to_string)
        .collect()
}

#[test]
fn the_documented_keys_are_exactly_the_emitted_keys() {
    let mut emitted = std::collections::BTreeSet::new();
    let opts = DescentOptions::default();
    let mut lines: Vec<String> = Vec::new();
    for line in LINES
        .iter()
        .chain(["y^2 = x^3 - 36x", "y^2 = x^3 - 25x", "0 0 0 0 1"].iter())
    {
        lines.push(json_for_line(line, &opts));
        lines.push(json_for_bytes(line.as_bytes(), &opts, Detail::Full).unwrap());
    }
    // A partial report: a budget too small for the search.
    let mut tiny = DescentOptions::default();
    tiny.search_units = 1;
    lines.push(json_for_line("y^2 = x^3 - 30x^2 + 3x", &tiny));
    // Family lines carry two keys in front.
    let fam = Family::congruent_numbers(5, 6).unwrap();
    for m in fam.members() {
        lines.push(scan_member(&m, &opts).to_line());
    }
    for l in &lines {
        assert_valid(l);
        let v: Value = serde_json::from_str(l).unwrap();
        key_paths(&v, "", &mut emitted);
    }
    let documented = documented_paths();
    let missing: Vec<_> = emitted.difference(&documented).collect();
    let extra: Vec<_> = documented.difference(&emitted).collect();
    assert!(
        missing.is_empty() && extra.is_empty(),
        "emitted but not documented: {missing:?}\ndocumented but not emitted: {extra:?}"
    );
}
