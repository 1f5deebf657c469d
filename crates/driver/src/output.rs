//! The result of a sweep: [`Polar`] with its [`PolarPoint`]s and per-surface [`SurfaceEvents`],
//! all `serde::Serialize` (the JSON writer writes them as they are).
//!
//! A point that did not converge keeps its place with `converged: false`, a `flag` giving the
//! reason, and `None` for every coefficient and event.

use foilsweep_boundary_layer::state::{Event, EventKind};
use foilsweep_viscous::{PointResult, SurfaceResult};
use serde::Serialize;

/// Version of the output layout (JSON keys, CSV columns); raised on any incompatible change.
pub const SCHEMA_VERSION: u32 = 1;

/// The caution carried by every output.
pub const CAUTION: &str = "results are engineering estimates; flight test, airworthiness rules \
                           and licensed practice decide";

/// Which quantity was swept.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum TargetKind {
    /// Angle of attack in degrees.
    AlphaDeg,
    /// Target lift coefficient.
    Cl,
}

/// Identity of the analysed section.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct SectionInfo {
    /// Section name (title line of the file or the NACA designation).
    pub name: String,
    /// Hash of the section's coordinates as loaded, before re-panelling
    /// (`Airfoil::coordinate_hash`).
    pub coordinate_hash: String,
    /// Number of panels used by the panel method.
    pub panels: usize,
}

/// The settings a polar was computed with.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PolarSettings {
    /// Swept quantity.
    pub target: TargetKind,
    /// Free-stream Mach number (Kármán–Tsien correction of Cp only).
    pub mach: f64,
    /// Critical N-factor of the e^N transition method.
    pub critical_n: f64,
    /// Upper-surface trip, x/c.
    pub trip_upper_x_over_c: Option<f64>,
    /// Lower-surface trip, x/c.
    pub trip_lower_x_over_c: Option<f64>,
    /// Wake length behind the trailing edge, chords.
    pub wake_length_chords: f64,
    /// Number of wake stations.
    pub wake_stations: usize,
    /// Newton iterations allowed per stagnation-point position.
    pub max_iterations: usize,
    /// Convergence tolerance on the largest scaled Newton update.
    pub tolerance: f64,
    /// Stagnation-point relocations allowed.
    pub max_relocations: usize,
    /// Entrainment coefficient at transition as a fraction of its equilibrium value.
    pub transition_entrainment_fraction: f64,
    /// True when the wake-curvature term was part of the interaction.
    pub wake_curvature: bool,
    /// Largest continuation step from a converged neighbour, in the swept quantity (degrees
    /// or cl); longer requested steps are walked through unreported intermediate values.
    pub max_continuation_step: f64,
    /// True when a failed warm-started point was also retried cold by the sweep.
    pub retry_cold: bool,
    /// Step halvings allowed when approaching a failed point from its neighbour.
    pub max_step_halvings: u32,
    /// Consecutive failures past stall after which a marching direction stops (0 = never).
    pub give_up_after_failures: usize,
}

/// Boundary-layer events of one surface (first occurrence of each), x/c.
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize)]
pub struct SurfaceEvents {
    /// Transition position, if the surface transitions before the trailing edge.
    pub transition_x_over_c: Option<f64>,
    /// True when transition was forced by a trip.
    pub transition_forced: Option<bool>,
    /// First laminar separation.
    pub laminar_separation_x_over_c: Option<f64>,
    /// First reattachment.
    pub reattachment_x_over_c: Option<f64>,
    /// First turbulent separation.
    pub turbulent_separation_x_over_c: Option<f64>,
    /// Length of the laminar separation bubble: from the first laminar separation to the first
    /// reattachment after it (both must exist).
    pub bubble_length_x_over_c: Option<f64>,
}

impl SurfaceEvents {
    /// True when the layer separates laminar and does not reattach before the trailing edge
    /// (an open bubble, or laminar separation at the trailing edge).
    pub fn bubble_is_open(&self) -> bool {
        self.laminar_separation_x_over_c.is_some() && self.bubble_length_x_over_c.is_none()
    }

    /// Events of a converged surface result.
    pub fn from_surface(surface: &SurfaceResult) -> Self {
        Self::from_events(
            &surface.events,
            surface.transition_x_over_c,
            surface.transition_forced,
        )
    }

    fn from_events(events: &[Event], transition: Option<f64>, forced: bool) -> Self {
        let first = |wanted: fn(&EventKind) -> bool| {
            events
                .iter()
                .position(|e| wanted(&e.kind))
                .map(|i| (i, events[i].x_over_c))
        };
        let laminar_separation = first(|k| matches!(k, EventKind::LaminarSeparation));
        let bubble_length = laminar_separation.and_then(|(i, x_separation)| {
            events[i + 1..]
                .iter()
                .find(|e| matches!(e.kind, EventKind::Reattachment))
                .map(|e| e.x_over_c - x_separation)
        });
        Self {
            transition_x_over_c: transition,
            transition_forced: transition.map(|_| forced),
            laminar_separation_x_over_c: laminar_separation.map(|(_, x)| x),
            reattachment_x_over_c: first(|k| matches!(k, EventKind::Reattachment)).map(|(_, x)| x),
            turbulent_separation_x_over_c: first(|k| matches!(k, EventKind::TurbulentSeparation))
                .map(|(_, x)| x),
            bubble_length_x_over_c: bubble_length,
        }
    }
}

/// One requested (Reynolds number, target) pair.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PolarPoint {
    /// Reynolds number on the chord.
    pub reynolds: f64,
    /// Angle of attack, degrees: the requested one in an alpha sweep; in a cl sweep the alpha
    /// found, or `None` if the point failed.
    pub alpha_deg: Option<f64>,
    /// The requested lift coefficient in a cl sweep (`None` in an alpha sweep).
    pub target_cl: Option<f64>,
    /// True when the coupled solve converged.
    pub converged: bool,
    /// Why the point is flagged (not converged, not attempted, outside the model), if it is.
    pub flag: Option<String>,
    /// Lift coefficient.
    pub cl: Option<f64>,
    /// Drag coefficient (wake momentum deficit).
    pub cd: Option<f64>,
    /// Skin-friction part of cd.
    pub cd_friction: Option<f64>,
    /// Pressure part of cd.
    pub cd_pressure: Option<f64>,
    /// Quarter-chord pitching moment, nose-up positive.
    pub cm: Option<f64>,
    /// Minimum surface pressure coefficient (compressibility-corrected).
    pub cp_min: Option<f64>,
    /// Newton iterations of the final solve (also given for a point that ran out of
    /// iterations).
    pub iterations: Option<usize>,
    /// Final residual 2-norm of the final solve.
    pub residual: Option<f64>,
    /// Viscous solves spent on this point, including retries and warm-up steps.
    pub solves: usize,
    /// Upper-surface events.
    pub upper: SurfaceEvents,
    /// Lower-surface events.
    pub lower: SurfaceEvents,
}

impl PolarPoint {
    /// A converged point. A point beyond the critical Cp stays converged but is flagged.
    pub(crate) fn converged(
        reynolds: f64,
        target_cl: Option<f64>,
        result: &PointResult,
        solves: usize,
    ) -> Self {
        let flag = result.supersonic_flag.then(|| {
            format!(
                "locally supersonic: cp_min {:.3} is beyond the critical Cp, outside the model",
                result.cp_min
            )
        });
        Self {
            reynolds,
            alpha_deg: Some(result.alpha_deg),
            target_cl,
            converged: true,
            flag,
            cl: Some(result.cl),
            cd: Some(result.cd),
            cd_friction: Some(result.cd_friction),
            cd_pressure: Some(result.cd_pressure),
            cm: Some(result.cm),
            cp_min: Some(result.cp_min),
            iterations: Some(result.iterations),
            residual: Some(result.residual),
            solves,
            upper: SurfaceEvents::from_surface(&result.upper),
            lower: SurfaceEvents::from_surface(&result.lower),
        }
    }

    /// A failed or skipped point: the requested target, the reason, and nothing invented.
    pub(crate) fn flagged(
        reynolds: f64,
        alpha_deg: Option<f64>,
        target_cl: Option<f64>,
        reason: String,
        iterations: Option<usize>,
        residual: Option<f64>,
        solves: usize,
    ) -> Self {
        Self {
            reynolds,
            alpha_deg,
            target_cl,
            converged: false,
            flag: Some(reason),
            cl: None,
            cd: None,
            cd_friction: None,
            cd_pressure: None,
            cm: None,
            cp_min: None,
            iterations,
            residual,
            solves,
            upper: SurfaceEvents::default(),
            lower: SurfaceEvents::default(),
        }
    }

    /// Lift-to-drag ratio of a converged point with positive drag.
    pub fn lift_to_drag(&self) -> Option<f64> {
        match (self.cl, self.cd) {
            (Some(cl), Some(cd)) if cd > 0.0 => Some(cl / cd),
            _ => None,
        }
    }

    /// True when the point converged and carries no flag (the only points plotted).
    pub fn is_clean(&self) -> bool {
        self.converged && self.flag.is_none()
    }

    /// True when the point converged with an open bubble on either surface
    /// ([`SurfaceEvents::bubble_is_open`]).
    pub fn has_open_bubble(&self) -> bool {
        self.converged && (self.upper.bubble_is_open() || self.lower.bubble_is_open())
    }
}

/// A viscous polar of one section over one or more Reynolds numbers.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Polar {
    /// Output layout version ([`SCHEMA_VERSION`]).
    pub schema_version: u32,
    /// Version of this program.
    pub tool_version: String,
    /// The caution that goes with the numbers ([`CAUTION`]).
    pub caution: String,
    /// The analysed section.
    pub section: SectionInfo,
    /// How the polar was computed.
    pub settings: PolarSettings,
    /// Requested Reynolds numbers, in order.
    pub reynolds: Vec<f64>,
    /// Requested targets (alpha in degrees or cl), in order.
    pub targets: Vec<f64>,
    /// One point per (Reynolds number, target): grouped by Reynolds number in requested order,
    /// targets in requested order within each.
    pub points: Vec<PolarPoint>,
}

impl Polar {
    /// The points of one requested Reynolds number, in target order.
    pub fn points_at(&self, reynolds: f64) -> impl Iterator<Item = &PolarPoint> {
        self.points.iter().filter(move |p| p.reynolds == reynolds)
    }

    /// Number of points that did not converge.
    pub fn failed_count(&self) -> usize {
        self.points.iter().filter(|p| !p.converged).count()
    }

    /// Number of points carrying a flag (failed, skipped or outside the model).
    pub fn flagged_count(&self) -> usize {
        self.points.iter().filter(|p| p.flag.is_some()).count()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;
    use foilsweep_boundary_layer::state::TransitionKind;

    fn event(kind: EventKind, x_over_c: f64) -> Event {
        Event {
            kind,
            arc_length: x_over_c,
            x_over_c,
        }
    }

    #[test]
    fn bubble_runs_from_laminar_separation_to_the_reattachment_after_it() {
        let events = [
            event(EventKind::Reattachment, 0.05),
            event(EventKind::LaminarSeparation, 0.40),
            event(EventKind::Transition(TransitionKind::Natural), 0.48),
            event(EventKind::Reattachment, 0.55),
            event(EventKind::TurbulentSeparation, 0.95),
        ];
        let found = SurfaceEvents::from_events(&events, Some(0.48), false);
        assert_eq!(found.laminar_separation_x_over_c, Some(0.40));
        // First occurrence of each kind, even when it precedes the bubble.
        assert_eq!(found.reattachment_x_over_c, Some(0.05));
        assert_eq!(found.turbulent_separation_x_over_c, Some(0.95));
        assert_abs_diff_eq!(found.bubble_length_x_over_c.unwrap(), 0.15, epsilon = 1e-12);
        assert_eq!(found.transition_forced, Some(false));
        assert!(!found.bubble_is_open());
    }

    #[test]
    fn no_bubble_without_reattachment() {
        let events = [event(EventKind::LaminarSeparation, 0.6)];
        let found = SurfaceEvents::from_events(&events, None, false);
        assert_eq!(found.bubble_length_x_over_c, None);
        assert_eq!(found.transition_x_over_c, None);
        assert_eq!(found.transition_forced, None);
        assert!(found.bubble_is_open());
        assert!(!SurfaceEvents::from_events(&[], None, false).bubble_is_open());
    }
}
