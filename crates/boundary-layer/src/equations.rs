//! Discrete residuals of the interacting integral boundary-layer equations.
//!
//! Every station carries three unknowns: the momentum thickness θ, the mass defect
//! m = ue·δ* (the displacement effect fed back to the inviscid flow, Lighthill 1958) and a
//! third variable `c` that is the e^N amplification factor N in laminar flow and the
//! entrainment coefficient C_E in turbulent flow and the wake. The edge speed ue at a station
//! is not an unknown of its own here: the caller supplies it (in the coupled solve it is
//! ue = ue_inviscid + D·m).
//!
//! Equations per interval between an upstream station 1 and a downstream station 2, each in a
//! dimensionless, logarithmic trapezoidal form so that large ratios of θ or ue stay well scaled:
//!
//! * momentum integral (von Kármán): `ln(θ2/θ1) + (2 + H̄) ln(ue2/ue1) − Δs·avg(cf/(2θ)) = 0`;
//! * laminar: kinetic-energy integral in shape-factor form (e.g. White 2006, eq. 4-…;
//!   Drela & Giles 1987 for its use through reversed flow)
//!   `ln(H*2/H*1) + (1 − H̄) ln(ue2/ue1) − Δs·avg((2 C_D/H* − cf/2)/θ) = 0`, with the
//!   two-equation laminar closure H*(H), cf(H, Re_θ), C_D(H, Re_θ) of
//!   [`crate::closure::laminar_blend`] (our Falkner–Skan table when attached, the published
//!   fit when separated);
//!   amplification `N2 − N1 − Δs·avg(dN/ds) = 0` (envelope e^N, Drela & Giles 1987) with the
//!   trapezoidal average. On the E387 at 7.15°, Re 3e5, 160 panels, the upstream rate alone
//!   put N at arc length 0.2 (x/c 0.17) 0.56 ahead of a fine (Δs = 1e-6) integration of the same equations on
//!   the same edge speed, the trapezoidal average 0.44 ahead; most of what is left arises at
//!   the first amplifying stations behind the suction peak, where the stations are coarse;
//! * turbulent and wake: Head's (1958) entrainment equation with the lag-entrainment
//!   closure of Green, Weeks & Brooman (1973):
//!   `[ue2 θ2 H1_2 − ue1 θ1 H1_1 − Δs·avg(ue C_E)] / avg(ue θ) = 0` and the lag equation
//!   `C_E2 − C_E1 − Δs·avg(θ dC_E/ds / θ) = 0`; cf = 0 in the wake;
//! * transition inside an interval: the interval is split at the transition point T, whose
//!   state is interpolated linearly in s between the two stations; the laminar equations hold
//!   from 1 to T and the turbulent ones from T to 2, and the two parts are added (momentum and
//!   shape equations) so the residual changes continuously as T moves through the interval.
//!   C_E at T starts at a fixed fraction of its equilibrium value.
//!
//! What this module does not do: choose which intervals are laminar or turbulent, locate the
//! stagnation point, or solve anything (see [`crate::interaction`]).

use crate::closure::{lag_entrainment, laminar_blend, transition};

/// Shape factor below which the closures are not evaluated (profiles thinner than this do not
/// exist in attached or separated flow; guards the Newton iterates only).
pub const MIN_SHAPE_FACTOR: f64 = 1.02;
/// Smallest entrainment coefficient used by the closures (guards the Newton iterates only).
pub const MIN_ENTRAINMENT: f64 = 1.0e-6;
/// Smallest edge speed used in logarithms (guards iterates near the stagnation point).
pub const MIN_EDGE_VELOCITY: f64 = 1.0e-6;
/// Shape factor of the Hiemenz stagnation-point similarity solution (Hiemenz 1911; exact
/// value 2.2162, see `tests/data/falkner_skan_integrals.csv`).
pub const STAGNATION_SHAPE_FACTOR: f64 = 2.2162;
/// Thwaites's integral coefficient: θ² ue⁶ = 0.45 ν ∫ ue⁵ ds (Thwaites 1949).
pub const THWAITES_COEFFICIENT: f64 = 0.45;
/// Thwaites's stagnation-point value of λ = (θ²/ν) due/ds (Thwaites 1949): θ² = 0.075 ν s/ue.
pub const STAGNATION_LAMBDA: f64 = 0.075;
/// Shape factor of the Blasius flat-plate solution (Blasius 1908).
pub const BLASIUS_SHAPE_FACTOR: f64 = 2.5911;
/// Blasius momentum-thickness constant θ·√(ue s/ν)/s (Blasius 1908).
pub const BLASIUS_THETA: f64 = 0.6641;

/// Largest shape factor at which the starting entrainment of a turbulent layer is evaluated
/// (our choice, no source: the upper end of the 5–8 range at which bubble shear layers are
/// reported to transition, METHODS digest §5.2; the lag-entrainment closure is not calibrated
/// beyond it). The lag equation's equilibrium target is held at the same shape factor.
pub const MAX_START_SHAPE_FACTOR: f64 = lag_entrainment::EQUILIBRIUM_SHAPE_FACTOR_CEILING;

/// Values at one station as seen by the residuals.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Point {
    /// Arc length s.
    pub arc_length: f64,
    /// Momentum thickness θ.
    pub theta: f64,
    /// Mass defect m = ue·δ*.
    pub mass_defect: f64,
    /// Amplification N (laminar) or entrainment coefficient C_E (turbulent, wake).
    pub third: f64,
    /// Edge speed ue.
    pub edge_velocity: f64,
}

impl Point {
    /// Edge speed guarded away from zero.
    pub fn ue(&self) -> f64 {
        self.edge_velocity.max(MIN_EDGE_VELOCITY)
    }
    /// Displacement thickness δ* = m/ue.
    pub fn displacement_thickness(&self) -> f64 {
        self.mass_defect / self.ue()
    }
    /// Shape factor H = δ*/θ, guarded below by [`MIN_SHAPE_FACTOR`].
    pub fn shape_factor(&self) -> f64 {
        (self.displacement_thickness() / self.theta).max(MIN_SHAPE_FACTOR)
    }
    /// Momentum-thickness Reynolds number ue·θ·Re (lengths and speeds in chord and V∞ units).
    pub fn re_theta(&self, reynolds: f64) -> f64 {
        (self.ue() * self.theta * reynolds).max(1.0)
    }
}

/// Settings the residuals need.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EquationSettings {
    /// Reynolds number on the reference length and speed (ν = 1/reynolds).
    pub reynolds: f64,
    /// Critical amplification N_crit.
    pub critical_n: f64,
    /// C_E at the start of turbulent flow as a fraction of its equilibrium value.
    pub transition_entrainment_fraction: f64,
}

/// Integral of a source term X(s) over an interval, ∫ X ds = ∫ (s X) d(ln s), by the
/// trapezoidal rule in ln s (the form of Drela & Giles 1987): exact for the s⁻¹ behaviour of the
/// terms near a stagnation point or leading edge, and the plain trapezoidal rule in s where the
/// interval is short compared with s.
fn integrate(p1: &Point, p2: &Point, x1: f64, x2: f64) -> f64 {
    let (s1, s2) = (p1.arc_length, p2.arc_length);
    if s1 > 0.0 && s2 > 0.0 {
        (s2 / s1).ln() * 0.5 * (s1 * x1 + s2 * x2)
    } else {
        (s2 - s1) * 0.5 * (x1 + x2)
    }
}

/// Local closure values of a laminar station.
struct LaminarLocal {
    h: f64,
    h_star: f64,
    cf_over_2theta: f64,
    shape_source: f64,
    amplification_rate: f64,
}

fn laminar_local(p: &Point, settings: &EquationSettings) -> LaminarLocal {
    let h = p.shape_factor();
    let re_theta = p.re_theta(settings.reynolds);
    let cf = laminar_blend::skin_friction(h, re_theta);
    let cd = laminar_blend::dissipation(h, re_theta);
    let h_star = laminar_blend::energy_shape_factor(h);
    LaminarLocal {
        h,
        h_star,
        cf_over_2theta: cf / (2.0 * p.theta),
        shape_source: (2.0 * cd / h_star - 0.5 * cf) / p.theta,
        amplification_rate: transition::amplification_rate(h, p.theta, re_theta),
    }
}

/// Local closure values of a turbulent or wake station.
struct TurbulentLocal {
    h: f64,
    h1: f64,
    cf_over_2theta: f64,
    entrainment_source: f64,
}

fn turbulent_local(p: &Point, settings: &EquationSettings, wake: bool) -> TurbulentLocal {
    let h = p.shape_factor();
    let re_theta = p.re_theta(settings.reynolds);
    let cf = if wake {
        0.0
    } else {
        lag_entrainment::skin_friction(h, re_theta)
    };
    let h1 = lag_entrainment::entrainment_shape_factor(h);
    let ce = p.third.max(MIN_ENTRAINMENT);
    TurbulentLocal {
        h,
        h1,
        cf_over_2theta: cf / (2.0 * p.theta),
        entrainment_source: ce,
    }
}

/// Lag-equation rate dC_E/ds at a station, with the pressure gradient (θ/ue) due/ds taken from
/// the interval's edge-speed difference.
fn lag_rate_per_length(p: &Point, settings: &EquationSettings, due_ds: f64, wake: bool) -> f64 {
    let h = p.shape_factor();
    let re_theta = p.re_theta(settings.reynolds);
    let pressure_gradient = p.theta / p.ue() * due_ds;
    lag_entrainment::lag_rate(
        h,
        p.third.max(MIN_ENTRAINMENT),
        re_theta,
        pressure_gradient,
        wake,
    ) / p.theta
}

/// Residuals of a laminar interval from `p1` to `p2` (third variable N).
pub fn laminar_interval(p1: &Point, p2: &Point, settings: &EquationSettings) -> [f64; 3] {
    let a = laminar_local(p1, settings);
    let b = laminar_local(p2, settings);
    let log_ue = (p2.ue() / p1.ue()).ln();
    let h_mean = 0.5 * (a.h + b.h);
    [
        (p2.theta / p1.theta).ln() + (2.0 + h_mean) * log_ue
            - integrate(p1, p2, a.cf_over_2theta, b.cf_over_2theta),
        (b.h_star / a.h_star).ln() + (1.0 - h_mean) * log_ue
            - integrate(p1, p2, a.shape_source, b.shape_source),
        p2.third - p1.third - integrate(p1, p2, a.amplification_rate, b.amplification_rate),
    ]
}

/// Residuals of a turbulent (or wake, `wake = true`) interval from `p1` to `p2`
/// (third variable C_E).
pub fn turbulent_interval(
    p1: &Point,
    p2: &Point,
    settings: &EquationSettings,
    wake: bool,
) -> [f64; 3] {
    let ds = p2.arc_length - p1.arc_length;
    let a = turbulent_local(p1, settings, wake);
    let b = turbulent_local(p2, settings, wake);
    let log_ue = (p2.ue() / p1.ue()).ln();
    let h_mean = 0.5 * (a.h + b.h);
    let scale = 0.5 * (p1.ue() * p1.theta + p2.ue() * p2.theta);
    let due_ds = if ds != 0.0 {
        (p2.ue() - p1.ue()) / ds
    } else {
        0.0
    };
    [
        (p2.theta / p1.theta).ln() + (2.0 + h_mean) * log_ue
            - integrate(p1, p2, a.cf_over_2theta, b.cf_over_2theta),
        // Difference form scaled by the mean ue·θ (> 0): stays defined where H1 ≤ 0 (H ≳ 19).
        (p2.ue() * p2.theta * b.h1 - p1.ue() * p1.theta * a.h1) / scale
            - integrate(
                p1,
                p2,
                p1.ue() * a.entrainment_source,
                p2.ue() * b.entrainment_source,
            ) / scale,
        p2.third
            - p1.third
            - integrate(
                p1,
                p2,
                lag_rate_per_length(p1, settings, due_ds, wake),
                lag_rate_per_length(p2, settings, due_ds, wake),
            ),
    ]
}

/// Entrainment coefficient at the start of turbulent flow for a layer with the given state.
///
/// The equilibrium value is taken at min(H, [`MAX_START_SHAPE_FACTOR`]): the lag-entrainment
/// closure is calibrated only for moderate H, and a laminar shear layer can reach H ≈ 10–20 before
/// it transitions; the lag equation then carries C_E to its own level.
pub fn starting_entrainment(p: &Point, settings: &EquationSettings) -> f64 {
    let h = p.shape_factor().min(MAX_START_SHAPE_FACTOR);
    let re_theta = p.re_theta(settings.reynolds);
    (settings.transition_entrainment_fraction
        * lag_entrainment::equilibrium_entrainment(h, re_theta))
    .max(MIN_ENTRAINMENT)
}

/// Linear interpolation of a station state at fraction `f` of the interval (third variable
/// left at `third`).
fn interpolate(p1: &Point, p2: &Point, f: f64, third: f64) -> Point {
    let lerp = |a: f64, b: f64| a + f * (b - a);
    let ue = lerp(p1.ue(), p2.ue());
    let dstar = lerp(p1.displacement_thickness(), p2.displacement_thickness());
    Point {
        arc_length: lerp(p1.arc_length, p2.arc_length),
        theta: lerp(p1.theta, p2.theta),
        mass_defect: ue * dstar,
        third,
        edge_velocity: ue,
    }
}

/// Where transition happens in an interval whose upstream station is laminar.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TransitionPoint {
    /// Fraction of the interval (0 at the upstream station, 1 at the downstream one).
    pub fraction: f64,
    /// True when a trip forced it before the e^N criterion.
    pub forced: bool,
}

/// Natural-transition fraction of the interval `p1 → p2` (unbounded): where
/// N1 + f·Δs·(dN/ds)_1 reaches N_crit, with the envelope rate of the laminar upstream station
/// (Drela & Giles 1987 envelope). Explicit: the downstream station of a transition interval
/// holds a turbulent state, whose shape factor says nothing about the laminar layer, so the
/// transition point follows from upstream laminar quantities alone (a rate averaged with the
/// turbulent station let the bookkeeping cycle between neighbouring intervals). Fully laminar
/// intervals integrate the rate by the trapezoidal rule ([`laminar_interval`]). +∞ when
/// nothing amplifies.
fn natural_fraction(p1: &Point, p2: &Point, settings: &EquationSettings) -> f64 {
    let growth = (p2.arc_length - p1.arc_length) * laminar_local(p1, settings).amplification_rate;
    if growth > 0.0 {
        (settings.critical_n - p1.third) / growth
    } else if p1.third >= settings.critical_n {
        0.0
    } else {
        f64::INFINITY
    }
}

fn trip_fraction(p1: &Point, p2: &Point, trip_arc_length: Option<f64>) -> Option<f64> {
    trip_arc_length
        .filter(|&s| s > p1.arc_length && s <= p2.arc_length)
        .map(|s| (s - p1.arc_length) / (p2.arc_length - p1.arc_length))
}

/// Locates transition in the interval `p1 → p2` if it happens there.
///
/// `p1` is laminar (third = N). Natural transition is where the amplification, integrated
/// with the upstream station's envelope rate, reaches N_crit; a trip at `trip_arc_length` wins
/// when it comes first. Returns `None` when the interval stays laminar.
pub fn locate_transition(
    p1: &Point,
    p2: &Point,
    settings: &EquationSettings,
    trip_arc_length: Option<f64>,
) -> Option<TransitionPoint> {
    let natural = natural_fraction(p1, p2, settings).max(0.0);
    match trip_fraction(p1, p2, trip_arc_length) {
        Some(t) if t < natural || natural > 1.0 => Some(TransitionPoint {
            fraction: t,
            forced: true,
        }),
        _ if natural <= 1.0 => Some(TransitionPoint {
            fraction: natural,
            forced: false,
        }),
        _ => None,
    }
}

/// Transition fraction used inside the residual of a transition interval: like
/// [`locate_transition`], but continued smoothly outside the interval (clamped to
/// [−0.5, 1.5], states extrapolated linearly) instead of being cut at its ends, so that a
/// Newton iterate whose transition point has drifted a little out of the interval still sees a
/// smooth residual; the bookkeeping moves the interval once the iterate settles.
pub fn transition_fraction(
    p1: &Point,
    p2: &Point,
    settings: &EquationSettings,
    trip_arc_length: Option<f64>,
) -> TransitionPoint {
    let natural = natural_fraction(p1, p2, settings).clamp(-0.5, 1.5);
    match trip_fraction(p1, p2, trip_arc_length) {
        Some(t) if t < natural => TransitionPoint {
            fraction: t,
            forced: true,
        },
        _ => TransitionPoint {
            fraction: natural,
            forced: false,
        },
    }
}

/// Residuals of an interval that contains transition at `point`: laminar from `p1` (third = N)
/// to T, turbulent from T to `p2` (third = C_E). The fraction may lie slightly outside [0, 1]
/// (see [`transition_fraction`]); the two parts are then continued with a negative length, which
/// keeps the residual smooth.
pub fn transition_interval(
    p1: &Point,
    p2: &Point,
    point: TransitionPoint,
    settings: &EquationSettings,
) -> [f64; 3] {
    let mut t = interpolate(p1, p2, point.fraction, settings.critical_n);
    // Laminar part 1 → T; its third residual is not used because N at T is N_crit by
    // construction.
    let lam = laminar_interval(p1, &t, settings);
    t.third = starting_entrainment(&t, settings);
    let turb = turbulent_interval(&t, p2, settings, false);
    [lam[0] + turb[0], lam[1] + turb[1], turb[2]]
}

/// How the first station of a surface starts.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum SurfaceStart {
    /// Stagnation-point (Hiemenz) flow, ue ≈ K s near s = 0, with the slope K = due/ds at the
    /// stagnation point (speed per length).
    Stagnation {
        /// Edge-speed gradient K at the stagnation point.
        slope: f64,
    },
    /// Sharp flat-plate leading edge (Blasius) with finite ue at s = 0.
    FlatPlate,
}

/// Residuals fixing a station near the start of a surface from similarity: Thwaites's
/// stagnation value θ² = 0.075 ν/K with the Hiemenz shape factor (Thwaites 1949; Hiemenz 1911),
/// or the Blasius values θ = 0.6641 √(ν s/ue), H = 2.5911 (Blasius 1908); and N = 0.
pub fn surface_start(p: &Point, start: SurfaceStart, settings: &EquationSettings) -> [f64; 3] {
    let nu = 1.0 / settings.reynolds;
    let (theta_target, h_target) = match start {
        SurfaceStart::Stagnation { slope } => (
            (STAGNATION_LAMBDA * nu / slope.max(1e-6)).sqrt(),
            STAGNATION_SHAPE_FACTOR,
        ),
        SurfaceStart::FlatPlate => (
            BLASIUS_THETA * (nu * p.arc_length / p.ue()).sqrt(),
            BLASIUS_SHAPE_FACTOR,
        ),
    };
    // The shape-factor condition is written as m/θ − ue·H (a speed, O(1)) rather than through
    // δ* = m/ue, which is singular at a station sitting on the stagnation point (ue → 0).
    [
        (p.theta / theta_target).ln(),
        p.mass_defect / p.theta - p.edge_velocity * h_target,
        p.third,
    ]
}

/// Residuals of a station in the stagnation region behind the first one (its predecessor lies
/// closer to the stagnation point than the surface's `similarity_end`): θ from Thwaites's
/// integral from the stagnation point, θ² ue⁶ = 0.45 ν ∫₀ˢ ue⁵ ds (Thwaites 1949), with
/// ue = K s up to the previous station (its similarity speed) and linear from there to this
/// station's own edge speed; the Hiemenz shape factor; N = 0. For ue = K s throughout this is
/// the stagnation value θ² = 0.075 ν/K of [`surface_start`]; where the speed rises faster or
/// slower than linearly (a small leading-edge radius, or a stagnation point between nodes) it
/// follows the actual speed instead of assuming the linear law a whole panel away from the
/// stagnation point.
pub fn stagnation_region_start(
    previous_arc_length: f64,
    p: &Point,
    slope: f64,
    settings: &EquationSettings,
) -> [f64; 3] {
    let nu = 1.0 / settings.reynolds;
    let k = slope.max(1e-6);
    let s0 = previous_arc_length;
    let u0 = k * s0;
    // A speed below half the similarity speed of the previous station only occurs while the
    // stagnation point is still being located; it is held there so that θ stays finite.
    let u1 = p.edge_velocity.max(0.5 * u0).max(MIN_EDGE_VELOCITY);
    let linear_piece = crate::thwaites::integral_ue5(u0, u1, (p.arc_length - s0).max(0.0));
    let integral = k.powi(5) * s0.powi(6) / 6.0 + linear_piece;
    let theta_target = (THWAITES_COEFFICIENT * nu * integral / u1.powi(6)).sqrt();
    [
        (p.theta / theta_target).ln(),
        p.mass_defect / p.theta - p.edge_velocity * STAGNATION_SHAPE_FACTOR,
        p.third,
    ]
}

/// State that a surface's trailing-edge station hands to the wake: C_E of a turbulent station
/// as it is, of a laminar one (transition forced at the trailing edge) from its equilibrium.
pub fn trailing_edge_entrainment(p: &Point, laminar: bool, settings: &EquationSettings) -> f64 {
    if laminar {
        starting_entrainment(p, settings)
    } else {
        p.third.max(MIN_ENTRAINMENT)
    }
}

/// Residuals of the first wake station: θ and δ* of the two surfaces add up (plus the
/// trailing-edge gap in δ*), C_E is the θ-weighted mean of the two surfaces' values.
pub fn wake_start(
    upper: (&Point, bool),
    lower: (&Point, bool),
    wake: &Point,
    trailing_edge_gap: f64,
    settings: &EquationSettings,
) -> [f64; 3] {
    let (u, u_lam) = upper;
    let (l, l_lam) = lower;
    let theta = u.theta + l.theta;
    let dstar = u.displacement_thickness() + l.displacement_thickness() + trailing_edge_gap;
    let ce = (u.theta * trailing_edge_entrainment(u, u_lam, settings)
        + l.theta * trailing_edge_entrainment(l, l_lam, settings))
        / theta;
    [
        (wake.theta / theta).ln(),
        wake.displacement_thickness() / dstar - 1.0,
        wake.third / ce - 1.0,
    ]
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn point(arc_length: f64, theta: f64, edge_velocity: f64) -> Point {
        Point {
            arc_length,
            theta,
            mass_defect: STAGNATION_SHAPE_FACTOR * theta * edge_velocity,
            third: 0.0,
            edge_velocity,
        }
    }

    #[test]
    fn stagnation_region_start_is_hiemenz_for_linear_speed() {
        // ue = K s throughout: Thwaites's integral gives θ² = 0.075 ν/K at every s (Thwaites
        // 1949), the value of the first station's start; residuals vanish to rounding.
        let settings = EquationSettings {
            reynolds: 5.0e5,
            critical_n: 9.0,
            transition_entrainment_fraction: 0.5,
        };
        let (k, s0, s1) = (90.0, 0.0012, 0.0045);
        let theta = (STAGNATION_LAMBDA / (settings.reynolds * k)).sqrt();
        let r = stagnation_region_start(s0, &point(s1, theta, k * s1), k, &settings);
        assert!(r.iter().all(|v| v.abs() < 1e-12), "{r:?}");
    }

    #[test]
    fn stagnation_region_start_follows_thwaites_march_for_faster_rise() {
        // Speed rising faster than linear after the previous station (a small leading-edge
        // radius): the target θ equals the one of Thwaites's integral marched by the
        // `thwaites` module over the same piecewise-linear speed (0, K s0, u1), whose
        // stagnation start is checked against the exact value there. Same formula, independent
        // code: agreement to rounding.
        let settings = EquationSettings {
            reynolds: 5.0e5,
            critical_n: 9.0,
            transition_entrainment_fraction: 0.5,
        };
        let (k, s0, s1, u1) = (90.0, 0.0006, 0.0038, 0.76);
        let marched = crate::thwaites::momentum_thickness(
            &[0.0, s0, s1],
            &[0.0, k * s0, u1],
            1.0 / settings.reynolds,
        );
        let r = stagnation_region_start(s0, &point(s1, marched[2], u1), k, &settings);
        assert_relative_eq!(r[0], 0.0, epsilon = 1e-12);
        // The linear law a whole panel away would have given θ² = 0.075 ν/K, about 1.6 times the
        // integral's θ here: the case the start exists for.
        let linear = (STAGNATION_LAMBDA / (settings.reynolds * k)).sqrt();
        assert!(linear / marched[2] > 1.5, "{linear} vs {}", marched[2]);
    }
}
