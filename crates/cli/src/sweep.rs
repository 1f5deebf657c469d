//! `foilsweep sweep`: viscous polars of one section over Reynolds numbers and alphas (or cls).
//!
//! The section is re-panelled (default 160 panels) and swept by `foilsweep_driver::run_polar`:
//! Reynolds numbers in parallel, alphas by continuation with retries. The result is printed to
//! stdout as a table, CSV or JSON; with `--out DIR` the long CSV, the JSON, the grid CSVs and the
//! SVG plots are written into DIR as well. Reynolds numbers accept `2e5`, `200000`, `200k`,
//! `1.5M`. Transition is set by `--n-factor` or by a free-stream turbulence level
//! `--turbulence` in percent (Mack 1977, see the boundary-layer crate).
//!
//! Exit status: 0 when every point converged unflagged, 3 when some points are flagged (a
//! `warning:` line on stderr says how many), 1 on a run-time error, 2 on a usage error (bad
//! numbers and out-of-range values are refused by the argument parser).

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::Context;
use clap::ValueEnum;
use foilsweep_boundary_layer::closure::transition::critical_n_from_turbulence;
use foilsweep_driver::progress::SweepProgress;
use foilsweep_driver::write::{file_stem, write_all, write_json, write_long_csv, write_table};
use foilsweep_driver::{
    check_critical_n, check_mach, check_reynolds, check_trip, run_polar, PolarRequest, Targets,
    CAUTION,
};

use crate::alpha::{parse_alpha_list, AlphaList};
use crate::input::{load_section, Origin, SectionArgs};

/// Exit status when some points are flagged.
const EXIT_FLAGGED: u8 = 3;

/// Output layout on stdout.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Format {
    /// One block per Reynolds number, aligned columns.
    Table,
    /// One header row, one row per point.
    Csv,
    /// The whole polar with its section and settings.
    Json,
}

/// Reynolds numbers, in the order given.
#[derive(Debug, Clone, PartialEq)]
pub struct ReynoldsList(pub Vec<f64>);

/// One Reynolds number: a plain number (`200000`, `2e5`) or with a `k` (1e3) or `M` (1e6)
/// suffix (`200k`, `1.5M`), within 1e3..1e9.
fn parse_reynolds(text: &str) -> Result<f64, String> {
    let text = text.trim();
    let (digits, scale) = if let Some(d) = text.strip_suffix(['k', 'K']) {
        (d, 1.0e3)
    } else if let Some(d) = text.strip_suffix('M') {
        (d, 1.0e6)
    } else {
        (text, 1.0)
    };
    let value: f64 = digits
        .parse()
        .map_err(|_| format!("'{text}' is not a Reynolds number such as 2e5, 200000 or 200k"))?;
    check_reynolds(value * scale).map_err(|e| e.to_string())
}

/// A comma list of Reynolds numbers.
fn parse_reynolds_list(text: &str) -> Result<ReynoldsList, String> {
    text.split(',')
        .map(parse_reynolds)
        .collect::<Result<_, _>>()
        .map(ReynoldsList)
}

fn parse_number(text: &str) -> Result<f64, String> {
    text.trim()
        .parse::<f64>()
        .map_err(|_| format!("'{}' is not a number", text.trim()))
}

fn parse_mach(text: &str) -> Result<f64, String> {
    check_mach(parse_number(text)?).map_err(|e| e.to_string())
}

fn parse_n_factor(text: &str) -> Result<f64, String> {
    check_critical_n(parse_number(text)?).map_err(|e| e.to_string())
}

fn parse_trip(text: &str) -> Result<f64, String> {
    check_trip(parse_number(text)?).map_err(|e| e.to_string())
}

/// Critical N-factor from a turbulence level in percent (Mack 1977 through the boundary-layer
/// crate, which also checks the range).
fn n_factor_from_turbulence_percent(percent: f64) -> Result<f64, String> {
    critical_n_from_turbulence(percent / 100.0).map_err(|e| format!("turbulence {percent} %: {e}"))
}

fn parse_turbulence(text: &str) -> Result<f64, String> {
    let percent = parse_number(text)?;
    n_factor_from_turbulence_percent(percent).map(|_| percent)
}

/// Arguments of `foilsweep sweep`.
#[derive(Debug, clap::Args)]
#[command(group(clap::ArgGroup::new("target").required(true).args(["alpha", "cl"])))]
pub struct Args {
    #[command(flatten)]
    pub source: SectionArgs,
    /// Reynolds numbers on the chord, comma separated: 2e5,3e5 or 200k,300k.
    #[arg(long, value_parser = parse_reynolds_list)]
    pub re: ReynoldsList,
    /// Angles of attack in degrees: a list (-2,0,2.5) or an inclusive range start:end:step.
    #[arg(long, allow_hyphen_values = true, value_parser = parse_alpha_list)]
    pub alpha: Option<AlphaList>,
    /// Target lift coefficients instead of angles: a list or a range start:end:step.
    #[arg(long, allow_hyphen_values = true, value_parser = parse_alpha_list)]
    pub cl: Option<AlphaList>,
    /// Free-stream Mach number (Kármán–Tsien correction of Cp only).
    #[arg(long, default_value_t = 0.0, value_parser = parse_mach)]
    pub mach: f64,
    /// Critical N-factor of the e^N transition method (default 9).
    #[arg(long, value_parser = parse_n_factor, conflicts_with = "turbulence")]
    pub n_factor: Option<f64>,
    /// Free-stream turbulence in percent, converted to a critical N-factor (Mack 1977).
    #[arg(long, value_parser = parse_turbulence)]
    pub turbulence: Option<f64>,
    /// Forced transition on the upper surface at this x/c.
    #[arg(long, value_parser = parse_trip)]
    pub trip_upper: Option<f64>,
    /// Forced transition on the lower surface at this x/c.
    #[arg(long, value_parser = parse_trip)]
    pub trip_lower: Option<f64>,
    /// Number of panels after re-panelling.
    #[arg(long, default_value_t = 160)]
    pub panels: usize,
    /// Leave the wake-curvature term out of the coupling (first-order coupling only; lift about
    /// 1 % higher).
    #[arg(long)]
    pub no_wake_curvature: bool,
    /// Also write CSV, JSON, grid CSVs and SVG plots into this directory.
    #[arg(long, value_name = "DIR")]
    pub out: Option<PathBuf>,
    /// Output layout on stdout.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
}

/// How a sweep ended, when it ran.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Completion {
    /// Every point converged and none is flagged.
    Clean,
    /// Some points are flagged (reported on stderr).
    Flagged,
}

impl Completion {
    /// The process exit status for this completion.
    pub fn exit_code(self) -> ExitCode {
        match self {
            Completion::Clean => ExitCode::SUCCESS,
            Completion::Flagged => ExitCode::from(EXIT_FLAGGED),
        }
    }
}

/// File-name stem for the outputs: the coordinate file's own stem, or the NACA designation.
fn output_stem(origin: &Origin, name: &str) -> String {
    match origin {
        Origin::File(path) => Path::new(path)
            .file_stem()
            .map_or_else(|| file_stem(name), |s| file_stem(&s.to_string_lossy())),
        Origin::Naca => file_stem(name),
    }
}

/// Runs the sweep, prints it, writes files when asked, and reports flagged points on stderr.
pub fn run(args: &Args, out: &mut dyn Write) -> anyhow::Result<Completion> {
    let loaded = load_section(&args.source)?;
    let targets = match (&args.alpha, &args.cl) {
        (Some(alpha), _) => Targets::AlphaDeg(alpha.0.clone()),
        (None, Some(cl)) => Targets::Cl(cl.0.clone()),
        // clap's required group makes this unreachable; keep a plain error rather than panic.
        (None, None) => anyhow::bail!("give --alpha or --cl"),
    };
    let mut request = PolarRequest::new(&loaded.airfoil, args.panels, args.re.0.clone(), targets)
        .with_context(|| format!("section {}", loaded.airfoil.name()))?;
    request.mach = args.mach;
    request.critical_n = match (args.n_factor, args.turbulence) {
        (Some(n), _) => n,
        (None, Some(percent)) => {
            n_factor_from_turbulence_percent(percent).map_err(anyhow::Error::msg)?
        }
        (None, None) => request.critical_n,
    };
    request.trip_upper_x_over_c = args.trip_upper;
    request.trip_lower_x_over_c = args.trip_lower;
    request.viscous.wake_curvature = !args.no_wake_curvature;
    request.check()?;

    eprintln!("caution: {CAUTION}");
    let total = request.reynolds.len() * request.targets.values().len();
    let progress = SweepProgress::new(total);
    let polar = run_polar(&request, Some(&|point| progress.point_done(point)))?;
    progress.finish();

    match args.format {
        Format::Table => write_table(out, &polar)?,
        Format::Csv => write_long_csv(out, &polar)?,
        Format::Json => write_json(out, &polar)?,
    }
    if let Some(dir) = &args.out {
        let stem = output_stem(&loaded.origin, loaded.airfoil.name());
        let written = write_all(dir, &stem, &polar)?;
        eprintln!("wrote {} files to {}", written.len(), dir.display());
    }

    let failed = polar.failed_count();
    let outside = polar
        .points
        .iter()
        .filter(|p| p.converged && p.flag.is_some())
        .count();
    if failed > 0 {
        eprintln!(
            "warning: {failed} of {total} points did not converge; they are flagged in the outputs"
        );
    }
    if outside > 0 {
        eprintln!(
            "warning: {outside} of {total} points are locally supersonic, outside the model; \
             they are flagged in the outputs"
        );
    }
    let open = polar.points.iter().filter(|p| p.has_open_bubble()).count();
    if open > 0 {
        eprintln!(
            "note: at {open} of {total} points a surface separates laminar and does not reattach \
             before the trailing edge (bubble 'open' in the table); far upstream of the trailing \
             edge this is where the model is least reliable (README, Cautions)"
        );
    }
    Ok(if polar.flagged_count() > 0 {
        Completion::Flagged
    } else {
        Completion::Clean
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reynolds_numbers_in_three_spellings() {
        assert_eq!(
            parse_reynolds_list("2e5,200000,200k,1.5M").unwrap().0,
            vec![2.0e5, 2.0e5, 2.0e5, 1.5e6]
        );
        assert_eq!(
            parse_reynolds("50").unwrap_err(),
            "Reynolds number 50 is outside 1e3..1e9"
        );
        assert_eq!(
            parse_reynolds("2e5x").unwrap_err(),
            "'2e5x' is not a Reynolds number such as 2e5, 200000 or 200k"
        );
        assert!(parse_reynolds("nan").is_err());
        assert!(parse_reynolds("5G").is_err());
    }

    #[test]
    fn turbulence_in_percent_gives_the_mack_n_factor() {
        // Mack (1977): N = -8.43 - 2.4 ln(Tu); Tu = 0.07 % = 0.0007 gives N = 9.0046 (by hand;
        // tolerance 1e-4 is the rounding of that hand value). Checks the percent conversion.
        let n = n_factor_from_turbulence_percent(0.07).unwrap();
        assert!((n - 9.0046).abs() < 1e-4, "{n}");
        assert!(parse_turbulence("40").is_err());
        assert_eq!(
            parse_trip("1.2").unwrap_err(),
            "trip position 1.2 is outside 0..1 x/c"
        );
        assert_eq!(
            parse_mach("0.95").unwrap_err(),
            "Mach number 0.95 is outside 0..0.9"
        );
    }

    #[test]
    fn output_stems() {
        assert_eq!(
            output_stem(
                &Origin::File("airfoils/e387.dat".to_owned()),
                "Eppler 387 (x)"
            ),
            "e387"
        );
        assert_eq!(output_stem(&Origin::Naca, "NACA 0012"), "naca_0012");
    }
}
