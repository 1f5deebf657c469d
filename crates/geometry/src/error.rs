//! Error type of the geometry crate and the locations it points at.
//!
//! Every data-dependent failure (a broken coordinate file, an impossible NACA code, an absurd
//! panel count) is a [`GeometryError`]. Errors that come from a text file name the source and the
//! 1-based line; errors about points given directly name the 1-based point index instead.

use std::fmt;

/// Where a point came from: a line of a coordinate text, or a position in a point list.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Location {
    /// 1-based line number in the parsed text.
    Line(usize),
    /// 1-based index in the point list given to [`crate::Airfoil::from_points`].
    Point(usize),
}

impl fmt::Display for Location {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Location::Line(line) => write!(f, "line {line}"),
            Location::Point(index) => write!(f, "point {index}"),
        }
    }
}

/// A straight piece of the contour between two consecutive input points.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Segment {
    /// Where the segment starts.
    pub from: Location,
    /// Where the segment ends.
    pub to: Location,
}

impl fmt::Display for Segment {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{} to {}", self.from, self.to)
    }
}

/// Everything that can go wrong when building or re-panelling an [`crate::Airfoil`].
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum GeometryError {
    /// The text holds no coordinate lines at all.
    #[error("{source_name}: no coordinates found (empty input)")]
    Empty {
        /// Name of the parsed source (usually the file path).
        source_name: String,
    },
    /// A token where a number was expected does not parse.
    #[error("{source_name} line {line}: '{token}' is not a number")]
    NotANumber {
        /// Name of the parsed source.
        source_name: String,
        /// 1-based line number.
        line: usize,
        /// The offending token.
        token: String,
    },
    /// A coordinate line holds only one number.
    #[error("{source_name} line {line}: expected two numbers (x y), found one")]
    MissingCoordinate {
        /// Name of the parsed source.
        source_name: String,
        /// 1-based line number.
        line: usize,
    },
    /// A coordinate is NaN or infinite.
    #[error("{source_name} {location}: '{value}' is not a finite number")]
    NotFinite {
        /// Name of the source.
        source_name: String,
        /// Line (parsed text) or point index (point list).
        location: Location,
        /// The value as written.
        value: String,
    },
    /// The point-count line of the two-surface layout disagrees with the points that follow.
    #[error(
        "{source_name} line {line}: the point-count line announces {upper} + {lower} points \
         but {found} coordinate lines follow"
    )]
    CountMismatch {
        /// Name of the parsed source.
        source_name: String,
        /// 1-based line number of the point-count line.
        line: usize,
        /// Announced number of upper-surface points.
        upper: usize,
        /// Announced number of lower-surface points.
        lower: usize,
        /// Coordinate lines actually found after the count line.
        found: usize,
    },
    /// Every point is the same point (zero chord).
    #[error("{source_name}: all points coincide (zero chord)")]
    AllPointsCoincide {
        /// Name of the source.
        source_name: String,
    },
    /// Fewer distinct points than a section needs.
    #[error("{source_name}: {count} distinct points, at least {minimum} are needed")]
    TooFewPoints {
        /// Name of the source.
        source_name: String,
        /// Distinct points found (after merging repeated ones).
        count: usize,
        /// Smallest accepted number.
        minimum: usize,
    },
    /// The points lie on one line: the contour encloses no area.
    #[error("{source_name}: the contour encloses no area (all points lie on one line)")]
    ZeroArea {
        /// Name of the source.
        source_name: String,
    },
    /// Two non-neighbouring segments of the contour cross or touch.
    #[error("{source_name}: the contour crosses itself: segment {first} meets segment {second}")]
    SelfIntersection {
        /// Name of the source.
        source_name: String,
        /// The first of the two segments (in contour order).
        first: Segment,
        /// The second segment.
        second: Segment,
    },
    /// A NACA designation that is not a valid 4- or 5-digit code.
    #[error("invalid NACA code '{code}': {reason}")]
    InvalidNacaCode {
        /// The code as given.
        code: String,
        /// What is wrong with it.
        reason: String,
    },
    /// A re-panelling request with too few panels to describe a section.
    #[error("cannot re-panel into {requested} panels: at least {minimum} are needed")]
    TooFewPanels {
        /// Panels asked for.
        requested: usize,
        /// Smallest accepted number.
        minimum: usize,
    },
}
