//! Checks and corrections that turn a raw point list into a valid contour.
//!
//! In order: finite values; repeated consecutive points (merged, warning); all points equal
//! (error); too few points (error); zero enclosed area (error); self-intersection (error naming
//! both segments); clockwise order (reversed, warning); chord not normalised (moved to leading
//! edge (0,0) and trailing-edge midpoint (1,0), warning — or kept, with a note, when
//! [`ParseOptions::keep_chord`] is set). The leading edge of a contour that is not yet in chord
//! coordinates is the point of the arc-length spline farthest from the trailing-edge midpoint
//! (see [`ChordLine::of`]).

use nalgebra::{Point2, Rotation2, Vector2};

use crate::error::{GeometryError, Location, Segment};
use crate::spline::ContourSpline;
use crate::ParseOptions;

/// Fewest distinct points accepted for a section.
pub(crate) const MIN_POINTS: usize = 10;

/// Consecutive points closer than this fraction of the bounding-box diagonal are one point.
const DUPLICATE_TOLERANCE: f64 = 1e-9;

/// A contour whose trailing-edge midpoint is within this distance of (1, 0) and that passes
/// within it of (0, 0) on its nose is already in chord coordinates (the precision of a
/// 4-decimal coordinate file).
const NORMALISED_TOLERANCE: f64 = 1e-4;

/// How far from the farthest-point leading edge the origin may lie and still count as "on the
/// nose" (in chord units).
const NOSE_EXTENT: f64 = 0.05;

/// Points with the line or index each came from, so that errors can point at the input.
#[derive(Debug, Clone, Default)]
pub(crate) struct LocatedPoints {
    pub points: Vec<Point2<f64>>,
    pub locations: Vec<Location>,
}

impl LocatedPoints {
    pub fn push(&mut self, point: Point2<f64>, location: Location) {
        self.points.push(point);
        self.locations.push(location);
    }

    pub fn split_at(self, mid: usize) -> (Self, Self) {
        let (mut points, mut locations) = (self.points, self.locations);
        let tail = Self {
            points: points.split_off(mid),
            locations: locations.split_off(mid),
        };
        (Self { points, locations }, tail)
    }

    pub fn reversed(&self) -> Self {
        Self {
            points: self.points.iter().rev().copied().collect(),
            locations: self.locations.iter().rev().copied().collect(),
        }
    }

    pub fn extend(&mut self, other: Self) {
        self.points.extend(other.points);
        self.locations.extend(other.locations);
    }
}

/// Runs every check and correction; returns the contour and the warnings.
pub(crate) fn validate(
    source_name: &str,
    raw: LocatedPoints,
    options: &ParseOptions,
) -> Result<(Vec<Point2<f64>>, Vec<String>), GeometryError> {
    let mut warnings = Vec::new();
    check_finite(source_name, &raw)?;
    let scale = bounding_diagonal(&raw.points);
    let mut contour = merge_repeated(raw, scale, &mut warnings);
    let count = contour.points.len();
    if count == 1 || (count > 0 && scale == 0.0) {
        return Err(GeometryError::AllPointsCoincide {
            source_name: source_name.to_owned(),
        });
    }
    if count < MIN_POINTS {
        return Err(GeometryError::TooFewPoints {
            source_name: source_name.to_owned(),
            count,
            minimum: MIN_POINTS,
        });
    }
    let ring = Ring::new(&contour.points, scale);
    let area = ring.signed_area(&contour.points);
    if area.abs() <= 1e-12 * scale * scale {
        return Err(GeometryError::ZeroArea {
            source_name: source_name.to_owned(),
        });
    }
    if let Some((first, second)) = ring.first_crossing(&contour.points, scale) {
        let segment = |k: usize| Segment {
            from: contour.locations[k],
            to: contour.locations[ring.next(k)],
        };
        return Err(GeometryError::SelfIntersection {
            source_name: source_name.to_owned(),
            first: segment(first),
            second: segment(second),
        });
    }
    if area < 0.0 {
        contour = contour.reversed();
        warnings.push(
            "points were in clockwise order; reversed to trailing edge -> upper surface -> \
             leading edge -> lower surface"
                .to_owned(),
        );
    }
    let points = normalise_chord(contour.points, options, &mut warnings);
    Ok((points, warnings))
}

fn check_finite(source_name: &str, raw: &LocatedPoints) -> Result<(), GeometryError> {
    for (p, &location) in raw.points.iter().zip(&raw.locations) {
        if let Some(bad) = [p.x, p.y].into_iter().find(|v| !v.is_finite()) {
            return Err(GeometryError::NotFinite {
                source_name: source_name.to_owned(),
                location,
                value: bad.to_string(),
            });
        }
    }
    Ok(())
}

fn bounding_diagonal(points: &[Point2<f64>]) -> f64 {
    let (mut lo, mut hi) = (
        Vector2::repeat(f64::INFINITY),
        Vector2::repeat(f64::NEG_INFINITY),
    );
    for p in points {
        lo = lo.inf(&p.coords);
        hi = hi.sup(&p.coords);
    }
    if points.is_empty() {
        0.0
    } else {
        (hi - lo).norm()
    }
}

fn merge_repeated(raw: LocatedPoints, scale: f64, warnings: &mut Vec<String>) -> LocatedPoints {
    let mut kept = LocatedPoints::default();
    let mut merged = Vec::new();
    for (p, location) in raw.points.into_iter().zip(raw.locations) {
        match kept.points.last() {
            Some(last) if (p - last).norm() <= DUPLICATE_TOLERANCE * scale => {
                merged.push(location.to_string());
            }
            _ => kept.push(p, location),
        }
    }
    if !merged.is_empty() {
        warnings.push(format!(
            "merged {} repeated consecutive point(s) into the point before ({})",
            merged.len(),
            merged.join(", ")
        ));
    }
    kept
}

/// The contour as a closed polygon: the trailing-edge base closes it when the TE is open; with a
/// sharp TE the last point equals the first and is left out.
struct Ring {
    len: usize,
}

impl Ring {
    fn new(points: &[Point2<f64>], scale: f64) -> Self {
        let n = points.len();
        let sharp = (points[0] - points[n - 1]).norm() <= DUPLICATE_TOLERANCE * scale;
        Self {
            len: if sharp { n - 1 } else { n },
        }
    }

    fn next(&self, k: usize) -> usize {
        (k + 1) % self.len
    }

    /// Shoelace formula; positive for counter-clockwise order.
    fn signed_area(&self, points: &[Point2<f64>]) -> f64 {
        0.5 * (0..self.len)
            .map(|k| {
                let (a, b) = (points[k], points[self.next(k)]);
                a.x * b.y - b.x * a.y
            })
            .sum::<f64>()
    }

    /// First pair of non-neighbouring segments (in contour order) that cross or touch.
    fn first_crossing(&self, points: &[Point2<f64>], scale: f64) -> Option<(usize, usize)> {
        let m = self.len;
        let segment = |k: usize| (points[k], points[self.next(k)]);
        let eps = 1e-14 * scale * scale;
        for i in 0..m {
            let (a, b) = segment(i);
            for j in i + 2..m {
                if i == 0 && j == m - 1 {
                    continue; // neighbours across the closure
                }
                let (c, d) = segment(j);
                if a.x.max(b.x) < c.x.min(d.x)
                    || c.x.max(d.x) < a.x.min(b.x)
                    || a.y.max(b.y) < c.y.min(d.y)
                    || c.y.max(d.y) < a.y.min(b.y)
                {
                    continue;
                }
                if segments_meet(a, b, c, d, eps) {
                    return Some((i, j));
                }
            }
        }
        None
    }
}

fn orientation(a: Point2<f64>, b: Point2<f64>, c: Point2<f64>, eps: f64) -> i8 {
    let cross = (b - a).perp(&(c - a));
    if cross > eps {
        1
    } else if cross < -eps {
        -1
    } else {
        0
    }
}

fn within_box(a: Point2<f64>, b: Point2<f64>, p: Point2<f64>) -> bool {
    p.x >= a.x.min(b.x) && p.x <= a.x.max(b.x) && p.y >= a.y.min(b.y) && p.y <= a.y.max(b.y)
}

/// Whether closed segments ab and cd share a point (standard orientation test).
fn segments_meet(a: Point2<f64>, b: Point2<f64>, c: Point2<f64>, d: Point2<f64>, eps: f64) -> bool {
    let o1 = orientation(a, b, c, eps);
    let o2 = orientation(a, b, d, eps);
    let o3 = orientation(c, d, a, eps);
    let o4 = orientation(c, d, b, eps);
    if o1 * o2 < 0 && o3 * o4 < 0 {
        return true;
    }
    (o1 == 0 && within_box(a, b, c))
        || (o2 == 0 && within_box(a, b, d))
        || (o3 == 0 && within_box(c, d, a))
        || (o4 == 0 && within_box(c, d, b))
}

/// Leading edge, chord and chord-line direction of a contour.
pub(crate) struct ChordLine {
    pub leading_edge: Point2<f64>,
    pub chord: f64,
    /// Unit vector from the leading edge to the trailing-edge midpoint.
    pub direction: Vector2<f64>,
    /// Whether the contour was already in chord coordinates.
    pub in_chord_coordinates: bool,
}

impl ChordLine {
    /// The chord line of a contour. A contour already in chord coordinates (trailing-edge
    /// midpoint at (1, 0), passing through (0, 0) on its nose) keeps its own chord line: for
    /// designed sections such as the cambered NACA families, the chord joins the mean-line ends,
    /// and the farthest-point leading edge lies a little off it (NACA 4412: about 0.003 c, a
    /// 0.18° rotation). Otherwise the leading edge is the spline point farthest from the
    /// trailing-edge midpoint.
    pub fn of(points: &[Point2<f64>], spline: &ContourSpline) -> Self {
        let te_mid = trailing_edge_midpoint(points);
        let farthest = spline.point(spline.farthest_from(te_mid));
        let origin = Point2::origin();
        let in_chord_coordinates = (te_mid - Point2::new(1.0, 0.0)).norm() <= NORMALISED_TOLERANCE
            && (farthest - origin).norm() <= NOSE_EXTENT
            && (spline.point(spline.nearest_to(origin)) - origin).norm() <= NORMALISED_TOLERANCE;
        let leading_edge = if in_chord_coordinates {
            origin
        } else {
            farthest
        };
        let to_te = te_mid - leading_edge;
        Self {
            leading_edge,
            chord: to_te.norm(),
            direction: to_te / to_te.norm(),
            in_chord_coordinates,
        }
    }

    /// Position of `p` in chord coordinates: x/c along the chord line, y/c normal to it.
    pub fn to_chord_frame(&self, p: Point2<f64>) -> Point2<f64> {
        let r = p - self.leading_edge;
        Point2::new(
            r.dot(&self.direction) / self.chord,
            self.direction.perp(&r) / self.chord,
        )
    }
}

pub(crate) fn trailing_edge_midpoint(points: &[Point2<f64>]) -> Point2<f64> {
    nalgebra::center(&points[0], &points[points.len() - 1])
}

fn normalise_chord(
    points: Vec<Point2<f64>>,
    options: &ParseOptions,
    warnings: &mut Vec<String>,
) -> Vec<Point2<f64>> {
    let spline = ContourSpline::new(&points);
    let chord_line = ChordLine::of(&points, &spline);
    if chord_line.in_chord_coordinates {
        return points;
    }
    let le = chord_line.leading_edge;
    let angle_deg = chord_line
        .direction
        .y
        .atan2(chord_line.direction.x)
        .to_degrees();
    let description = format!(
        "leading edge at ({:.6}, {:.6}), chord {:.6}, chord line at {:.4} deg",
        le.x, le.y, chord_line.chord, angle_deg
    );
    if options.keep_chord {
        warnings.push(format!(
            "chord not normalised ({description}); kept as given because keep_chord is set"
        ));
        return points;
    }
    warnings.push(format!(
        "normalised the chord ({description}) to leading edge (0, 0) and trailing-edge \
         midpoint (1, 0)"
    ));
    let rotation = Rotation2::rotation_between(&chord_line.direction, &Vector2::x());
    points
        .into_iter()
        .map(|p| Point2::from(rotation * (p - le) / chord_line.chord))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn located(points: &[(f64, f64)]) -> LocatedPoints {
        let mut out = LocatedPoints::default();
        for (i, &(x, y)) in points.iter().enumerate() {
            out.push(Point2::new(x, y), Location::Point(i + 1));
        }
        out
    }

    #[test]
    fn crossing_and_touching_segments_are_detected() {
        let p = |x, y| Point2::new(x, y);
        assert!(segments_meet(
            p(0., 0.),
            p(1., 1.),
            p(0., 1.),
            p(1., 0.),
            0.0
        ));
        assert!(segments_meet(
            p(0., 0.),
            p(1., 0.),
            p(0.5, 0.),
            p(0.5, 1.),
            0.0
        ));
        assert!(!segments_meet(
            p(0., 0.),
            p(1., 0.),
            p(0., 0.1),
            p(1., 0.1),
            0.0
        ));
        assert!(segments_meet(
            p(0., 0.),
            p(1., 0.),
            p(0.5, 0.),
            p(2., 0.),
            0.0
        ));
    }

    #[test]
    fn figure_eight_reports_the_crossing_segments() {
        // TE (1,0) over the "upper" side that dips below the lower side: a bow tie.
        let pts = [
            (1.0, 0.0),
            (0.8, 0.05),
            (0.6, 0.06),
            (0.4, -0.06),
            (0.2, -0.09),
            (0.0, 0.0),
            (0.2, 0.09),
            (0.4, 0.06),
            (0.6, -0.06),
            (0.8, -0.05),
            (1.0, 0.0),
        ];
        match validate("bowtie", located(&pts), &ParseOptions::default()) {
            Err(GeometryError::SelfIntersection { first, second, .. }) => {
                assert_eq!(first.from, Location::Point(3));
                assert_eq!(second.from, Location::Point(8));
            }
            other => panic!("unexpected {other:?}"),
        }
    }
}
