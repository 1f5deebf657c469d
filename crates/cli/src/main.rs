//! The `foilsweep` command line: argument parsing, friendly one-line errors and exit codes.
//!
//! `main` only dispatches: each subcommand lives in its own module with an `Args` struct (clap
//! derive) and a `run(&Args, &mut dyn Write) -> anyhow::Result<()>` function that writes its
//! results to the given output. To add a subcommand, add a module, a variant to [`Command`] and
//! one arm to the `match` in `main`. Shared pieces: [`input`] (loading a section from a file or
//! a NACA code) and [`alpha`] (angle lists and ranges).
//!
//! Exit codes: 0 success, 1 a run-time error (printed as one `error:` line on stderr), 2 a
//! command-line usage error (clap's message), 3 a sweep that finished with flagged points.
//! Warnings go to stderr prefixed `warning:`.

mod alpha;
mod input;
mod inviscid;
mod section;
mod sweep;

use std::io::Write;
use std::process::ExitCode;

use clap::{Parser, Subcommand};

/// Two-dimensional airfoil analysis for low-speed wings.
#[derive(Debug, Parser)]
#[command(name = "foilsweep", version, about)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Debug, Subcommand)]
enum Command {
    /// Geometric properties of a section and any corrections made while reading it.
    Section(section::Args),
    /// Inviscid panel solution (cl, cm, minimum Cp) over a list of angles of attack.
    Inviscid(inviscid::Args),
    /// Viscous polars over Reynolds numbers and angles of attack (or target cls).
    Sweep(sweep::Args),
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    let stdout = std::io::stdout();
    let mut out = stdout.lock();
    let mut success = ExitCode::SUCCESS;
    let result = match &cli.command {
        Command::Section(args) => section::run(args, &mut out),
        Command::Inviscid(args) => inviscid::run(args, &mut out),
        Command::Sweep(args) => sweep::run(args, &mut out).map(|done| success = done.exit_code()),
    };
    let flushed = out.flush();
    match result.and(flushed.map_err(anyhow::Error::from)) {
        Ok(()) => success,
        Err(error) => {
            // `{:#}` joins the context chain on one line: "error: outer: inner".
            eprintln!("error: {error:#}");
            ExitCode::FAILURE
        }
    }
}
