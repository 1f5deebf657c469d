//! Airfoil geometry: parse and validate section coordinates, generate NACA sections, spline and
//! re-panel a contour, and measure its geometric properties.
//!
//! The central type is [`Airfoil`]: a validated contour with private fields, built only by
//! [`Airfoil::parse`] (coordinate text in either of two plain layouts), [`Airfoil::from_points`]
//! or [`naca::naca_section`]. Construction checks and, where it is safe, corrects the input;
//! every correction comes back in a [`GeometryReport`] and every failure is a [`GeometryError`]
//! that names the source and the line (or point index).
//!
//! Invariants of an `Airfoil`:
//! * at least 10 points, all finite, no two consecutive points equal;
//! * counter-clockwise order: upper trailing edge → upper surface → leading edge → lower surface
//!   → lower trailing edge (first and last point coincide for a sharp trailing edge);
//! * the contour does not cross itself and encloses a positive area;
//! * unless [`ParseOptions::keep_chord`] is set, the contour is in chord coordinates: the
//!   trailing-edge midpoint is at (1, 0) and the nose passes through (0, 0), within 1e-4 c.
//!   Input that is not is moved, rotated and scaled so that its leading edge — the point of the
//!   arc-length spline farthest from the trailing-edge midpoint — lands on (0, 0). Input that
//!   already is keeps its own chord line (for cambered NACA sections that line joins the mean-line
//!   ends and differs from the farthest-point chord by a few tenths of a degree).
//!
//! [`Airfoil::repanel`] redistributes the nodes on a not-a-knot cubic spline of the contour
//! (parameter: cumulative chord length), clustered by curvature and towards the trailing edge.
//! [`Airfoil::properties`] gives thickness, camber, leading-edge radius, trailing-edge thickness
//! and angle, and area ([`SectionProperties`]).
//!
//! This crate does not read files, print, or know about flow: the caller passes text and gets
//! plain values back.
//!
//! ```
//! use foilsweep_geometry::{naca::{naca_section, TrailingEdge}, Airfoil, ParseOptions};
//!
//! # fn main() -> Result<(), foilsweep_geometry::GeometryError> {
//! let section = naca_section("2412", 81, TrailingEdge::Open)?;
//! let panels = section.repanel(160)?;
//! assert_eq!(panels.points().len(), 161);
//! assert!((panels.properties().max_thickness - 0.12).abs() < 1e-3);
//!
//! let text = "flat-ish\n1 0\n0.7 0.04\n0.4 0.06\n0.2 0.05\n0.05 0.025\n0 0\n\
//!             0.05 -0.02\n0.2 -0.03\n0.4 -0.03\n0.7 -0.02\n1 0\n";
//! let (foil, report) = Airfoil::parse(text, "inline", &ParseOptions::default())?;
//! assert_eq!(foil.name(), "flat-ish");
//! assert!(report.warnings.is_empty());
//! # Ok(())
//! # }
//! ```
#![warn(missing_docs)]

mod error;
pub mod naca;
mod parse;
mod properties;
mod repanel;
mod spline;
mod validate;

use nalgebra::Point2;

pub use error::{GeometryError, Location, Segment};
pub use properties::SectionProperties;

/// Options for building an [`Airfoil`] from coordinates.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct ParseOptions {
    /// Keep the coordinates' own chord, position and rotation instead of normalising to
    /// leading edge (0, 0) and trailing-edge midpoint (1, 0). Default `false`: normalise, with a
    /// warning in the report.
    pub keep_chord: bool,
}

/// What validation corrected or noticed while building an [`Airfoil`].
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct GeometryReport {
    /// One line per correction (merged repeated points, reversed order, normalised chord, …).
    pub warnings: Vec<String>,
}

/// A validated airfoil contour (see the crate documentation for its invariants).
#[derive(Debug, Clone, PartialEq)]
pub struct Airfoil {
    name: String,
    points: Vec<Point2<f64>>,
}

impl Airfoil {
    /// Parses coordinate text in either plain layout, detected automatically:
    /// * single loop: a title line, then `x y` pairs TE → upper → LE → lower → TE;
    /// * two surfaces: a title line, a line with the two surfaces' point counts (`61. 61.`), then
    ///   the upper and the lower surface, each from the leading to the trailing edge.
    ///
    /// Spaces, tabs or commas separate numbers; blank lines and text after the first two numbers
    /// of a line are ignored; the title line may be missing. The title, or `source_name` when
    /// there is none, becomes the section name. Errors name `source_name` and the 1-based line.
    pub fn parse(
        text: &str,
        source_name: &str,
        options: &ParseOptions,
    ) -> Result<(Airfoil, GeometryReport), GeometryError> {
        let parsed = parse::parse_text(text, source_name)?;
        let (points, warnings) = validate::validate(source_name, parsed.points, options)?;
        let name = parsed
            .title
            .filter(|t| !t.is_empty())
            .unwrap_or_else(|| source_name.to_owned());
        Ok((Airfoil { name, points }, GeometryReport { warnings }))
    }

    /// Validates points given in single-loop order (TE → upper → LE → lower → TE, or the
    /// clockwise reverse, which is corrected). Errors name the 1-based point index.
    pub fn from_points(
        name: &str,
        points: Vec<Point2<f64>>,
        options: &ParseOptions,
    ) -> Result<(Airfoil, GeometryReport), GeometryError> {
        let mut located = validate::LocatedPoints::default();
        for (i, p) in points.into_iter().enumerate() {
            located.push(p, Location::Point(i + 1));
        }
        let (points, warnings) = validate::validate(name, located, options)?;
        Ok((
            Airfoil {
                name: name.to_owned(),
                points,
            },
            GeometryReport { warnings },
        ))
    }

    /// Section name (title line, file name or NACA designation).
    pub fn name(&self) -> &str {
        &self.name
    }

    /// Contour points, counter-clockwise: upper TE → upper surface → LE → lower surface → lower TE.
    pub fn points(&self) -> &[Point2<f64>] {
        &self.points
    }

    /// The same section with `n_panels` panels (`n_panels + 1` points) redistributed along the
    /// spline, clustered at the leading and trailing edges; the trailing-edge points are kept.
    /// 160 panels is a good default for the panel method.
    pub fn repanel(&self, n_panels: usize) -> Result<Airfoil, GeometryError> {
        if n_panels < repanel::MIN_PANELS {
            return Err(GeometryError::TooFewPanels {
                requested: n_panels,
                minimum: repanel::MIN_PANELS,
            });
        }
        Ok(Airfoil {
            name: self.name.clone(),
            points: repanel::repanel_points(&self.points, n_panels),
        })
    }

    /// Thickness, camber, leading-edge radius, trailing-edge thickness and angle, and area, in
    /// chord units.
    pub fn properties(&self) -> SectionProperties {
        properties::section_properties(&self.points)
    }

    /// Distance between the first and last point, in the contour's units (0 for a sharp TE).
    pub fn trailing_edge_gap(&self) -> f64 {
        (self.points[0] - self.points[self.points.len() - 1]).norm()
    }

    /// Stable 16-digit hex hash of the coordinates (FNV-1a, 64 bit, over the little-endian bit
    /// patterns of x and y of every point in order), for output metadata.
    pub fn coordinate_hash(&self) -> String {
        let bytes: Vec<u8> = self
            .points
            .iter()
            .flat_map(|p| [p.x, p.y])
            .flat_map(|v| v.to_bits().to_le_bytes())
            .collect();
        format!("{:016x}", fnv1a(&bytes))
    }
}

/// FNV-1a, 64 bit (Fowler, Noll and Vo): offset basis 0xcbf29ce484222325, prime 0x100000001b3.
fn fnv1a(bytes: &[u8]) -> u64 {
    const OFFSET: u64 = 0xcbf2_9ce4_8422_2325;
    const PRIME: u64 = 0x0000_0100_0000_01b3;
    bytes
        .iter()
        .fold(OFFSET, |h, &byte| (h ^ u64::from(byte)).wrapping_mul(PRIME))
}

#[cfg(test)]
mod tests;
