//! One style for error sections: every `pub fn` in `src/` that returns a
//! `Result` says when it fails under a `# Errors` heading of its doc
//! comment (followed by text: the variants, or "As [`other`]"), and no doc
//! comment uses another form ("Errors:", "Errors as for …", "# Error",
//! "**Errors**"). The form of rustdoc's own guidelines and of clippy's
//! `missing_errors_doc` (common practice).

use std::fs;
use std::path::Path;

#[path = "common/source_files.rs"]
mod source_files;
use source_files::rust_files;

/// The doc lines (text after `///`, trimmed) of the item whose first line
/// is `lines[at]`: the `///` and `#[…]` lines right above it.
fn doc_above(lines: &[&str], at: usize) -> Vec<String> {
    let mut doc = Vec::new();
    let mut k = at;
    while k > 0 {
        k -= 1;
        let l = lines[k].trim_start();
        if let Some(d) = l.strip_prefix("///") {
            doc.push(d.trim().to_string());
        } else if !l.starts_with("#[") {
            break;
        }
    }
    doc.reverse();
    doc
}

/// True when the signature starting at `lines[at]` returns a `Result`.
fn returns_result(lines: &[&str], at: usize) -> bool {
    let mut sig = String::new();
    for l in &lines[at..] {
        let code = l.split("//").next().unwrap_or("");
        sig.push_str(code);
        sig.push(' ');
        if code.contains('{') || code.trim_end().ends_with(';') {
            break;
        }
    }
    let sig = sig.split('{').next().unwrap_or("");
    let Some((_, ret)) = sig.rsplit_once("->") else {
        return false;
    };
    let ret = ret.trim_start();
    ret.starts_with("Result") || ret.contains("Result<")
}

/// The places in `text` (file `name`) that break the style.
fn style_faults(name: &str, text: &str) -> Vec<String> {
    let lines: Vec<&str> = text.lines().collect();
    let mut faults = Vec::new();
    for (i, l) in lines.iter().enumerate() {
        let t = l.trim_start();
        if let Some(d) = t.strip_prefix("///").or_else(|| t.strip_prefix("//!")) {
            let d = d.trim();
            let other_form = d.starts_with("Errors:")
                || d.starts_with("Errors as")
                || d == "# Error"
                || d.starts_with("**Errors**");
            if other_form {
                faults.push(format!("{name}:{}: error section as `{d}`", i + 1));
            }
        }
        let public_fn = ["pub fn ", "pub const fn ", "pub unsafe fn "]
            .iter()
            .any(|p| t.starts_with(p));
        if !public_fn || !returns_result(&lines, i) {
            continue;
        }
        let doc = doc_above(&lines, i);
        match doc.iter().position(|d| d == "# Errors") {
            Some(h) if doc.get(h + 1).is_some_and(|d| !d.is_empty()) => {}
            Some(_) => faults.push(format!("{name}:{}: `# Errors` with no text", i + 1)),
            None => faults.push(format!("{name}:{}: no `# Errors` section", i + 1)),
        }
    }
    faults
}

#[test]
fn every_public_fallible_function_has_one_style_of_error_section() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut files = Vec::new();
    rust_files(&root.join("src"), &mut files);
    let mut faults = Vec::new();
    let mut sections = 0;
    for f in &files {
        let text = fs::read_to_string(f).expect("readable source");
        sections += text.lines().filter(|l| l.trim() == "/// # Errors").count();
        let name = f.strip_prefix(root).unwrap_or(f).display().to_string();
        faults.extend(style_faults(&name, &text));
    }
    assert!(
        sections > 100,
        "only {sections} error sections: the scan is broken"
    );
    assert!(faults.is_empty(), "{}", faults.join("\n"));
}

#[test]
fn the_scan_finds_planted_faults() {
    let text = "/// Does it.\npub fn a(x: u8) -> Result<u8> {\n}\n\
                /// Does it.\n///\n/// # Errors\n/// [`Error::Zero`] for 0.\n\
                #[inline]\npub fn b(\n    x: u8,\n) -> Result<u8> {\n}\n\
                /// Errors as for [`b`].\npub fn c() -> std::fmt::Result {\n}\n\
                /// Plain.\npub fn d() -> u8 {\n}\n";
    let got = style_faults("t.rs", text);
    assert_eq!(
        got,
        [
            "t.rs:2: no `# Errors` section",
            "t.rs:13: error section as `Errors as for [`b`].`",
        ]
    );
}
