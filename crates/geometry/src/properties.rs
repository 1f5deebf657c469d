//! Geometric properties of a section, in chord units.
//!
//! All lengths are fractions of the chord c (leading edge = spline point farthest from the
//! trailing-edge midpoint), measured in the chord frame (x along the chord line):
//! * thickness t(x) = y_upper(x) − y_lower(x) and camber (y_upper + y_lower)/2, with both surfaces
//!   interpolated at the same x station (the "vertical" convention; NACA sections apply thickness
//!   normal to the mean line, so this differs from the nominal thickness by O(t·camber slope²));
//! * leading-edge radius 1/|κ| of the spline at the leading edge (osculating circle); it converges
//!   at second order with the point spacing on the nose (NACA 0012 with 81 cosine-spaced points
//!   per side: −1.7 %; 161: −0.4 %), so measure it on the finest coordinates available rather
//!   than on a re-panelled contour;
//! * trailing-edge thickness = distance between the two trailing-edge points;
//! * trailing-edge angle between the two surfaces' secants over the last 2 % of chord;
//! * cross-section area by the shoelace formula on the contour points, closed by the TE base.

use nalgebra::Point2;

use crate::spline::ContourSpline;
use crate::validate::{trailing_edge_midpoint, ChordLine};

/// Geometric properties of a section; lengths in fractions of the chord, area in chord².
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SectionProperties {
    /// Chord in the contour's own units (1 for a normalised section).
    pub chord: f64,
    /// Largest thickness, y_upper − y_lower at the same x/c.
    pub max_thickness: f64,
    /// x/c where the thickness is largest.
    pub max_thickness_x: f64,
    /// Camber of largest magnitude (signed; positive above the chord line).
    pub max_camber: f64,
    /// x/c of the largest camber.
    pub max_camber_x: f64,
    /// Leading-edge radius (osculating circle of the spline at the leading edge).
    pub leading_edge_radius: f64,
    /// Trailing-edge thickness: distance between the first and last contour points.
    pub trailing_edge_thickness: f64,
    /// Angle between the upper and lower surface over the last 2 % of chord, in degrees.
    pub trailing_edge_angle_deg: f64,
    /// Enclosed cross-section area, in chord².
    pub area: f64,
}

/// Stations for thickness and camber (cosine spacing, end points excluded).
const STATIONS: usize = 400;
/// Spline samples per surface for the station interpolation.
const SURFACE_SAMPLES: usize = 2000;
/// Chord fraction over which the trailing-edge angle is measured.
const TE_ANGLE_LENGTH: f64 = 0.02;

/// One surface as a dense polyline in the chord frame, from the leading edge to the TE.
struct Surface(Vec<Point2<f64>>);

impl Surface {
    fn sample(spline: &ContourSpline, frame: &ChordLine, s_le: f64, s_te: f64) -> Self {
        // Quadratic clustering towards the leading edge, where the surface turns fastest.
        Self(
            (0..=SURFACE_SAMPLES)
                .map(|k| {
                    let u = k as f64 / SURFACE_SAMPLES as f64;
                    let s = s_le + (s_te - s_le) * (1.0 - (0.5 * std::f64::consts::PI * u).cos());
                    frame.to_chord_frame(spline.point(s))
                })
                .collect(),
        )
    }

    /// y at chord station x: the crossing closest to the trailing edge, linear in between.
    fn y_at(&self, x: f64) -> Option<f64> {
        self.0.windows(2).rev().find_map(|w| {
            let (a, b) = (w[0], w[1]);
            let inside = (a.x <= x && x <= b.x) || (b.x <= x && x <= a.x);
            (inside && a.x != b.x).then(|| a.y + (b.y - a.y) * (x - a.x) / (b.x - a.x))
        })
    }
}

/// x and value at the extremum of the parabola through three (x, value) pairs; falls back to the
/// middle pair when the three are collinear.
fn parabola_vertex(p: [(f64, f64); 3]) -> (f64, f64) {
    let [(x0, y0), (x1, y1), (x2, y2)] = p;
    let d01 = (y1 - y0) / (x1 - x0);
    let d12 = (y2 - y1) / (x2 - x1);
    let a = (d12 - d01) / (x2 - x0);
    if a == 0.0 {
        return (x1, y1);
    }
    let b = d01 - a * (x0 + x1);
    let xv = (-b / (2.0 * a)).clamp(x0, x2);
    (xv, y1 + (xv - x1) * (d01 + a * (xv - x0)))
}

/// Largest value of `f` over the stations (by `key`), refined by a parabola through neighbours.
fn refined_extremum(samples: &[(f64, f64)], key: impl Fn(f64) -> f64) -> (f64, f64) {
    let Some(best) =
        (0..samples.len()).max_by(|&a, &b| key(samples[a].1).total_cmp(&key(samples[b].1)))
    else {
        return (0.0, 0.0);
    };
    if best == 0 || best + 1 == samples.len() {
        return samples[best];
    }
    parabola_vertex([samples[best - 1], samples[best], samples[best + 1]])
}

pub(crate) fn section_properties(points: &[Point2<f64>]) -> SectionProperties {
    let spline = ContourSpline::new(points);
    let frame = ChordLine::of(points, &spline);
    let s_le = spline.farthest_from(trailing_edge_midpoint(points));
    let upper = Surface::sample(&spline, &frame, s_le, 0.0);
    let lower = Surface::sample(&spline, &frame, s_le, spline.length());

    let mut thickness = Vec::with_capacity(STATIONS);
    let mut camber = Vec::with_capacity(STATIONS);
    for j in 1..STATIONS {
        let x = 0.5 * (1.0 - (std::f64::consts::PI * j as f64 / STATIONS as f64).cos());
        if let (Some(yu), Some(yl)) = (upper.y_at(x), lower.y_at(x)) {
            thickness.push((x, yu - yl));
            camber.push((x, 0.5 * (yu + yl)));
        }
    }
    let (max_thickness_x, max_thickness) = refined_extremum(&thickness, |t| t);
    let (max_camber_x, max_camber) = refined_extremum(&camber, f64::abs);

    let n = points.len();
    let te_upper = frame.to_chord_frame(points[0]);
    let te_lower = frame.to_chord_frame(points[n - 1]);
    let x_angle = 1.0 - TE_ANGLE_LENGTH;
    let trailing_edge_angle_deg = match (upper.y_at(x_angle), lower.y_at(x_angle)) {
        (Some(yu), Some(yl)) => {
            let tu = te_upper - Point2::new(x_angle, yu);
            let tl = te_lower - Point2::new(x_angle, yl);
            tu.angle(&tl).to_degrees()
        }
        _ => f64::NAN,
    };

    let closed_area: f64 = (0..n)
        .map(|k| {
            let (a, b) = (points[k], points[(k + 1) % n]);
            a.x * b.y - b.x * a.y
        })
        .sum();
    SectionProperties {
        chord: frame.chord,
        max_thickness,
        max_thickness_x,
        max_camber,
        max_camber_x,
        leading_edge_radius: 1.0 / (spline.curvature(s_le).abs() * frame.chord),
        trailing_edge_thickness: (points[0] - points[n - 1]).norm() / frame.chord,
        trailing_edge_angle_deg,
        area: 0.5 * closed_area / (frame.chord * frame.chord),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn parabola_vertex_is_exact_for_a_parabola() {
        let f = |x: f64| 3.0 - 2.0 * (x - 0.31) * (x - 0.31);
        let (xv, yv) = parabola_vertex([(0.2, f(0.2)), (0.3, f(0.3)), (0.45, f(0.45))]);
        assert_relative_eq!(xv, 0.31, epsilon = 1e-12);
        assert_relative_eq!(yv, 3.0, epsilon = 1e-12);
    }
}
