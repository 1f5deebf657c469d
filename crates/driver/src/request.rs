//! What a polar sweep is asked to do: [`PolarRequest`], [`Targets`], [`SweepSettings`], and the
//! range checks of its inputs.
//!
//! The ranges mirror the checks `foilsweep_viscous::solve_point` makes on each operating point
//! (Reynolds number 1e3..1e9, Mach 0..0.9, N-factor 0..20, trips 0..1 x/c, |alpha| ≤ 30 deg,
//! |cl| ≤ 3), so that a bad request is refused once, up front, with one clear message instead of
//! failing every point.

use foilsweep_geometry::{Airfoil, GeometryError};
use foilsweep_panel::{PanelError, PanelSolver};
use foilsweep_viscous::ViscousSettings;

use crate::output::SectionInfo;

/// Errors in a polar request or in setting up its section.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum RequestError {
    /// A Reynolds number outside the range the boundary-layer model covers.
    #[error("Reynolds number {0} is outside 1e3..1e9")]
    Reynolds(f64),
    /// The same Reynolds number listed twice.
    #[error("Reynolds number {0} is listed twice")]
    DuplicateReynolds(f64),
    /// A Mach number outside the Kármán–Tsien range.
    #[error("Mach number {0} is outside 0..0.9")]
    Mach(f64),
    /// A critical N-factor outside the e^N range.
    #[error("critical N-factor {0} is outside 0..20")]
    CriticalN(f64),
    /// A trip position outside the chord.
    #[error("trip position {0} is outside 0..1 x/c")]
    Trip(f64),
    /// An angle of attack outside the solver's range.
    #[error("angle of attack {0} deg is outside -30..30 deg")]
    AlphaDeg(f64),
    /// A target lift coefficient outside the solver's range.
    #[error("target cl {0} is outside -3..3")]
    Cl(f64),
    /// An empty list of Reynolds numbers or targets.
    #[error("no {0} requested")]
    Empty(&'static str),
    /// The section cannot be re-panelled.
    #[error("cannot re-panel the section: {0}")]
    Repanel(#[from] GeometryError),
    /// The panel solver cannot be built for the section.
    #[error("cannot build the panel solver: {0}")]
    Panel(#[from] PanelError),
}

/// Checks one Reynolds number (chord based) against 1e3..1e9.
pub fn check_reynolds(reynolds: f64) -> Result<f64, RequestError> {
    if reynolds.is_finite() && (1.0e3..=1.0e9).contains(&reynolds) {
        Ok(reynolds)
    } else {
        Err(RequestError::Reynolds(reynolds))
    }
}

/// Checks a free-stream Mach number against 0..0.9.
pub fn check_mach(mach: f64) -> Result<f64, RequestError> {
    if mach.is_finite() && (0.0..0.9).contains(&mach) {
        Ok(mach)
    } else {
        Err(RequestError::Mach(mach))
    }
}

/// Checks a critical N-factor against (0, 20].
pub fn check_critical_n(critical_n: f64) -> Result<f64, RequestError> {
    if critical_n.is_finite() && critical_n > 0.0 && critical_n <= 20.0 {
        Ok(critical_n)
    } else {
        Err(RequestError::CriticalN(critical_n))
    }
}

/// Checks a trip position against 0..1 x/c.
pub fn check_trip(x_over_c: f64) -> Result<f64, RequestError> {
    if x_over_c.is_finite() && (0.0..=1.0).contains(&x_over_c) {
        Ok(x_over_c)
    } else {
        Err(RequestError::Trip(x_over_c))
    }
}

/// The swept quantity: angles of attack or target lift coefficients, in the order wanted in
/// the output.
#[derive(Debug, Clone, PartialEq)]
pub enum Targets {
    /// Angles of attack, degrees.
    AlphaDeg(Vec<f64>),
    /// Target lift coefficients (alpha found by the viscous solver).
    Cl(Vec<f64>),
}

impl Targets {
    /// The requested values, in order.
    pub fn values(&self) -> &[f64] {
        match self {
            Targets::AlphaDeg(values) | Targets::Cl(values) => values,
        }
    }

    fn check(&self) -> Result<(), RequestError> {
        if self.values().is_empty() {
            return Err(RequestError::Empty("angles of attack or target cls"));
        }
        for &value in self.values() {
            match self {
                Targets::AlphaDeg(_) if !(value.is_finite() && value.abs() <= 30.0) => {
                    return Err(RequestError::AlphaDeg(value))
                }
                Targets::Cl(_) if !(value.is_finite() && value.abs() <= 3.0) => {
                    return Err(RequestError::Cl(value))
                }
                _ => {}
            }
        }
        Ok(())
    }
}

/// How a sweep steps from point to point and recovers from failed points.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SweepSettings {
    /// Largest step in alpha (degrees) from the converged neighbour a point is warm-started
    /// from; a larger requested step is walked through intermediate values that are not
    /// reported. Default 0.5° (our choice: a 1° step from 5° to 6° on the E387 at Re 2e5 can
    /// land on a second, spurious solution with a laminar reattachment just ahead of
    /// transition, which 0.5° steps do not reach).
    pub max_alpha_step_deg: f64,
    /// The same for target-cl sweeps, in cl (default 0.05, about 0.5° of alpha).
    pub max_cl_step: f64,
    /// Retry a failed warm-started point cold before approaching it in steps. Off by default:
    /// `foilsweep_viscous::solve_point` already falls back to a cold start when a warm start
    /// fails, so the retry would repeat the same deterministic solve; set it for a solver that
    /// does not.
    pub retry_cold: bool,
    /// How many times the step from the last converged neighbour may be halved when a failed
    /// point is approached in smaller steps (0 disables the stepped approach).
    pub max_step_halvings: u32,
    /// After this many consecutive failed points in one marching direction past stall (lift
    /// slope below half of 2π per radian, see the sweep) the remaining targets in that
    /// direction are not attempted (0 = never stop). Failures before stall never stop a march.
    pub give_up_after_failures: usize,
}

impl Default for SweepSettings {
    fn default() -> Self {
        Self {
            max_alpha_step_deg: 0.5,
            max_cl_step: 0.05,
            retry_cold: false,
            max_step_halvings: 3,
            give_up_after_failures: 2,
        }
    }
}

/// One polar sweep of one section.
#[derive(Debug, Clone)]
pub struct PolarRequest {
    /// Section name, coordinate hash and panel count (for the output metadata).
    pub section: SectionInfo,
    /// The panel solver of the re-panelled section.
    pub solver: PanelSolver,
    /// Reynolds numbers (chord based), in output order.
    pub reynolds: Vec<f64>,
    /// Angles of attack or target cls, in output order.
    pub targets: Targets,
    /// Free-stream Mach number (Kármán–Tsien correction of Cp only).
    pub mach: f64,
    /// Critical amplification factor N_crit of the e^N method.
    pub critical_n: f64,
    /// Forced transition x/c on the upper surface.
    pub trip_upper_x_over_c: Option<f64>,
    /// Forced transition x/c on the lower surface.
    pub trip_lower_x_over_c: Option<f64>,
    /// Numerical settings of each viscous point.
    pub viscous: ViscousSettings,
    /// Retry and give-up rules of the sweep.
    pub sweep: SweepSettings,
}

impl PolarRequest {
    /// Re-panels `airfoil` with `panels` panels and builds the panel solver; Mach 0, N_crit 9,
    /// no trips, default viscous and sweep settings (change the public fields to adjust).
    pub fn new(
        airfoil: &Airfoil,
        panels: usize,
        reynolds: Vec<f64>,
        targets: Targets,
    ) -> Result<Self, RequestError> {
        let panelled = airfoil.repanel(panels)?;
        let solver = PanelSolver::new(panelled.points())?;
        Ok(Self {
            section: SectionInfo {
                name: airfoil.name().to_owned(),
                coordinate_hash: airfoil.coordinate_hash(),
                panels,
            },
            solver,
            reynolds,
            targets,
            mach: 0.0,
            critical_n: 9.0,
            trip_upper_x_over_c: None,
            trip_lower_x_over_c: None,
            viscous: ViscousSettings::default(),
            sweep: SweepSettings::default(),
        })
    }

    /// Checks every input range (see the module doc) and that no list is empty.
    pub fn check(&self) -> Result<(), RequestError> {
        if self.reynolds.is_empty() {
            return Err(RequestError::Empty("Reynolds numbers"));
        }
        for (i, &reynolds) in self.reynolds.iter().enumerate() {
            check_reynolds(reynolds)?;
            if self.reynolds[..i].contains(&reynolds) {
                return Err(RequestError::DuplicateReynolds(reynolds));
            }
        }
        self.targets.check()?;
        check_mach(self.mach)?;
        check_critical_n(self.critical_n)?;
        for trip in [self.trip_upper_x_over_c, self.trip_lower_x_over_c]
            .into_iter()
            .flatten()
        {
            check_trip(trip)?;
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use foilsweep_geometry::naca::{naca_section, TrailingEdge};

    fn request() -> PolarRequest {
        let airfoil = naca_section("naca0012", 81, TrailingEdge::Open).unwrap();
        PolarRequest::new(&airfoil, 80, vec![1.0e6], Targets::AlphaDeg(vec![0.0])).unwrap()
    }

    #[test]
    fn bad_inputs_are_refused_with_one_line_messages() {
        let mut bad = request();
        bad.reynolds = vec![50.0];
        assert_eq!(
            bad.check().unwrap_err().to_string(),
            "Reynolds number 50 is outside 1e3..1e9"
        );
        bad.reynolds = vec![2.0e5, 2.0e5];
        assert_eq!(
            bad.check().unwrap_err().to_string(),
            "Reynolds number 200000 is listed twice"
        );
        let mut bad = request();
        bad.targets = Targets::AlphaDeg(vec![0.0, f64::NAN]);
        assert_eq!(
            bad.check().unwrap_err().to_string(),
            "angle of attack NaN deg is outside -30..30 deg"
        );
        let mut bad = request();
        bad.targets = Targets::Cl(Vec::new());
        assert_eq!(
            bad.check().unwrap_err().to_string(),
            "no angles of attack or target cls requested"
        );
        let mut bad = request();
        bad.trip_lower_x_over_c = Some(1.5);
        assert_eq!(
            bad.check().unwrap_err().to_string(),
            "trip position 1.5 is outside 0..1 x/c"
        );
        let mut bad = request();
        bad.mach = 0.95;
        assert!(bad.check().is_err());
        let mut bad = request();
        bad.critical_n = 0.0;
        assert!(bad.check().is_err());
        assert!(request().check().is_ok());
    }

    #[test]
    fn section_metadata_comes_from_the_airfoil() {
        let request = request();
        assert_eq!(request.section.panels, 80);
        assert_eq!(request.section.coordinate_hash.len(), 16);
        assert!(request.section.name.contains("0012"));
    }
}
