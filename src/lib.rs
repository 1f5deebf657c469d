//! Shared helpers for the cross-crate validation tests in `tests/`.
//!
//! The root package exists to own the validation tests (which compare foilsweep
//! with published data) and the benchmarks. This library holds only what those
//! tests share: locating the copied reference data in `tests/data/` and reading
//! its CSV files. It contains no aerodynamics.
#![warn(missing_docs)]

use std::path::PathBuf;

/// Absolute path of a file in `tests/data/` (the published data copied into the project).
pub fn data_path(file_name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests")
        .join("data")
        .join(file_name)
}

/// Absolute path of a shipped section in `airfoils/`.
pub fn airfoil_path(file_name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("airfoils")
        .join(file_name)
}
