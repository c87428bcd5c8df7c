//! Honest citations: every repository path that the sources and the docs
//! name (`tests/…`, `docs/…`, `src/…`, `benches/…`, `examples/…`,
//! `scripts/…`, `fuzz/…` with a file ending) exists. A renamed or removed
//! file must take its citations with it (common practice).

use std::fs;
use std::path::{Path, PathBuf};

const ROOTS: [&str; 7] = [
    "src", "docs", "tests", "benches", "examples", "scripts", "fuzz",
];
const TOP_FILES: [&str; 2] = ["README.md", "DEVELOPERS.md"];
const ENDINGS: [&str; 8] = [".rs", ".md", ".json", ".txt", ".py", ".sh", ".toml", ".csv"];

fn text_files(dir: &Path, out: &mut Vec<PathBuf>) {
    let Ok(entries) = fs::read_dir(dir) else {
        return;
    };
    for e in entries.flatten() {
        let p = e.path();
        let name = p.file_name().and_then(|n| n.to_str()).unwrap_or("");
        if p.is_dir() {
            if name != "target" && !name.starts_with('.') {
                text_files(&p, out);
            }
        } else if ENDINGS.iter().any(|end| name.ends_with(end)) {
            out.push(p);
        }
    }
}

fn is_path_char(c: char) -> bool {
    c.is_ascii_alphanumeric() || matches!(c, '_' | '-' | '.' | '/')
}

/// The repository paths cited in `text`: a root folder name at a word
/// start, a slash, path characters, and one of the known endings.
fn cited_paths(text: &str) -> Vec<String> {
    let mut found: Vec<(usize, String)> = Vec::new();
    for root in ROOTS {
        let needle = format!("{root}/");
        let mut from = 0;
        while let Some(i) = text[from..].find(&needle) {
            let start = from + i;
            from = start + needle.len();
            let before = text[..start].chars().next_back();
            if before.is_some_and(|c| c.is_ascii_alphanumeric() || matches!(c, '_' | '/' | '.')) {
                continue;
            }
            let rest = &text[start..];
            let len = rest.find(|c: char| !is_path_char(c)).unwrap_or(rest.len());
            let mut cand = rest[..len].trim_end_matches('.').to_string();
            while cand.ends_with('/') {
                cand.pop();
            }
            if ENDINGS.iter().any(|end| cand.ends_with(end)) {
                found.push((start, cand));
            }
        }
    }
    found.sort();
    found.into_iter().map(|(_, p)| p).collect()
}

#[test]
fn every_cited_repository_path_exists() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut files = Vec::new();
    for dir in ROOTS {
        text_files(&root.join(dir), &mut files);
    }
    files.extend(TOP_FILES.iter().map(|f| root.join(f)));
    let mut missing = Vec::new();
    let mut checked = 0;
    // This file plants a missing path on purpose.
    let this_file = root.join("tests").join("docs_paths.rs");
    for f in files.iter().filter(|f| **f != this_file) {
        let Ok(text) = fs::read_to_string(f) else {
            continue;
        };
        for cited in cited_paths(&text) {
            checked += 1;
            if !root.join(&cited).exists() {
                missing.push(format!("{} cites {cited}", f.display()));
            }
        }
    }
    assert!(
        checked > 50,
        "only {checked} citations found: the scanner is broken"
    );
    assert!(missing.is_empty(), "missing files:\n{}", missing.join("\n"));
}

#[test]
fn the_scanner_finds_a_planted_missing_path() {
    let text = "see tests/no_such_file.rs and docs/heights.md, not mytests/x.rs";
    let got = cited_paths(text);
    assert_eq!(got, vec!["tests/no_such_file.rs", "docs/heights.md"]);
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    assert!(!root.join(&got[0]).exists());
    assert!(root.join(&got[1]).exists());
}

/// Every guide in `docs/` is part of the rustdoc: included into a module's
/// docs (`#![doc = include_str!(…)]`) or cited by path in a module's `//!`
/// docs (a citation the test above checks).
#[test]
fn every_guide_in_docs_is_reachable_from_the_rustdoc() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut sources = Vec::new();
    text_files(&root.join("src"), &mut sources);
    let module_docs: String = sources
        .iter()
        .filter_map(|f| fs::read_to_string(f).ok())
        .flat_map(|text| {
            text.lines()
                .filter(|l| {
                    let l = l.trim_start();
                    l.starts_with("//!") || l.starts_with("#![doc")
                })
                .map(str::to_string)
                .collect::<Vec<_>>()
        })
        .collect::<Vec<_>>()
        .join("\n");
    let mut guides = Vec::new();
    for e in fs::read_dir(root.join("docs")).expect("docs/").flatten() {
        let name = e.file_name().to_string_lossy().into_owned();
        if name.ends_with(".md") {
            guides.push(name);
        }
    }
    assert!(guides.len() >= 5, "docs/ holds only {guides:?}");
    let unreachable: Vec<&String> = guides
        .iter()
        .filter(|g| !module_docs.contains(&format!("docs/{g}")))
        .collect();
    assert!(
        unreachable.is_empty(),
        "not in any module's rustdoc: {unreachable:?}"
    );
}
