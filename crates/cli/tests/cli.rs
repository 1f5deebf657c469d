//! End-to-end checks of the `foilsweep` binary: exit codes, one-line errors, and outputs.

use std::path::PathBuf;
use std::process::{Command, Output};

/// Runs the built binary from the workspace root (so relative paths like `airfoils/` work).
fn foilsweep(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_foilsweep"))
        .args(args)
        .current_dir(workspace_root())
        .output()
        .expect("binary runs")
}

fn workspace_root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../..")
}

fn stdout(output: &Output) -> String {
    String::from_utf8_lossy(&output.stdout).into_owned()
}

fn stderr(output: &Output) -> String {
    String::from_utf8_lossy(&output.stderr).into_owned()
}

/// Parses `foilsweep inviscid … --format csv` output into rows of numbers by column name.
fn csv_rows(text: &str) -> (Vec<String>, Vec<Vec<f64>>) {
    let mut lines = text.lines();
    let header: Vec<String> = lines
        .next()
        .unwrap_or_default()
        .split(',')
        .map(str::to_owned)
        .collect();
    let rows = lines
        .map(|l| l.split(',').map(|v| v.parse().expect("number")).collect())
        .collect();
    (header, rows)
}

#[test]
fn bad_file_gives_one_error_line_and_failure() {
    let path = "tests/data/bad_input/not_a_number.dat";
    let output = foilsweep(&["section", path]);
    assert_eq!(output.status.code(), Some(1));
    assert_eq!(
        stderr(&output),
        format!("error: {path} line 12: 'abc' is not a number\n")
    );
    assert!(stdout(&output).is_empty());
}

#[test]
fn missing_file_and_bad_code_are_explained() {
    let output = foilsweep(&["section", "airfoils/nothing.dat"]);
    assert_eq!(output.status.code(), Some(1));
    assert_eq!(
        stderr(&output),
        "error: airfoils/nothing.dat: no such file, and not a NACA code such as naca2412 or 23012\n"
    );
    let output = foilsweep(&["inviscid", "naca2012", "--alpha", "0"]);
    assert_eq!(output.status.code(), Some(1));
    assert_eq!(
        stderr(&output),
        "error: invalid NACA code 'naca2012': camber given without its position\n"
    );
}

#[test]
fn section_naca0012_prints_twelve_percent() {
    let output = foilsweep(&["section", "naca0012"]);
    assert!(output.status.success(), "{}", stderr(&output));
    let text = stdout(&output);
    // The NACA 0012 thickness polynomial peaks at 12.004 % c near x/c = 0.30 (Abbott & von
    // Doenhoff 1959, Appendix I: 6.002 % half-thickness at 30 %).
    assert!(
        text.contains("max thickness:           0.1200 c (12.00 %) at x/c = 0.299"),
        "{text}"
    );
    assert!(text.contains("symmetric section"), "{text}");
    assert!(stderr(&output).is_empty());
}

#[test]
fn corrections_are_warnings_on_stderr() {
    let output = foilsweep(&["section", "tests/data/bad_input/clockwise.dat"]);
    assert!(output.status.success());
    let err = stderr(&output);
    assert_eq!(err.lines().count(), 1, "{err}");
    assert!(
        err.starts_with("warning: points were in clockwise order"),
        "{err}"
    );
}

#[test]
fn negative_alpha_ranges_parse_in_both_spellings() {
    let joined: [&[&str]; 2] = [
        &["inviscid", "naca0012", "--alpha=-4:4:2", "--format", "csv"],
        &[
            "inviscid", "naca0012", "--alpha", "-4:4:2", "--format", "csv",
        ],
    ];
    for args in joined {
        let output = foilsweep(args);
        assert!(output.status.success(), "{}", stderr(&output));
        let (header, rows) = csv_rows(&stdout(&output));
        assert_eq!(
            header,
            [
                "alpha_deg",
                "cl",
                "cl_pressure",
                "cm_c4",
                "cp_min",
                "cp_min_x"
            ]
        );
        let alphas: Vec<f64> = rows.iter().map(|r| r[0]).collect();
        assert_eq!(alphas, [-4.0, -2.0, 0.0, 2.0, 4.0]);
        // Symmetric section: cl is odd in alpha (exact symmetry; round-off only).
        for k in 0..2 {
            assert!((rows[k][1] + rows[4 - k][1]).abs() < 1e-9);
        }
        assert!(rows[2][1].abs() < 1e-9);
        // Thin-airfoil theory gives dcl/dalpha = 2π per radian (Abbott & von Doenhoff §4.3);
        // thickness raises the inviscid slope by roughly 0.77 t ≈ 9 % for a 12 % section
        // (common practice, no source), so accept 2π·[1.0, 1.2].
        let slope = (rows[3][1] - rows[1][1]) / 4.0_f64.to_radians();
        let two_pi = 2.0 * std::f64::consts::PI;
        assert!(slope > two_pi && slope < 1.2 * two_pi, "slope {slope}");
    }
}

#[test]
fn bad_alpha_is_a_usage_error() {
    let output = foilsweep(&["inviscid", "naca0012", "--alpha", "0:x:1"]);
    assert_eq!(output.status.code(), Some(2));
    assert!(stderr(&output)
        .starts_with("error: invalid value '0:x:1' for '--alpha <ALPHA>': 'x' is not a number"));
    let output = foilsweep(&["inviscid", "naca0012", "--alpha", "0", "--mach", "1.2"]);
    assert_eq!(output.status.code(), Some(1));
    assert_eq!(
        stderr(&output),
        "error: --mach must be at least 0 and below 1, got 1.2\n"
    );
}

#[test]
fn json_output_names_the_section_and_settings() {
    let output = foilsweep(&[
        "inviscid",
        "airfoils/e387.dat",
        "--alpha",
        "0,5",
        "--format",
        "json",
    ]);
    assert!(output.status.success(), "{}", stderr(&output));
    let text = stdout(&output);
    assert!(text.contains("\"section\": \"Eppler 387 (NASA TM-4062 Table I design coordinates, model trailing edge thickened)\""), "{text}");
    assert!(text.contains("\"panels\": 160"));
    assert_eq!(text.matches("\"alpha_deg\"").count(), 2);
}
