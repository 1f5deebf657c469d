//! `foilsweep inviscid`: inviscid panel solution over a list of angles of attack.
//!
//! The section is re-panelled (default 160 panels), the panel solver is built once, and each
//! angle is solved by superposition. Columns: `alpha_deg`, `cl` (circulation), `cl_pressure`
//! (pressure integration), `cm_c4` (quarter chord, nose-up positive), `cp_min` and its node's
//! `cp_min_x` (x/c). With `--mach` > 0 the pressure coefficients `cp_min` are corrected by
//! Kármán–Tsien; cl and cm stay incompressible (the panel crate does not yet integrate a
//! corrected Cp), and a warning flags angles where cp_min passes the critical Cp.

use std::io::Write;

use anyhow::{bail, Context};
use clap::ValueEnum;
use foilsweep_panel::{critical_cp, karman_tsien_cp, PanelSolver};

use crate::alpha::{parse_alpha_list, AlphaList};
use crate::input::{load_section, SectionArgs};

/// Output layout.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Format {
    /// Aligned columns for reading.
    Table,
    /// One header row, one row per angle.
    Csv,
    /// One object with the section, the settings and one entry per angle.
    Json,
}

/// Arguments of `foilsweep inviscid`.
#[derive(Debug, clap::Args)]
pub struct Args {
    #[command(flatten)]
    pub source: SectionArgs,
    /// Angles of attack in degrees: a list (-2,0,2.5) or an inclusive range start:end:step.
    #[arg(long, allow_hyphen_values = true, value_parser = parse_alpha_list)]
    pub alpha: AlphaList,
    /// Number of panels after re-panelling.
    #[arg(long, default_value_t = 160)]
    pub panels: usize,
    /// Free-stream Mach number for the Kármán–Tsien correction of Cp (0 = incompressible).
    #[arg(long, default_value_t = 0.0)]
    pub mach: f64,
    /// Output layout.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
}

/// One solved angle of attack.
struct Row {
    alpha_deg: f64,
    cl: f64,
    cl_pressure: f64,
    cm_c4: f64,
    cp_min: f64,
    cp_min_x: f64,
}

const COLUMNS: [&str; 6] = [
    "alpha_deg",
    "cl",
    "cl_pressure",
    "cm_c4",
    "cp_min",
    "cp_min_x",
];

impl Row {
    fn values(&self) -> [f64; 6] {
        [
            self.alpha_deg,
            self.cl,
            self.cl_pressure,
            self.cm_c4,
            self.cp_min,
            self.cp_min_x,
        ]
    }
}

/// Solves every requested angle and writes the table.
pub fn run(args: &Args, out: &mut dyn Write) -> anyhow::Result<()> {
    if !(0.0..1.0).contains(&args.mach) {
        bail!("--mach must be at least 0 and below 1, got {}", args.mach);
    }
    let alphas = &args.alpha.0;
    let loaded = load_section(&args.source)?;
    let panelled = loaded.airfoil.repanel(args.panels)?;
    let solver = PanelSolver::new(panelled.points())
        .with_context(|| format!("panel solver for {}", panelled.name()))?;
    let critical = critical_cp(args.mach);
    let mut rows = Vec::with_capacity(alphas.len());
    for &alpha_deg in alphas {
        let solution = solver.solve(alpha_deg.to_radians());
        let (index, cp0) = solution
            .cp
            .iter()
            .copied()
            .enumerate()
            .min_by(|a, b| a.1.total_cmp(&b.1))
            .context("panel solution without nodes")?;
        let cp_min = if args.mach > 0.0 {
            karman_tsien_cp(cp0, args.mach)
        } else {
            cp0
        };
        if args.mach > 0.0 && (cp_min.is_nan() || cp_min < critical) {
            eprintln!(
                "warning: alpha {alpha_deg} deg: cp_min {cp_min:.3} is beyond the critical \
                 {critical:.3}: locally supersonic, outside the Karman-Tsien model"
            );
        }
        rows.push(Row {
            alpha_deg,
            cl: solution.cl,
            cl_pressure: solution.cl_pressure,
            cm_c4: solution.cm_c4,
            cp_min,
            cp_min_x: panelled.points()[index].x,
        });
    }
    match args.format {
        Format::Table => write_table(out, &rows),
        Format::Csv => write_csv(out, &rows),
        Format::Json => write_json(out, args, &panelled, &rows),
    }
}

fn write_table(out: &mut dyn Write, rows: &[Row]) -> anyhow::Result<()> {
    let header: Vec<String> = COLUMNS.iter().map(|c| format!("{c:>12}")).collect();
    writeln!(out, "{}", header.join(""))?;
    for row in rows {
        let cells: Vec<String> = row.values().iter().map(|v| format!("{v:>12.5}")).collect();
        writeln!(out, "{}", cells.join(""))?;
    }
    Ok(())
}

fn write_csv(out: &mut dyn Write, rows: &[Row]) -> anyhow::Result<()> {
    writeln!(out, "{}", COLUMNS.join(","))?;
    for row in rows {
        let cells: Vec<String> = row.values().iter().map(|v| v.to_string()).collect();
        writeln!(out, "{}", cells.join(","))?;
    }
    Ok(())
}

/// A JSON string literal (RFC 8259 escapes).
fn json_string(text: &str) -> String {
    let mut s = String::with_capacity(text.len() + 2);
    s.push('"');
    for c in text.chars() {
        match c {
            '"' => s.push_str("\\\""),
            '\\' => s.push_str("\\\\"),
            c if (c as u32) < 0x20 => s.push_str(&format!("\\u{:04x}", c as u32)),
            c => s.push(c),
        }
    }
    s.push('"');
    s
}

/// A JSON number, or null for NaN/infinity (which JSON cannot hold).
fn json_number(value: f64) -> String {
    if value.is_finite() {
        value.to_string()
    } else {
        "null".to_owned()
    }
}

fn write_json(
    out: &mut dyn Write,
    args: &Args,
    panelled: &foilsweep_geometry::Airfoil,
    rows: &[Row],
) -> anyhow::Result<()> {
    let points: Vec<String> = rows
        .iter()
        .map(|row| {
            let fields: Vec<String> = COLUMNS
                .iter()
                .zip(row.values())
                .map(|(name, v)| format!("{}: {}", json_string(name), json_number(v)))
                .collect();
            format!("    {{{}}}", fields.join(", "))
        })
        .collect();
    writeln!(out, "{{")?;
    writeln!(out, "  \"schema_version\": 1,")?;
    writeln!(
        out,
        "  \"tool_version\": {},",
        json_string(env!("CARGO_PKG_VERSION"))
    )?;
    writeln!(out, "  \"analysis\": \"inviscid panel\",")?;
    writeln!(out, "  \"section\": {},", json_string(panelled.name()))?;
    writeln!(
        out,
        "  \"coordinate_hash\": {},",
        json_string(&panelled.coordinate_hash())
    )?;
    writeln!(out, "  \"panels\": {},", args.panels)?;
    writeln!(out, "  \"mach\": {},", json_number(args.mach))?;
    writeln!(out, "  \"points\": [\n{}\n  ]", points.join(",\n"))?;
    writeln!(out, "}}")?;
    Ok(())
}
