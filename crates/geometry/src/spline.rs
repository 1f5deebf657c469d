//! Parametric cubic spline of a contour on cumulative chord length.
//!
//! x(s) and y(s) are each an interpolating cubic spline with not-a-knot end conditions (third
//! derivative continuous at the second and second-to-last knots), where the parameter s is the
//! cumulative length of the straight segments between the input points, a standard approximation
//! of arc length (de Boor, *A Practical Guide to Splines*, 1978, ch. IV and V). Curvature is
//! κ = (x′y″ − y′x″)/(x′² + y′²)^{3/2}, positive where the contour turns counter-clockwise.
//! The second derivatives at the knots come from the usual tridiagonal system, solved with the
//! Thomas algorithm; the not-a-knot rows are folded into the first and last equations so that the
//! system stays tridiagonal and diagonally dominant.

use nalgebra::{Point2, Vector2};

/// One coordinate as a cubic spline: values and second derivatives at the knots.
#[derive(Debug, Clone)]
struct CubicSpline {
    values: Vec<f64>,
    second: Vec<f64>,
}

impl CubicSpline {
    /// Not-a-knot spline through `values` at knots `s` (strictly increasing, at least 4 knots).
    fn not_a_knot(s: &[f64], values: &[f64]) -> Self {
        let n = s.len();
        debug_assert!(n >= 4 && values.len() == n);
        let h: Vec<f64> = s.windows(2).map(|w| w[1] - w[0]).collect();
        let slope: Vec<f64> = (0..n - 1)
            .map(|i| (values[i + 1] - values[i]) / h[i])
            .collect();
        // Unknowns M_1 … M_{n-2}; M_0 and M_{n-1} follow from the not-a-knot conditions.
        let m = n - 2;
        let mut sub = vec![0.0; m];
        let mut diag = vec![0.0; m];
        let mut sup = vec![0.0; m];
        let mut rhs = vec![0.0; m];
        for k in 0..m {
            let i = k + 1;
            sub[k] = h[i - 1];
            diag[k] = 2.0 * (h[i - 1] + h[i]);
            sup[k] = h[i];
            rhs[k] = 6.0 * (slope[i] - slope[i - 1]);
        }
        // M_0 = ((h0 + h1) M_1 − h0 M_2) / h1 substituted into the first row.
        let (h0, h1) = (h[0], h[1]);
        diag[0] += h0 * (h0 + h1) / h1;
        sup[0] -= h0 * h0 / h1;
        // M_{n-1} = ((a + b) M_{n-2} − b M_{n-3}) / a with a = h_{n-3}, b = h_{n-2}.
        let (a, b) = (h[n - 3], h[n - 2]);
        diag[m - 1] += b * (a + b) / a;
        sub[m - 1] -= b * b / a;
        let inner = solve_tridiagonal(&sub, &diag, &sup, &rhs);
        let mut second = Vec::with_capacity(n);
        second.push(((h0 + h1) * inner[0] - h0 * inner[1]) / h1);
        second.extend_from_slice(&inner);
        second.push(((a + b) * inner[m - 1] - b * inner[m - 2]) / a);
        Self {
            values: values.to_vec(),
            second,
        }
    }

    /// Value and first two derivatives on interval `i` at offset `t` from its start.
    fn eval(&self, i: usize, t: f64, h: f64) -> [f64; 3] {
        let (y0, y1) = (self.values[i], self.values[i + 1]);
        let (m0, m1) = (self.second[i], self.second[i + 1]);
        let b = (y1 - y0) / h - h * (2.0 * m0 + m1) / 6.0;
        let c = 0.5 * m0;
        let d = (m1 - m0) / (6.0 * h);
        [
            y0 + t * (b + t * (c + t * d)),
            b + t * (2.0 * c + 3.0 * t * d),
            2.0 * c + 6.0 * t * d,
        ]
    }
}

/// Thomas algorithm for a diagonally dominant tridiagonal system.
fn solve_tridiagonal(sub: &[f64], diag: &[f64], sup: &[f64], rhs: &[f64]) -> Vec<f64> {
    let n = diag.len();
    let mut c = vec![0.0; n];
    let mut d = vec![0.0; n];
    c[0] = sup[0] / diag[0];
    d[0] = rhs[0] / diag[0];
    for i in 1..n {
        let denom = diag[i] - sub[i] * c[i - 1];
        c[i] = sup[i] / denom;
        d[i] = (rhs[i] - sub[i] * d[i - 1]) / denom;
    }
    let mut x = vec![0.0; n];
    x[n - 1] = d[n - 1];
    for i in (0..n - 1).rev() {
        x[i] = d[i] - c[i] * x[i + 1];
    }
    x
}

/// A contour as a smooth parametric curve P(s), s ∈ [0, length].
#[derive(Debug, Clone)]
pub(crate) struct ContourSpline {
    knots: Vec<f64>,
    x: CubicSpline,
    y: CubicSpline,
}

impl ContourSpline {
    /// Spline through the points. Precondition (guaranteed by validation): at least 4 points and
    /// no two consecutive points equal.
    pub fn new(points: &[Point2<f64>]) -> Self {
        let mut knots = Vec::with_capacity(points.len());
        knots.push(0.0);
        for w in points.windows(2) {
            let last = knots[knots.len() - 1];
            knots.push(last + (w[1] - w[0]).norm());
        }
        let xs: Vec<f64> = points.iter().map(|p| p.x).collect();
        let ys: Vec<f64> = points.iter().map(|p| p.y).collect();
        Self {
            x: CubicSpline::not_a_knot(&knots, &xs),
            y: CubicSpline::not_a_knot(&knots, &ys),
            knots,
        }
    }

    /// Total parameter length (≈ arc length of the contour).
    pub fn length(&self) -> f64 {
        self.knots[self.knots.len() - 1]
    }

    /// Parameter values of the input points.
    pub fn knots(&self) -> &[f64] {
        &self.knots
    }

    fn interval(&self, s: f64) -> usize {
        let n = self.knots.len();
        match self.knots.partition_point(|&k| k <= s) {
            0 => 0,
            i if i >= n => n - 2,
            i => i - 1,
        }
    }

    /// Point, first and second derivative with respect to s.
    pub fn eval(&self, s: f64) -> (Point2<f64>, Vector2<f64>, Vector2<f64>) {
        let s = s.clamp(0.0, self.length());
        let i = self.interval(s);
        let h = self.knots[i + 1] - self.knots[i];
        let t = s - self.knots[i];
        let [x, dx, ddx] = self.x.eval(i, t, h);
        let [y, dy, ddy] = self.y.eval(i, t, h);
        (
            Point2::new(x, y),
            Vector2::new(dx, dy),
            Vector2::new(ddx, ddy),
        )
    }

    /// Point at parameter s.
    pub fn point(&self, s: f64) -> Point2<f64> {
        self.eval(s).0
    }

    /// Signed curvature at s (positive where the contour turns counter-clockwise).
    pub fn curvature(&self, s: f64) -> f64 {
        let (_, d1, d2) = self.eval(s);
        (d1.x * d2.y - d1.y * d2.x) / d1.norm().powi(3)
    }

    /// Parameter of the spline point farthest from `reference` (with `reference` the
    /// trailing-edge midpoint, this is the leading edge).
    pub fn farthest_from(&self, reference: Point2<f64>) -> f64 {
        self.extremal_distance(reference, true)
    }

    /// Parameter of the spline point nearest to `reference`.
    pub fn nearest_to(&self, reference: Point2<f64>) -> f64 {
        self.extremal_distance(reference, false)
    }

    /// The extremal knot brackets the search; Newton steps on g(s) = (P − R)·P′ = 0, kept inside
    /// the bracket by bisection, refine it.
    fn extremal_distance(&self, reference: Point2<f64>, farthest: bool) -> f64 {
        let sign = if farthest { 1.0 } else { -1.0 };
        let distance = |s: f64| sign * (self.point(s) - reference).norm_squared();
        let best = (0..self.knots.len())
            .max_by(|&a, &b| distance(self.knots[a]).total_cmp(&distance(self.knots[b])))
            .unwrap_or(0);
        // With the sign folded in, the extremum is a maximum of sign·|P − R|²: g goes + to −.
        let g = |s: f64| {
            let (p, d1, d2) = self.eval(s);
            let r = p - reference;
            (sign * r.dot(&d1), sign * (d1.norm_squared() + r.dot(&d2)))
        };
        let mut lo = self.knots[best.saturating_sub(1)];
        let mut hi = self.knots[(best + 1).min(self.knots.len() - 1)];
        if g(lo).0 <= 0.0 || g(hi).0 >= 0.0 {
            return self.knots[best];
        }
        let mut s = self.knots[best];
        for _ in 0..100 {
            let (value, slope) = g(s);
            if value > 0.0 {
                lo = s;
            } else {
                hi = s;
            }
            let newton = s - value / slope;
            let next = if slope < 0.0 && newton >= lo && newton <= hi {
                newton
            } else {
                0.5 * (lo + hi)
            };
            let step = (next - s).abs();
            s = next;
            if step <= 1e-14 * self.length() {
                break;
            }
        }
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;
    use std::f64::consts::PI;

    fn circle(n: usize, radius: f64) -> Vec<Point2<f64>> {
        (0..=n)
            .map(|i| {
                let t = 2.0 * PI * i as f64 / n as f64;
                Point2::new(radius * t.cos(), radius * t.sin())
            })
            .collect()
    }

    #[test]
    fn not_a_knot_reproduces_a_cubic_exactly() {
        // A cubic is its own not-a-knot interpolant (de Boor 1978, ch. IV).
        let s: Vec<f64> = vec![0.0, 0.3, 1.0, 1.2, 2.0, 2.9];
        let f = |t: f64| 1.0 - 2.0 * t + 0.5 * t * t - 0.3 * t * t * t;
        let values: Vec<f64> = s.iter().map(|&t| f(t)).collect();
        let spline = CubicSpline::not_a_knot(&s, &values);
        for (i, w) in s.windows(2).enumerate() {
            let t = 0.37 * (w[1] - w[0]);
            let [v, d, dd] = spline.eval(i, t, w[1] - w[0]);
            let x = w[0] + t;
            assert_relative_eq!(v, f(x), epsilon = 1e-12);
            assert_relative_eq!(d, -2.0 + x - 0.9 * x * x, epsilon = 1e-11);
            assert_relative_eq!(dd, 1.0 - 1.8 * x, epsilon = 1e-10);
        }
    }

    #[test]
    fn circle_curvature_is_inverse_radius() {
        // Exact: a circle of radius r has curvature 1/r; 200 knots give a chord-length
        // parametrisation error of order (h/r)^2 ≈ 1e-3 — tolerance 1e-3 relative.
        let spline = ContourSpline::new(&circle(200, 2.0));
        for k in 1..10 {
            let s = spline.length() * k as f64 / 10.0;
            assert_relative_eq!(spline.curvature(s), 0.5, max_relative = 1e-3);
            assert_relative_eq!(
                (spline.point(s) - Point2::origin()).norm(),
                2.0,
                epsilon = 1e-6
            );
        }
    }

    #[test]
    fn farthest_point_of_an_ellipse_is_its_vertex() {
        // Ellipse x = cos t, y = 0.5 sin t: the farthest point from (1, 0) is (−1, 0) exactly and
        // the nearest to (0, −1) is (0, −0.5); 401 knots make the spline error ~1e-8.
        let points: Vec<Point2<f64>> = (0..=401)
            .map(|i| {
                let t = 2.0 * PI * (i as f64 + 0.3) / 401.0;
                Point2::new(t.cos(), 0.5 * t.sin())
            })
            .collect();
        let spline = ContourSpline::new(&points);
        let le = spline.point(spline.farthest_from(Point2::new(1.0, 0.0)));
        assert_relative_eq!(le.x, -1.0, epsilon = 1e-6);
        assert_relative_eq!(le.y, 0.0, epsilon = 1e-6);
        let bottom = spline.point(spline.nearest_to(Point2::new(0.0, -1.0)));
        assert_relative_eq!(bottom.x, 0.0, epsilon = 1e-6);
        assert_relative_eq!(bottom.y, -0.5, epsilon = 1e-6);
    }
}
