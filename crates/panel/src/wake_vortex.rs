//! Surface-speed response to a vortex sheet along the wake line: the building block of the
//! wake-curvature correction of the viscous coupling.
//!
//! A thin curved wake carries a pressure difference across it (the normal momentum balance of a
//! curved shear layer); the equivalent inviscid flow reproduces it with a vortex sheet on the
//! wake line (Lock & Williams 1987, Prog. Aerospace Sci. 24, the "wake-curvature" term of
//! viscous–inviscid interaction). This module gives how the surface speeds respond to such a
//! sheet; its strength is the boundary layer's business.
//!
//! Surface rows come from re-solving the Formulation-A system with the sheet's stream function on
//! the right-hand side, `A·[Δγ; Δψ0] = −Bψ γ_w` (no term in the Kutta and sharp-TE rows), as for
//! the transpiration sources ([`crate::SourceInfluence`]).

use crate::solver::{wake_panels, PanelSolver};
use crate::wake::WakeLine;
use nalgebra::DMatrix;

impl PanelSolver {
    /// Sensitivity ∂γ_i/∂γ_w,k of the surface speed at node i (N + 1 rows, along increasing
    /// panel-s) to a constant-strength vortex sheet on wake panel k (Nw − 1 columns, panel k
    /// from wake node k to k + 1). Sheet strengths are counter-clockwise positive, like the
    /// surface γ. A degenerate (zero-length) wake panel has a zero column. Reuses the stored LU
    /// factorisation.
    pub fn wake_vortex_influence(&self, wake: &WakeLine) -> DMatrix<f64> {
        let wpanels = wake_panels(wake);
        let mut rhs = DMatrix::<f64>::zeros(self.panels.len() + 2, wpanels.len());
        for (i, p) in self.nodes.iter().enumerate() {
            if !self.is_psi_row(i) {
                continue;
            }
            for (k, panel) in wpanels.iter().enumerate() {
                if let Some(pan) = panel {
                    rhs[(i, k)] = -pan.constant_vortex_psi(p);
                }
            }
        }
        self.solve_rhs(&rhs)
    }
}
