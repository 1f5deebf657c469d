//! One viscous operating point of an airfoil: the boundary layer coupled to the panel method.
//!
//! What it does: for a panelled section (a [`PanelSolver`]) and an operating point (alpha or a
//! target cl, Reynolds number, Mach number, critical N-factor, trips), it builds the boundary-layer
//! stations of both surfaces (from the stagnation point) and of the wake, the mass-defect
//! influence matrix `D` from the panel method's source influence, and solves the interacting
//! boundary layer `ue = ue_inviscid + D·m` simultaneously by Newton's method
//! ([`foilsweep_boundary_layer::interaction`]). The stagnation point is re-located from the
//! viscous surface speed and the solve repeated until it stops moving. It then reports cl and cm
//! from the viscous surface pressure, cd from the wake momentum deficit far downstream
//! (Squire & Young 1938) split into friction and pressure parts, the events (laminar separation,
//! transition, reattachment, turbulent separation) per surface, and the convergence record.
//!
//! What it does not do: sweeps, continuation over alpha, file output (see `foilsweep-driver`).
//!
//! Conventions: chord 1, V∞ = 1, ν = 1/Re; angles in radians inside, `alpha_deg` at the edges;
//! cm about the quarter chord, nose-up positive. Mach enters only through the Kármán–Tsien
//! correction of the surface pressure (the boundary layer is incompressible); points whose
//! minimum Cp is below the critical Cp are flagged.
//!
//! Invariants: every result carries a [`PointStatus`]; a point that did not converge, or that
//! converged to a state failing the plausibility check ([`Implausibility`]), is never reported
//! as converged, and no coefficient is invented for a point that failed.
//!
//! ```no_run
//! # fn main() -> Result<(), Box<dyn std::error::Error>> {
//! use foilsweep_panel::PanelSolver;
//! use foilsweep_viscous::{solve_point, OperatingPoint, ViscousSettings};
//! # let nodes: Vec<nalgebra::Point2<f64>> = Vec::new();
//! let solver = PanelSolver::new(&nodes)?;
//! let point = OperatingPoint::at_alpha_deg(4.0, 3.0e5);
//! let result = solve_point(&solver, &point, &ViscousSettings::default(), None)?;
//! println!("cl {:.3} cd {:.5}", result.cl, result.cd);
//! # Ok(()) }
//! ```
#![warn(missing_docs)]

mod topology;

use foilsweep_boundary_layer::equations::EquationSettings;
use foilsweep_boundary_layer::interaction::{
    self, Coupling, InteractionError, InteractionSettings, InteractionState, Termination,
};
use foilsweep_boundary_layer::state::{Event, StationState};
use foilsweep_panel::PanelSolver;

pub use topology::Surface;
use topology::Topology;

/// What the operating point holds fixed.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Target {
    /// Angle of attack, degrees.
    AlphaDeg(f64),
    /// Lift coefficient (alpha is found by a secant iteration).
    Cl(f64),
}

/// One operating point.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct OperatingPoint {
    /// Alpha or target cl.
    pub target: Target,
    /// Reynolds number on the chord.
    pub reynolds: f64,
    /// Free-stream Mach number (Kármán–Tsien correction of Cp only).
    pub mach: f64,
    /// Critical amplification factor N_crit.
    pub critical_n: f64,
    /// Trip (forced transition) x/c on the upper surface.
    pub trip_upper_x_over_c: Option<f64>,
    /// Trip x/c on the lower surface.
    pub trip_lower_x_over_c: Option<f64>,
}

impl OperatingPoint {
    /// A point at `alpha_deg` and `reynolds`, Mach 0, N_crit 9, no trips.
    pub fn at_alpha_deg(alpha_deg: f64, reynolds: f64) -> Self {
        Self {
            target: Target::AlphaDeg(alpha_deg),
            reynolds,
            mach: 0.0,
            critical_n: 9.0,
            trip_upper_x_over_c: None,
            trip_lower_x_over_c: None,
        }
    }

    fn check(&self) -> Result<(), ViscousError> {
        let bad =
            |what: &str, v: f64| Err(ViscousError::Input(format!("{what} {v} is out of range")));
        match self.target {
            Target::AlphaDeg(a) if !(a.is_finite() && a.abs() <= 30.0) => {
                return bad("alpha (deg)", a)
            }
            Target::Cl(c) if !(c.is_finite() && c.abs() <= 3.0) => return bad("target cl", c),
            _ => {}
        }
        if !(self.reynolds.is_finite() && (1.0e3..=1.0e9).contains(&self.reynolds)) {
            return bad("Reynolds number", self.reynolds);
        }
        if !(self.mach.is_finite() && (0.0..0.9).contains(&self.mach)) {
            return bad("Mach number", self.mach);
        }
        if !(self.critical_n.is_finite() && self.critical_n > 0.0 && self.critical_n <= 20.0) {
            return bad("critical N-factor", self.critical_n);
        }
        for trip in [self.trip_upper_x_over_c, self.trip_lower_x_over_c]
            .into_iter()
            .flatten()
        {
            if !(trip.is_finite() && (0.0..=1.0).contains(&trip)) {
                return bad("trip x/c", trip);
            }
        }
        Ok(())
    }
}

/// Numerical settings of the coupled solve.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ViscousSettings {
    /// Wake length behind the trailing edge, chords.
    pub wake_length: f64,
    /// Number of wake stations.
    pub wake_stations: usize,
    /// Newton iterations per stagnation-point position. The default, 150, is our choice: the
    /// transition interval moves by one station per iteration until the iterate settles, so a
    /// transition point that has far to travel from the starting state (a bubble at low Re, a
    /// laminar separation near the leading edge at negative alpha) needs more than the 60 we
    /// used before (E387 Re 5e5, −4°, and Re 1e5, 0°–3.5°, converge with 100 and not with 60;
    /// the NACA 0012 tripped at Re 6e6, 15°–16°, with the wake-curvature term needs 150).
    pub max_iterations: usize,
    /// Convergence tolerance on the largest scaled Newton update.
    pub tolerance: f64,
    /// Maximum number of stagnation-point relocations.
    pub max_relocations: usize,
    /// C_E at transition as a fraction of its equilibrium value.
    pub transition_entrainment_fraction: f64,
    /// Include the wake-curvature term of the interaction (a vortex sheet κ ue (δ* + θ) on the
    /// wake line; DEVELOPERS.md, step 2a). On by default; off only to compare with the
    /// first-order coupling (it lowers the lift slope by about 1 %).
    pub wake_curvature: bool,
}

impl Default for ViscousSettings {
    fn default() -> Self {
        Self {
            wake_length: 1.0,
            wake_stations: 32,
            max_iterations: 150,
            tolerance: 1.0e-6,
            max_relocations: 10,
            transition_entrainment_fraction: 0.5,
            wake_curvature: true,
        }
    }
}

/// Why a point ended as it did.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PointStatus {
    /// Newton converged and the stagnation point settled.
    Converged,
    /// The iteration limit was reached; coefficients are from the last iterate and flagged.
    NotConverged,
    /// Newton converged to a state that fails a physical plausibility check (see
    /// [`Implausibility`]); the coefficients are from that state and flagged.
    Implausible(Implausibility),
}

/// Why a converged state is not accepted.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Implausibility {
    /// The laminar layer separates, and then transitions, where the inviscid flow is still
    /// accelerating on both sides of the separation station. An attached laminar layer cannot
    /// separate in a favourable pressure gradient; such states appear next to the stagnation
    /// point on the attachment side (a separated first interval that then trips transition
    /// there) and are a second, spurious solution of the discrete equations.
    SeparationInFavourableGradient(Surface),
    /// The momentum thickness falls to less than half of an upstream laminar value across the
    /// transition interval, or inside the laminar separated run that ends at transition, and the
    /// turbulent layer behind stays separated for more than a tenth of the chord (the second
    /// form: E387 at Re 1e6, −3.5°, and 7e5, −4°, lower surface, θ halving at H 26–82 in a
    /// leading-edge bubble, turbulent separation to 0.12 c, cd 0.0142 and 0.0226 next to 0.0091
    /// and 0.0111 half a degree away). θ carries the momentum deficit, which only a strong acceleration can shrink (by
    /// the momentum integral, halving θ over one interval takes an edge-speed rise of about
    /// 2^(1/(H+2)) − 1, over 15 % for an attached layer). Such states pair the fall with H of
    /// 70–80 at the transition station and a long turbulent separated region, a spurious
    /// solution of the discrete equations next to the physical short bubble (E387, Re 2e5,
    /// 2.25° and 4.09° reached in small steps: θ ratio 0.16–0.17, separated over 0.3 c, cd
    /// 0.0144–0.0164 against 0.0111–0.0123). A one-station dip in a short bubble (θ ratio
    /// 0.2–0.45, H 16–42, separated over 0.04–0.06 c; E387 at Re 1e6 near 0°–2°, NACA 2412 at
    /// Re 6e6) is a local artefact of the transition interval that leaves the coefficients
    /// within 1 % of a neighbouring state without it (E387 Re 1e6, 2°: cd 0.00546 against
    /// 0.00549) and is accepted.
    MomentumCollapseAtTransition(Surface),
}

impl std::fmt::Display for Implausibility {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Self::SeparationInFavourableGradient(surface) => write!(
                f,
                "laminar separation on the {} surface where the inviscid flow accelerates \
                 (spurious state near the stagnation point)",
                surface.name()
            ),
            Self::MomentumCollapseAtTransition(surface) => write!(
                f,
                "momentum thickness collapses at transition on the {} surface (spurious \
                 separated state)",
                surface.name()
            ),
        }
    }
}

/// Boundary-layer results of one surface.
#[derive(Debug, Clone, PartialEq)]
pub struct SurfaceResult {
    /// Which surface.
    pub surface: Surface,
    /// Station results from the stagnation point to the trailing edge.
    pub stations: Vec<StationState>,
    /// Chordwise position of each station.
    pub x_over_c: Vec<f64>,
    /// Events in downstream order.
    pub events: Vec<Event>,
    /// Transition x/c, if the surface transitions before the trailing edge.
    pub transition_x_over_c: Option<f64>,
    /// True when transition was forced by a trip.
    pub transition_forced: bool,
}

/// Result of one operating point.
#[derive(Debug, Clone, PartialEq)]
pub struct PointResult {
    /// Angle of attack, degrees.
    pub alpha_deg: f64,
    /// Lift coefficient from the viscous surface pressure.
    pub cl: f64,
    /// Drag coefficient from the wake momentum deficit (Squire–Young at the wake end).
    pub cd: f64,
    /// Skin-friction part of cd.
    pub cd_friction: f64,
    /// Pressure part of cd (cd − cd_friction).
    pub cd_pressure: f64,
    /// Quarter-chord pitching moment (nose-up positive).
    pub cm: f64,
    /// Inviscid cl at the same alpha (for reference).
    pub cl_inviscid: f64,
    /// Minimum surface Cp (compressibility-corrected).
    pub cp_min: f64,
    /// True when cp_min is below the critical Cp at this Mach number (outside the model).
    pub supersonic_flag: bool,
    /// Upper surface results.
    pub upper: SurfaceResult,
    /// Lower surface results.
    pub lower: SurfaceResult,
    /// Wake stations.
    pub wake: Vec<StationState>,
    /// Surface Cp at the panel nodes (compressibility-corrected).
    pub cp: Vec<f64>,
    /// Converged or not.
    pub status: PointStatus,
    /// Newton iterations in total.
    pub iterations: usize,
    /// Final residual 2-norm.
    pub residual: f64,
    /// State to warm-start a neighbouring point.
    pub warm_start: WarmStart,
}

/// Boundary-layer state of a solved point, reusable as the starting guess of a neighbour.
#[derive(Debug, Clone, PartialEq)]
pub struct WarmStart {
    pub(crate) topology: Topology,
    pub(crate) state: InteractionState,
    /// Wake-curvature sheet strength per wake panel (empty without the correction).
    pub(crate) wake_sheet: Vec<f64>,
}

/// Errors of one operating point.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ViscousError {
    /// The operating point's inputs are out of range.
    #[error("invalid operating point: {0}")]
    Input(String),
    /// The panel geometry cannot carry a boundary layer (e.g. no stagnation point found).
    #[error("cannot set up the boundary layer: {0}")]
    Setup(String),
    /// The coupled solve failed outright.
    #[error("coupled solve failed at alpha {alpha_deg:.2} deg: {source}")]
    Solve {
        /// Angle of attack, degrees.
        alpha_deg: f64,
        /// Underlying boundary-layer error.
        source: InteractionError,
    },
    /// A target-cl point found no alpha.
    #[error("no alpha reaches cl {target:.3} (last cl {last_cl:.3} at {last_alpha_deg:.2} deg)")]
    TargetCl {
        /// The requested cl.
        target: f64,
        /// Last cl reached.
        last_cl: f64,
        /// Alpha of the last attempt.
        last_alpha_deg: f64,
    },
}

/// Solves one operating point. `warm` (a neighbouring point's result) speeds up and stabilises
/// the solve; without it, or if it does not converge, the boundary layer starts from the
/// initial marches, and if that does not converge either, from a solution carried down from a
/// higher Reynolds number (`reynolds_continuation`).
pub fn solve_point(
    solver: &PanelSolver,
    point: &OperatingPoint,
    settings: &ViscousSettings,
    warm: Option<&WarmStart>,
) -> Result<PointResult, ViscousError> {
    point.check()?;
    match point.target {
        Target::AlphaDeg(alpha_deg) => solve_alpha(solver, point, alpha_deg, settings, warm),
        Target::Cl(cl_target) => solve_target_cl(solver, point, cl_target, settings, warm),
    }
}

fn solve_target_cl(
    solver: &PanelSolver,
    point: &OperatingPoint,
    cl_target: f64,
    settings: &ViscousSettings,
    warm: Option<&WarmStart>,
) -> Result<PointResult, ViscousError> {
    // Secant on alpha, started from the inviscid estimate with a 2π-ish slope.
    let inv0 = solver.solve(0.0);
    let inv1 = solver.solve(1.0_f64.to_radians());
    let slope_inv = (inv1.cl - inv0.cl).max(0.05);
    let mut alpha = (cl_target - inv0.cl) / slope_inv;
    let mut warm_owned = warm.cloned();
    let mut previous: Option<(f64, f64)> = None;
    let mut last = None;
    for _ in 0..12 {
        if alpha.is_nan() || alpha.abs() > 25.0 {
            break;
        }
        let r = solve_alpha(solver, point, alpha, settings, warm_owned.as_ref())?;
        let err = r.cl - cl_target;
        if err.abs() < 1e-4 && r.status == PointStatus::Converged {
            return Ok(r);
        }
        let slope = match previous {
            Some((a0, c0)) if (alpha - a0).abs() > 1e-6 => ((r.cl - c0) / (alpha - a0)).max(0.02),
            _ => slope_inv * 0.9,
        };
        previous = Some((alpha, r.cl));
        alpha -= (err / slope).clamp(-3.0, 3.0);
        warm_owned = Some(r.warm_start.clone());
        last = Some(r);
    }
    let (last_cl, last_alpha_deg) = last.map_or((f64::NAN, alpha), |r| (r.cl, r.alpha_deg));
    Err(ViscousError::TargetCl {
        target: cl_target,
        last_cl,
        last_alpha_deg,
    })
}

fn solve_alpha(
    solver: &PanelSolver,
    point: &OperatingPoint,
    alpha_deg: f64,
    settings: &ViscousSettings,
    warm: Option<&WarmStart>,
) -> Result<PointResult, ViscousError> {
    // A warm start is tried first; if it does not converge the point starts afresh from the
    // initial march, then by Reynolds-number continuation; a converged result is returned, else
    // the one of the first two with the smaller final residual, flagged.
    let setup = InviscidSetup::new(solver, alpha_deg, settings)?;
    let warm_result =
        warm.map(|w| attempt_alpha(solver, &setup, point, alpha_deg, settings, Some(w)));
    if let Some(Ok(r)) = &warm_result {
        if r.status == PointStatus::Converged {
            return warm_result.expect("checked above");
        }
    }
    let cold = attempt_alpha(solver, &setup, point, alpha_deg, settings, None);
    if matches!(&cold, Ok(c) if c.status == PointStatus::Converged) {
        return cold;
    }
    if let Some(r) = reynolds_continuation(solver, &setup, point, alpha_deg, settings) {
        return Ok(r);
    }
    match (warm_result, cold) {
        (Some(Ok(w)), Ok(c)) => Ok(if w.residual <= c.residual { w } else { c }),
        (Some(Ok(w)), Err(_)) => Ok(w),
        (_, cold) => cold,
    }
}

/// Factors above the requested Reynolds number at which [`reynolds_continuation`] tries its cold
/// start, in order. Our choice, no source: a thinner layer couples more weakly with the panels.
const CONTINUATION_START_FACTORS: [f64; 3] = [8.0, 4.0, 2.0];
/// Reynolds-number ratio of a normal continuation step. Our choice, no source: θ scales as
/// Re^-½ in laminar and about Re^-⅕ in turbulent flow, so it changes by 15–40 % per step.
const CONTINUATION_STEP_RATIO: f64 = 2.0;
/// Most times a failed continuation step has its ratio square-rooted before the continuation
/// gives up (2 → 1.41 → 1.19 → 1.09). Our choice, no source.
const CONTINUATION_STEP_HALVINGS: usize = 3;
/// Most solves one continuation may spend, cold starts included (our choice, no source: bounds
/// the cost of a point that no path solves; a successful step resets the step to a factor of
/// two, so without a cap a run of short successes could take about a hundred solves).
const CONTINUATION_MAX_SOLVES: usize = 12;

/// Last resort for a point that neither a warm nor a cold start solves: the same point is
/// solved cold at a higher Reynolds number (the first of [`CONTINUATION_START_FACTORS`] that
/// converges), where the boundary layer is thinner and its interaction with the inviscid flow
/// weaker, and the solution is carried down to the requested Reynolds number, each step
/// warm-started from the one before with the thicknesses scaled by (Re_before/Re)^½ (the laminar
/// scaling; a guess that Newton corrects). Steps are normally a factor of two; a step that fails
/// is retried with the square root of its ratio (halving it in log Re) up to
/// [`CONTINUATION_STEP_HALVINGS`] times, within [`CONTINUATION_MAX_SOLVES`] solves in all. `Some`
/// only if the point converges at the requested Reynolds number.
///
/// Seen to be needed on sections with a blunt trailing edge and trips near the leading edge at
/// low Reynolds number (NACA 2412, trips at 10 %, Re 3e5): the initial marches give a state
/// whose displacement at the thick trailing edge drives the edge speed there to twice the
/// inviscid value, and Newton diverges from it; from the converged state at Re 1.2e6 it does not.
/// The shorter steps are needed where long laminar bubbles change fast with Reynolds number
/// (NACA 0018, 0°: a cold start converges at Re 9e4, 1.1e5 and 1.35e5 but not at 1e5 or 1.2e5
/// at 160 panels; the step from 2e5 to 1e5 fails, shorter ones do not).
fn reynolds_continuation(
    solver: &PanelSolver,
    setup: &InviscidSetup,
    point: &OperatingPoint,
    alpha_deg: f64,
    settings: &ViscousSettings,
) -> Option<PointResult> {
    let solves = std::cell::Cell::new(0);
    let solve = |reynolds: f64, warm: Option<(f64, &WarmStart)>| {
        solves.set(solves.get() + 1);
        if solves.get() > CONTINUATION_MAX_SOLVES {
            return None;
        }
        let step = OperatingPoint { reynolds, ..*point };
        let warm = warm.map(|(from, w)| {
            let mut w = w.clone();
            let scale = (from / reynolds).sqrt();
            w.state.theta.iter_mut().for_each(|t| *t *= scale);
            w.state.mass_defect.iter_mut().for_each(|m| *m *= scale);
            w
        });
        attempt_alpha(solver, setup, &step, alpha_deg, settings, warm.as_ref())
            .ok()
            .filter(|r| r.status == PointStatus::Converged)
    };
    let (mut reynolds, mut solved) = CONTINUATION_START_FACTORS.iter().find_map(|f| {
        let reynolds = f * point.reynolds;
        solve(reynolds, None).map(|r| (reynolds, r))
    })?;
    let mut ratio = CONTINUATION_STEP_RATIO;
    let mut halvings = 0;
    loop {
        let next = (reynolds / ratio).max(point.reynolds);
        match solve(next, Some((reynolds, &solved.warm_start))) {
            Some(r) if next == point.reynolds => return Some(r),
            Some(r) => {
                (reynolds, solved) = (next, r);
                ratio = CONTINUATION_STEP_RATIO;
                halvings = 0;
            }
            None if halvings < CONTINUATION_STEP_HALVINGS
                && solves.get() < CONTINUATION_MAX_SOLVES =>
            {
                ratio = ratio.sqrt();
                halvings += 1;
            }
            None => return None,
        }
    }
}

/// The wake-curvature term of the interaction (Lock & Williams 1987, Prog. Aerospace Sci. 24;
/// derivation in DEVELOPERS.md). Across a thin wake whose line turns at curvature κ
/// (counter-clockwise positive along the flow) the real flow's static pressure jumps by
/// ρ ue² κ (δ* + θ) more than the equivalent inviscid flow's; the equivalent flow carries the
/// difference as a vortex sheet of strength γ_w = κ ue (δ* + θ) on the wake line. The sheet is
/// part of the interaction law (`Coupling::defect_influence`), so Newton sees it; it lowers
/// lift (the wake behind a lifting section turns counter-clockwise). Not modelled: the sheet's
/// effect on the wake's own edge speed, and the change of the wake line's shape.
struct WakeCurvature {
    /// ∂γ_surface/∂γ_w per wake panel.
    influence: nalgebra::DMatrix<f64>,
    /// Curvature of each wake panel: the tangent-angle change over the panel length.
    curvature: Vec<f64>,
}

impl WakeCurvature {
    fn new(solver: &PanelSolver, wake: &foilsweep_panel::WakeLine) -> Self {
        let curvature = wake
            .nodes
            .windows(2)
            .zip(wake.tangents.windows(2))
            .map(|(p, t)| {
                let length = (p[1] - p[0]).norm();
                let turn = t[0].perp(&t[1]).atan2(t[0].dot(&t[1]));
                if length > 0.0 {
                    turn / length
                } else {
                    0.0
                }
            })
            .collect();
        Self {
            influence: solver.wake_vortex_influence(wake),
            curvature,
        }
    }

    /// Surface speed γ plus the response to `sheet` (unchanged if the sheet does not fit).
    fn add_sheet(&self, mut gamma: Vec<f64>, sheet: &[f64]) -> Vec<f64> {
        if sheet.len() == self.curvature.len() {
            let response = &self.influence * nalgebra::DVector::from_column_slice(sheet);
            for (g, r) in gamma.iter_mut().zip(response.iter()) {
                *g += r;
            }
        }
        gamma
    }
}

/// The inviscid part of one alpha, shared by every attempt at it (it does not depend on the
/// Reynolds number or the boundary-layer state).
struct InviscidSetup {
    inviscid: foilsweep_panel::InviscidSolution,
    wake: foilsweep_panel::WakeLine,
    wake_speed: Vec<f64>,
    influence: foilsweep_panel::SourceInfluence,
    curvature: Option<WakeCurvature>,
}

impl InviscidSetup {
    fn new(
        solver: &PanelSolver,
        alpha_deg: f64,
        settings: &ViscousSettings,
    ) -> Result<Self, ViscousError> {
        let alpha = alpha_deg.to_radians();
        let inviscid = solver.solve(alpha);
        let wake = solver
            .try_wake_line(alpha, settings.wake_stations, settings.wake_length)
            .map_err(|e| ViscousError::Setup(e.to_string()))?;
        let wake_speed = solver.wake_speed(alpha, &wake);
        let influence = solver.source_influence(&wake);
        let curvature = settings
            .wake_curvature
            .then(|| WakeCurvature::new(solver, &wake));
        Ok(Self {
            inviscid,
            wake,
            wake_speed,
            influence,
            curvature,
        })
    }
}

fn attempt_alpha(
    solver: &PanelSolver,
    setup: &InviscidSetup,
    point: &OperatingPoint,
    alpha_deg: f64,
    settings: &ViscousSettings,
    warm: Option<&WarmStart>,
) -> Result<PointResult, ViscousError> {
    let InviscidSetup {
        inviscid,
        wake,
        wake_speed,
        influence,
        curvature,
    } = setup;
    // With a warm start the stagnation point is placed where the neighbour's displacement
    // effect puts it at this alpha (viscous γ estimate), so the mapped state fits the layout.
    let gamma_start = match warm {
        Some(w) => {
            let gamma =
                w.topology
                    .viscous_gamma(&inviscid.gamma, &influence.matrix, &w.state.mass_defect);
            match &curvature {
                Some(c) => c.add_sheet(gamma, &w.wake_sheet),
                None => gamma,
            }
        }
        None => inviscid.gamma.clone(),
    };
    let mut topo = Topology::new(solver, &gamma_start, wake, point)
        .or_else(|_| Topology::new(solver, &inviscid.gamma, wake, point))
        .map_err(ViscousError::Setup)?;
    let ib_settings = InteractionSettings {
        equations: EquationSettings {
            reynolds: point.reynolds,
            critical_n: point.critical_n,
            transition_entrainment_fraction: settings.transition_entrainment_fraction,
        },
        max_iterations: settings.max_iterations,
        tolerance: settings.tolerance,
    };
    let mut state = warm.map(|w| topo.remap(&w.topology, &w.state));
    let mut iterations = 0;
    let mut relocations = 0;
    loop {
        let d = topo.mass_defect_influence(&influence.matrix);
        let ue_inv = topo.inviscid_edge_velocity(&inviscid.gamma, wake_speed);
        let c = curvature
            .as_ref()
            .map(|c| topo.defect_influence(&c.influence, &c.curvature));
        let coupling = Coupling {
            edge_velocity_inviscid: &ue_inv,
            influence: &d,
            defect_influence: c.as_ref(),
        };
        let solution = interaction::solve(&topo.layout, &coupling, &ib_settings, state.take())
            .map_err(|source| ViscousError::Solve { alpha_deg, source })?;
        iterations += solution.convergence.iterations;
        // Viscous surface speed γ at the nodes and the stagnation point it implies; the
        // stagnation point is moved (and the layer re-solved) only from a converged state.
        let gamma = topo.viscous_gamma(
            &inviscid.gamma,
            &influence.matrix,
            &solution.state.mass_defect,
        );
        let sheet = curvature.as_ref().map_or_else(Vec::new, |c| {
            let wake = solution.stations.get(2).map_or(&[][..], Vec::as_slice);
            topo.wake_sheet(&c.curvature, wake)
        });
        let gamma = match &curvature {
            Some(c) => c.add_sheet(gamma, &sheet),
            None => gamma,
        };
        let converged = solution.convergence.termination == Termination::Converged;
        let moved = if converged {
            topo.relocated(&gamma, wake, point)
                .map_err(ViscousError::Setup)?
        } else {
            None
        };
        if let Some(new_topo) = moved
            .as_ref()
            .filter(|_| relocations < settings.max_relocations)
        {
            relocations += 1;
            state = Some(new_topo.remap(&topo, &solution.state));
            topo = new_topo.clone();
            continue;
        }
        let status = if converged && moved.is_none() {
            // `ue_inv` is still this layout's: the layout only changes on a relocation above.
            let implausible = topo
                .separation_in_favourable_gradient(&ue_inv, &solution.events)
                .map(Implausibility::SeparationInFavourableGradient)
                .or_else(|| {
                    topology::momentum_collapse_at_transition(&solution.stations)
                        .map(Implausibility::MomentumCollapseAtTransition)
                });
            implausible.map_or(PointStatus::Converged, PointStatus::Implausible)
        } else {
            PointStatus::NotConverged
        };
        let mut result = topology::post_process(
            &topo, inviscid, alpha_deg, point, &gamma, solution, status, iterations,
        );
        result.warm_start.wake_sheet = sheet;
        return Ok(result);
    }
}
