//! Per-station boundary-layer results and events, shared by the direct march and the
//! interacting (coupled) solver.
//!
//! All lengths are in the caller's units (chord units with V∞ = 1 inside foilsweep),
//! speeds are edge speeds ue ≥ 0, and `skin_friction` is based on the local edge speed
//! (cf = τw / (½ρ ue²)); convert with (ue/V∞)² before integrating drag.

/// Flow regime at one station.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Regime {
    /// Attached laminar flow (cf > 0).
    Laminar,
    /// Laminar flow with reversed wall flow (cf ≤ 0): inside a laminar separation bubble
    /// before transition, or a laminar separated shear layer.
    LaminarSeparated,
    /// Attached turbulent flow.
    Turbulent,
    /// Turbulent flow with reversed wall flow (cf ≤ 0), e.g. the rear of a bubble or
    /// trailing-edge separation.
    TurbulentSeparated,
    /// The wake behind the trailing edge (cf = 0 by definition).
    Wake,
}

/// Integral quantities at one boundary-layer station.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StationState {
    /// Arc length from the stagnation point (or along the wake from the trailing edge plus the
    /// surface length), in caller length units.
    pub arc_length: f64,
    /// Edge speed ue (≥ 0), in caller speed units.
    pub edge_velocity: f64,
    /// Momentum thickness θ.
    pub momentum_thickness: f64,
    /// Displacement thickness δ*.
    pub displacement_thickness: f64,
    /// Shape factor H = δ*/θ.
    pub shape_factor: f64,
    /// Skin-friction coefficient on the local edge speed, τw/(½ρ ue²).
    pub skin_friction: f64,
    /// e^N amplification factor N (laminar stations; 0 or the value at transition elsewhere).
    pub amplification: f64,
    /// Flow regime.
    pub regime: Regime,
}

/// How transition came about.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TransitionKind {
    /// The e^N envelope reached the critical N-factor.
    Natural,
    /// A trip (forced transition position) was reached first.
    Forced,
    /// Transition caused by laminar separation (only the non-interacting estimate does this):
    /// placed by the bubble model's correlation downstream of the separation point (Horton 1968,
    /// see `direct`), not by the e^N envelope or a trip.
    AtSeparation,
}

/// A boundary-layer event along one surface.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum EventKind {
    /// Laminar separation: cf changes sign from + to − in laminar flow.
    LaminarSeparation,
    /// Laminar-to-turbulent transition.
    Transition(TransitionKind),
    /// Turbulent reattachment: cf changes sign from − back to +.
    Reattachment,
    /// Turbulent separation: cf changes sign from + to − in turbulent flow.
    TurbulentSeparation,
}

/// An event located along a surface by interpolation between stations.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Event {
    /// What happened.
    pub kind: EventKind,
    /// Arc length from the stagnation point.
    pub arc_length: f64,
    /// Chordwise position x/c (interpolated from the station positions supplied by the caller).
    pub x_over_c: f64,
}
