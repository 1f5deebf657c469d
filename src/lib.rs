//! Shared helpers for the cross-crate validation tests in `tests/`.
//!
//! The root package exists to own the validation tests (which compare foilsweep
//! with published data) and the benchmarks. This library holds only what those
//! tests share: locating the copied reference data in `tests/data/` and the shipped
//! sections, and the fixed dense matrix the benchmarks use as their LU floor. It contains no
//! aerodynamics.
#![warn(missing_docs)]

use std::path::PathBuf;

/// Absolute path of a file in `tests/data/` (the published data copied into the project).
pub fn data_path(file_name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests")
        .join("data")
        .join(file_name)
}

/// CSV reader over a file in `tests/data/`, skipping the `#` comment lines that carry the
/// provenance notes of some files.
///
/// # Panics
/// If the file is missing (the data are part of the repository; a missing file is a broken
/// checkout, not a test result).
pub fn data_reader(file_name: &str) -> csv::Reader<std::fs::File> {
    csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .from_path(data_path(file_name))
        .unwrap_or_else(|e| panic!("reference data file {file_name}: {e}"))
}

/// Absolute path of a shipped section in `airfoils/`.
pub fn airfoil_path(file_name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("airfoils")
        .join(file_name)
}

/// A reproducible dense `n × n` matrix with entries in (−0.5, 0.5), from a fixed-seed linear
/// congruential generator (no RNG dependency): the matrix whose LU factorisation the benchmarks
/// quote as the floor that one panel solve or one viscous point is compared with.
pub fn seeded_matrix(n: usize) -> nalgebra::DMatrix<f64> {
    let mut state: u64 = 0x2545_f491_4f6c_dd1d;
    nalgebra::DMatrix::from_fn(n, n, |_, _| {
        state = state
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        (state >> 11) as f64 / (1u64 << 53) as f64 - 0.5
    })
}
