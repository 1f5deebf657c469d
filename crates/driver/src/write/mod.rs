//! Writers of a [`Polar`]: long CSV, JSON, grid CSVs for wing tools, SVG plots and a text table.
//!
//! Every writer comes in a stream form (`write_*` to any `io::Write`, e.g. stdout) and the file
//! outputs are written through [`write_file`]: to a temporary name in the destination directory,
//! flushed and synced, then renamed over the target, so an existing file is either replaced
//! whole or left untouched. [`write_all`] writes the full set of files of a polar into one
//! directory. Missing values (failed points, absent events) are empty CSV cells, JSON `null`,
//! `-` in the table, and are not drawn.

mod csv;
mod plot;
mod table;

use std::fs::{self, File};
use std::io::{self, BufWriter, Write};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicUsize, Ordering};

use crate::output::Polar;

pub use self::csv::{grid_quantities, write_grid, write_long_csv, GridQuantity, LONG_CSV_COLUMNS};
pub use self::plot::{plot_svg, PlotKind};
pub use self::table::write_table;

/// A file that could not be written.
#[derive(Debug, thiserror::Error)]
pub enum WriteError {
    /// Creating, writing, syncing or renaming the file failed.
    #[error("cannot write {path}: {source}")]
    File {
        /// The destination file.
        path: PathBuf,
        /// The underlying error.
        source: io::Error,
    },
    /// The output directory could not be created.
    #[error("cannot create directory {path}: {source}")]
    Directory {
        /// The directory.
        path: PathBuf,
        /// The underlying error.
        source: io::Error,
    },
}

/// Writes the whole polar as pretty JSON (serde), followed by a newline.
pub fn write_json(out: &mut dyn Write, polar: &Polar) -> io::Result<()> {
    serde_json::to_writer_pretty(&mut *out, polar)?;
    writeln!(out)
}

/// Distinguishes the temporary files of concurrent writers in one process.
static TEMP_COUNTER: AtomicUsize = AtomicUsize::new(0);

/// Writes `path` by calling `write` on a temporary file in the same directory and renaming it
/// over `path` once it is complete; on any failure the temporary file is removed and `path`
/// is untouched.
pub fn write_file(
    path: &Path,
    write: impl FnOnce(&mut dyn Write) -> io::Result<()>,
) -> Result<(), WriteError> {
    let fail = |source| WriteError::File {
        path: path.to_owned(),
        source,
    };
    let file_name = path
        .file_name()
        .ok_or_else(|| fail(io::Error::other("not a file name")))?;
    let temp = path.with_file_name(format!(
        ".{}.{}-{}.tmp",
        file_name.to_string_lossy(),
        std::process::id(),
        TEMP_COUNTER.fetch_add(1, Ordering::Relaxed)
    ));
    let written = (|| {
        let mut buffered = BufWriter::new(File::create(&temp)?);
        write(&mut buffered)?;
        let file = buffered.into_inner().map_err(|e| e.into_error())?;
        file.sync_all()?;
        fs::rename(&temp, path)
    })();
    written.map_err(|source| {
        // Best effort: the temporary may not exist if creating it failed.
        let _ = fs::remove_file(&temp);
        fail(source)
    })
}

/// A file-name stem from a section name: lowercase ASCII letters and digits, other runs of
/// characters become one `_`, at most 40 characters; `section` if nothing is left.
pub fn file_stem(name: &str) -> String {
    let mut stem = String::new();
    for c in name.chars() {
        if c.is_ascii_alphanumeric() {
            stem.push(c.to_ascii_lowercase());
        } else if !stem.is_empty() && !stem.ends_with('_') {
            stem.push('_');
        }
    }
    stem.truncate(40);
    let stem = stem.trim_end_matches('_');
    if stem.is_empty() {
        "section".to_owned()
    } else {
        stem.to_owned()
    }
}

/// Writes every output of `polar` into `dir` (created if missing), names starting with `stem`:
/// `<stem>_polar.csv`, `<stem>_polar.json`, one `<stem>_grid_<quantity>.csv` per grid quantity
/// and one `<stem>_<plot>.svg` per [`PlotKind`]. Returns the paths written, in that order.
pub fn write_all(dir: &Path, stem: &str, polar: &Polar) -> Result<Vec<PathBuf>, WriteError> {
    fs::create_dir_all(dir).map_err(|source| WriteError::Directory {
        path: dir.to_owned(),
        source,
    })?;
    let mut written = Vec::new();
    let mut emit = |name: String,
                    write: &dyn Fn(&mut dyn Write) -> io::Result<()>|
     -> Result<(), WriteError> {
        let path = dir.join(name);
        write_file(&path, |out| write(out))?;
        written.push(path);
        Ok(())
    };
    emit(format!("{stem}_polar.csv"), &|out| {
        write_long_csv(out, polar)
    })?;
    emit(format!("{stem}_polar.json"), &|out| write_json(out, polar))?;
    for quantity in grid_quantities(polar) {
        emit(format!("{stem}_grid_{}.csv", quantity.name()), &|out| {
            write_grid(out, polar, quantity)
        })?;
    }
    for kind in PlotKind::ALL {
        emit(format!("{stem}_{}.svg", kind.file_suffix()), &|out| {
            out.write_all(plot_svg(polar, kind)?.as_bytes())
        })?;
    }
    Ok(written)
}

#[cfg(test)]
pub(crate) mod test_support {
    //! A small hand-made polar and unique temporary directories for the writer tests.

    use std::path::PathBuf;
    use std::sync::atomic::{AtomicUsize, Ordering};

    use crate::output::{
        Polar, PolarPoint, PolarSettings, SectionInfo, SurfaceEvents, TargetKind, CAUTION,
        SCHEMA_VERSION,
    };

    /// A fresh empty directory under the system temporary directory.
    pub fn temp_dir(tag: &str) -> PathBuf {
        static COUNTER: AtomicUsize = AtomicUsize::new(0);
        let dir = std::env::temp_dir().join(format!(
            "foilsweep-driver-{tag}-{}-{}",
            std::process::id(),
            COUNTER.fetch_add(1, Ordering::Relaxed)
        ));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).unwrap();
        dir
    }

    fn point(reynolds: f64, alpha_deg: f64, converged: bool) -> PolarPoint {
        if !converged {
            return PolarPoint::flagged(
                reynolds,
                Some(alpha_deg),
                None,
                "not converged: residual 1.3e0 after 40 iterations".to_owned(),
                Some(40),
                Some(1.3),
                5,
            );
        }
        // Invented but plausible numbers (thin-airfoil slope, parabolic drag).
        let cl = 0.11 * alpha_deg;
        let events = |x: f64| SurfaceEvents {
            transition_x_over_c: Some(x),
            transition_forced: Some(false),
            laminar_separation_x_over_c: Some(x - 0.05),
            reattachment_x_over_c: Some(x + 0.03),
            turbulent_separation_x_over_c: None,
            bubble_length_x_over_c: Some(0.08),
        };
        PolarPoint {
            reynolds,
            alpha_deg: Some(alpha_deg),
            target_cl: None,
            converged: true,
            flag: None,
            cl: Some(cl),
            cd: Some(0.006 + 0.01 * cl * cl),
            cd_friction: Some(0.005),
            cd_pressure: Some(0.001 + 0.01 * cl * cl),
            cm: Some(-0.002 * alpha_deg),
            cp_min: Some(-0.5 - 0.3 * alpha_deg.abs()),
            iterations: Some(12),
            residual: Some(1e-12),
            solves: 1,
            upper: events(0.6 - 0.05 * alpha_deg),
            lower: events(0.6 + 0.05 * alpha_deg),
        }
    }

    /// Two Reynolds numbers × four alphas; alpha 6 failed at the lower Reynolds number.
    pub fn sample_polar() -> Polar {
        let reynolds = vec![2.0e5, 1.0e6];
        let targets = vec![-2.0, 0.0, 2.0, 6.0];
        let points = reynolds
            .iter()
            .flat_map(|&re| {
                targets
                    .iter()
                    .map(move |&a| point(re, a, !(re == 2.0e5 && a == 6.0)))
            })
            .collect();
        Polar {
            schema_version: SCHEMA_VERSION,
            tool_version: "test".to_owned(),
            caution: CAUTION.to_owned(),
            section: SectionInfo {
                name: "Invented test section, 11 %".to_owned(),
                coordinate_hash: "0123456789abcdef".to_owned(),
                panels: 160,
            },
            settings: PolarSettings {
                target: TargetKind::AlphaDeg,
                mach: 0.0,
                critical_n: 9.0,
                trip_upper_x_over_c: None,
                trip_lower_x_over_c: Some(0.3),
                wake_length_chords: 1.0,
                wake_stations: 32,
                max_iterations: 40,
                tolerance: 1e-6,
                max_relocations: 10,
                transition_entrainment_fraction: 0.5,
                wake_curvature: true,
                max_continuation_step: 0.5,
                retry_cold: false,
                max_step_halvings: 3,
                give_up_after_failures: 2,
            },
            reynolds,
            targets,
            points,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::test_support::{sample_polar, temp_dir};
    use super::*;

    #[test]
    fn write_all_writes_every_file_and_json_parses_back() {
        let dir = temp_dir("all");
        let polar = sample_polar();
        let written = write_all(&dir, "invented", &polar).unwrap();
        let names: Vec<String> = written
            .iter()
            .map(|p| p.file_name().unwrap().to_string_lossy().into_owned())
            .collect();
        assert_eq!(
            names,
            [
                "invented_polar.csv",
                "invented_polar.json",
                "invented_grid_cl.csv",
                "invented_grid_cd.csv",
                "invented_grid_cm.csv",
                "invented_cl_alpha.svg",
                "invented_cl_cd.svg",
                "invented_cm_alpha.svg",
                "invented_transition_alpha.svg",
            ]
        );
        for path in &written {
            assert!(path.is_file(), "{}", path.display());
        }
        // No temporary file is left behind.
        assert_eq!(fs::read_dir(&dir).unwrap().count(), written.len());

        let json: serde_json::Value =
            serde_json::from_str(&fs::read_to_string(&written[1]).unwrap()).unwrap();
        assert_eq!(json["schema_version"], 1);
        assert_eq!(json["points"].as_array().unwrap().len(), 8);
        assert_eq!(json["section"]["panels"], 160);
        assert_eq!(json["settings"]["target"], "alpha_deg");
        let failed = &json["points"][3];
        assert_eq!(failed["converged"], false);
        assert!(failed["cl"].is_null());
        assert_eq!(json["points"][1]["cl"], 0.0);

        for path in &written[5..] {
            let svg = fs::read_to_string(path).unwrap();
            assert!(svg.contains("<svg"), "{}", path.display());
            assert!(svg.contains("engineering estimate"), "{}", path.display());
        }
        fs::remove_dir_all(&dir).unwrap();
    }

    #[test]
    fn failed_write_leaves_the_old_file_and_no_temporary() {
        let dir = temp_dir("atomic");
        let path = dir.join("kept.csv");
        fs::write(&path, "old contents\n").unwrap();
        let error = write_file(&path, |out| {
            out.write_all(b"partial")?;
            Err(io::Error::other("disk full"))
        })
        .unwrap_err();
        assert_eq!(
            error.to_string(),
            format!("cannot write {}: disk full", path.display())
        );
        assert_eq!(fs::read_to_string(&path).unwrap(), "old contents\n");
        assert_eq!(fs::read_dir(&dir).unwrap().count(), 1);
        write_file(&path, |out| out.write_all(b"new\n")).unwrap();
        assert_eq!(fs::read_to_string(&path).unwrap(), "new\n");
        fs::remove_dir_all(&dir).unwrap();
    }

    #[test]
    fn unwritable_directory_names_the_path() {
        let dir = temp_dir("blocked");
        let blocker = dir.join("a_file");
        fs::write(&blocker, "").unwrap();
        let error = write_all(&blocker.join("sub"), "x", &sample_polar()).unwrap_err();
        assert!(
            error.to_string().starts_with(&format!(
                "cannot create directory {}",
                blocker.join("sub").display()
            )),
            "{error}"
        );
        fs::remove_dir_all(&dir).unwrap();
    }

    #[test]
    fn file_stems_are_plain() {
        assert_eq!(file_stem("NACA 0012"), "naca_0012");
        assert_eq!(
            file_stem("Eppler 387 (NASA TM-4062 Table I design coordinates)"),
            "eppler_387_nasa_tm_4062_table_i_design_c"
        );
        assert_eq!(file_stem("  ***  "), "section");
    }
}
