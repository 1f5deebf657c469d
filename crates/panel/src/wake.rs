//! Wake line behind the trailing edge (METHODS §6.3): a streamline of the inviscid solution
//! marched from the trailing-edge midpoint, and the inviscid speed along it.
//!
//! The first wake panel leaves along the trailing-edge bisector with a length equal to the mean
//! of the two trailing-edge panel lengths; further panels grow geometrically (ratio ≤ 1.2). Each
//! step is a Heun (predictor–corrector) step along the unit velocity direction.

use crate::solver::PanelSolver;
use crate::PanelError;
use nalgebra::{Point2, Vector2};

/// Largest growth ratio of neighbouring wake panel lengths.
const MAX_GROWTH: f64 = 1.2;

/// A wake line: nodes from the trailing-edge midpoint downstream and the unit tangent (flow
/// direction) at each node.
#[derive(Clone, Debug, PartialEq)]
pub struct WakeLine {
    /// Wake nodes; `nodes[0]` is the trailing-edge midpoint.
    pub nodes: Vec<Point2<f64>>,
    /// Unit tangent at each node, downstream: the trailing-edge bisector at node 0, the inviscid
    /// velocity direction at the others.
    pub tangents: Vec<Vector2<f64>>,
}

/// First panel length and growth ratio of `panels` panels that sum to `total`, starting from the
/// preferred first length `first`. If `panels·first ≥ total` the spacing is uniform (shorter
/// first panel); if even ratio 1.2 cannot reach `total`, the first panel is lengthened.
fn wake_spacing(first: f64, total: f64, panels: usize) -> (f64, f64) {
    let m = panels as f64;
    if m * first >= total {
        return (total / m, 1.0);
    }
    let sum = |r: f64| (r.powi(panels as i32) - 1.0) / (r - 1.0);
    if first * sum(MAX_GROWTH) <= total {
        return (total / sum(MAX_GROWTH), MAX_GROWTH);
    }
    // first·sum(r) is increasing in r; bisect on (1, 1.2].
    let (mut lo, mut hi) = (1.0 + 1e-12, MAX_GROWTH);
    for _ in 0..100 {
        let mid = 0.5 * (lo + hi);
        if first * sum(mid) < total {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    let r = 0.5 * (lo + hi);
    (total / sum(r), r)
}

impl PanelSolver {
    /// Unit flow direction at `p`, or `fallback` where the speed vanishes or is not finite.
    fn flow_direction(
        &self,
        alpha_rad: f64,
        gamma: &[f64],
        p: &Point2<f64>,
        fallback: Vector2<f64>,
    ) -> Vector2<f64> {
        let v = self.field_velocity_unchecked(alpha_rad, gamma, p);
        let speed = v.norm();
        if speed > 1e-12 && speed.is_finite() {
            v / speed
        } else {
            fallback
        }
    }

    /// March the wake streamline at `alpha_rad`: `n_nodes` nodes reaching `length` chords from
    /// the trailing-edge midpoint (see the module doc for the spacing rule).
    ///
    /// Invalid settings (fewer than 2 nodes, a length that is not positive and finite, a
    /// non-finite angle) give the degenerate one-node wake (the trailing-edge midpoint only, no
    /// wake panels), which a caller detects by `nodes.len() == 1`;
    /// [`PanelSolver::try_wake_line`] reports the reason instead.
    pub fn wake_line(&self, alpha_rad: f64, n_nodes: usize, length: f64) -> WakeLine {
        self.try_wake_line(alpha_rad, n_nodes, length)
            .unwrap_or_else(|_| WakeLine {
                nodes: vec![self.te_midpoint],
                tangents: vec![self.te_bisector],
            })
    }

    /// [`PanelSolver::wake_line`] with invalid settings reported as errors.
    ///
    /// # Errors
    /// Fewer than 2 nodes, a length that is not positive and finite, or a non-finite angle.
    pub fn try_wake_line(
        &self,
        alpha_rad: f64,
        n_nodes: usize,
        length: f64,
    ) -> Result<WakeLine, PanelError> {
        if !alpha_rad.is_finite() {
            return Err(PanelError::NonFiniteAlpha { alpha_rad });
        }
        if n_nodes < 2 {
            return Err(PanelError::TooFewWakeNodes { n_nodes });
        }
        if !(length.is_finite() && length > 0.0) {
            return Err(PanelError::InvalidWakeLength { length });
        }
        let n = self.panels.len();
        let first = 0.5 * (self.panels[0].length + self.panels[n - 1].length);
        let (mut h, ratio) = wake_spacing(first, length * self.chord, n_nodes - 1);
        let gamma = self.solve(alpha_rad).gamma;
        let mut nodes = Vec::with_capacity(n_nodes);
        let mut tangents = Vec::with_capacity(n_nodes);
        nodes.push(self.te_midpoint);
        tangents.push(self.te_bisector);
        nodes.push(self.te_midpoint + self.te_bisector * h);
        for j in 1..n_nodes - 1 {
            let p = nodes[j];
            let t1 = self.flow_direction(alpha_rad, &gamma, &p, tangents[j - 1]);
            tangents.push(t1);
            h *= ratio;
            let predicted = p + t1 * h;
            let t2 = self.flow_direction(alpha_rad, &gamma, &predicted, t1);
            let sum = t1 + t2;
            let step = if sum.norm() > 1e-12 {
                sum.normalize()
            } else {
                t1
            };
            nodes.push(p + step * h);
        }
        let last = nodes[n_nodes - 1];
        let t_last = self.flow_direction(alpha_rad, &gamma, &last, tangents[n_nodes - 2]);
        tangents.push(t_last);
        Ok(WakeLine { nodes, tangents })
    }

    /// Inviscid speed along the wake tangent at each wake node at `alpha_rad`. At node 0 (the
    /// trailing edge, where field velocities are singular) it is the mean trailing-edge surface
    /// speed ½(γ_N − γ_0), the same rule as row 0 of the wake block of
    /// [`crate::SourceInfluence`].
    ///
    /// # Panics
    /// If `wake.tangents` and `wake.nodes` differ in length (a contract violation; `wake_line`
    /// always builds them equal).
    #[track_caller]
    pub fn wake_speed(&self, alpha_rad: f64, wake: &WakeLine) -> Vec<f64> {
        assert_eq!(
            wake.nodes.len(),
            wake.tangents.len(),
            "wake line needs one tangent per node"
        );
        let n = self.panels.len();
        let gamma = self.solve(alpha_rad).gamma;
        wake.nodes
            .iter()
            .zip(&wake.tangents)
            .enumerate()
            .map(|(j, (p, t))| {
                if j == 0 {
                    0.5 * (gamma[n] - gamma[0])
                } else {
                    t.dot(&self.field_velocity_unchecked(alpha_rad, &gamma, p))
                }
            })
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn spacing_reaches_the_requested_length() {
        // The panel lengths must sum to the total for each of the three regimes.
        for (first, total, m) in [(0.01, 1.0, 30), (0.01, 1.0, 200), (0.01, 10.0, 20)] {
            let (h, r) = wake_spacing(first, total, m);
            assert!((1.0..=MAX_GROWTH).contains(&r));
            let sum: f64 = (0..m).map(|k| h * r.powi(k as i32)).sum();
            assert_relative_eq!(sum, total, max_relative = 1e-10);
        }
        let (h, r) = wake_spacing(0.01, 1.0, 30);
        assert_relative_eq!(h, 0.01, max_relative = 1e-10);
        assert!(r > 1.0 && r < MAX_GROWTH);
    }
}
