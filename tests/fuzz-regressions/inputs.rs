//! The replay tests' one list of inputs for a fuzz target, shared by the crates that own the
//! readers (`#[path]`-included from each crate's `tests/fuzz_regressions.rs`).

use std::path::{Path, PathBuf};

/// Every file in the seed and regression folders of one fuzz target, sorted.
pub fn inputs(target: &str) -> Vec<PathBuf> {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("../..");
    let mut files: Vec<PathBuf> = [
        root.join("fuzz/corpus").join(target),
        root.join("tests/fuzz-regressions").join(target),
    ]
    .iter()
    .filter_map(|d| std::fs::read_dir(d).ok())
    .flat_map(|d| d.filter_map(|e| e.ok().map(|e| e.path())))
    .filter(|p| p.is_file() && p.file_name().is_some_and(|n| n != "README.md"))
    .collect();
    files.sort();
    assert!(!files.is_empty(), "no inputs for fuzz target {target}");
    files
}
