//! Influence integrals of one straight panel (METHODS §1.1, after Katz & Plotkin 2001, ch. 10).
//!
//! A panel runs from node `a` to node `b`, length L, tangent t̂ = (b − a)/L and left normal
//! n̂_L = ẑ × t̂, which points into the body for a counter-clockwise contour. A field point P has
//! local coordinates x = (P − a)·t̂, y = (P − a)·n̂_L, and
//!
//! ```text
//! r1 = |P − a|, r2 = |P − b|, Iy0 = θ2 − θ1 (angle subtended), Ix0 = ln(r1/r2)
//! Iy1 = x·Iy0 − y·Ix0, Ix1 = x·Ix0 − L + y·Iy0
//! ```
//!
//! Implemented here (velocities with u = ∂ψ/∂y, v = −∂ψ/∂x, V = u t̂ + v n̂_L):
//! - linear vortex γ(ξ) = γa(1 − ξ/L) + γb ξ/L (counter-clockwise positive): stream function
//!   ψ = −(1/2π) ∫ γ ln ρ dξ and velocity;
//! - constant vortex (the trailing-edge base panel): the same with γa = γb;
//! - constant source σ (outflow positive): stream function ψ = (1/2π) ∫ σ θ dξ and velocity.
//!
//! The source stream function is multi-valued; [`BranchCut`] chooses where its jump sits. The
//! angle subtended, θ2 − θ1, is evaluated as the angle between the two vectors P − a and P − b,
//! so it has no cut at all (it lies in (−π, π), and is ±π only on the panel itself).

use nalgebra::{Point2, Vector2};
use std::f64::consts::{FRAC_1_PI, PI};

/// 1/(2π).
const INV_TWO_PI: f64 = 0.5 * FRAC_1_PI;

/// Distance, relative to the panel length, below which a field point counts as sitting on an
/// end node of the panel.
const END_NODE_TOLERANCE: f64 = 1e-9;

/// Where the branch cut of a source panel's stream function is placed.
///
/// Each source point ξ on the panel carries a ray along which its angle jumps by 2π; the rays of
/// all ξ together sweep the cut region, where the formula differs from a true stream function.
/// Surface sources put it on the outward side of their own panel (the strip 0 < x < L, y < 0,
/// leaving the body), so that the contour from node 0 to node N never enters a cut region and
/// the Dirichlet rows see the stream function of the inner side of the source sheet. This
/// assumes that no node lies straight outward of another surface panel, true for airfoils.
/// Wake sources put it downstream along the panel's own line (a line cut), away from the body.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum BranchCut {
    /// Rays along the outward normal −n̂_L.
    OutwardNormal,
    /// Rays along +t̂ (downstream for a wake panel).
    Downstream,
}

/// A straight panel with its local frame.
#[derive(Clone, Copy, Debug)]
pub(crate) struct Panel {
    /// Start node.
    pub a: Point2<f64>,
    /// Length L.
    pub length: f64,
    /// Unit tangent t̂ = (b − a)/L.
    pub tangent: Vector2<f64>,
    /// Left normal n̂_L = ẑ × t̂ (into the body on a counter-clockwise contour).
    pub normal_left: Vector2<f64>,
}

/// Local coordinates of a field point relative to a panel.
#[derive(Clone, Copy, Debug)]
struct Local {
    x: f64,
    y: f64,
    r1: f64,
    r2: f64,
    /// ln r1 and ln r2 (−∞ on the end nodes; products with vanishing factors are guarded).
    ln_r1: f64,
    ln_r2: f64,
    /// Angle subtended by the panel, θ2 − θ1.
    theta_diff: f64,
}

/// `x·ln r`, taking the limit 0 when r = 0 (which implies x = 0 for the terms used here).
fn x_ln_r(x: f64, r: f64, ln_r: f64) -> f64 {
    if r > 0.0 {
        x * ln_r
    } else {
        0.0
    }
}

/// `½r²·ln r − ¼r²`, with the limit 0 at r = 0.
fn half_r2_ln_r_minus_quarter_r2(r: f64, ln_r: f64) -> f64 {
    if r > 0.0 {
        0.5 * r * r * ln_r - 0.25 * r * r
    } else {
        0.0
    }
}

impl Panel {
    /// Panel from `a` to `b`. The caller guarantees a non-zero length.
    pub fn new(a: Point2<f64>, b: Point2<f64>) -> Panel {
        let d = b - a;
        let length = d.norm();
        let tangent = d / length;
        Panel {
            a,
            length,
            tangent,
            normal_left: Vector2::new(-tangent.y, tangent.x),
        }
    }

    /// Outward normal −n̂_L.
    pub fn normal_out(&self) -> Vector2<f64> {
        -self.normal_left
    }

    fn local(&self, p: &Point2<f64>) -> Local {
        let d = p - self.a;
        let x = d.dot(&self.tangent);
        let y = d.dot(&self.normal_left);
        let l = self.length;
        let r1 = (x * x + y * y).sqrt();
        let r2 = ((x - l) * (x - l) + y * y).sqrt();
        // Angle from (P − a) to (P − b): cross = y·L, dot = x(x − L) + y².
        let theta_diff = if r1 <= END_NODE_TOLERANCE * l || r2 <= END_NODE_TOLERANCE * l {
            0.0
        } else {
            (y * l).atan2(x * (x - l) + y * y)
        };
        Local {
            x,
            y,
            r1,
            r2,
            ln_r1: r1.ln(),
            ln_r2: r2.ln(),
            theta_diff,
        }
    }

    fn local_to_global(&self, u: f64, v: f64) -> Vector2<f64> {
        self.tangent * u + self.normal_left * v
    }

    /// ∫₀ᴸ ln ρ dξ (J0) and ∫₀ᴸ ξ ln ρ dξ (J1) at a local point.
    fn log_moments(&self, q: &Local) -> (f64, f64) {
        let l = self.length;
        let j0 =
            x_ln_r(q.x, q.r1, q.ln_r1) - x_ln_r(q.x - l, q.r2, q.ln_r2) - l + q.y * q.theta_diff;
        let k = half_r2_ln_r_minus_quarter_r2(q.r1, q.ln_r1)
            - half_r2_ln_r_minus_quarter_r2(q.r2, q.ln_r2);
        (j0, q.x * j0 - k)
    }

    /// Stream function at `p` of a linear vortex with unit end strengths: returns the
    /// coefficients (of γa, of γb).
    pub fn linear_vortex_psi(&self, p: &Point2<f64>) -> (f64, f64) {
        let q = self.local(p);
        let (j0, j1) = self.log_moments(&q);
        let l = self.length;
        (-INV_TWO_PI * (j0 - j1 / l), -INV_TWO_PI * j1 / l)
    }

    /// Stream function at `p` of a constant vortex of unit strength.
    pub fn constant_vortex_psi(&self, p: &Point2<f64>) -> f64 {
        let q = self.local(p);
        let (j0, _) = self.log_moments(&q);
        -INV_TWO_PI * j0
    }

    /// Velocity at `p` of a linear vortex with unit end strengths: (coefficient of γa, of γb).
    /// Logarithmically singular at the end nodes (not evaluated there by this crate).
    pub fn linear_vortex_velocity(&self, p: &Point2<f64>) -> (Vector2<f64>, Vector2<f64>) {
        let q = self.local(p);
        let l = self.length;
        let ix0 = q.ln_r1 - q.ln_r2;
        let iy0 = q.theta_diff;
        let iy1 = q.x * iy0 - q.y * ix0;
        let ix1 = q.x * ix0 - l + q.y * iy0;
        let va = self.local_to_global(-INV_TWO_PI * (iy0 - iy1 / l), INV_TWO_PI * (ix0 - ix1 / l));
        let vb = self.local_to_global(-INV_TWO_PI * iy1 / l, INV_TWO_PI * ix1 / l);
        (va, vb)
    }

    /// Velocity at `p` of a constant vortex of unit strength.
    pub fn constant_vortex_velocity(&self, p: &Point2<f64>) -> Vector2<f64> {
        let q = self.local(p);
        let ix0 = q.ln_r1 - q.ln_r2;
        self.local_to_global(-INV_TWO_PI * q.theta_diff, INV_TWO_PI * ix0)
    }

    /// Angle of the local vector (x, y) with its 2π jump on the ray chosen by `cut`; it differs
    /// from atan2(y, x) by a multiple of 2π.
    fn angle(x: f64, y: f64, cut: BranchCut) -> f64 {
        match cut {
            // Jump on the ray towards −y: measure from +y, then shift back by π/2.
            BranchCut::OutwardNormal => (-x).atan2(y) + 0.5 * PI,
            // Jump on the ray towards +x: measure from −x, then shift back by π.
            BranchCut::Downstream => (-y).atan2(-x) + PI,
        }
    }

    /// Stream function at `p` of a constant source of unit strength (outflow positive):
    /// ψ = (1/2π)·T0 with T0 = xθ1 + y ln r1 − (x − L)θ2 − y ln r2.
    pub fn constant_source_psi(&self, p: &Point2<f64>, cut: BranchCut) -> f64 {
        let q = self.local(p);
        let l = self.length;
        let theta1 = Self::angle(q.x, q.y, cut);
        let theta2 = Self::angle(q.x - l, q.y, cut);
        let t0 = q.x * theta1 + x_ln_r(q.y, q.r1, q.ln_r1)
            - (q.x - l) * theta2
            - x_ln_r(q.y, q.r2, q.ln_r2);
        INV_TWO_PI * t0
    }

    /// Velocity at `p` of a constant source of unit strength: u = Ix0/2π, v = Iy0/2π.
    ///
    /// The tangential part is logarithmically infinite at the panel's own end nodes. When `p`
    /// sits on an end node, `ln_r_end` (if given) replaces the logarithm of the vanishing
    /// distance there; see [`crate::SourceInfluence`] for the cell-average value used.
    pub fn constant_source_velocity(&self, p: &Point2<f64>, ln_r_end: Option<f64>) -> Vector2<f64> {
        let q = self.local(p);
        let tol = END_NODE_TOLERANCE * self.length;
        let ln_of = |r: f64, ln_r: f64| match ln_r_end {
            Some(ln_ref) if r <= tol => ln_ref,
            _ => ln_r,
        };
        let ix0 = ln_of(q.r1, q.ln_r1) - ln_of(q.r2, q.ln_r2);
        self.local_to_global(INV_TWO_PI * ix0, INV_TWO_PI * q.theta_diff)
    }
}

#[cfg(test)]
mod tests {
    //! Checks of the closed forms against brute-force quadrature and finite differences.
    use super::*;
    use approx::assert_relative_eq;

    /// Gauss–Legendre quadrature on [0, L] split into `pieces` sub-intervals, 5 points each.
    fn quad(l: f64, pieces: usize, f: impl Fn(f64) -> f64) -> f64 {
        let nodes = [
            0.0,
            -0.538_469_310_105_683,
            0.538_469_310_105_683,
            -0.906_179_845_938_664,
            0.906_179_845_938_664,
        ];
        let weights = [
            0.568_888_888_888_889,
            0.478_628_670_499_366,
            0.478_628_670_499_366,
            0.236_926_885_056_189,
            0.236_926_885_056_189,
        ];
        let h = l / pieces as f64;
        let mut sum = 0.0;
        for k in 0..pieces {
            let mid = (k as f64 + 0.5) * h;
            for (xi, w) in nodes.iter().zip(weights.iter()) {
                sum += w * 0.5 * h * f(mid + 0.5 * h * xi);
            }
        }
        sum
    }

    fn test_panel() -> Panel {
        Panel::new(Point2::new(0.3, -0.1), Point2::new(0.1, 0.05))
    }

    fn field_points() -> Vec<Point2<f64>> {
        vec![
            Point2::new(0.7, 0.4),
            Point2::new(-0.2, -0.3),
            Point2::new(0.2, -0.02),
            Point2::new(0.18, 0.03),
            Point2::new(1.5, -2.0),
        ]
    }

    /// Point on the panel at arc length ξ.
    fn on_panel(p: &Panel, xi: f64) -> Point2<f64> {
        p.a + p.tangent * xi
    }

    #[test]
    fn vortex_stream_function_matches_quadrature() {
        // ψ = −(1/2π) ∫ γ(ξ) ln ρ dξ by 400-piece Gauss quadrature; the closed form must agree to
        // quadrature accuracy (1e-10 absolute, far below any panel-method error).
        let pan = test_panel();
        for p in field_points() {
            let ln_rho = |xi: f64| (p - on_panel(&pan, xi)).norm().ln();
            let l = pan.length;
            let qa = -INV_TWO_PI * quad(l, 400, |xi| (1.0 - xi / l) * ln_rho(xi));
            let qb = -INV_TWO_PI * quad(l, 400, |xi| xi / l * ln_rho(xi));
            let (ca, cb) = pan.linear_vortex_psi(&p);
            assert_relative_eq!(ca, qa, epsilon = 1e-10);
            assert_relative_eq!(cb, qb, epsilon = 1e-10);
            assert_relative_eq!(pan.constant_vortex_psi(&p), qa + qb, epsilon = 1e-10);
        }
    }

    #[test]
    fn velocities_match_quadrature() {
        // Biot–Savart for a ccw vortex: V = γ/(2π ρ²)·(−Δy, Δx); source: V = σ/(2π ρ²)·(Δx, Δy).
        let pan = test_panel();
        let l = pan.length;
        for p in field_points() {
            let kernel = |xi: f64| {
                let d = p - on_panel(&pan, xi);
                d / (2.0 * PI * d.norm_squared())
            };
            let comp = |w: &dyn Fn(f64) -> f64, pick: &dyn Fn(Vector2<f64>) -> f64| {
                quad(l, 400, |xi| w(xi) * pick(kernel(xi)))
            };
            let wa = |xi: f64| 1.0 - xi / l;
            let wb = |xi: f64| xi / l;
            let one = |_: f64| 1.0;
            let rot_x = |k: Vector2<f64>| -k.y;
            let rot_y = |k: Vector2<f64>| k.x;
            let (va, vb) = pan.linear_vortex_velocity(&p);
            assert_relative_eq!(va.x, comp(&wa, &rot_x), epsilon = 1e-9);
            assert_relative_eq!(va.y, comp(&wa, &rot_y), epsilon = 1e-9);
            assert_relative_eq!(vb.x, comp(&wb, &rot_x), epsilon = 1e-9);
            assert_relative_eq!(vb.y, comp(&wb, &rot_y), epsilon = 1e-9);
            let vc = pan.constant_vortex_velocity(&p);
            assert_relative_eq!(vc, va + vb, epsilon = 1e-12);
            let vs = pan.constant_source_velocity(&p, None);
            assert_relative_eq!(vs.x, comp(&one, &|k| k.x), epsilon = 1e-9);
            assert_relative_eq!(vs.y, comp(&one, &|k| k.y), epsilon = 1e-9);
        }
    }

    #[test]
    fn stream_functions_differentiate_to_velocities() {
        // u = ∂ψ/∂y, v = −∂ψ/∂x by central differences (h = 1e-6, error O(h²) ≈ 1e-12 plus
        // rounding ≈ 1e-10); both source cuts give the same derivatives away from the cut.
        let pan = test_panel();
        let h = 1e-6;
        for p in field_points() {
            let dx = Vector2::new(h, 0.0);
            let dy = Vector2::new(0.0, h);
            let fd = |f: &dyn Fn(&Point2<f64>) -> f64| {
                Vector2::new(
                    (f(&(p + dy)) - f(&(p - dy))) / (2.0 * h),
                    -(f(&(p + dx)) - f(&(p - dx))) / (2.0 * h),
                )
            };
            let (va, vb) = pan.linear_vortex_velocity(&p);
            assert_relative_eq!(fd(&|q| pan.linear_vortex_psi(q).0), va, epsilon = 1e-8);
            assert_relative_eq!(fd(&|q| pan.linear_vortex_psi(q).1), vb, epsilon = 1e-8);
            let vs = pan.constant_source_velocity(&p, None);
            // The downstream cut is a line (the rays are collinear with the panel) and misses
            // all test points. The outward cut is the strip 0 < x < L, y < 0: inside it the
            // branch adds σ(L − x) to ψ, i.e. a spurious velocity n̂_L — which is why no node
            // of the body may lie outward of another surface panel.
            let g = fd(&|q| pan.constant_source_psi(q, BranchCut::Downstream));
            assert_relative_eq!(g, vs, epsilon = 1e-8);
            let d = p - pan.a;
            let (x, y) = (d.dot(&pan.tangent), d.dot(&pan.normal_left));
            let in_strip = x > 0.0 && x < pan.length && y < 0.0;
            let g = fd(&|q| pan.constant_source_psi(q, BranchCut::OutwardNormal));
            let expected = if in_strip { vs + pan.normal_left } else { vs };
            assert_relative_eq!(g, expected, epsilon = 1e-8);
        }
    }

    #[test]
    fn source_stream_function_matches_quadrature_and_cut_side() {
        // ψ = (1/2π) ∫ θ dξ with θ continuous off the cut. The test point sits on the inner
        // side (y > 0 in the local frame), where the outward cut must not interfere: quadrature
        // of atan2 with the outward cut agrees to 1e-10.
        let pan = test_panel();
        let l = pan.length;
        let p = pan.a + pan.tangent * 0.3 * l + pan.normal_left * 0.02;
        let q = quad(l, 400, |xi| {
            let d = p - on_panel(&pan, xi);
            Panel::angle(
                d.dot(&pan.tangent),
                d.dot(&pan.normal_left),
                BranchCut::OutwardNormal,
            )
        }) * INV_TWO_PI;
        assert_relative_eq!(
            pan.constant_source_psi(&p, BranchCut::OutwardNormal),
            q,
            epsilon = 1e-10
        );
        // The end nodes must take the inner-side (interior) limit, which the Dirichlet rows use.
        let at_a = pan.constant_source_psi(&pan.a, BranchCut::OutwardNormal);
        let near_a =
            pan.constant_source_psi(&(pan.a + pan.normal_left * 1e-9), BranchCut::OutwardNormal);
        assert_relative_eq!(at_a, near_a, epsilon = 1e-8);
        let b = pan.a + pan.tangent * pan.length;
        let at_b = pan.constant_source_psi(&b, BranchCut::OutwardNormal);
        let near_b =
            pan.constant_source_psi(&(b + pan.normal_left * 1e-9), BranchCut::OutwardNormal);
        assert_relative_eq!(at_b, near_b, epsilon = 1e-8);
    }

    #[test]
    fn self_influence_limits() {
        // Just outside the panel mid-point (METHODS §1.1): vortex u = +(γa+γb)/4 along t̂;
        // source +σ/2 along the outward normal.
        let pan = test_panel();
        let p = pan.a + pan.tangent * 0.5 * pan.length + pan.normal_out() * 1e-10;
        let (va, vb) = pan.linear_vortex_velocity(&p);
        assert_relative_eq!((va + vb).dot(&pan.tangent), 0.5, epsilon = 1e-8);
        let vs = pan.constant_source_velocity(&p, None);
        assert_relative_eq!(vs.dot(&pan.normal_out()), 0.5, epsilon = 1e-8);
    }
}
