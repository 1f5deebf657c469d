//! Tidy checks on the source tree: module docs, no switched-off or panic-expecting tests, and the
//! crate graph and dependency rules of `DEVELOPERS.md`.
//!
//! These read the repository's own files (under `CARGO_MANIFEST_DIR`); they do not build or run
//! anything.

use std::path::{Path, PathBuf};

/// The workspace root (the root package is the validation package).
fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// Every `.rs` file under `dir`, recursively (skipping hidden and `target` directories).
fn rust_files(dir: &Path, found: &mut Vec<PathBuf>) {
    let entries = std::fs::read_dir(dir).unwrap_or_else(|e| panic!("{}: {e}", dir.display()));
    for entry in entries {
        let path = entry.expect("directory entry").path();
        let name = path.file_name().and_then(|n| n.to_str()).unwrap_or("");
        if path.is_dir() {
            if !name.starts_with('.') && name != "target" {
                rust_files(&path, found);
            }
        } else if name.ends_with(".rs") {
            found.push(path);
        }
    }
}

/// All Rust sources under crates/, tests/, benches/ and src/, with their text.
fn sources() -> Vec<(PathBuf, String)> {
    let mut files = Vec::new();
    for dir in ["crates", "tests", "benches", "src"] {
        rust_files(&root().join(dir), &mut files);
    }
    assert!(files.len() > 10, "found only {} source files", files.len());
    files.sort();
    files
        .into_iter()
        .map(|path| {
            let text = std::fs::read_to_string(&path)
                .unwrap_or_else(|e| panic!("{}: {e}", path.display()));
            (path, text)
        })
        .collect()
}

fn relative(path: &Path) -> String {
    path.strip_prefix(root())
        .unwrap_or(path)
        .display()
        .to_string()
}

// Rationale: every file says what it is for on its first line (project code style: a `//!` doc first).
#[test]
fn every_source_file_starts_with_a_module_doc() {
    let offenders: Vec<String> = sources()
        .iter()
        .filter(|(_, text)| !text.starts_with("//!"))
        .map(|(path, _)| relative(path))
        .collect();
    assert!(
        offenders.is_empty(),
        "files whose first line is not a `//!` doc: {offenders:?}"
    );
}

// Rationale: a panic is a contract violation, never expected behaviour, and a switched-off test
// hides a failure. The patterns are built with concat! so that this file does not match itself.
#[test]
fn no_panic_expecting_or_ignored_tests() {
    let patterns = [concat!("#[", "should_panic"), concat!("#[", "ignore")];
    let offenders: Vec<String> = sources()
        .iter()
        .flat_map(|(path, text)| {
            text.lines().enumerate().filter_map(move |(i, line)| {
                patterns
                    .iter()
                    .find(|p| line.contains(**p))
                    .map(|p| format!("{}:{} {p}", relative(path), i + 1))
            })
        })
        .collect();
    assert!(offenders.is_empty(), "forbidden attributes: {offenders:?}");
}

/// The library chain of DEVELOPERS.md, in order: a crate may depend only on crates before it.
const CHAIN: [&str; 6] = [
    "foilsweep-geometry",
    "foilsweep-panel",
    "foilsweep-boundary-layer",
    "foilsweep-viscous",
    "foilsweep-driver",
    "foilsweep-cli",
];

/// (package name, names in its `[dependencies]` table) for every crate under crates/.
///
/// Line-based: the package name is the first `name = "…"` of the `[package]` table; a dependency
/// is the key of each line of the `[dependencies]` table (`foo.workspace = true`,
/// `foo = "1"` or `foo = { … }`), up to the next table header.
fn crate_dependencies() -> Vec<(String, Vec<String>)> {
    let entries = std::fs::read_dir(root().join("crates")).expect("crates directory");
    let mut crates: Vec<(String, Vec<String>)> = entries
        .map(|entry| {
            let manifest = entry.expect("directory entry").path().join("Cargo.toml");
            let text = std::fs::read_to_string(&manifest)
                .unwrap_or_else(|e| panic!("{}: {e}", manifest.display()));
            let (mut table, mut name, mut dependencies) = (String::new(), None, Vec::new());
            for line in text.lines().map(str::trim) {
                if line.is_empty() || line.starts_with('#') {
                    continue;
                }
                if line.starts_with('[') {
                    table = line.to_owned();
                } else if table == "[package]" && name.is_none() && line.starts_with("name") {
                    name = line.split('"').nth(1).map(str::to_owned);
                } else if table == "[dependencies]" {
                    let key = line.split(['=', '.']).next().unwrap_or("").trim();
                    dependencies.push(key.trim_matches('"').to_owned());
                }
            }
            let name = name.unwrap_or_else(|| panic!("{}: package name", manifest.display()));
            (name, dependencies)
        })
        .collect();
    assert_eq!(crates.len(), CHAIN.len(), "crates: {crates:?}");
    crates.sort();
    crates
}

/// The entries of `dependencies` that are in `forbidden`.
fn uses<'a>(dependencies: &'a [String], forbidden: &[&str]) -> Vec<&'a str> {
    dependencies
        .iter()
        .map(String::as_str)
        .filter(|d| forbidden.contains(d))
        .collect()
}

// Rationale: argument parsing and catch-all errors belong to the binary; libraries return typed
// errors (DEVELOPERS.md, invariants).
#[test]
fn only_the_cli_uses_clap_or_anyhow() {
    for (name, dependencies) in crate_dependencies() {
        if name != "foilsweep-cli" {
            let found = uses(&dependencies, &["clap", "anyhow"]);
            assert!(found.is_empty(), "{name} depends on {found:?}");
        }
    }
}

// Rationale: the panel method takes plain node arrays so it can be used without the geometry
// crate (DEVELOPERS.md, code map and invariants).
#[test]
fn panel_does_not_depend_on_geometry() {
    let crates = crate_dependencies();
    let (_, dependencies) = crates
        .iter()
        .find(|(name, _)| name == "foilsweep-panel")
        .expect("foilsweep-panel");
    assert!(
        uses(dependencies, &["foilsweep-geometry"]).is_empty(),
        "foilsweep-panel depends on foilsweep-geometry"
    );
}

// Rationale: the crate graph is a chain without back-edges, so each layer can be tested and
// understood without the ones above it (DEVELOPERS.md, data flow and invariants).
#[test]
fn no_crate_depends_on_a_later_crate_in_the_chain() {
    for (name, dependencies) in crate_dependencies() {
        let position = CHAIN
            .iter()
            .position(|c| *c == name)
            .unwrap_or_else(|| panic!("{name} is not in the chain of DEVELOPERS.md"));
        let later = uses(&dependencies, &CHAIN[position..]);
        assert!(later.is_empty(), "{name} depends on {later:?}");
    }
}

// Rationale: only the driver (and the binary on top of it) does file or terminal IO and output
// formats; the numerical crates stay free of them (DEVELOPERS.md, invariants).
#[test]
fn only_driver_and_cli_use_output_crates() {
    let output = ["serde", "serde_json", "csv", "plotters", "indicatif"];
    for (name, dependencies) in crate_dependencies() {
        if name != "foilsweep-driver" && name != "foilsweep-cli" {
            let found = uses(&dependencies, &output);
            assert!(found.is_empty(), "{name} depends on {found:?}");
        }
    }
}
