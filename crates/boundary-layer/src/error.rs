//! Error type of the boundary-layer crate: bad inputs and failed marches, each carrying the
//! station index (0-based, in the arrays the caller passed) where it was found.

use thiserror::Error;

/// Why a boundary-layer computation could not be done.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum BoundaryLayerError {
    /// The input arrays do not have the same length.
    #[error("input arrays differ in length: arc_length {arc_length}, edge_velocity {edge_velocity}, x_over_c {x_over_c}")]
    LengthMismatch {
        /// Length of the arc-length array.
        arc_length: usize,
        /// Length of the edge-velocity array.
        edge_velocity: usize,
        /// Length of the x/c array.
        x_over_c: usize,
    },
    /// Fewer stations than the march needs.
    #[error("too few stations: {count} given, at least {required} needed")]
    TooFewStations {
        /// Stations given.
        count: usize,
        /// Stations needed.
        required: usize,
    },
    /// A value is NaN, infinite or out of its physical range.
    #[error("invalid {quantity} at station {station}: {value}")]
    InvalidValue {
        /// Station index.
        station: usize,
        /// Which input (e.g. "edge velocity").
        quantity: &'static str,
        /// The offending value.
        value: f64,
    },
    /// Arc length does not increase strictly from one station to the next.
    #[error("arc length does not increase at station {station}: {previous} then {value}")]
    NonIncreasingArcLength {
        /// Station index of the second of the two stations.
        station: usize,
        /// Arc length at the previous station.
        previous: f64,
        /// Arc length at this station.
        value: f64,
    },
    /// The edge velocity vanishes downstream of the first station (a second stagnation point).
    #[error("edge velocity vanishes at station {station} downstream of the start")]
    VanishingEdgeVelocity {
        /// Station index.
        station: usize,
    },
    /// The Reynolds number is outside 1e3 ..= 1e9.
    #[error("reynolds number {reynolds} outside the supported range 1e3 to 1e9")]
    ReynoldsOutOfRange {
        /// The Reynolds number given.
        reynolds: f64,
    },
    /// A march setting is NaN or out of range.
    #[error("invalid setting {name}: {value}")]
    InvalidSetting {
        /// Setting name.
        name: &'static str,
        /// The offending value.
        value: f64,
    },
    /// The free-stream turbulence level is outside the range of Mack's relation.
    #[error(
        "turbulence level {tu} outside the range of mack's relation (1e-4 to 0.0298 as a fraction)"
    )]
    TurbulenceOutOfRange {
        /// The turbulence level given (fraction).
        tu: f64,
    },
    /// The march produced a non-finite state (a bug or an input beyond every closure).
    #[error("march produced a non-finite {quantity} at station {station}")]
    NonFiniteState {
        /// Station index.
        station: usize,
        /// Which quantity.
        quantity: &'static str,
    },
}
