//! The import drawing of `src/` follows the layer table of the crate root
//! (`src/lib.rs`): every `crate::…` path in a module's code names a module
//! of a lower row of the table (or, for the rows the crate root declares
//! side by side, neither uses the other), so no arrow points up and no
//! loop joins two layer folders. Comments are skipped (a doc link is not
//! an import); code under `#[cfg(test)]` counts like the rest (common
//! practice: a layer's tests may not reach above it either).

use std::collections::{BTreeMap, BTreeSet};
use std::fs;
use std::path::{Path, PathBuf};

/// Rows of the table that sit side by side: neither module may use the
/// other (the sentence below the table in `src/lib.rs`).
const SIDE_BY_SIDE: [(&str, &str); 2] = [("analytic", "height"), ("conic", "cubic")];

/// The rows of the layer table, lowest first: the modules named in each.
fn layer_table(lib: &str) -> Vec<Vec<String>> {
    let mut rows = Vec::new();
    let mut in_table = false;
    for line in lib.lines() {
        let Some(doc) = line.strip_prefix("//!") else {
            continue;
        };
        let doc = doc.trim();
        if doc.starts_with("| layer | module |") {
            in_table = true;
            continue;
        }
        if !in_table {
            continue;
        }
        if !doc.starts_with('|') {
            break;
        }
        let cells: Vec<&str> = doc.split('|').map(str::trim).collect();
        // cells: "", layer, modules, holds, ""
        if cells.len() < 4 || cells[2].starts_with("---") {
            continue;
        }
        let mods: Vec<String> = cells[2]
            .split(',')
            .map(|m| m.trim().trim_matches(['[', ']', '`']).to_string())
            .filter(|m| !m.is_empty())
            .collect();
        rows.push(mods);
    }
    rows
}

/// The code of a file with its line comments (and doc comments) removed.
fn code_of(text: &str) -> String {
    text.lines()
        .map(|l| match l.find("//") {
            Some(i) => &l[..i],
            None => l,
        })
        .collect::<Vec<_>>()
        .join("\n")
}

fn is_ident(c: char) -> bool {
    c.is_ascii_alphanumeric() || c == '_'
}

/// The first segments of the `crate::` paths in `code`: `crate::a::b`
/// gives `a`, `crate::{a::x, b}` gives `a` and `b`.
fn crate_paths(code: &str) -> BTreeSet<String> {
    let mut out = BTreeSet::new();
    let mut from = 0;
    while let Some(i) = code[from..].find("crate::") {
        let start = from + i;
        from = start + "crate::".len();
        if code[..start].chars().next_back().is_some_and(is_ident) {
            continue;
        }
        let rest = &code[from..];
        if let Some(group) = rest.strip_prefix('{') {
            let mut depth = 1;
            let mut at_segment_start = true;
            let mut word = String::new();
            for c in group.chars() {
                match c {
                    '{' => depth += 1,
                    '}' => depth -= 1,
                    _ => {}
                }
                if depth == 0 {
                    break;
                }
                if depth == 1 && at_segment_start && is_ident(c) {
                    word.push(c);
                    continue;
                }
                if !word.is_empty() {
                    out.insert(std::mem::take(&mut word));
                }
                if depth == 1 && c == ',' {
                    at_segment_start = true;
                } else if !c.is_whitespace() {
                    at_segment_start = false;
                }
            }
        } else {
            let name: String = rest.chars().take_while(|&c| is_ident(c)).collect();
            if !name.is_empty() {
                out.insert(name);
            }
        }
    }
    out
}

#[path = "common/source_files.rs"]
mod source_files;
use source_files::rust_files;

/// For each top-level module of `src/`, the modules its code names, with
/// one file that names each.
fn import_drawing(src: &Path) -> BTreeMap<String, BTreeMap<String, PathBuf>> {
    let mut files = Vec::new();
    rust_files(src, &mut files);
    let mut drawing: BTreeMap<String, BTreeMap<String, PathBuf>> = BTreeMap::new();
    for f in files {
        let rel = f.strip_prefix(src).expect("below src");
        let first = rel
            .components()
            .next()
            .and_then(|c| c.as_os_str().to_str())
            .unwrap_or("");
        if first == "lib.rs" {
            continue;
        }
        let module = first.trim_end_matches(".rs").to_string();
        let text = fs::read_to_string(&f).expect("readable source");
        let entry = drawing.entry(module.clone()).or_default();
        for used in crate_paths(&code_of(&text)) {
            if used != module {
                entry.entry(used).or_insert_with(|| f.clone());
            }
        }
    }
    drawing
}

/// The arrows of `drawing` that break the table `rows`: a module outside
/// the table, an arrow to a higher row or between rows side by side, and
/// two modules of one row that use each other.
fn faults(
    rows: &[Vec<String>],
    drawing: &BTreeMap<String, BTreeMap<String, PathBuf>>,
) -> Vec<String> {
    let row_of: BTreeMap<&str, usize> = rows
        .iter()
        .enumerate()
        .flat_map(|(i, ms)| ms.iter().map(move |m| (m.as_str(), i)))
        .collect();
    let mut wrong = Vec::new();
    for (module, uses) in drawing {
        let Some(&own) = row_of.get(module.as_str()) else {
            wrong.push(format!("module {module} is not in the layer table"));
            continue;
        };
        for (used, file) in uses {
            // Names that are not modules (`crate::Result`, re-exports at
            // the root) are not arrows between layer folders.
            let Some(&below) = row_of.get(used.as_str()) else {
                continue;
            };
            let beside = SIDE_BY_SIDE
                .iter()
                .any(|&(a, b)| (a, b) == (module, used) || (b, a) == (module, used));
            if below > own || beside {
                wrong.push(format!(
                    "{} ({module}, row {own}) uses {used} (row {below})",
                    file.display()
                ));
            }
        }
    }
    // Within one row (error and budget) the arrows may go one way only.
    for (module, uses) in drawing {
        for used in uses.keys() {
            let back = drawing.get(used).is_some_and(|u| u.contains_key(module));
            if back && module < used {
                wrong.push(format!("{module} and {used} use each other"));
            }
        }
    }
    wrong
}

#[test]
fn no_import_points_up_and_no_loop_joins_layer_folders() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let lib = fs::read_to_string(root.join("src/lib.rs")).expect("src/lib.rs");
    let rows = layer_table(&lib);
    assert!(rows.len() >= 10, "layer table not found: {rows:?}");
    let drawing = import_drawing(&root.join("src"));
    assert!(drawing.len() >= 10, "only {} modules", drawing.len());
    let arrows: usize = drawing.values().map(BTreeMap::len).sum();
    assert!(arrows >= 30, "only {arrows} arrows: the scan is broken");
    let wrong = faults(&rows, &drawing);
    assert!(wrong.is_empty(), "{}", wrong.join("\n"));
}

#[test]
fn planted_faults_are_found() {
    let rows: Vec<Vec<String>> = [
        vec!["error", "budget"],
        vec!["arith"],
        vec!["analytic"],
        vec!["height"],
        vec!["descent"],
    ]
    .iter()
    .map(|r| r.iter().map(|m| m.to_string()).collect())
    .collect();
    let mut drawing: BTreeMap<String, BTreeMap<String, PathBuf>> = BTreeMap::new();
    fn arrow(d: &mut BTreeMap<String, BTreeMap<String, PathBuf>>, from: &str, to: &str) {
        let file = PathBuf::from(format!("{from} file"));
        d.entry(from.to_string())
            .or_default()
            .insert(to.to_string(), file);
    }
    arrow(&mut drawing, "descent", "arith");
    arrow(&mut drawing, "descent", "Result");
    assert!(faults(&rows, &drawing).is_empty());
    arrow(&mut drawing, "arith", "descent");
    arrow(&mut drawing, "analytic", "height");
    arrow(&mut drawing, "error", "budget");
    arrow(&mut drawing, "budget", "error");
    arrow(&mut drawing, "family", "arith");
    let got = faults(&rows, &drawing);
    assert_eq!(
        got,
        [
            "analytic file (analytic, row 2) uses height (row 3)",
            "arith file (arith, row 1) uses descent (row 4)",
            "module family is not in the layer table",
            "arith and descent use each other",
            "budget and error use each other",
        ],
        "{got:?}"
    );
}

#[test]
fn the_scanner_sees_grouped_and_plain_paths_and_skips_comments() {
    let code = code_of(
        "use crate::{arith::factor, curve::{Curve, Point}, error::Result};\n\
         let x = crate::local::Prime::new(p); // crate::family::scan\n\
         /// [`crate::output`]\n\
         let y = mycrate::descent::x;",
    );
    let got: Vec<String> = crate_paths(&code).into_iter().collect();
    assert_eq!(got, ["arith", "curve", "error", "local"]);
    let table = "//! | layer | module | holds |\n//! |---|---|---|\n\
                 //! | — | [`error`], [`budget`] | x |\n//! | 1 | [`arith`] | y |\n//!\n";
    assert_eq!(
        layer_table(table),
        vec![
            vec!["error".to_string(), "budget".to_string()],
            vec!["arith".to_string()]
        ]
    );
}
