//! Broken coordinate files give their specific error (variant and line), or a warning when the
//! input can be corrected safely; garbage never panics.
//!
//! The files in `tests/data/bad_input/` are invented for these tests (a coarse NACA 0012 with 13
//! points per side, then broken one way each). Line numbers count the title as line 1.

use foilsweep_geometry::{Airfoil, GeometryError, GeometryReport, Location, ParseOptions};
use foilsweep_validation::data_path;

fn parse_file(name: &str) -> Result<(Airfoil, GeometryReport), GeometryError> {
    let path = data_path(&format!("bad_input/{name}"));
    let text = std::fs::read_to_string(&path).expect("test file exists");
    Airfoil::parse(&text, name, &ParseOptions::default())
}

fn error_of(name: &str) -> GeometryError {
    match parse_file(name) {
        Err(error) => error,
        Ok((foil, _)) => panic!("{name} parsed into {} points", foil.points().len()),
    }
}

#[test]
fn word_instead_of_number() {
    let error = error_of("not_a_number.dat");
    assert_eq!(
        error,
        GeometryError::NotANumber {
            source_name: "not_a_number.dat".into(),
            line: 12,
            token: "abc".into()
        }
    );
    assert_eq!(
        error.to_string(),
        "not_a_number.dat line 12: 'abc' is not a number"
    );
}

#[test]
fn nan_and_infinity_are_located() {
    assert!(matches!(
        error_of("nan.dat"),
        GeometryError::NotFinite { location: Location::Line(16), ref value, .. } if value == "NaN"
    ));
    assert!(matches!(
        error_of("inf.dat"),
        GeometryError::NotFinite { location: Location::Line(8), ref value, .. } if value == "inf"
    ));
}

#[test]
fn one_number_on_a_line() {
    assert!(matches!(
        error_of("missing_coordinate.dat"),
        GeometryError::MissingCoordinate { line: 10, .. }
    ));
}

#[test]
fn too_few_points() {
    assert!(matches!(
        error_of("too_few_points.dat"),
        GeometryError::TooFewPoints {
            count: 6,
            minimum: 10,
            ..
        }
    ));
}

#[test]
fn empty_file() {
    assert!(matches!(error_of("empty.dat"), GeometryError::Empty { .. }));
}

#[test]
fn all_points_equal() {
    assert!(matches!(
        error_of("all_points_equal.dat"),
        GeometryError::AllPointsCoincide { .. }
    ));
}

#[test]
fn count_line_that_does_not_match() {
    // Two-surface layout announcing 14 + 13 points, followed by 13 + 13 lines.
    assert!(matches!(
        error_of("count_mismatch.dat"),
        GeometryError::CountMismatch {
            line: 2,
            upper: 14,
            lower: 13,
            found: 26,
            ..
        }
    ));
}

#[test]
fn self_intersection_names_both_segments() {
    // Points on lines 7 and 8 were pushed below the lower surface: the upper segment from line 6
    // to 7 crosses the lower segment from line 21 to 22.
    let error = error_of("self_intersecting.dat");
    match &error {
        GeometryError::SelfIntersection { first, second, .. } => {
            assert_eq!(
                (first.from, first.to),
                (Location::Line(6), Location::Line(7))
            );
            assert_eq!(
                (second.from, second.to),
                (Location::Line(21), Location::Line(22))
            );
        }
        other => panic!("unexpected {other:?}"),
    }
    assert_eq!(
        error.to_string(),
        "self_intersecting.dat: the contour crosses itself: segment line 6 to line 7 meets \
         segment line 21 to line 22"
    );
}

#[test]
fn repeated_points_are_merged_with_a_warning() {
    let (foil, report) = parse_file("duplicated_points.dat").unwrap();
    assert_eq!(foil.points().len(), 25);
    assert_eq!(report.warnings.len(), 1, "{report:?}");
    assert!(report.warnings[0].contains("merged 2"), "{report:?}");
    assert!(report.warnings[0].contains("line 7"), "{report:?}");
}

#[test]
fn clockwise_order_is_reversed_with_a_warning() {
    let (foil, report) = parse_file("clockwise.dat").unwrap();
    assert_eq!(report.warnings.len(), 1, "{report:?}");
    assert!(report.warnings[0].contains("clockwise"), "{report:?}");
    let p = foil.points();
    assert!(
        p[0].y > 0.0 && p[p.len() - 1].y < 0.0,
        "starts on the upper surface"
    );
    let (reference, _) = parse_file("duplicated_points.dat").unwrap();
    assert_eq!(p, reference.points());
}

#[test]
fn unnormalised_chord_is_normalised_with_a_warning() {
    let (foil, report) = parse_file("unnormalised_chord.dat").unwrap();
    assert_eq!(report.warnings.len(), 1, "{report:?}");
    assert!(
        report.warnings[0].starts_with("normalised the chord"),
        "{report:?}"
    );
    let (reference, _) = parse_file("duplicated_points.dat").unwrap();
    // The file is the 5-decimal contour scaled by 250 and rounded to 4 decimals (4e-7 c), and
    // the farthest-point leading edge of its spline may sit up to ~1e-5 c off the data point:
    // 5e-5 c covers both.
    for (a, b) in foil.points().iter().zip(reference.points()) {
        assert!((a - b).norm() < 5e-5, "{a} vs {b}");
    }
    let kept = Airfoil::parse(
        &std::fs::read_to_string(data_path("bad_input/unnormalised_chord.dat")).unwrap(),
        "kept",
        &ParseOptions { keep_chord: true },
    )
    .unwrap();
    assert!((kept.0.properties().chord - 250.0).abs() < 0.01);
}

/// xorshift64 (Marsaglia 2003): a tiny deterministic generator for the garbage below.
struct XorShift(u64);

impl XorShift {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 << 13;
        self.0 ^= self.0 >> 7;
        self.0 ^= self.0 << 17;
        self.0
    }
}

#[test]
fn garbage_never_panics() {
    let mut rng = XorShift(0x5eed_1234_abcd_0042);
    let good = std::fs::read_to_string(data_path("bad_input/duplicated_points.dat")).unwrap();
    let alphabet = b"0123456789 .,-+eE\n\tnaNiIf#x";
    let mut outcomes = [0usize; 2];
    for round in 0..3000 {
        let text: String = match round % 3 {
            // Random bytes, lossily decoded.
            0 => {
                let len = (rng.next() % 400) as usize;
                let bytes: Vec<u8> = (0..len).map(|_| rng.next() as u8).collect();
                String::from_utf8_lossy(&bytes).into_owned()
            }
            // Random text from number-like characters.
            1 => {
                let len = (rng.next() % 600) as usize;
                (0..len)
                    .map(|_| alphabet[(rng.next() % alphabet.len() as u64) as usize] as char)
                    .collect()
            }
            // A good file with a few characters replaced.
            _ => {
                let mut bytes = good.clone().into_bytes();
                for _ in 0..(1 + rng.next() % 4) {
                    let at = (rng.next() % bytes.len() as u64) as usize;
                    bytes[at] = alphabet[(rng.next() % alphabet.len() as u64) as usize];
                }
                String::from_utf8_lossy(&bytes).into_owned()
            }
        };
        let result = Airfoil::parse(&text, "garbage", &ParseOptions::default());
        match result {
            Ok((foil, _)) => {
                assert!(foil.points().len() >= 10);
                assert!(foil
                    .points()
                    .iter()
                    .all(|p| p.x.is_finite() && p.y.is_finite()));
                // Whatever validation accepted, the spline-based steps must handle too.
                let panels = foil.repanel(160).expect("160 panels is a valid request");
                assert_eq!(panels.points().len(), 161);
                let _ = panels.properties();
                outcomes[0] += 1;
            }
            Err(error) => {
                assert!(!error.to_string().is_empty());
                outcomes[1] += 1;
            }
        }
    }
    println!("garbage: {} parsed, {} rejected", outcomes[0], outcomes[1]);
    assert!(outcomes[1] > 0);
}
