//! NACA section ordinates from the published definitions against the printed tables of Abbott &
//! von Doenhoff, *Theory of Wing Sections* (1959), Appendices I and III.
//!
//! The table values in `tests/data/abbott_*.csv` were recalled from memory and carry a `source`
//! column saying so; they must be checked against the book. The NACA 0012 thickness row at
//! x = 20 % is printed 5.737 while the definition gives 5.73754 (0.00054 % c, just over half a
//! unit of the last digit): it is kept in the file marked as a disagreement and printed, not
//! asserted. Recalled cambered-section ordinates (2412, 4412, 23012) disagreed with the
//! definition at 45 of 102 rows, so they are not used as a check until verified against the book.
//!
//! Tolerance: half a unit of the last printed digit (0.0005 % c for the 3-decimal thickness
//! table, 0.005 % c for the 2-decimal section ordinates) — the most a correctly rounded printed
//! value can differ from the exact one.

use foilsweep_geometry::naca::{naca_section, NacaDefinition, TrailingEdge};
use foilsweep_validation::data_path;
use serde::Deserialize;

#[derive(Debug, Deserialize)]
struct ThicknessRow {
    x_percent: f64,
    half_thickness_percent: f64,
    status: String,
}

#[derive(Debug, Deserialize)]
struct SlopeRow {
    section: String,
    le_radius_centre_slope: f64,
}

fn read_rows<T: for<'de> Deserialize<'de>>(file: &str) -> Vec<T> {
    let mut reader = csv::Reader::from_path(data_path(file)).expect("reference data file");
    reader
        .deserialize()
        .collect::<Result<Vec<T>, _>>()
        .expect("well-formed reference data")
}

#[test]
fn naca_0012_thickness_matches_abbott_appendix_i() {
    // Abbott & von Doenhoff (1959) Appendix I, NACA 0012, y_t in % c; the open trailing edge
    // (0.126 % at x = 100) is the published polynomial. Tolerance 0.0005 % c: half the last
    // printed digit.
    let definition = NacaDefinition::parse("0012").unwrap();
    let rows: Vec<ThicknessRow> = read_rows("abbott_naca0012_thickness.csv");
    assert_eq!(rows.len(), 18);
    let mut checked = 0;
    for row in &rows {
        let computed = 100.0 * definition.half_thickness(row.x_percent / 100.0, TrailingEdge::Open);
        let error = computed - row.half_thickness_percent;
        if row.status == "ok" {
            assert!(
                error.abs() <= 0.0005 + 1e-12,
                "x = {}: {computed} vs {}",
                row.x_percent,
                row.half_thickness_percent
            );
            checked += 1;
        } else {
            println!(
                "known disagreement at x = {}: {} ({error:+.5} % c)",
                row.x_percent, row.status
            );
        }
    }
    assert!(checked >= 17);
}

#[test]
fn generated_sections_lie_on_the_definition() {
    // The contour that `naca_section` builds is the definition evaluated at cosine stations:
    // every point must be the analytic surface point of its station (round-off only).
    for code in ["0012", "2412", "4412", "23012"] {
        let definition = NacaDefinition::parse(code).unwrap();
        let foil = naca_section(code, 61, TrailingEdge::Open).unwrap();
        let points = foil.points();
        for (i, p) in points.iter().enumerate() {
            let k = if i < 61 { 60 - i } else { i - 60 };
            let xc = 0.5 * (1.0 - (std::f64::consts::PI * k as f64 / 60.0).cos());
            let (u, l) = definition.surface_points(xc, TrailingEdge::Open);
            let expected = if i < 61 { u } else { l };
            assert!((p - expected).norm() < 1e-15, "{code} point {i}");
        }
    }
}

#[test]
fn leading_edge_radius_centre_slope_matches_abbott() {
    // Abbott & von Doenhoff (1959) Appendix III print the slope of the line through the
    // leading-edge radius centre, which is the mean-line slope at x = 0 (§6.2). Tolerance: half
    // the last printed digit (0.005 for 0.10 and 0.20, 0.0005 for 0.305).
    let rows: Vec<SlopeRow> = read_rows("abbott_leading_edge_slope.csv");
    for row in &rows {
        let slope = NacaDefinition::parse(&row.section)
            .unwrap()
            .mean_line(0.0)
            .1;
        let tolerance = if row.section.len() == 5 {
            0.0005
        } else {
            0.005
        };
        assert!(
            (slope - row.le_radius_centre_slope).abs() <= tolerance,
            "{}: {slope} vs {}",
            row.section,
            row.le_radius_centre_slope
        );
    }
    assert_eq!(rows.len(), 3);
}
