//! The Rust files below a folder, for the source scans of tests/layers.rs
//! and tests/docs_errors.rs.
#![allow(dead_code)]

use std::fs;
use std::path::{Path, PathBuf};

/// Adds the `.rs` files below `dir` (all depths) to `out`.
pub fn rust_files(dir: &Path, out: &mut Vec<PathBuf>) {
    for e in fs::read_dir(dir).expect("readable folder").flatten() {
        let p = e.path();
        if p.is_dir() {
            rust_files(&p, out);
        } else if p.extension().is_some_and(|x| x == "rs") {
            out.push(p);
        }
    }
}
