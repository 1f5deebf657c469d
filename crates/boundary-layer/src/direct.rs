//! Direct (edge-speed-given) boundary-layer march along one surface and the wake: the fast
//! **non-interacting estimate**. The edge speed is prescribed (usually the inviscid one), so the
//! displacement effect of the layer on the pressure is ignored: lift is inviscid, a laminar
//! separation bubble is represented by a semi-empirical model and not by its own pressure
//! plateau, and separated regions are only flagged. Use it for quick maps of transition and
//! bubble risk; the interacting solver (module `interaction`) produces polars.
//!
//! Per surface, from the stagnation point (s = 0, ue = 0 allowed) or a sharp leading edge:
//!
//! 1. **Laminar, attached**: Thwaites (1949) with the Hiemenz start (see [`crate::thwaites`]),
//!    closure l(λ), H(λ) of Cebeci & Bradshaw (1977) ([`crate::closure::thwaites`]).
//! 2. **Amplification**: N integrated with the trapezoidal rule, dN/ds from the Drela & Giles
//!    (1987) envelope on Thwaites's H and θ ([`crate::closure::transition`]).
//! 3. **First event wins**, each located by linear interpolation inside the interval (never
//!    snapped to a station): N reaching `critical_n` (natural transition), x/c rising through
//!    the trip position (forced transition), or λ falling below −0.09 (laminar separation).
//!    Transition: θ continuous, H restarts at `turbulent_start_shape_factor` (1.4 is usual
//!    textbook practice, e.g. Moran 1984; METHODS §3.3), C_E at its equilibrium value.
//! 4. **Laminar separation** before transition: Horton's (1968) semi-empirical bubble model
//!    (METHODS §5.2; constants widely quoted, marked [unverified] there):
//!    - laminar part at constant ue = U_S and θ = θ_S, of length ℓ1 with U_S ℓ1/ν = 4·10⁴
//!      (Horton 1968); H rises linearly from H_S = H(λ = −0.09) = 3.55 to
//!      [`BUBBLE_TRANSITION_SHAPE_FACTOR`] = 6 over ℓ1 (our choice inside the 5–8 that METHODS
//!      §5.2 quotes; no source). N keeps growing with the envelope rate on that H at the
//!      constant Re_θ; transition is at the first of N = N_crit (Natural), the trip (Forced) and
//!      the end of ℓ1 (reported as `TransitionKind::AtSeparation`: caused by the separation,
//!      placed by Horton's correlation);
//!    - turbulent part T → R with cf ≈ 0: ue falls linearly from U_S at T to the inviscid
//!      ue(s_R) at R, H falls linearly from its value at T to H_R = 3.5 (Horton 1968 as quoted
//!      in METHODS §5.2, [unverified]), θ from dθ/ds = −(H + 2)(θ/ue) due/ds (integrated
//!      exactly for the linear distributions); R is the first s_R at which Horton's
//!      reattachment parameter (θ/ue)(due/ds) of this linear recovery has risen to −0.0082
//!      (Horton 1968, METHODS §5.2);
//!    - **bursting**: no such R before the end of the surface (or no transition on it). The
//!      bubble is then reported as burst and the layer is marked separated to the end.
//!
//!    Inside the bubble the stations report the model's edge speed (the pressure plateau and
//!    the linear recovery), θ, H and cf = 0, with regime `LaminarSeparated` (S → T) and
//!    `TurbulentSeparated` (T → R).
//! 5. **Turbulent**: Green, Weeks & Brooman's (1973) lag-entrainment method (default; it
//!    accepts the high H after a bubble) or Head's (1958) entrainment method, state (θ, H, C_E),
//!    integrated with classical RK4 on ue linear between stations, with sub-steps no longer than
//!    4θ and no more than a 5 % change of ue.
//! 6. **Turbulent separation** is flagged where H reaches `turbulent_separation_shape_factor`
//!    (METHODS §3.4: 2.4; the criteria in the literature range 1.8–2.8). A direct march has no
//!    valid answer past it, so from there on **H (and C_E) are frozen** at the threshold and
//!    only the momentum integral is carried on (θ keeps growing with the adverse gradient),
//!    with regime `TurbulentSeparated`; nothing reattaches after that. After a bubble the
//!    threshold starts at max(setting, H_R) and drops to the setting once H has fallen below it
//!    (a recovering layer is not flagged at its start).
//!
//! [`march_wake`] continues the two trailing-edge states as one wake (θ and δ* added, cf = 0,
//! the wake constants of the lag-entrainment method) and [`squire_young_drag`] gives a side's
//! or the wake's drag contribution (Squire & Young 1938).
//!
//! Conventions: lengths in chord units with V∞ = 1, ν = 1/`reynolds`; cf is on the local edge
//! speed. Where ue = 0 (the stagnation station) or θ = 0 (a sharp leading edge) cf is singular
//! or undefined and is reported as 0 (the wall shear τw = μ ue l/θ vanishes at a stagnation
//! point; at a sharp leading edge only its integral is finite).

use crate::closure::{head, lag_entrainment, thwaites as thwaites_closure, transition};
use crate::error::BoundaryLayerError;
use crate::state::{Event, EventKind, Regime, StationState, TransitionKind};
use crate::thwaites;

/// Horton's (1968) laminar-part length Reynolds number U_S ℓ1/ν (METHODS §5.2, the widely quoted
/// value, [unverified] there).
pub const HORTON_LAMINAR_LENGTH_REYNOLDS: f64 = 4.0e4;
/// Horton's (1968) shape factor at turbulent reattachment (METHODS §5.2, [unverified]).
pub const HORTON_REATTACHMENT_SHAPE_FACTOR: f64 = 3.5;
/// Horton's (1968) reattachment parameter (θ/ue)(due/ds) at R (METHODS §5.2, [unverified]).
pub const HORTON_REATTACHMENT_PARAMETER: f64 = -0.0082;
/// Shape factor reached at the end of the laminar part of a bubble (our choice within the
/// H ≈ 5–8 that METHODS §5.2 quotes for transition in the shear layer; no source).
pub const BUBBLE_TRANSITION_SHAPE_FACTOR: f64 = 6.0;

/// Supported range of the Reynolds number.
const REYNOLDS_RANGE: std::ops::RangeInclusive<f64> = 1.0e3..=1.0e9;
/// Maximum RK4 sub-step in momentum thicknesses.
const MAX_STEP_IN_THETA: f64 = 4.0;
/// Maximum relative change of ue over one RK4 sub-step.
const MAX_EDGE_VELOCITY_CHANGE: f64 = 0.05;
/// Cap on RK4 sub-steps per interval (a guard against absurd inputs, not a tolerance).
const MAX_SUBSTEPS: usize = 20_000;
/// Pieces of the trapezoidal N integration along the laminar part of a bubble.
const BUBBLE_N_PIECES: usize = 200;

/// Turbulent integral method of the direct march.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum TurbulentModel {
    /// Head (1958) entrainment with Ludwieg–Tillmann skin friction; calibrated for attached
    /// layers (H ≲ 2.4–2.8).
    Head,
    /// Green, Weeks & Brooman (1973) lag-entrainment; also valid at the high H of a reattaching
    /// bubble and in the wake.
    #[default]
    LagEntrainment,
}

/// Settings of the direct march.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MarchSettings {
    /// Reynolds number V∞c/ν; the kinematic viscosity in the caller's units is ν = 1/reynolds.
    /// Must lie in 1e3 ..= 1e9.
    pub reynolds: f64,
    /// Critical N-factor of the e^N method (9 for a low-turbulence tunnel; see
    /// [`transition::critical_n_from_turbulence`]). Must be positive.
    pub critical_n: f64,
    /// Trip position x/c: transition is forced where x/c first rises through it, if reached
    /// before natural transition.
    pub forced_transition_x_over_c: Option<f64>,
    /// Shape factor at the start of the turbulent layer after natural or forced transition
    /// (1.4, METHODS §3.3). Must lie in 1.1 ..= 3.
    pub turbulent_start_shape_factor: f64,
    /// Shape factor at which turbulent separation is declared (2.4, METHODS §3.4). Must lie in
    /// 1.5 ..= 20.
    pub turbulent_separation_shape_factor: f64,
    /// Turbulent method.
    pub turbulent_model: TurbulentModel,
}

impl MarchSettings {
    /// Usual settings at Reynolds number `reynolds`: N_crit = 9, no trip, turbulent start
    /// H = 1.4, separation at H = 2.4, lag-entrainment.
    pub fn new(reynolds: f64) -> Self {
        Self {
            reynolds,
            critical_n: 9.0,
            forced_transition_x_over_c: None,
            turbulent_start_shape_factor: 1.4,
            turbulent_separation_shape_factor: 2.4,
            turbulent_model: TurbulentModel::LagEntrainment,
        }
    }

    /// Checks every setting.
    fn validate(&self) -> Result<(), BoundaryLayerError> {
        if !REYNOLDS_RANGE.contains(&self.reynolds) {
            return Err(BoundaryLayerError::ReynoldsOutOfRange {
                reynolds: self.reynolds,
            });
        }
        let checks = [
            ("critical_n", self.critical_n, 0.0..=30.0),
            (
                "turbulent_start_shape_factor",
                self.turbulent_start_shape_factor,
                1.1..=3.0,
            ),
            (
                "turbulent_separation_shape_factor",
                self.turbulent_separation_shape_factor,
                1.5..=20.0,
            ),
        ];
        for (name, value, range) in checks {
            if !range.contains(&value) || (name == "critical_n" && value == 0.0) {
                return Err(BoundaryLayerError::InvalidSetting { name, value });
            }
        }
        if let Some(x) = self.forced_transition_x_over_c {
            if !x.is_finite() {
                return Err(BoundaryLayerError::InvalidSetting {
                    name: "forced_transition_x_over_c",
                    value: x,
                });
            }
        }
        Ok(())
    }
}

/// Summary of a laminar separation bubble found by the direct march (Horton 1968 model).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BubbleReport {
    /// Arc length of laminar separation S.
    pub separation_arc_length: f64,
    /// Arc length of transition T (None if the surface ends first).
    pub transition_arc_length: Option<f64>,
    /// Arc length of turbulent reattachment R (None if the bubble bursts).
    pub reattachment_arc_length: Option<f64>,
    /// Bubble length s_R − s_S (None if it bursts).
    pub length: Option<f64>,
    /// Momentum-thickness jump θ_R − θ_S (None if it bursts).
    pub momentum_thickness_jump: Option<f64>,
    /// Height estimate: largest δ* in the bubble (at T or R) minus δ* at S.
    pub height_estimate: f64,
    /// Momentum-thickness Reynolds number at separation U_S θ_S/ν.
    pub separation_re_theta: f64,
    /// True if the model found no reattachment on the surface (bursting, or no transition).
    pub burst: bool,
}

/// Result of a direct surface march.
#[derive(Debug, Clone, PartialEq)]
pub struct SurfaceMarch {
    /// One state per input station, same order.
    pub stations: Vec<StationState>,
    /// Events in downstream order.
    pub events: Vec<Event>,
    /// The laminar separation bubble, if laminar separation came before transition.
    pub bubble: Option<BubbleReport>,
}

/// Checks that the station arrays are consistent and physical.
fn validate_stations(
    arc_length: &[f64],
    edge_velocity: &[f64],
    x_over_c: Option<&[f64]>,
) -> Result<(), BoundaryLayerError> {
    let n = arc_length.len();
    let nx = x_over_c.map_or(n, <[f64]>::len);
    if edge_velocity.len() != n || nx != n {
        return Err(BoundaryLayerError::LengthMismatch {
            arc_length: n,
            edge_velocity: edge_velocity.len(),
            x_over_c: nx,
        });
    }
    if n < 2 {
        return Err(BoundaryLayerError::TooFewStations {
            count: n,
            required: 2,
        });
    }
    for i in 0..n {
        let (s, u) = (arc_length[i], edge_velocity[i]);
        if !s.is_finite() || s < 0.0 {
            return Err(BoundaryLayerError::InvalidValue {
                station: i,
                quantity: "arc length",
                value: s,
            });
        }
        if !u.is_finite() || u < 0.0 {
            return Err(BoundaryLayerError::InvalidValue {
                station: i,
                quantity: "edge velocity",
                value: u,
            });
        }
        if i > 0 && u == 0.0 {
            return Err(BoundaryLayerError::VanishingEdgeVelocity { station: i });
        }
        if let Some(x) = x_over_c {
            if !x[i].is_finite() {
                return Err(BoundaryLayerError::InvalidValue {
                    station: i,
                    quantity: "x/c",
                    value: x[i],
                });
            }
        }
        if i > 0 && s <= arc_length[i - 1] {
            return Err(BoundaryLayerError::NonIncreasingArcLength {
                station: i,
                previous: arc_length[i - 1],
                value: s,
            });
        }
    }
    Ok(())
}

/// Linear interpolation of `values` at arc length `s` (clamped to the ends).
fn interpolate(arc_length: &[f64], values: &[f64], s: f64) -> f64 {
    let n = arc_length.len();
    let j = arc_length.partition_point(|&x| x < s).clamp(1, n - 1);
    let t = (s - arc_length[j - 1]) / (arc_length[j] - arc_length[j - 1]);
    values[j - 1] + t.clamp(0.0, 1.0) * (values[j] - values[j - 1])
}

/// Integral state of the turbulent layer or wake.
#[derive(Debug, Clone, Copy, PartialEq)]
struct TurbulentState {
    /// Momentum thickness θ.
    theta: f64,
    /// Shape factor H.
    h: f64,
    /// Entrainment coefficient C_E (lag-entrainment only; Head's method computes F(H1)).
    ce: f64,
}

/// Turbulent-separation watch of a surface march (absent in the wake).
#[derive(Debug, Clone, Copy, PartialEq)]
struct SeparationWatch {
    /// The user's criterion.
    setting: f64,
    /// Current threshold (≥ setting until H has dropped below the setting once).
    threshold: f64,
    /// H and C_E frozen after separation.
    frozen: bool,
}

/// RK4 integrator of the turbulent momentum/entrainment/lag system on a prescribed ue.
#[derive(Debug, Clone, Copy)]
struct TurbulentMarcher {
    model: TurbulentModel,
    kinematic_viscosity: f64,
    wake: bool,
    watch: Option<SeparationWatch>,
}

impl TurbulentMarcher {
    /// Skin friction of the model at this state (0 in the wake).
    fn skin_friction(&self, y: &TurbulentState, ue: f64) -> f64 {
        if self.wake {
            return 0.0;
        }
        let re_theta = ue * y.theta / self.kinematic_viscosity;
        match self.model {
            TurbulentModel::Head => head::ludwieg_tillmann_skin_friction(y.h, re_theta),
            TurbulentModel::LagEntrainment => lag_entrainment::skin_friction(y.h, re_theta),
        }
    }

    /// d/ds of (θ, H, C_E) at edge speed `ue` with gradient `due`.
    fn rates(&self, y: &TurbulentState, ue: f64, due: f64) -> TurbulentState {
        let frozen = self.watch.is_some_and(|w| w.frozen);
        let pi = y.theta / ue * due;
        let cf = self.skin_friction(y, ue);
        let dtheta = 0.5 * cf - (y.h + 2.0) * pi;
        if frozen {
            return TurbulentState {
                theta: dtheta,
                h: 0.0,
                ce: 0.0,
            };
        }
        let re_theta = ue * y.theta / self.kinematic_viscosity;
        let (h1, dh1_dh, entrainment, dce) = match self.model {
            TurbulentModel::Head => {
                // Head (1958): (1/ue) d(ue θ H1)/ds = F(H1)
                let h1 = head::entrainment_shape_factor(y.h);
                let slope = head::entrainment_shape_factor_slope(y.h);
                (h1, slope, head::entrainment_function(h1), 0.0)
            }
            TurbulentModel::LagEntrainment => (
                lag_entrainment::entrainment_shape_factor(y.h),
                lag_entrainment::entrainment_shape_factor_slope(y.h),
                y.ce,
                lag_entrainment::lag_rate(y.h, y.ce, re_theta, pi, self.wake) / y.theta,
            ),
        };
        // (1/ue) d(ue θ H1)/ds = E  ⇒  θ H1' dH/ds = E − H1 Π − H1 dθ/ds
        let dh = (entrainment - h1 * pi - h1 * dtheta) / (y.theta * dh1_dh);
        TurbulentState {
            theta: dtheta,
            h: dh,
            ce: dce,
        }
    }

    /// Advances `y` from `s_a` (edge speed `ua`) to `s_b` (`ub`), ue linear in between. Returns
    /// the arc length of turbulent separation if it happened in this interval.
    fn advance(
        &mut self,
        y: &mut TurbulentState,
        s_a: f64,
        s_b: f64,
        ua: f64,
        ub: f64,
    ) -> Option<f64> {
        let ds = s_b - s_a;
        if ds <= 0.0 {
            return None;
        }
        let due = (ub - ua) / ds;
        let by_theta = ds / (MAX_STEP_IN_THETA * y.theta.max(f64::MIN_POSITIVE));
        let by_speed = (ub - ua).abs() / (MAX_EDGE_VELOCITY_CHANGE * ua.min(ub));
        let pieces = by_theta
            .max(by_speed)
            .ceil()
            .clamp(1.0, MAX_SUBSTEPS as f64) as usize;
        let step = ds / pieces as f64;
        let mut separation = None;
        for k in 0..pieces {
            let s0 = s_a + step * k as f64;
            let u0 = ua + due * (s0 - s_a);
            let um = u0 + 0.5 * step * due;
            let u1 = u0 + step * due;
            let add = |y: &TurbulentState, k: &TurbulentState, f: f64| TurbulentState {
                theta: y.theta + f * k.theta,
                h: y.h + f * k.h,
                ce: y.ce + f * k.ce,
            };
            let k1 = self.rates(y, u0, due);
            let k2 = self.rates(&add(y, &k1, 0.5 * step), um, due);
            let k3 = self.rates(&add(y, &k2, 0.5 * step), um, due);
            let k4 = self.rates(&add(y, &k3, step), u1, due);
            let h_old = y.h;
            y.theta += step / 6.0 * (k1.theta + 2.0 * k2.theta + 2.0 * k3.theta + k4.theta);
            y.h += step / 6.0 * (k1.h + 2.0 * k2.h + 2.0 * k3.h + k4.h);
            y.ce += step / 6.0 * (k1.ce + 2.0 * k2.ce + 2.0 * k3.ce + k4.ce);
            if let Some(w) = self.watch.as_mut() {
                if !w.frozen {
                    if y.h < w.setting {
                        w.threshold = w.setting;
                    } else if y.h >= w.threshold {
                        let t = ((w.threshold - h_old) / (y.h - h_old)).clamp(0.0, 1.0);
                        separation = Some(s0 + t * step);
                        y.h = w.threshold;
                        w.frozen = true;
                    }
                }
            }
        }
        separation
    }

    /// Station record of state `y` at arc length `s` and edge speed `ue`.
    fn station(&self, y: &TurbulentState, s: f64, ue: f64, amplification: f64) -> StationState {
        let regime = if self.wake {
            Regime::Wake
        } else if self.watch.is_some_and(|w| w.frozen) {
            Regime::TurbulentSeparated
        } else {
            Regime::Turbulent
        };
        StationState {
            arc_length: s,
            edge_velocity: ue,
            momentum_thickness: y.theta,
            displacement_thickness: y.h * y.theta,
            shape_factor: y.h,
            skin_friction: self.skin_friction(y, ue),
            amplification,
            regime,
        }
    }
}

/// Checks a state for finiteness and positivity of θ.
fn check_state(y: &TurbulentState, station: usize) -> Result<(), BoundaryLayerError> {
    if !(y.theta.is_finite() && y.theta > 0.0) {
        return Err(BoundaryLayerError::NonFiniteState {
            station,
            quantity: "momentum thickness",
        });
    }
    if !(y.h.is_finite() && y.ce.is_finite()) {
        return Err(BoundaryLayerError::NonFiniteState {
            station,
            quantity: "shape factor",
        });
    }
    Ok(())
}

/// Thwaites quantities at one laminar station.
#[derive(Debug, Clone, Copy)]
struct LaminarStation {
    theta: f64,
    lambda: f64,
    h: f64,
    cf: f64,
    n: f64,
}

/// Inputs shared by the parts of one surface march.
struct Surface<'a> {
    s: &'a [f64],
    u: &'a [f64],
    x: &'a [f64],
    settings: &'a MarchSettings,
    nu: f64,
}

impl Surface<'_> {
    fn event(&self, kind: EventKind, s: f64) -> Event {
        Event {
            kind,
            arc_length: s,
            x_over_c: interpolate(self.s, self.x, s),
        }
    }

    /// Arc length in `(s_from, s_to]` where x/c first rises through the trip position.
    fn trip_between(&self, s_from: f64, s_to: f64) -> Option<f64> {
        let xt = self.settings.forced_transition_x_over_c?;
        (1..self.s.len()).find_map(|j| {
            let (sa, sb) = (self.s[j - 1], self.s[j]);
            let (xa, xb) = (self.x[j - 1], self.x[j]);
            if sb <= s_from || sa >= s_to || !(xa < xt && xt <= xb) {
                return None;
            }
            let st = sa + (xt - xa) / (xb - xa) * (sb - sa);
            (st > s_from && st <= s_to).then_some(st)
        })
    }

    /// Turbulent march from `start` (state `y` at arc length `s0`) over the stations with
    /// index ≥ `first`; appends to `out`.
    fn march_turbulent(
        &self,
        mut marcher: TurbulentMarcher,
        mut y: TurbulentState,
        s0: f64,
        first: usize,
        amplification: f64,
        out: &mut Output,
    ) -> Result<(), BoundaryLayerError> {
        let mut s_prev = s0;
        let mut u_prev = interpolate(self.s, self.u, s0);
        for i in first..self.s.len() {
            if let Some(s_sep) = marcher.advance(&mut y, s_prev, self.s[i], u_prev, self.u[i]) {
                out.events
                    .push(self.event(EventKind::TurbulentSeparation, s_sep));
            }
            check_state(&y, i)?;
            out.stations
                .push(marcher.station(&y, self.s[i], self.u[i], amplification));
            s_prev = self.s[i];
            u_prev = self.u[i];
        }
        Ok(())
    }

    fn marcher(&self, start_h: f64, frozen: bool) -> TurbulentMarcher {
        let setting = self.settings.turbulent_separation_shape_factor;
        TurbulentMarcher {
            model: self.settings.turbulent_model,
            kinematic_viscosity: self.nu,
            wake: false,
            watch: Some(SeparationWatch {
                setting,
                threshold: setting.max(start_h),
                frozen,
            }),
        }
    }

    /// Turbulent start state at shape factor `h` and momentum thickness `theta` where the edge
    /// speed is `ue`: C_E at its equilibrium value.
    fn turbulent_start(&self, theta: f64, h: f64, ue: f64) -> TurbulentState {
        TurbulentState {
            theta,
            h,
            ce: lag_entrainment::equilibrium_entrainment(h, ue * theta / self.nu),
        }
    }
}

/// Stations and events collected along a march.
#[derive(Debug, Default)]
struct Output {
    stations: Vec<StationState>,
    events: Vec<Event>,
}

/// Where the attached laminar march ends.
enum LaminarEnd {
    /// Transition at arc length `s` inside the interval ending at station `next`.
    Transition {
        s: f64,
        next: usize,
        kind: TransitionKind,
    },
    /// Laminar separation at arc length `s` inside the interval ending at station `next`.
    Separation { s: f64, next: usize },
    /// Laminar to the end.
    None,
}

/// Direct march along one surface from the stagnation point: the **non-interacting estimate**
/// (module doc). `arc_length` starts at the stagnation point (s = 0 with `edge_velocity` 0) or
/// at a sharp leading edge (edge velocity > 0) and increases strictly; `edge_velocity` ≥ 0 (only
/// the first may be 0); `x_over_c` locates the stations for events and the trip.
///
/// # Errors
/// Length mismatch, fewer than 2 stations, NaN/infinite/negative values, non-increasing arc
/// length, a vanishing edge speed after the start, settings out of range (Reynolds number
/// outside 1e3–1e9), or a non-finite state during the march — each with the station index.
pub fn march_surface(
    arc_length: &[f64],
    edge_velocity: &[f64],
    x_over_c: &[f64],
    settings: &MarchSettings,
) -> Result<SurfaceMarch, BoundaryLayerError> {
    settings.validate()?;
    validate_stations(arc_length, edge_velocity, Some(x_over_c))?;
    let surface = Surface {
        s: arc_length,
        u: edge_velocity,
        x: x_over_c,
        settings,
        nu: 1.0 / settings.reynolds,
    };
    let laminar = laminar_stations(&surface);
    let mut out = Output::default();
    let end = find_laminar_end(&surface, &laminar);
    let last_laminar = match end {
        LaminarEnd::Transition { next, .. } | LaminarEnd::Separation { next, .. } => next,
        LaminarEnd::None => arc_length.len(),
    };
    for (i, lam) in laminar.iter().enumerate().take(last_laminar) {
        out.stations.push(StationState {
            arc_length: arc_length[i],
            edge_velocity: edge_velocity[i],
            momentum_thickness: lam.theta,
            displacement_thickness: lam.h * lam.theta,
            shape_factor: lam.h,
            skin_friction: lam.cf,
            amplification: lam.n,
            regime: if lam.cf > 0.0 || lam.lambda >= thwaites_closure::SEPARATION_LAMBDA {
                Regime::Laminar
            } else {
                Regime::LaminarSeparated
            },
        });
    }
    let mut bubble = None;
    match end {
        LaminarEnd::None => {}
        LaminarEnd::Transition { s, next, kind } => {
            out.events
                .push(surface.event(EventKind::Transition(kind), s));
            let theta = interpolate(
                arc_length,
                &laminar.iter().map(|l| l.theta).collect::<Vec<_>>(),
                s,
            );
            let n_t = interpolate(
                arc_length,
                &laminar.iter().map(|l| l.n).collect::<Vec<_>>(),
                s,
            )
            .min(settings.critical_n);
            let h0 = settings.turbulent_start_shape_factor;
            let y = surface.turbulent_start(theta, h0, interpolate(arc_length, edge_velocity, s));
            surface.march_turbulent(surface.marcher(h0, false), y, s, next, n_t, &mut out)?;
        }
        LaminarEnd::Separation { s, next } => {
            bubble = Some(march_bubble(&surface, &laminar, s, next, &mut out)?);
        }
    }
    Ok(SurfaceMarch {
        stations: out.stations,
        events: out.events,
        bubble,
    })
}

/// Thwaites's laminar solution and the N-factor at every station (used up to the first event).
fn laminar_stations(surface: &Surface) -> Vec<LaminarStation> {
    let (s, u, nu) = (surface.s, surface.u, surface.nu);
    let gradient = thwaites::edge_velocity_gradient(s, u);
    let theta = thwaites::momentum_thickness(s, u, nu);
    let mut out: Vec<LaminarStation> = Vec::with_capacity(s.len());
    let mut rate_prev = 0.0;
    for i in 0..s.len() {
        let lambda = theta[i] * theta[i] / nu * gradient[i];
        let h = thwaites_closure::shape_factor(lambda);
        let re_theta = u[i] * theta[i] / nu;
        let cf = if re_theta > 0.0 {
            2.0 * thwaites_closure::shear_parameter(lambda) / re_theta
        } else {
            0.0
        };
        let rate = transition::amplification_rate(h, theta[i], re_theta);
        let n = match out.last() {
            Some(prev) => prev.n + 0.5 * (rate_prev + rate) * (s[i] - s[i - 1]),
            None => 0.0,
        };
        rate_prev = rate;
        out.push(LaminarStation {
            theta: theta[i],
            lambda,
            h,
            cf,
            n,
        });
    }
    out
}

/// The first of natural transition, forced transition and laminar separation.
fn find_laminar_end(surface: &Surface, laminar: &[LaminarStation]) -> LaminarEnd {
    let s = surface.s;
    let n_crit = surface.settings.critical_n;
    let lambda_s = thwaites_closure::SEPARATION_LAMBDA;
    if laminar[0].lambda < lambda_s {
        return LaminarEnd::Separation { s: s[0], next: 1 };
    }
    for i in 1..s.len() {
        let (a, b) = (&laminar[i - 1], &laminar[i]);
        let ds = s[i] - s[i - 1];
        let natural = (b.n >= n_crit).then(|| s[i - 1] + (n_crit - a.n) / (b.n - a.n) * ds);
        let forced = surface.trip_between(s[i - 1], s[i]);
        let separation = (b.lambda < lambda_s)
            .then(|| s[i - 1] + (a.lambda - lambda_s) / (a.lambda - b.lambda) * ds);
        let transition = match (natural, forced) {
            (Some(n), Some(f)) if f <= n => Some((f, TransitionKind::Forced)),
            (Some(n), _) => Some((n, TransitionKind::Natural)),
            (None, Some(f)) => Some((f, TransitionKind::Forced)),
            (None, None) => None,
        };
        match (transition, separation) {
            (Some((st, kind)), Some(ss)) if st <= ss => {
                return LaminarEnd::Transition {
                    s: st,
                    next: i,
                    kind,
                }
            }
            (Some((st, kind)), None) => {
                return LaminarEnd::Transition {
                    s: st,
                    next: i,
                    kind,
                }
            }
            (_, Some(ss)) => return LaminarEnd::Separation { s: ss, next: i },
            (None, None) => {}
        }
    }
    LaminarEnd::None
}

/// ln(θ/θ_T) across the turbulent part of a bubble where ue falls linearly from `u_t` to `u`
/// and H linearly from `h_t` to `h`: −∫(H + 2) due/ue, exact for these linear distributions.
fn bubble_log_growth(u_t: f64, h_t: f64, u: f64, h: f64) -> f64 {
    let r = u / u_t;
    let ln_r = r.ln();
    let ratio = if (r - 1.0).abs() < 1e-8 {
        1.0 - 0.5 * (r - 1.0)
    } else {
        ln_r / (r - 1.0)
    };
    -((h_t + 2.0) * ln_r + (h - h_t) * (1.0 - ratio))
}

/// Horton's (1968) bubble model from laminar separation at `s_sep` (module doc); fills the
/// stations from index `next` on.
fn march_bubble(
    surface: &Surface,
    laminar: &[LaminarStation],
    s_sep: f64,
    next: usize,
    out: &mut Output,
) -> Result<BubbleReport, BoundaryLayerError> {
    let (s, u, nu, settings) = (surface.s, surface.u, surface.nu, surface.settings);
    let s_end = s[s.len() - 1];
    let column = |f: fn(&LaminarStation) -> f64| laminar.iter().map(f).collect::<Vec<_>>();
    let theta_s = interpolate(s, &column(|l| l.theta), s_sep);
    let n_s = interpolate(s, &column(|l| l.n), s_sep);
    let u_s = interpolate(s, u, s_sep);
    let h_s = thwaites_closure::shape_factor(thwaites_closure::SEPARATION_LAMBDA);
    let re_theta_s = u_s * theta_s / nu;
    out.events
        .push(surface.event(EventKind::LaminarSeparation, s_sep));

    // Laminar part: constant ue and θ, H ramps up over Horton's length ℓ1.
    let ell1 = HORTON_LAMINAR_LENGTH_REYNOLDS * nu / u_s;
    let h_laminar = |x: f64| {
        h_s + (BUBBLE_TRANSITION_SHAPE_FACTOR - h_s) * ((x - s_sep) / ell1).clamp(0.0, 1.0)
    };
    let rate = |x: f64| transition::amplification_rate(h_laminar(x), theta_s, re_theta_s);
    let mut transition_at = (s_sep + ell1, TransitionKind::AtSeparation);
    let piece = ell1 / BUBBLE_N_PIECES as f64;
    let mut n_acc = n_s;
    for k in 0..BUBBLE_N_PIECES {
        let xa = s_sep + piece * k as f64;
        let dn = 0.5 * (rate(xa) + rate(xa + piece)) * piece;
        if n_acc + dn >= settings.critical_n {
            let t = if dn > 0.0 {
                (settings.critical_n - n_acc) / dn
            } else {
                0.0
            };
            transition_at = (xa + t * piece, TransitionKind::Natural);
            break;
        }
        n_acc += dn;
    }
    if let Some(st) = surface.trip_between(s_sep, transition_at.0) {
        transition_at = (st, TransitionKind::Forced);
    }
    let (s_t, kind) = transition_at;
    // N along the laminar part (trapezoid from S), for the station records.
    let n_at = |x: f64| {
        let m = (((x - s_sep) / piece).ceil() as usize).clamp(1, BUBBLE_N_PIECES);
        let dx = (x - s_sep) / m as f64;
        n_s + (0..m)
            .map(|k| 0.5 * (rate(s_sep + dx * k as f64) + rate(s_sep + dx * (k + 1) as f64)) * dx)
            .sum::<f64>()
    };
    let n_t = n_at(s_t).min(settings.critical_n);
    let laminar_station = |i: usize| StationState {
        arc_length: s[i],
        edge_velocity: u_s,
        momentum_thickness: theta_s,
        displacement_thickness: h_laminar(s[i]) * theta_s,
        shape_factor: h_laminar(s[i]),
        skin_friction: 0.0,
        amplification: n_at(s[i]),
        regime: Regime::LaminarSeparated,
    };
    let mut report = BubbleReport {
        separation_arc_length: s_sep,
        transition_arc_length: None,
        reattachment_arc_length: None,
        length: None,
        momentum_thickness_jump: None,
        height_estimate: (h_laminar(s_end.min(s_t)) - h_s) * theta_s,
        separation_re_theta: re_theta_s,
        burst: true,
    };
    if s_t > s_end {
        // The surface ends inside the laminar part: open bubble, no transition.
        out.stations.extend((next..s.len()).map(laminar_station));
        return Ok(report);
    }
    out.events
        .push(surface.event(EventKind::Transition(kind), s_t));
    report.transition_arc_length = Some(s_t);
    let first_turbulent = s.partition_point(|&x| x < s_t).max(next);
    out.stations
        .extend((next..first_turbulent).map(laminar_station));

    // Turbulent part: linear recovery from U_S at T to the inviscid ue at R.
    let h_t = h_laminar(s_t);
    let h_r = HORTON_REATTACHMENT_SHAPE_FACTOR;
    let reattachment_gap = |s_r: f64| {
        let u_r = interpolate(s, u, s_r);
        let slope = (u_r - u_s) / (s_r - s_t);
        let theta_r = theta_s * bubble_log_growth(u_s, h_t, u_r, h_r).exp();
        theta_r / u_r * slope - HORTON_REATTACHMENT_PARAMETER
    };
    let mut s_r = None;
    let mut lower = s_t;
    for &candidate in &s[first_turbulent..] {
        if candidate <= s_t {
            continue;
        }
        if reattachment_gap(candidate) >= 0.0 {
            // bisection on (lower, candidate]; the gap is continuous there and → −∞ at T when
            // the inviscid ue at T is below U_S
            let (mut a, mut b) = (lower, candidate);
            if a <= s_t {
                a = s_t + 1e-12 * (candidate - s_t);
                if reattachment_gap(a) >= 0.0 {
                    b = a;
                }
            }
            for _ in 0..100 {
                if b - a <= 1e-12 * (1.0 + b.abs()) {
                    break;
                }
                let mid = 0.5 * (a + b);
                if reattachment_gap(mid) >= 0.0 {
                    b = mid;
                } else {
                    a = mid;
                }
            }
            s_r = Some(b);
            break;
        }
        lower = candidate;
    }
    let Some(s_r) = s_r else {
        // Burst: no reattachment on the surface. Separated to the end with H frozen at its
        // value at T (only the momentum integral is carried on).
        let y = surface.turbulent_start(theta_s, h_t, interpolate(s, u, s_t));
        return surface
            .march_turbulent(
                surface.marcher(h_t, true),
                y,
                s_t,
                first_turbulent,
                n_t,
                out,
            )
            .map(|()| report);
    };
    let u_r = interpolate(s, u, s_r);
    let theta_r = theta_s * bubble_log_growth(u_s, h_t, u_r, h_r).exp();
    let first_attached = s.partition_point(|&x| x < s_r).max(first_turbulent);
    for &s_i in &s[first_turbulent..first_attached] {
        let t = (s_i - s_t) / (s_r - s_t);
        let ue = u_s + t * (u_r - u_s);
        let h = h_t + t * (h_r - h_t);
        let theta = theta_s * bubble_log_growth(u_s, h_t, ue, h).exp();
        out.stations.push(StationState {
            arc_length: s_i,
            edge_velocity: ue,
            momentum_thickness: theta,
            displacement_thickness: h * theta,
            shape_factor: h,
            skin_friction: 0.0,
            amplification: n_t,
            regime: Regime::TurbulentSeparated,
        });
    }
    out.events.push(surface.event(EventKind::Reattachment, s_r));
    report.reattachment_arc_length = Some(s_r);
    report.length = Some(s_r - s_sep);
    report.momentum_thickness_jump = Some(theta_r - theta_s);
    report.height_estimate = (h_t * theta_s).max(h_r * theta_r) - h_s * theta_s;
    report.burst = false;
    let y = surface.turbulent_start(theta_r, h_r, u_r);
    surface.march_turbulent(
        surface.marcher(h_r, false),
        y,
        s_r,
        first_attached,
        n_t,
        out,
    )?;
    Ok(report)
}

/// Direct march of the wake behind a trailing edge (non-interacting estimate), starting from the
/// upper and lower trailing-edge states: θ_w = θ_u + θ_l, δ*_w = δ*_u + δ*_l, cf = 0, the wake
/// form of the chosen turbulent method (lag-entrainment: wake constants of Green, Weeks &
/// Brooman 1973; Head: entrainment with cf = 0). C_E starts at the boundary-layer equilibrium
/// value of the combined H. `arc_length` (any strictly increasing values, e.g. continuing the
/// surface length) and `edge_velocity` (> 0) describe the wake stations; station 0 is the
/// trailing edge.
///
/// # Errors
/// As [`march_surface`]; also if a trailing-edge state has non-positive or non-finite θ or δ*.
pub fn march_wake(
    upper: &StationState,
    lower: &StationState,
    arc_length: &[f64],
    edge_velocity: &[f64],
    settings: &MarchSettings,
) -> Result<Vec<StationState>, BoundaryLayerError> {
    settings.validate()?;
    validate_stations(arc_length, edge_velocity, None)?;
    if edge_velocity[0] == 0.0 {
        return Err(BoundaryLayerError::VanishingEdgeVelocity { station: 0 });
    }
    for te in [upper, lower] {
        for (quantity, value) in [
            ("trailing-edge momentum thickness", te.momentum_thickness),
            (
                "trailing-edge displacement thickness",
                te.displacement_thickness,
            ),
        ] {
            if !(value.is_finite() && value > 0.0) {
                return Err(BoundaryLayerError::InvalidValue {
                    station: 0,
                    quantity,
                    value,
                });
            }
        }
    }
    let nu = 1.0 / settings.reynolds;
    let theta = upper.momentum_thickness + lower.momentum_thickness;
    let h = (upper.displacement_thickness + lower.displacement_thickness) / theta;
    let mut y = TurbulentState {
        theta,
        h,
        ce: lag_entrainment::equilibrium_entrainment(h, edge_velocity[0] * theta / nu),
    };
    let mut marcher = TurbulentMarcher {
        model: settings.turbulent_model,
        kinematic_viscosity: nu,
        wake: true,
        watch: None,
    };
    let mut out = Vec::with_capacity(arc_length.len());
    out.push(marcher.station(&y, arc_length[0], edge_velocity[0], 0.0));
    for i in 1..arc_length.len() {
        marcher.advance(
            &mut y,
            arc_length[i - 1],
            arc_length[i],
            edge_velocity[i - 1],
            edge_velocity[i],
        );
        check_state(&y, i)?;
        out.push(marcher.station(&y, arc_length[i], edge_velocity[i], 0.0));
    }
    Ok(out)
}

/// Drag-coefficient contribution of one side (or of a wake station) by Squire & Young (1938),
/// ARC R&M 1838: cd = 2 θ ue^((H + 5)/2), with θ in chord units and ue in units of V∞ (METHODS
/// §6.7). Sum the two trailing-edge contributions, or use the wake's last station alone.
pub fn squire_young_drag(theta: f64, h: f64, ue: f64) -> f64 {
    2.0 * theta * ue.powf(0.5 * (h + 5.0))
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn squire_young_laminar_flat_plate() {
        // METHODS §6.7 / §8 #20: laminar flat plate, ue = 1 at the TE: cd = 2·0.664/√Re per
        // side (Blasius θ); the formula is exact there since ue^(...) = 1.
        let re: f64 = 1e6;
        let theta = 0.664 / re.sqrt();
        assert_relative_eq!(
            2.0 * squire_young_drag(theta, 2.59, 1.0),
            2.656 / re.sqrt(),
            max_relative = 1e-3
        );
    }

    #[test]
    fn bubble_growth_limits() {
        // constant ue: no growth; constant H: (u_t/u)^(H+2)
        assert_relative_eq!(bubble_log_growth(1.0, 5.0, 1.0, 3.5), 0.0, epsilon = 1e-12);
        assert_relative_eq!(
            bubble_log_growth(1.0, 4.0, 0.9, 4.0).exp(),
            0.9f64.powf(-6.0),
            max_relative = 1e-12
        );
    }
}
