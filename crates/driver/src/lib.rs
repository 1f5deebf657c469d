//! Viscous polars of one section: sweeps over Reynolds number and angle of attack (or lift
//! coefficient), the output types, and the CSV/JSON/SVG/text writers.
//!
//! What it does: a [`PolarRequest`] (a panelled section, a list of Reynolds numbers, a list of
//! alphas or target cls, Mach, N-factor, trips, solver settings) is run by [`run_polar`] into a
//! [`Polar`]. Reynolds numbers run in parallel (rayon); within one Reynolds number the targets
//! are solved by continuation — starting at the requested value nearest zero, marching upward
//! and then downward, each point warm-started from its converged neighbour. A failed point is
//! retried cold, then approached in smaller steps from its last converged neighbour
//! ([`SweepSettings`]). The [`write`](mod@write) module writes the polar as a long CSV, JSON, grid CSVs for
//! wing tools, SVG plots and a text table; [`progress`] shows a progress bar on a terminal.
//!
//! What it does not do: parse command lines, solve a single point (that is
//! `foilsweep-viscous`), or read coordinate files (the command line loads sections).
//!
//! Main types: [`PolarRequest`], [`Targets`], [`SweepSettings`], [`Polar`], [`PolarPoint`],
//! [`SurfaceEvents`], [`RequestError`], [`write::WriteError`].
//!
//! Invariants: every requested (Reynolds number, target) pair appears exactly once in
//! [`Polar::points`], grouped by Reynolds number in the requested order and, within one, in the
//! requested target order, independent of the number of threads. A point that did not converge
//! is kept and flagged with its reason; its coefficients are `None`, never invented. Files are
//! written to a temporary name in the destination directory and renamed, so an existing file is
//! either replaced whole or left untouched.
//!
//! ```no_run
//! # fn main() -> Result<(), Box<dyn std::error::Error>> {
//! use foilsweep_driver::{run_polar, PolarRequest, Targets};
//! use foilsweep_geometry::naca::{naca_section, TrailingEdge};
//! let airfoil = naca_section("naca2412", 161, TrailingEdge::Open)?;
//! let request = PolarRequest::new(
//!     &airfoil,
//!     160,
//!     vec![2.0e5, 5.0e5],
//!     Targets::AlphaDeg(vec![-2.0, 0.0, 2.0, 4.0]),
//! )?;
//! let polar = run_polar(&request, None)?;
//! foilsweep_driver::write::write_table(&mut std::io::stdout(), &polar)?;
//! # Ok(()) }
//! ```
#![warn(missing_docs)]

mod output;
pub mod progress;
mod request;
mod sweep;
pub mod write;

pub use output::{
    Polar, PolarPoint, PolarSettings, SectionInfo, SurfaceEvents, TargetKind, CAUTION,
    SCHEMA_VERSION,
};
pub use request::{
    check_critical_n, check_mach, check_reynolds, check_trip, PolarRequest, RequestError,
    SweepSettings, Targets,
};
pub use sweep::run_polar;
