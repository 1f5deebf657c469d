//! Assembly, factorisation and solution of the Dirichlet stream-function system
//! (METHODS §1.2 Formulation A, §1.4 trailing-edge base panel) and the post-processing of a
//! vorticity distribution into Cp, cl, cm and the stagnation point (METHODS §1.6).
//!
//! Unknowns: γ_0 … γ_N (node vortex strengths) and ψ0 (interior stream function). Rows:
//! - i = 0 … N: Σ_panels ψ_i(γ) [+ base panel] − ψ0 = −ψ∞(P_i), ψ∞ = y cos α − x sin α;
//! - N + 1: Kutta condition γ_0 + γ_N = 0;
//! - sharp trailing edge only: row N (a duplicate of row 0) is replaced by equal second
//!   differences, γ_0 − 2γ_1 + γ_2 = γ_N − 2γ_{N−1} + γ_{N−2}.

use crate::influence::{BranchCut, Panel};
use crate::wake::WakeLine;
use crate::PanelError;
use nalgebra::{DMatrix, DVector, Dyn, Point2, Vector2, LU};

/// A trailing-edge gap smaller than this fraction of the chord is treated as sharp (the two
/// trailing-edge rows are then duplicates to within rounding and row N is replaced).
pub(crate) const SHARP_TE_RELATIVE_GAP: f64 = 1e-9;

/// A panel shorter than this fraction of the contour size counts as zero length.
const ZERO_LENGTH_RELATIVE: f64 = 1e-12;

/// Smallest acceptable ratio of the smallest to the largest LU pivot.
const MIN_PIVOT_RATIO: f64 = 1e-13;

/// The straight panel closing a blunt trailing edge, from node N to node 0 (METHODS §1.4
/// option 1). It carries a constant source σ_TE = q_TE (n̂_b·d̂) and a constant vortex
/// γ_TE = q_TE (ŝ_b·d̂), with q_TE = ½(γ_N − γ_0) and d̂ the downstream trailing-edge bisector.
#[derive(Clone, Copy, Debug)]
pub(crate) struct BasePanel {
    pub panel: Panel,
    /// n̂_b·d̂: source strength per unit q_TE.
    pub source_per_q: f64,
    /// ŝ_b·d̂: vortex strength per unit q_TE.
    pub vortex_per_q: f64,
}

/// Linear-vorticity panel solver for one geometry: the influence matrix is factored once and the
/// solutions for α = 0° and α = 90° are kept, so any α is a superposition.
#[derive(Clone, Debug)]
pub struct PanelSolver {
    pub(crate) nodes: Vec<Point2<f64>>,
    pub(crate) panels: Vec<Panel>,
    pub(crate) base: Option<BasePanel>,
    pub(crate) chord: f64,
    pub(crate) leading_edge: Point2<f64>,
    pub(crate) te_midpoint: Point2<f64>,
    pub(crate) te_bisector: Vector2<f64>,
    lu: LU<f64, Dyn, Dyn>,
    gamma_0: Vec<f64>,
    gamma_90: Vec<f64>,
}

/// Stagnation point of a solution, located by the sign change of γ from negative (upper
/// surface) to positive (lower surface).
#[derive(Clone, Debug, PartialEq)]
pub struct Stagnation {
    /// γ changes sign between node `panel` and node `panel + 1`.
    pub panel: usize,
    /// Position of the zero within that panel by linear interpolation of γ, in [0, 1].
    pub fraction: f64,
    /// The interpolated point.
    pub point: Point2<f64>,
}

/// Inviscid solution at one angle of attack (V∞ = 1).
#[derive(Clone, Debug, PartialEq)]
pub struct InviscidSolution {
    /// Angle of attack in radians, from the geometry's x-axis.
    pub alpha_rad: f64,
    /// Surface speed γ_i at each node along increasing panel-s (negative on a lifting upper
    /// surface).
    pub gamma: Vec<f64>,
    /// Pressure coefficient 1 − γ_i² at each node.
    pub cp: Vec<f64>,
    /// Lift coefficient from the circulation, cl = 2Γ/c (Kutta–Joukowski).
    pub cl: f64,
    /// Lift coefficient from pressure integration (trapezoidal, METHODS §1.6).
    pub cl_pressure: f64,
    /// Pressure drag coefficient from the same integration (zero in exact inviscid flow; the
    /// near-field value is a discretisation indicator only).
    pub cd_pressure: f64,
    /// Pitching moment about the quarter-chord point on the LE–TE line, nose-up positive.
    pub cm_c4: f64,
    /// Stagnation point.
    pub stagnation: Stagnation,
}

/// Signed area enclosed by the closed polygon of `nodes` (positive counter-clockwise).
fn signed_area(nodes: &[Point2<f64>]) -> f64 {
    let n = nodes.len();
    0.5 * (0..n)
        .map(|i| {
            let p = nodes[i];
            let q = nodes[(i + 1) % n];
            p.x * q.y - q.x * p.y
        })
        .sum::<f64>()
}

impl PanelSolver {
    /// Build the solver for a contour of N + 1 nodes, counter-clockwise from the upper trailing
    /// edge (node 0) to the lower trailing edge (node N). Nodes 0 and N coincide for a sharp
    /// trailing edge; otherwise the gap is closed by a base panel (METHODS §1.4).
    ///
    /// # Errors
    /// Fewer than 3 panels, a non-finite coordinate, a zero-length panel (repeated node), a
    /// clockwise contour, or a (numerically) singular influence matrix.
    pub fn new(nodes: &[Point2<f64>]) -> Result<PanelSolver, PanelError> {
        if nodes.len() < 4 {
            return Err(PanelError::TooFewPanels {
                panels: nodes.len().saturating_sub(1),
            });
        }
        if let Some(index) = nodes
            .iter()
            .position(|p| !(p.x.is_finite() && p.y.is_finite()))
        {
            return Err(PanelError::NonFiniteNode { index });
        }
        let n = nodes.len() - 1;
        let te_midpoint = nodes[0] + 0.5 * (nodes[n] - nodes[0]);
        let (leading_edge, chord) = nodes.iter().map(|p| (*p, (p - te_midpoint).norm())).fold(
            (nodes[0], 0.0),
            |best, cand| if cand.1 > best.1 { cand } else { best },
        );
        let size = chord.max((nodes[n] - nodes[0]).norm());
        for j in 0..n {
            let length = (nodes[j + 1] - nodes[j]).norm();
            // A NaN size or length also fails here.
            if length.is_nan() || length <= ZERO_LENGTH_RELATIVE * size {
                return Err(PanelError::ZeroLengthPanel { panel: j });
            }
        }
        let area = signed_area(nodes);
        if area <= 0.0 {
            return Err(PanelError::Clockwise { signed_area: area });
        }
        let panels: Vec<Panel> = (0..n).map(|j| Panel::new(nodes[j], nodes[j + 1])).collect();
        let bisector_raw = panels[n - 1].tangent - panels[0].tangent;
        let te_bisector = if bisector_raw.norm() > 1e-12 {
            bisector_raw.normalize()
        } else {
            // Degenerate (both trailing-edge panels parallel and same-way): fall back to the
            // direction from the leading edge to the trailing edge.
            (te_midpoint - leading_edge).normalize()
        };
        let gap = (nodes[n] - nodes[0]).norm();
        let base = (gap > SHARP_TE_RELATIVE_GAP * chord).then(|| {
            let panel = Panel::new(nodes[n], nodes[0]);
            BasePanel {
                panel,
                source_per_q: panel.normal_out().dot(&te_bisector),
                vortex_per_q: panel.tangent.dot(&te_bisector),
            }
        });

        let mut solver = PanelSolver {
            nodes: nodes.to_vec(),
            panels,
            base,
            chord,
            leading_edge,
            te_midpoint,
            te_bisector,
            lu: DMatrix::<f64>::zeros(1, 1).lu(),
            gamma_0: Vec::new(),
            gamma_90: Vec::new(),
        };
        let matrix = solver.assemble();
        let lu = matrix.lu();
        let diag = lu.u().diagonal();
        let max_pivot = diag.iter().fold(0.0_f64, |m, d| m.max(d.abs()));
        let min_pivot = diag.iter().fold(f64::INFINITY, |m, d| m.min(d.abs()));
        let pivot_ratio = if max_pivot > 0.0 {
            min_pivot / max_pivot
        } else {
            0.0
        };
        if pivot_ratio.is_nan() || pivot_ratio < MIN_PIVOT_RATIO {
            return Err(PanelError::SingularMatrix { pivot_ratio });
        }
        let mut rhs = DMatrix::<f64>::zeros(n + 2, 2);
        for i in 0..=n {
            if solver.is_psi_row(i) {
                // −ψ∞ with ψ∞ = y cos α − x sin α: α = 0 → −y, α = 90° → +x.
                rhs[(i, 0)] = -nodes[i].y;
                rhs[(i, 1)] = nodes[i].x;
            }
        }
        let sol = lu
            .solve(&rhs)
            .filter(|s| s.iter().all(|v| v.is_finite()))
            .ok_or(PanelError::SingularMatrix { pivot_ratio })?;
        solver.gamma_0 = sol.column(0).rows(0, n + 1).iter().copied().collect();
        solver.gamma_90 = sol.column(1).rows(0, n + 1).iter().copied().collect();
        solver.lu = lu;
        Ok(solver)
    }

    /// Number of panels N.
    pub fn panel_count(&self) -> usize {
        self.panels.len()
    }

    /// The N + 1 nodes as given.
    pub fn nodes(&self) -> &[Point2<f64>] {
        &self.nodes
    }

    /// Chord: distance from the trailing-edge midpoint to the farthest node (the leading edge).
    pub fn chord(&self) -> f64 {
        self.chord
    }

    /// The node farthest from the trailing-edge midpoint.
    pub fn leading_edge(&self) -> Point2<f64> {
        self.leading_edge
    }

    /// Midpoint of the two trailing-edge nodes (start of the wake).
    pub fn trailing_edge_midpoint(&self) -> Point2<f64> {
        self.te_midpoint
    }

    /// Unit bisector of the two trailing-edge panels, pointing downstream.
    pub fn trailing_edge_bisector(&self) -> Vector2<f64> {
        self.te_bisector
    }

    /// Whether the trailing edge is treated as sharp (gap ≤ 1e-9 chord) rather than closed by a
    /// base panel.
    pub fn has_sharp_trailing_edge(&self) -> bool {
        self.base.is_none()
    }

    /// Rows 0 … N carry a stream-function condition except row N of a sharp trailing edge.
    pub(crate) fn is_psi_row(&self, i: usize) -> bool {
        i < self.panels.len() || (i == self.panels.len() && self.base.is_some())
    }

    fn assemble(&self) -> DMatrix<f64> {
        let n = self.panels.len();
        let mut a = DMatrix::<f64>::zeros(n + 2, n + 2);
        for (i, p) in self.nodes.iter().enumerate() {
            for (j, panel) in self.panels.iter().enumerate() {
                let (ca, cb) = panel.linear_vortex_psi(p);
                a[(i, j)] += ca;
                a[(i, j + 1)] += cb;
            }
            if let Some(base) = &self.base {
                let c = base.source_per_q
                    * base.panel.constant_source_psi(p, BranchCut::OutwardNormal)
                    + base.vortex_per_q * base.panel.constant_vortex_psi(p);
                a[(i, n)] += 0.5 * c;
                a[(i, 0)] -= 0.5 * c;
            }
            a[(i, n + 1)] = -1.0;
        }
        if self.base.is_none() {
            a.row_mut(n).fill(0.0);
            for (k, w) in [
                (0, 1.0),
                (1, -2.0),
                (2, 1.0),
                (n, -1.0),
                (n - 1, 2.0),
                (n - 2, -1.0),
            ] {
                a[(n, k)] += w;
            }
        }
        a[(n + 1, 0)] = 1.0;
        a[(n + 1, n)] = 1.0;
        a
    }

    /// Solve the factored system for a right-hand side; returns γ_0 … γ_N (ψ0 dropped).
    pub(crate) fn solve_rhs(&self, rhs: &DMatrix<f64>) -> DMatrix<f64> {
        let n = self.panels.len();
        match self.lu.solve(rhs) {
            Some(sol) => sol.rows(0, n + 1).into_owned(),
            // Unreachable after the pivot check in `new`; NaN flags it rather than panicking.
            None => DMatrix::from_element(n + 1, rhs.ncols(), f64::NAN),
        }
    }

    /// Inviscid solution at `alpha_rad` by superposition γ = γ0 cos α + γ90 sin α. A non-finite
    /// angle gives NaN results.
    pub fn solve(&self, alpha_rad: f64) -> InviscidSolution {
        let (s, c) = alpha_rad.sin_cos();
        let gamma: Vec<f64> = self
            .gamma_0
            .iter()
            .zip(&self.gamma_90)
            .map(|(g0, g90)| g0 * c + g90 * s)
            .collect();
        self.post_process(alpha_rad, gamma)
    }

    /// Inviscid solution at `alpha_rad` with constant-strength transpiration sources added:
    /// `sigma` holds first the N surface panels, then the Nw − 1 wake panels of `wake` (layout
    /// of [`crate::SourceInfluence`]). The surface speeds equal `solve(α).gamma + S·sigma` with
    /// `S` the source-influence matrix.
    ///
    /// # Errors
    /// `sigma` of the wrong length, or a non-finite angle.
    pub fn solve_with_sources(
        &self,
        alpha_rad: f64,
        wake: &WakeLine,
        sigma: &[f64],
    ) -> Result<InviscidSolution, PanelError> {
        if !alpha_rad.is_finite() {
            return Err(PanelError::NonFiniteAlpha { alpha_rad });
        }
        let expected = self.panels.len() + wake.nodes.len().saturating_sub(1);
        if sigma.len() != expected {
            return Err(PanelError::LengthMismatch {
                what: "source strengths",
                expected,
                found: sigma.len(),
            });
        }
        let b = self.source_rhs_columns(wake);
        let rhs = b * DVector::from_column_slice(sigma);
        let dgamma = self.solve_rhs(&DMatrix::from_column_slice(rhs.len(), 1, rhs.as_slice()));
        let mut sol = self.solve(alpha_rad);
        for (g, d) in sol.gamma.iter_mut().zip(dgamma.iter()) {
            *g += d;
        }
        Ok(self.post_process(alpha_rad, sol.gamma))
    }

    /// Right-hand-side columns of unit constant sources: column k holds −ψ_k(P_i) in the
    /// stream-function rows and zero in the Kutta and sharp-TE rows. Surface sources cut along
    /// their outward normal, wake sources downstream along the wake panel (see
    /// [`BranchCut`]), so that no cut crosses the contour between nodes.
    pub(crate) fn source_rhs_columns(&self, wake: &WakeLine) -> DMatrix<f64> {
        let n = self.panels.len();
        let wake_panels = wake_panels(wake);
        let mut b = DMatrix::<f64>::zeros(n + 2, n + wake_panels.len());
        for (i, p) in self.nodes.iter().enumerate() {
            if !self.is_psi_row(i) {
                continue;
            }
            for (k, panel) in self.panels.iter().enumerate() {
                b[(i, k)] = -panel.constant_source_psi(p, BranchCut::OutwardNormal);
            }
            for (k, panel) in wake_panels.iter().enumerate() {
                b[(i, n + k)] = match panel {
                    Some(pan) => -pan.constant_source_psi(p, BranchCut::Downstream),
                    None => 0.0,
                };
            }
        }
        b
    }

    /// Velocity at `p` per unit γ_i for each node i (vortex panels and the base panel).
    pub(crate) fn vortex_velocity_gradient(&self, p: &Point2<f64>) -> Vec<Vector2<f64>> {
        let n = self.panels.len();
        let mut grad = vec![Vector2::zeros(); n + 1];
        for (j, panel) in self.panels.iter().enumerate() {
            let (va, vb) = panel.linear_vortex_velocity(p);
            grad[j] += va;
            grad[j + 1] += vb;
        }
        if let Some(base) = &self.base {
            let v = base.panel.constant_source_velocity(p, None) * base.source_per_q
                + base.panel.constant_vortex_velocity(p) * base.vortex_per_q;
            grad[n] += 0.5 * v;
            grad[0] -= 0.5 * v;
        }
        grad
    }

    /// Velocity at a field point `p` of the free stream at `alpha_rad` plus the vortex sheet
    /// `gamma` (N + 1 node values) and, for a blunt trailing edge, the base panel tied to it.
    /// Transpiration sources are added separately with [`PanelSolver::source_velocity`].
    /// Infinite on the contour's end nodes; meaningful off the surface.
    ///
    /// # Errors
    /// `gamma` of the wrong length.
    pub fn field_velocity(
        &self,
        alpha_rad: f64,
        gamma: &[f64],
        p: Point2<f64>,
    ) -> Result<Vector2<f64>, PanelError> {
        let expected = self.panels.len() + 1;
        if gamma.len() != expected {
            return Err(PanelError::LengthMismatch {
                what: "vortex strengths",
                expected,
                found: gamma.len(),
            });
        }
        Ok(self.field_velocity_unchecked(alpha_rad, gamma, &p))
    }

    pub(crate) fn field_velocity_unchecked(
        &self,
        alpha_rad: f64,
        gamma: &[f64],
        p: &Point2<f64>,
    ) -> Vector2<f64> {
        let (s, c) = alpha_rad.sin_cos();
        self.vortex_velocity_gradient(p)
            .iter()
            .zip(gamma)
            .fold(Vector2::new(c, s), |v, (g, gi)| v + g * *gi)
    }

    /// Velocity at a field point `p` induced by constant-strength sources (layout of
    /// [`crate::SourceInfluence`]: N surface panels, then the wake panels of `wake`).
    /// Logarithmically infinite on a source panel's end nodes.
    ///
    /// # Errors
    /// `sigma` of the wrong length.
    pub fn source_velocity(
        &self,
        wake: &WakeLine,
        sigma: &[f64],
        p: Point2<f64>,
    ) -> Result<Vector2<f64>, PanelError> {
        let wake_panels = wake_panels(wake);
        let expected = self.panels.len() + wake_panels.len();
        if sigma.len() != expected {
            return Err(PanelError::LengthMismatch {
                what: "source strengths",
                expected,
                found: sigma.len(),
            });
        }
        let surface = self.panels.iter().map(Some);
        let all = surface.chain(wake_panels.iter().map(Option::as_ref));
        Ok(all
            .zip(sigma)
            .fold(Vector2::zeros(), |v, (panel, s)| match panel {
                Some(pan) => v + pan.constant_source_velocity(&p, None) * *s,
                None => v,
            }))
    }

    fn post_process(&self, alpha_rad: f64, gamma: Vec<f64>) -> InviscidSolution {
        let n = self.panels.len();
        let c = self.chord;
        let cp: Vec<f64> = gamma.iter().map(|g| 1.0 - g * g).collect();
        // Circulation (clockwise positive): Γ = −Σ ½(γ_j + γ_{j+1}) L_j − γ_TE L_b.
        let mut circulation: f64 = -(0..n)
            .map(|j| 0.5 * (gamma[j] + gamma[j + 1]) * self.panels[j].length)
            .sum::<f64>();
        if let Some(base) = &self.base {
            let q_te = 0.5 * (gamma[n] - gamma[0]);
            circulation -= base.vortex_per_q * q_te * base.panel.length;
        }
        // Pressure integration with mid-panel Cp (trapezoidal), closed over the base panel with
        // the mean of the two trailing-edge values (METHODS §1.6).
        let reference = self.leading_edge + 0.25 * (self.te_midpoint - self.leading_edge);
        let mut segments: Vec<(Point2<f64>, Point2<f64>, f64)> = (0..n)
            .map(|j| (self.nodes[j], self.nodes[j + 1], 0.5 * (cp[j] + cp[j + 1])))
            .collect();
        if self.base.is_some() {
            segments.push((self.nodes[n], self.nodes[0], 0.5 * (cp[n] + cp[0])));
        }
        let (mut cfx, mut cfy, mut cm) = (0.0, 0.0, 0.0);
        for (a, b, cp_mid) in segments {
            let d = b - a;
            let mid = a + 0.5 * d;
            cfx -= cp_mid * d.y;
            cfy += cp_mid * d.x;
            cm -= cp_mid * ((mid.x - reference.x) * d.x + (mid.y - reference.y) * d.y);
        }
        let (s, co) = alpha_rad.sin_cos();
        let (cfx, cfy) = (cfx / c, cfy / c);
        InviscidSolution {
            alpha_rad,
            cl: 2.0 * circulation / c,
            cl_pressure: cfy * co - cfx * s,
            cd_pressure: cfx * co + cfy * s,
            cm_c4: cm / (c * c),
            stagnation: self.find_stagnation(&gamma),
            cp,
            gamma,
        }
    }

    /// The − to + sign change of γ with the largest jump (robust against sign noise where γ is
    /// near zero at a finite-angle trailing edge); if there is none, the node of smallest |γ|.
    fn find_stagnation(&self, gamma: &[f64]) -> Stagnation {
        let crossing = (0..gamma.len() - 1)
            .filter(|&i| gamma[i] < 0.0 && gamma[i + 1] >= 0.0)
            .max_by(|&i, &j| {
                let ji = gamma[i + 1] - gamma[i];
                let jj = gamma[j + 1] - gamma[j];
                ji.total_cmp(&jj)
            });
        let (panel, fraction) = match crossing {
            Some(i) => (i, gamma[i] / (gamma[i] - gamma[i + 1])),
            None => {
                let i = (0..gamma.len())
                    .min_by(|&i, &j| gamma[i].abs().total_cmp(&gamma[j].abs()))
                    .unwrap_or(0);
                (
                    i.min(gamma.len() - 2),
                    if i == gamma.len() - 1 { 1.0 } else { 0.0 },
                )
            }
        };
        let a = self.nodes[panel];
        let b = self.nodes[panel + 1];
        Stagnation {
            panel,
            fraction,
            point: a + fraction * (b - a),
        }
    }
}

/// Panels of a wake line, `None` for a zero-length (degenerate) segment, which then carries no
/// source.
pub(crate) fn wake_panels(wake: &WakeLine) -> Vec<Option<Panel>> {
    wake.nodes
        .windows(2)
        .map(|w| ((w[1] - w[0]).norm() > 0.0).then(|| Panel::new(w[0], w[1])))
        .collect()
}
