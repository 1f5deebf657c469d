//! Re-panelling: redistribute nodes along the arc-length spline, clustered by curvature.
//!
//! The target panel size along the contour is h(s) = λ / (1 + A (|κ| c)^P), with the curvature
//! κ of the spline smoothed over a short arc (±0.2 % of the perimeter) so that waviness of raw
//! coordinates does not show, then capped at both trailing-edge ends to `TE_SIZE_FRACTION` and at
//! the leading edge to `LE_SIZE_FRACTION` of the median mid-chord size, and finally limited in gradient, |dh/ds| ≤ `GROWTH`, so that
//! neighbouring panels differ by at most about 1 + `GROWTH`. λ is fixed by the panel count.
//! Nodes sit at equal increments of ∫ ds/h. The first and last nodes are the original trailing-edge
//! points, so a finite trailing-edge gap is kept. The targets (leading-edge panel 0.2–0.5 % c,
//! trailing-edge panels about a quarter of the mid-chord size, neighbour ratio ≤ 1.2) are the
//! project's panelling guidance (common practice, no source).

use nalgebra::Point2;

use crate::spline::ContourSpline;
use crate::validate::ChordLine;

/// Fewest panels accepted by re-panelling.
pub(crate) const MIN_PANELS: usize = 12;

/// Curvature weight A in the size function (tuned on NACA 0006–0021, 4412, 23012 and E387).
const CURVATURE_WEIGHT: f64 = 1.0;
/// Curvature exponent P in the size function.
const CURVATURE_POWER: f64 = 0.4;
/// Trailing-edge panel size as a fraction of the median mid-chord size.
const TE_SIZE_FRACTION: f64 = 0.25;
/// Largest leading-edge panel size as a fraction of the median mid-chord size (binds only on
/// thick sections, whose blunt nose has too little curvature to cluster the panels enough).
const LE_SIZE_FRACTION: f64 = 0.25;
/// Largest size gradient |dh/ds|: neighbouring panels differ by about this fraction.
const GROWTH: f64 = 0.15;
/// Half-width of the curvature smoothing window, as a fraction of the perimeter.
const SMOOTHING_HALF_WIDTH: f64 = 0.002;
/// Fine sampling of the spline used to build the size function.
const FINE_SAMPLES: usize = 4000;

/// New node positions: `n_panels + 1` points, same orientation and end points as `points`.
/// Precondition: `points` is a validated contour and `n_panels >= MIN_PANELS`.
pub(crate) fn repanel_points(points: &[Point2<f64>], n_panels: usize) -> Vec<Point2<f64>> {
    let spline = ContourSpline::new(points);
    let chord_line = ChordLine::of(points, &spline);
    let s = fine_grid(&spline);
    let curvature: Vec<f64> = s
        .iter()
        .map(|&si| spline.curvature(si).abs() * chord_line.chord)
        .collect();
    let curvature = smooth(&s, &curvature, SMOOTHING_HALF_WIDTH * spline.length());
    let mut size: Vec<f64> = curvature
        .iter()
        .map(|k| 1.0 / (1.0 + CURVATURE_WEIGHT * k.powf(CURVATURE_POWER)))
        .collect();

    let mut mid_chord: Vec<f64> = s
        .iter()
        .zip(&size)
        .filter(|(&si, _)| (0.25..=0.75).contains(&chord_line.to_chord_frame(spline.point(si)).x))
        .map(|(_, &h)| h)
        .collect();
    mid_chord.sort_by(f64::total_cmp);
    let reference = mid_chord
        .get(mid_chord.len() / 2)
        .copied()
        .unwrap_or_else(|| size.iter().copied().fold(0.0, f64::max));
    let last = size.len() - 1;
    size[0] = size[0].min(TE_SIZE_FRACTION * reference);
    size[last] = size[last].min(TE_SIZE_FRACTION * reference);
    let s_le = spline.nearest_to(chord_line.leading_edge);
    let le = s.partition_point(|&si| si < s_le).min(last);
    size[le] = size[le].min(LE_SIZE_FRACTION * reference);

    // Gradient limit in physical units: panel length = scale · h, scale = (∫ds/h) / N.
    let mut scale = integrate_inverse(&s, &size) / n_panels as f64;
    for _ in 0..50 {
        limit_gradient(&s, &mut size, GROWTH / scale);
        let updated = integrate_inverse(&s, &size) / n_panels as f64;
        let converged = (updated - scale).abs() <= 1e-9 * scale;
        scale = updated;
        if converged {
            break;
        }
    }

    let cumulative = cumulative_inverse(&s, &size);
    let total = cumulative[cumulative.len() - 1];
    let mut nodes = Vec::with_capacity(n_panels + 1);
    nodes.push(points[0]);
    let mut j = 0;
    for k in 1..n_panels {
        let target = total * k as f64 / n_panels as f64;
        while cumulative[j + 1] < target {
            j += 1;
        }
        let t = (target - cumulative[j]) / (cumulative[j + 1] - cumulative[j]);
        nodes.push(spline.point(s[j] + t * (s[j + 1] - s[j])));
    }
    nodes.push(points[points.len() - 1]);
    nodes
}

/// Samples evenly spaced in each knot interval, at least `FINE_SAMPLES` in all.
fn fine_grid(spline: &ContourSpline) -> Vec<f64> {
    let knots = spline.knots();
    let per_interval = FINE_SAMPLES.div_ceil(knots.len() - 1).max(4);
    let mut s = Vec::with_capacity(per_interval * knots.len());
    for w in knots.windows(2) {
        for q in 0..per_interval {
            s.push(w[0] + (w[1] - w[0]) * q as f64 / per_interval as f64);
        }
    }
    s.push(spline.length());
    s
}

/// Moving average over |s′ − s| ≤ half_width (window clipped at the ends), trapezoidal rule.
fn smooth(s: &[f64], values: &[f64], half_width: f64) -> Vec<f64> {
    let n = s.len();
    let mut integral = vec![0.0; n];
    for i in 1..n {
        integral[i] = integral[i - 1] + 0.5 * (values[i] + values[i - 1]) * (s[i] - s[i - 1]);
    }
    let at = |x: f64| -> f64 {
        let i = s.partition_point(|&v| v <= x).clamp(1, n - 1);
        let t = (x - s[i - 1]) / (s[i] - s[i - 1]);
        let v = values[i - 1] + t * (values[i] - values[i - 1]);
        integral[i - 1] + 0.5 * (values[i - 1] + v) * (x - s[i - 1])
    };
    let end = s[n - 1];
    s.iter()
        .map(|&si| {
            let (lo, hi) = ((si - half_width).max(0.0), (si + half_width).min(end));
            (at(hi) - at(lo)) / (hi - lo)
        })
        .collect()
}

/// Forward and backward sweeps so that |dh/ds| ≤ max_slope (only ever lowers h).
fn limit_gradient(s: &[f64], size: &mut [f64], max_slope: f64) {
    for i in 1..size.len() {
        size[i] = size[i].min(size[i - 1] + max_slope * (s[i] - s[i - 1]));
    }
    for i in (0..size.len() - 1).rev() {
        size[i] = size[i].min(size[i + 1] + max_slope * (s[i + 1] - s[i]));
    }
}

fn cumulative_inverse(s: &[f64], size: &[f64]) -> Vec<f64> {
    let mut out = vec![0.0; s.len()];
    for i in 1..s.len() {
        out[i] = out[i - 1] + 0.5 * (1.0 / size[i] + 1.0 / size[i - 1]) * (s[i] - s[i - 1]);
    }
    out
}

fn integrate_inverse(s: &[f64], size: &[f64]) -> f64 {
    cumulative_inverse(s, size)[s.len() - 1]
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn smoothing_keeps_a_linear_function_inside() {
        let s: Vec<f64> = (0..=100).map(|i| i as f64 * 0.01).collect();
        let v: Vec<f64> = s.iter().map(|x| 2.0 * x + 1.0).collect();
        let out = smooth(&s, &v, 0.05);
        for i in 10..90 {
            assert_relative_eq!(out[i], v[i], epsilon = 1e-12);
        }
    }

    #[test]
    fn gradient_limit_bounds_the_slope() {
        let s: Vec<f64> = (0..=50).map(|i| i as f64 * 0.02).collect();
        let mut h: Vec<f64> = s
            .iter()
            .map(|&x| if x < 0.5 { 0.01 } else { 1.0 })
            .collect();
        limit_gradient(&s, &mut h, 0.1);
        for i in 1..h.len() {
            assert!((h[i] - h[i - 1]).abs() <= 0.1 * 0.02 + 1e-15);
        }
        assert_relative_eq!(h[0], 0.01);
    }
}
