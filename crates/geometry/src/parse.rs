//! Reading coordinate text in the two plain layouts.
//!
//! * Single loop: an optional title line, then `x y` pairs from the trailing edge over the upper
//!   surface to the leading edge and back along the lower surface.
//! * Two surfaces: an optional title line, a line with the point counts of the two surfaces
//!   (e.g. `61. 61.`), then the upper surface from leading to trailing edge, then the lower surface
//!   from leading to trailing edge.
//!
//! The layout is detected from the first numeric line: two integer-valued numbers, both at least
//! 2, are read as the point counts. Numbers may be separated by spaces, tabs or commas; blank lines
//! are skipped and text after the first two numbers of a line is ignored. This module only turns
//! text into located points; all geometric checks live in [`crate::validate`].

use nalgebra::Point2;

use crate::error::{GeometryError, Location};
use crate::validate::LocatedPoints;

/// What the text held: an optional title and the points in single-loop order.
#[derive(Debug)]
pub(crate) struct ParsedText {
    /// The title line, trimmed, if the text had one.
    pub title: Option<String>,
    /// Points in single-loop order with the line each came from.
    pub points: LocatedPoints,
}

/// One non-blank line split into tokens.
struct TokenLine<'a> {
    line: usize,
    tokens: Vec<&'a str>,
}

fn split_tokens(text: &str) -> Vec<&str> {
    text.split(|c: char| c.is_whitespace() || c == ',')
        .filter(|t| !t.is_empty())
        .collect()
}

/// Whether the first two tokens both read as numbers (finite or not).
fn starts_with_two_numbers(tokens: &[&str]) -> bool {
    tokens.len() >= 2 && tokens[..2].iter().all(|t| t.parse::<f64>().is_ok())
}

/// Reads the `x y` pair at the start of a coordinate line.
fn read_pair(source_name: &str, line: &TokenLine<'_>) -> Result<(f64, f64), GeometryError> {
    let number = |token: &str| -> Result<f64, GeometryError> {
        let value: f64 = token.parse().map_err(|_| GeometryError::NotANumber {
            source_name: source_name.to_owned(),
            line: line.line,
            token: token.to_owned(),
        })?;
        if value.is_finite() {
            Ok(value)
        } else {
            Err(GeometryError::NotFinite {
                source_name: source_name.to_owned(),
                location: Location::Line(line.line),
                value: token.to_owned(),
            })
        }
    };
    let x = number(line.tokens[0])?;
    let Some(second) = line.tokens.get(1) else {
        return Err(GeometryError::MissingCoordinate {
            source_name: source_name.to_owned(),
            line: line.line,
        });
    };
    let y = number(second)?;
    Ok((x, y))
}

/// The point counts if this pair looks like a two-surface count line.
fn as_point_counts((a, b): (f64, f64)) -> Option<(usize, usize)> {
    let is_count = |v: f64| (2.0..=1.0e6).contains(&v) && v.fract() == 0.0;
    // The casts are exact: both values are integers in [2, 1e6].
    (is_count(a) && is_count(b)).then_some((a as usize, b as usize))
}

/// Parses coordinate text into single-loop order (see the module doc for the layouts).
pub(crate) fn parse_text(text: &str, source_name: &str) -> Result<ParsedText, GeometryError> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut lines: Vec<TokenLine<'_>> = text
        .lines()
        .enumerate()
        .map(|(i, l)| TokenLine {
            line: i + 1,
            tokens: split_tokens(l),
        })
        .filter(|l| !l.tokens.is_empty())
        .collect();

    let mut title = None;
    if let Some(first) = lines.first() {
        if !starts_with_two_numbers(&first.tokens) {
            let raw = text.lines().nth(first.line - 1).unwrap_or_default();
            title = Some(raw.trim().to_owned());
            lines.remove(0);
        }
    }
    let Some(first) = lines.first() else {
        return Err(GeometryError::Empty {
            source_name: source_name.to_owned(),
        });
    };

    let first_pair = read_pair(source_name, first)?;
    let points = match as_point_counts(first_pair) {
        Some((upper, lower)) => {
            let count_line = first.line;
            let rows = read_rows(source_name, &lines[1..])?;
            if rows.points.len() != upper + lower {
                return Err(GeometryError::CountMismatch {
                    source_name: source_name.to_owned(),
                    line: count_line,
                    upper,
                    lower,
                    found: rows.points.len(),
                });
            }
            join_surfaces(rows, upper)
        }
        None => read_rows(source_name, &lines)?,
    };
    Ok(ParsedText { title, points })
}

fn read_rows(source_name: &str, lines: &[TokenLine<'_>]) -> Result<LocatedPoints, GeometryError> {
    let mut points = LocatedPoints::default();
    for line in lines {
        let (x, y) = read_pair(source_name, line)?;
        points.push(Point2::new(x, y), Location::Line(line.line));
    }
    Ok(points)
}

/// Turns `upper (LE→TE), lower (LE→TE)` into single-loop order TE → upper → LE → lower → TE.
/// The leading-edge point that both surfaces list is kept once (it is part of the layout, not a
/// repeated point of the data).
fn join_surfaces(rows: LocatedPoints, upper_count: usize) -> LocatedPoints {
    let (upper, mut lower) = rows.split_at(upper_count);
    let mut joined = upper.reversed();
    if let (Some(le_upper), Some(le_lower)) = (upper.points.first(), lower.points.first()) {
        if le_upper == le_lower {
            lower = lower.split_at(1).1;
        }
    }
    joined.extend(lower);
    joined
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn single_loop_with_title_commas_tabs_and_trailing_text() {
        let text = "my section\n1.0, 0.0\n\n0.5\t0.05 upper\n0 0\n0.5 -0.05\n1 0 end\n";
        let parsed = parse_text(text, "t.dat").unwrap();
        assert_eq!(parsed.title.as_deref(), Some("my section"));
        assert_eq!(parsed.points.points.len(), 5);
        assert_eq!(parsed.points.locations[1], Location::Line(4));
        assert_eq!(parsed.points.points[3], Point2::new(0.5, -0.05));
    }

    #[test]
    fn missing_title_is_accepted() {
        let parsed = parse_text("1 0\n0 0\n1 0.1\n", "t").unwrap();
        assert!(parsed.title.is_none());
        assert_eq!(parsed.points.points.len(), 3);
    }

    #[test]
    fn two_surface_layout_is_joined_into_one_loop() {
        let text = "two surfaces\n3. 3.\n0 0\n0.5 0.05\n1 0\n0 0\n0.5 -0.04\n1 0\n";
        let parsed = parse_text(text, "t").unwrap();
        let xs: Vec<f64> = parsed.points.points.iter().map(|p| p.x).collect();
        let ys: Vec<f64> = parsed.points.points.iter().map(|p| p.y).collect();
        assert_eq!(xs, vec![1.0, 0.5, 0.0, 0.5, 1.0]);
        assert_eq!(ys, vec![0.0, 0.05, 0.0, -0.04, 0.0]);
        assert_eq!(parsed.points.locations[0], Location::Line(5));
    }

    #[test]
    fn count_mismatch_names_the_count_line() {
        let text = "title\n\n4 3\n0 0\n0.5 0.05\n1 0\n0 0\n0.5 -0.04\n1 0\n";
        match parse_text(text, "t") {
            Err(GeometryError::CountMismatch { line, found, .. }) => {
                assert_eq!((line, found), (3, 6));
            }
            other => panic!("unexpected {other:?}"),
        }
    }

    #[test]
    fn bad_tokens_are_located() {
        match parse_text("t\n1 0\n0.5 abc\n", "f") {
            Err(GeometryError::NotANumber { line, token, .. }) => {
                assert_eq!((line, token.as_str()), (3, "abc"));
            }
            other => panic!("unexpected {other:?}"),
        }
        match parse_text("t\n1 0\n0.5\n", "f") {
            Err(GeometryError::MissingCoordinate { line, .. }) => assert_eq!(line, 3),
            other => panic!("unexpected {other:?}"),
        }
        match parse_text("t\n1 0\n0.5 inf\n", "f") {
            Err(GeometryError::NotFinite { location, .. }) => {
                assert_eq!(location, Location::Line(3));
            }
            other => panic!("unexpected {other:?}"),
        }
        assert!(matches!(
            parse_text("only a title\n\n", "f"),
            Err(GeometryError::Empty { .. })
        ));
    }
}
