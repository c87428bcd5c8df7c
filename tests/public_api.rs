//! The public face of the crate is checked in as `docs/public_api.txt`, so
//! a change to it shows up in review. This test regenerates the listing
//! from the sources and compares; run with `UPDATE_PUBLIC_API=1` to rewrite
//! the file after an intended change.
//!
//! The listing is made by reading the sources (common practice for a
//! dependency-free check): a module is public when every `mod` on its path
//! is `pub mod`; in a public module every `pub` item at the top level, and
//! every `pub fn`/`pub const` in an `impl` block, is listed with its path.
//! `pub(crate)` and `#[cfg(test)]` items are not public and are skipped.

use std::fs;
use std::path::{Path, PathBuf};

fn module_file(dir: &Path, name: &str) -> Option<PathBuf> {
    let a = dir.join(format!("{name}.rs"));
    let b = dir.join(name).join("mod.rs");
    if a.exists() {
        Some(a)
    } else if b.exists() {
        Some(b)
    } else {
        None
    }
}

fn item_name(rest: &str) -> String {
    rest.split(|c: char| !(c.is_alphanumeric() || c == '_'))
        .find(|s| !s.is_empty())
        .unwrap_or("")
        .to_string()
}

/// What the walk collects: items of public modules, re-exported names,
/// and every type's inherent `pub fn`/`pub const`.
#[derive(Default)]
struct Collected {
    items: Vec<String>,
    reexported: Vec<String>,
    public_types: Vec<String>,
    methods: Vec<(String, String)>,
}

fn walk(file: &Path, path: &str, public: bool, out: &mut Collected) {
    let text = fs::read_to_string(file).expect("source file");
    let dir = if file
        .file_name()
        .is_some_and(|f| f == "mod.rs" || f == "lib.rs")
    {
        file.parent().expect("dir").to_path_buf()
    } else {
        file.with_extension("")
    };
    let mut impl_type: Option<String> = None;
    let mut skip_depth: Option<usize> = None;
    let mut depth = 0usize;
    let mut cfg_test = false;
    let mut in_use = false;
    for line in text.lines() {
        let t = line.trim_start();
        let indent = line.len() - t.len();
        if t.starts_with("//") {
            continue;
        }
        if t.starts_with("#[cfg(test)]") {
            cfg_test = true;
            continue;
        }
        let opens = line.matches('{').count();
        let closes = line.matches('}').count();
        if skip_depth.is_none() && cfg_test && opens > 0 {
            skip_depth = Some(depth);
        }
        if !t.starts_with("#[") {
            cfg_test = false;
        }
        let before = depth;
        depth = (depth + opens).saturating_sub(closes);
        if let Some(d) = skip_depth {
            if depth <= d {
                skip_depth = None;
            }
            continue;
        }
        if indent == 0 && t.starts_with("impl") {
            // `impl<T> Trait for Type {` or `impl Type {`: the type is the
            // last path segment before `{` (after `for`, if any).
            let head = t.split('{').next().unwrap_or("");
            let ty = head.rsplit(" for ").next().unwrap_or(head);
            let ty = ty.trim_start_matches("impl").trim();
            let ty = if ty.starts_with('<') {
                ty.split_once("> ").map(|x| x.1).unwrap_or(ty)
            } else {
                ty
            };
            let name = item_name(ty.rsplit("::").next().unwrap_or(ty));
            impl_type = if head.contains(" for ") {
                None
            } else {
                Some(name)
            };
            continue;
        }
        if before == 0 && indent == 0 {
            let sub = ["pub mod ", "pub(crate) mod ", "mod "]
                .iter()
                .find_map(|p| {
                    t.strip_prefix(p)
                        .map(|rest| (p.starts_with("pub mod"), rest))
                });
            if let Some((is_pub, rest)) = sub {
                if rest.trim_end().ends_with(';') {
                    let name = item_name(rest);
                    if public && is_pub {
                        out.items.push(format!("mod {path}::{name}"));
                    }
                    if let Some(f) = module_file(&dir, &name) {
                        walk(&f, &format!("{path}::{name}"), public && is_pub, out);
                    }
                    continue;
                }
            }
            if !public {
                continue;
            }
            if let Some(rest) = t.strip_prefix("pub use ") {
                out.items
                    .push(format!("use {path}::{}", rest.trim_end_matches(';')));
                in_use = !rest.trim_end().ends_with(';');
                out.reexported.extend(words(rest));
                continue;
            }
            for kind in ["fn", "struct", "enum", "trait", "type", "const", "static"] {
                if let Some(rest) = t.strip_prefix(&format!("pub {kind} ")) {
                    let name = item_name(rest);
                    out.items.push(format!("{kind} {path}::{name}"));
                    out.public_types.push(name);
                }
            }
        } else if in_use {
            // continuation lines of a multi-line `pub use`
            // (joined to the statement's first line, so one item per `pub use`)
            if let Some(last) = out.items.last_mut() {
                if !last.ends_with('{') {
                    last.push(' ');
                }
                last.push_str(t.trim_end_matches(';'));
            }
            out.reexported.extend(words(t));
            in_use = !t.trim_end().ends_with(';');
        } else if before == 1 && indent == 4 {
            if let Some(ty) = &impl_type {
                for kind in ["fn", "const"] {
                    if let Some(rest) = t.strip_prefix(&format!("pub {kind} ")) {
                        out.methods
                            .push((ty.clone(), format!("{kind} {ty}::{}", item_name(rest))));
                    }
                }
            }
        }
    }
}

fn words(s: &str) -> Vec<String> {
    s.split(|c: char| !(c.is_alphanumeric() || c == '_'))
        .filter(|w| !w.is_empty())
        .map(str::to_string)
        .collect()
}

#[test]
fn the_public_face_matches_the_checked_in_listing() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut c = Collected::default();
    walk(&root.join("src/lib.rs"), "isodescent", true, &mut c);
    let mut items = c.items;
    for (ty, m) in c.methods {
        if c.public_types.contains(&ty) || c.reexported.contains(&ty) {
            items.push(format!("{m} (method)"));
        }
    }
    items.sort();
    items.dedup();
    let listing = format!(
        "# The public items of isodescent, regenerated by tests/public_api.rs.\n# {} items.\n{}\n",
        items.len(),
        items.join("\n")
    );
    let file = root.join("docs/public_api.txt");
    if std::env::var_os("UPDATE_PUBLIC_API").is_some() {
        fs::write(&file, &listing).expect("write docs/public_api.txt");
        return;
    }
    let checked_in = fs::read_to_string(&file).unwrap_or_default();
    assert!(
        checked_in == listing,
        "the public face changed; review the difference and rerun with UPDATE_PUBLIC_API=1\n\
         (now {} items)",
        items.len()
    );
}
