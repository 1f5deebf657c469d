//! Source-influence (transpiration) matrix: how the surface and wake speeds respond to
//! constant-strength source panels on the surface and in the wake (METHODS §6.2, the building
//! block of the mass-defect coupling; displacement as transpiration after Lighthill 1958).
//!
//! Surface rows come from re-solving the Formulation-A system with the sources' stream function
//! on the right-hand side, `A·[Δγ; Δψ0] = −Bψ σ` (no source term in the Kutta and sharp-TE rows).
//! Wake rows add the sources' own velocity to the velocity induced by the changed vortex
//! strengths, projected on the wake tangent.

use crate::solver::{wake_panels, PanelSolver};
use crate::wake::WakeLine;
use nalgebra::DMatrix;

/// Sensitivity of the surface and wake speeds to constant-strength source panels.
///
/// Columns (outflow-positive source strength σ, constant per panel): first the N surface panels
/// (panel k from node k to node k + 1), then the Nw − 1 wake panels (wake node j to j + 1).
///
/// Rows: first the N + 1 surface nodes, then the Nw wake nodes. Entry (i, k) = ∂q_i/∂σ_k with
/// - surface node i: q_i = γ_i, the surface speed along increasing panel-s;
/// - wake node j ≥ 1: q_j = velocity along `wake.tangents[j]`, sources' own velocity plus the
///   velocity of the changed vortex sheet;
/// - wake node 0 (the trailing edge, where field velocities are singular): the mean of the two
///   trailing-edge surface rows with downstream-positive sign, ½(row N − row 0), matching
///   [`PanelSolver::wake_speed`].
///
/// A constant source panel induces a logarithmically infinite tangential velocity at its own end
/// nodes. At wake node j the two adjacent wake panels therefore use the mean of ln|x| over the
/// node's cell, x from −L_{j−1}/2 to +L_j/2 (the middles of the neighbouring panels):
/// `ln r_ref = (a1 ln a1 + a2 ln a2)/(a1 + a2) − 1`, a1 = L_{j−1}/2, a2 = L_j/2 (a2 = a1 at the
/// last node). For equal strengths on both panels the reference cancels and the result is the
/// exact principal value; for a strength jump it is the cell average of the singular term.
#[derive(Clone, Debug, PartialEq)]
pub struct SourceInfluence {
    /// The (N + 1 + Nw) × (N + Nw − 1) matrix described above.
    pub matrix: DMatrix<f64>,
}

/// Cell-average of ln|x| over (−a1, a2).
fn cell_mean_ln(a1: f64, a2: f64) -> f64 {
    (a1 * a1.ln() + a2 * a2.ln()) / (a1 + a2) - 1.0
}

impl PanelSolver {
    /// Source-influence matrix for the surface panels and the panels of `wake` (layout and
    /// conventions in [`SourceInfluence`]). Reuses the stored LU factorisation.
    ///
    /// # Panics
    /// If `wake.tangents` and `wake.nodes` differ in length (a contract violation; `wake_line`
    /// always builds them equal).
    #[track_caller]
    pub fn source_influence(&self, wake: &WakeLine) -> SourceInfluence {
        assert_eq!(
            wake.nodes.len(),
            wake.tangents.len(),
            "wake line needs one tangent per node"
        );
        let n = self.panels.len();
        let nw = wake.nodes.len();
        let wpanels = wake_panels(wake);
        let columns = n + wpanels.len();
        // Surface response: Δγ = A⁻¹(−Bψ) restricted to the γ rows.
        let dgamma = self.solve_rhs(&self.source_rhs_columns(wake));
        let mut matrix = DMatrix::<f64>::zeros(n + 1 + nw, columns);
        matrix.rows_mut(0, n + 1).copy_from(&dgamma);
        if nw == 0 {
            return SourceInfluence { matrix };
        }
        let te_row = 0.5 * (dgamma.row(n) - dgamma.row(0));
        matrix.row_mut(n + 1).copy_from(&te_row);
        let wake_length = |k: usize| wpanels.get(k).and_then(|p| p.map(|p| p.length));
        // Velocity along the tangent per unit γ_i at wake nodes 1 … Nw − 1, times Δγ.
        let mut projected = DMatrix::<f64>::zeros(nw - 1, n + 1);
        for j in 1..nw {
            let grad = self.vortex_velocity_gradient(&wake.nodes[j]);
            for (i, g) in grad.iter().enumerate() {
                projected[(j - 1, i)] = wake.tangents[j].dot(g);
            }
        }
        matrix
            .rows_mut(n + 2, nw - 1)
            .copy_from(&(projected * &dgamma));
        // The sources' own velocity.
        for j in 1..nw {
            let p = &wake.nodes[j];
            let t = &wake.tangents[j];
            for (k, panel) in self.panels.iter().enumerate() {
                matrix[(n + 1 + j, k)] += t.dot(&panel.constant_source_velocity(p, None));
            }
            for (k, panel) in wpanels.iter().enumerate() {
                if let Some(pan) = panel {
                    let adjacent = k + 1 == j || k == j;
                    let ln_ref = adjacent.then(|| {
                        // At the last node (or next to a degenerate panel) the cell is
                        // taken symmetric.
                        let (up, down) = (wake_length(j - 1), wake_length(j));
                        let a1 = up.or(down).unwrap_or(pan.length);
                        let a2 = down.or(up).unwrap_or(pan.length);
                        cell_mean_ln(0.5 * a1, 0.5 * a2)
                    });
                    matrix[(n + 1 + j, n + k)] += t.dot(&pan.constant_source_velocity(p, ln_ref));
                }
            }
        }
        SourceInfluence { matrix }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn cell_mean_of_log_matches_quadrature() {
        // Midpoint rule with 2e6 cells of ln|x| over (−0.02, 0.03); the integrable end
        // singularity limits it to ~1e-6.
        let (a1, a2) = (0.02, 0.03);
        let m = 2_000_000;
        let h = (a1 + a2) / m as f64;
        let mean: f64 = (0..m)
            .map(|k| (-a1 + (k as f64 + 0.5) * h).abs().ln())
            .sum::<f64>()
            / m as f64;
        assert_relative_eq!(cell_mean_ln(a1, a2), mean, epsilon = 1e-5);
    }
}
