//! Integral boundary-layer methods for 2D incompressible flow: closure relations, a direct
//! (edge-speed-given) march with transition and laminar-separation-bubble estimates, and the
//! residual form of the interacting equations that a coupling Newton solver drives.
//!
//! **Does not** know about panels, airfoils or files: inputs are plain arrays of arc length s
//! (from the stagnation point), edge speed ue ≥ 0 and x/c per station, in chord units with
//! V∞ = 1 and ν = 1/Re.
//!
//! Main pieces:
//! - [`closure`]: pure closure functions — Thwaites (1949) l(λ), H(λ); the two-equation laminar
//!   closure of Drela & Giles (1987) valid in reversed flow; Head (1958) entrainment;
//!   Green, Weeks & Brooman (1973) lag-entrainment; the e^N envelope of Drela & Giles (1987) and
//!   Mack's (1977) N_crit(Tu).
//! - [`direct`]: the fast **non-interacting estimate** — Thwaites from the stagnation point,
//!   e^N, Horton's (1968) bubble model at laminar separation, lag-entrainment (or Head) turbulent
//!   layer, the wake and Squire–Young drag. `direct::march_surface` → `SurfaceMarch`.
//! - [`thwaites`]: Thwaites's integral march (θ from the stagnation point) used by `direct`.
//! - [`falkner_skan`]: our own Falkner–Skan solver (attached and reversed branches), the source
//!   of the table-based laminar closure `closure::laminar_table`, which the interacting
//!   equations use on the attached branch (`closure::laminar_blend`).
//! - [`equations`] and [`interaction`]: discrete residuals of the interacting equations and the
//!   Newton solver with an interaction matrix (the coupled, "full" mode).
//! - `dense` (private): the blocked LU that solves the dense Newton system of the coupling.
//! - [`state`]: per-station results ([`state::StationState`], [`state::Regime`]) and events
//!   ([`state::Event`]) shared by all marches.
//! - [`error::BoundaryLayerError`]: every bad input and failure, with the station index.
//!
//! Governing equations (s along the surface, ue edge speed, θ momentum thickness, H = δ*/θ):
//! momentum integral dθ/ds = cf/2 − (2 + H)(θ/ue) due/ds (von Kármán); kinetic-energy integral
//! θ dH*/ds + H*(1 − H)(θ/ue) due/ds = 2C_D − H* cf/2; entrainment (1/ue) d(ue θ H1)/ds = C_E.
//!
//! Example (direct march of a flat plate at Re = 1e6):
//!
//! ```
//! use foilsweep_boundary_layer::direct::{march_surface, MarchSettings};
//! # fn main() -> Result<(), foilsweep_boundary_layer::BoundaryLayerError> {
//! let s: Vec<f64> = (0..50).map(|i| f64::from(i) / 49.0).collect();
//! let ue = vec![1.0; s.len()];
//! let march = march_surface(&s, &ue, &s, &MarchSettings::new(1e6))?;
//! assert_eq!(march.stations.len(), 50);
//! assert!(march.events.is_empty()); // laminar to x/c = 1 at Re 1e6 with N_crit = 9
//! # Ok(())
//! # }
//! ```
//!
//! Invariants: no panics on bad input (errors carry the station index); skin friction is based on
//! the local edge speed; every clamp applied by a closure outside its calibrated range is
//! documented on the function, and every regime change in a march is reported as an event.
#![warn(missing_docs)]

pub mod closure;
mod dense;
pub mod direct;
pub mod equations;
pub mod error;
pub mod falkner_skan;
pub mod interaction;
pub mod state;
pub mod thwaites;

pub use error::BoundaryLayerError;
