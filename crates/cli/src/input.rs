//! Loading a section from a coordinate file or a NACA designation, with its warnings.
//!
//! A command-line `SECTION` argument is a path to a coordinate file when such a file exists,
//! otherwise a NACA 4- or 5-digit code (`naca2412`, `NACA23012`, `2412`). NACA sections are
//! generated with [`NACA_POINTS_PER_SIDE`] cosine-spaced points per side and the published
//! (open) trailing edge. Corrections made while reading are printed to stderr as `warning:` lines.

use std::path::Path;

use anyhow::{bail, Context};
use foilsweep_geometry::naca::{naca_section, NacaDefinition, TrailingEdge};
use foilsweep_geometry::{Airfoil, GeometryReport, ParseOptions};

/// Points per side for generated NACA sections: fine enough that the leading-edge radius from
/// the spline is within 0.5 % of the definition (see the geometry crate's tests).
pub const NACA_POINTS_PER_SIDE: usize = 161;

/// The section argument shared by every subcommand that analyses one section.
#[derive(Debug, clap::Args)]
pub struct SectionArgs {
    /// Coordinate file (title line, then x y pairs) or NACA code such as naca2412 or 23012.
    #[arg(value_name = "SECTION")]
    pub section: String,
    /// Keep the file's own chord, position and rotation instead of normalising to chord 1.
    #[arg(long)]
    pub keep_chord: bool,
}

/// Where a section came from, for output metadata.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Origin {
    /// Read from this file.
    File(String),
    /// Generated from a NACA code.
    Naca,
}

/// A loaded section with its origin and the corrections made while reading it.
#[derive(Debug)]
pub struct LoadedSection {
    pub airfoil: Airfoil,
    pub origin: Origin,
    pub report: GeometryReport,
}

fn looks_like_naca(spec: &str) -> bool {
    let lower = spec.trim().to_ascii_lowercase();
    let digits = lower
        .strip_prefix("naca")
        .unwrap_or(&lower)
        .trim_start_matches([' ', '-', '_']);
    !digits.is_empty() && digits.chars().all(|c| c.is_ascii_digit())
}

/// Loads a section (see the module doc) and prints its warnings to stderr.
pub fn load_section(args: &SectionArgs) -> anyhow::Result<LoadedSection> {
    let spec = args.section.as_str();
    let path = Path::new(spec);
    let loaded = if path.is_file() {
        let text = std::fs::read_to_string(path).with_context(|| format!("cannot read {spec}"))?;
        let options = ParseOptions {
            keep_chord: args.keep_chord,
        };
        let (airfoil, report) = Airfoil::parse(&text, spec, &options)?;
        LoadedSection {
            airfoil,
            origin: Origin::File(spec.to_owned()),
            report,
        }
    } else if looks_like_naca(spec) {
        // Validate the code first so that a bad code reads as such, not as a missing file.
        NacaDefinition::parse(spec)?;
        let airfoil = naca_section(spec, NACA_POINTS_PER_SIDE, TrailingEdge::Open)?;
        LoadedSection {
            airfoil,
            origin: Origin::Naca,
            report: GeometryReport::default(),
        }
    } else if path.exists() {
        bail!("{spec} is not a regular file");
    } else {
        bail!("{spec}: no such file, and not a NACA code such as naca2412 or 23012");
    };
    for warning in &loaded.report.warnings {
        eprintln!("warning: {warning}");
    }
    Ok(loaded)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn args(section: &str) -> SectionArgs {
        SectionArgs {
            section: section.to_owned(),
            keep_chord: false,
        }
    }

    #[test]
    fn naca_codes_are_recognised() {
        for spec in ["naca2412", "NACA 23012", "2412", "naca-0012"] {
            let loaded = load_section(&args(spec)).unwrap();
            assert_eq!(loaded.origin, Origin::Naca);
            assert_eq!(loaded.airfoil.points().len(), 2 * NACA_POINTS_PER_SIDE - 1);
        }
    }

    #[test]
    fn bad_specs_give_one_line_errors() {
        let missing = load_section(&args("no/such/section.dat")).unwrap_err();
        assert_eq!(
            format!("{missing:#}"),
            "no/such/section.dat: no such file, and not a NACA code such as naca2412 or 23012"
        );
        let bad_code = load_section(&args("naca2012")).unwrap_err();
        assert_eq!(
            format!("{bad_code:#}"),
            "invalid NACA code 'naca2012': camber given without its position"
        );
    }
}
