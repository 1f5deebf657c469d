//! Error type of the panel crate.

use thiserror::Error;

/// Why a panel solver or a wake line could not be built.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum PanelError {
    /// Fewer than three panels (four nodes counting the closing node).
    #[error("need at least 3 panels (4 nodes), got {panels}")]
    TooFewPanels {
        /// Number of panels given (nodes − 1).
        panels: usize,
    },
    /// A node coordinate is NaN or infinite.
    #[error("node {index} has a non-finite coordinate")]
    NonFiniteNode {
        /// Index of the node.
        index: usize,
    },
    /// A panel has (near) zero length, e.g. a repeated node.
    #[error("panel {panel} (nodes {panel} to {next}) has zero length", next = panel + 1)]
    ZeroLengthPanel {
        /// Index of the panel (from node `panel` to node `panel + 1`).
        panel: usize,
    },
    /// The contour runs clockwise; nodes must go counter-clockwise from the upper trailing edge.
    #[error("contour is clockwise (signed area {signed_area:e}); nodes must run counter-clockwise from the upper trailing edge")]
    Clockwise {
        /// Signed area enclosed by the contour (negative for clockwise).
        signed_area: f64,
    },
    /// The influence matrix is singular or numerically close to it (e.g. a self-crossing contour).
    #[error("influence matrix is singular (pivot ratio {pivot_ratio:e})")]
    SingularMatrix {
        /// Smallest over largest absolute pivot of the LU factorisation.
        pivot_ratio: f64,
    },
    /// A wake line was requested with fewer than two nodes.
    #[error("wake needs at least 2 nodes, got {n_nodes}")]
    TooFewWakeNodes {
        /// Number of wake nodes requested.
        n_nodes: usize,
    },
    /// A wake length that is not a positive finite number.
    #[error("wake length must be positive and finite, got {length}")]
    InvalidWakeLength {
        /// Requested length in chord units.
        length: f64,
    },
    /// An angle of attack that is NaN or infinite.
    #[error("angle of attack is not finite: {alpha_rad} rad")]
    NonFiniteAlpha {
        /// Requested angle in radians.
        alpha_rad: f64,
    },
    /// A strength vector of the wrong length.
    #[error("{what} has {found} entries, expected {expected}")]
    LengthMismatch {
        /// Which vector.
        what: &'static str,
        /// Expected length.
        expected: usize,
        /// Length given.
        found: usize,
    },
}
