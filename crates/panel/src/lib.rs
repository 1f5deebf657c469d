//! Inviscid two-dimensional panel method: linear-vorticity panels in a Dirichlet
//! (stream-function) formulation with a Kutta condition, for one airfoil at any angle of attack,
//! plus the pieces a viscous–inviscid coupling needs (wake line, source-influence matrix).
//!
//! # What it does
//! - [`PanelSolver::new`] takes N + 1 nodes (counter-clockwise from the upper trailing edge,
//!   node 0, to the lower trailing edge, node N), builds the (N + 2) × (N + 2) system of
//!   METHODS §1.2 (Formulation A: unknowns γ_0 … γ_N and the interior stream function ψ0), closes
//!   a blunt trailing edge with a source/vortex base panel (METHODS §1.4), factors it once (LU)
//!   and keeps the solutions for α = 0° and 90°.
//! - [`PanelSolver::solve`] superposes them into an [`InviscidSolution`]: surface speed γ
//!   (= vortex strength), Cp = 1 − γ², cl from circulation and from pressure, cm about c/4, the
//!   stagnation point.
//! - [`PanelSolver::wake_line`] marches a [`WakeLine`] streamline from the trailing edge;
//!   [`PanelSolver::wake_speed`] gives the inviscid speed along it.
//! - [`PanelSolver::source_influence`] gives the [`SourceInfluence`] matrix ∂q/∂σ of surface and
//!   wake speeds with respect to constant-strength transpiration sources;
//!   [`PanelSolver::wake_vortex_influence`] the surface speeds' response to a vortex sheet on
//!   the wake line (wake-curvature correction).
//! - [`karman_tsien_cp`], [`karman_tsien_speed`], [`critical_cp`]: subsonic corrections.
//!
//! # What it does not do
//! No boundary layers, no file input, no geometry clean-up or re-panelling (it takes the nodes
//! it is given; use the geometry crate first), no unsteady or multi-element flows.
//!
//! # Conventions and invariants
//! V∞ = 1; lengths in the units of the nodes, coefficients normalised by the chord c (distance
//! from the trailing-edge midpoint to the farthest node); α in radians from the x-axis. γ_i is
//! the speed along increasing panel-s (counter-clockwise positive), negative on a lifting upper
//! surface. cm is nose-up positive about the quarter-chord point of the LE–TE line. A trailing
//! edge is sharp when its gap is at most 1e-9 c. The solver never panics on bad nodes: they give
//! a [`PanelError`].
//!
//! ```
//! use foilsweep_panel::PanelSolver;
//! use nalgebra::Point2;
//! # fn main() -> Result<(), foilsweep_panel::PanelError> {
//! // An ellipse of thickness 0.1 with its "trailing edge" node at x = 1.
//! let n = 120;
//! let nodes: Vec<Point2<f64>> = (0..=n)
//!     .map(|i| {
//!         let t = 2.0 * std::f64::consts::PI * i as f64 / n as f64;
//!         Point2::new(0.5 + 0.5 * t.cos(), 0.05 * t.sin())
//!     })
//!     .collect();
//! let solver = PanelSolver::new(&nodes)?;
//! let sol = solver.solve(4f64.to_radians());
//! assert!(sol.cl > 0.4 && sol.cl < 0.5);
//! # Ok(())
//! # }
//! ```
#![warn(missing_docs)]

mod compressibility;
mod error;
mod influence;
mod solver;
mod sources;
mod wake;
mod wake_vortex;

pub use compressibility::{critical_cp, isentropic_cp, karman_tsien_cp, karman_tsien_speed};
pub use error::PanelError;
pub use solver::{InviscidSolution, PanelSolver, Stagnation};
pub use sources::SourceInfluence;
pub use wake::WakeLine;
