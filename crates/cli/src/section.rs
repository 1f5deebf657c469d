//! `foilsweep section`: print the geometric properties of one section.

use std::io::Write;

use crate::input::{load_section, Origin, SectionArgs, NACA_POINTS_PER_SIDE};

/// Camber below this (in chord) is reported as a symmetric section: far below the 1e-5 c
/// resolution of coordinate files.
const SYMMETRIC_CAMBER: f64 = 1e-7;

/// Arguments of `foilsweep section`.
#[derive(Debug, clap::Args)]
pub struct Args {
    #[command(flatten)]
    pub source: SectionArgs,
}

/// Loads the section and writes its properties (lengths in chord fractions).
pub fn run(args: &Args, out: &mut dyn Write) -> anyhow::Result<()> {
    let loaded = load_section(&args.source)?;
    let foil = &loaded.airfoil;
    let p = foil.properties();
    let origin = match &loaded.origin {
        Origin::File(path) => format!("file {path}"),
        Origin::Naca => format!(
            "generated from the NACA definition, {NACA_POINTS_PER_SIDE} points per side, open trailing edge"
        ),
    };
    writeln!(out, "section:                 {}", foil.name())?;
    writeln!(out, "source:                  {origin}")?;
    writeln!(out, "points:                  {}", foil.points().len())?;
    writeln!(out, "chord (input units):     {:.6}", p.chord)?;
    writeln!(
        out,
        "max thickness:           {:.4} c ({:.2} %) at x/c = {:.4}",
        p.max_thickness,
        100.0 * p.max_thickness,
        p.max_thickness_x
    )?;
    if p.max_camber.abs() < SYMMETRIC_CAMBER {
        writeln!(out, "max camber:              0 (symmetric section)")?;
    } else {
        writeln!(
            out,
            "max camber:              {:.4} c ({:.2} %) at x/c = {:.4}",
            p.max_camber,
            100.0 * p.max_camber,
            p.max_camber_x
        )?;
    }
    writeln!(
        out,
        "leading-edge radius:     {:.5} c",
        p.leading_edge_radius
    )?;
    writeln!(
        out,
        "trailing-edge thickness: {:.5} c",
        p.trailing_edge_thickness
    )?;
    writeln!(
        out,
        "trailing-edge angle:     {:.2} deg",
        p.trailing_edge_angle_deg
    )?;
    writeln!(out, "area:                    {:.5} c^2", p.area)?;
    writeln!(out, "coordinate hash:         {}", foil.coordinate_hash())?;
    writeln!(
        out,
        "corrections:             {}",
        loaded.report.warnings.len()
    )?;
    Ok(())
}
