//! CSV writers: the long table (one row per point) and the grids for wing tools (one file per
//! quantity, one row per target, one column per Reynolds number).

use std::io::{self, Write};

use crate::output::{Polar, PolarPoint, SurfaceEvents, TargetKind};

/// Column names of the long CSV, in order.
pub const LONG_CSV_COLUMNS: [&str; 26] = [
    "reynolds",
    "alpha_deg",
    "target_cl",
    "converged",
    "flag",
    "cl",
    "cd",
    "cd_friction",
    "cd_pressure",
    "cm_quarter_chord",
    "cp_min",
    "iterations",
    "residual",
    "solves",
    "upper_transition_x_over_c",
    "upper_transition_forced",
    "upper_laminar_separation_x_over_c",
    "upper_reattachment_x_over_c",
    "upper_turbulent_separation_x_over_c",
    "upper_bubble_length_x_over_c",
    "lower_transition_x_over_c",
    "lower_transition_forced",
    "lower_laminar_separation_x_over_c",
    "lower_reattachment_x_over_c",
    "lower_turbulent_separation_x_over_c",
    "lower_bubble_length_x_over_c",
];

/// A cell: the value's shortest round-trip text, or empty.
fn cell<T: ToString>(value: Option<T>) -> String {
    value.map_or_else(String::new, |v| v.to_string())
}

fn surface_cells(events: &SurfaceEvents) -> [String; 6] {
    [
        cell(events.transition_x_over_c),
        cell(events.transition_forced),
        cell(events.laminar_separation_x_over_c),
        cell(events.reattachment_x_over_c),
        cell(events.turbulent_separation_x_over_c),
        cell(events.bubble_length_x_over_c),
    ]
}

fn long_row(point: &PolarPoint) -> Vec<String> {
    let mut row = vec![
        point.reynolds.to_string(),
        cell(point.alpha_deg),
        cell(point.target_cl),
        point.converged.to_string(),
        point.flag.clone().unwrap_or_default(),
        cell(point.cl),
        cell(point.cd),
        cell(point.cd_friction),
        cell(point.cd_pressure),
        cell(point.cm),
        cell(point.cp_min),
        cell(point.iterations),
        cell(point.residual),
        point.solves.to_string(),
    ];
    row.extend(surface_cells(&point.upper));
    row.extend(surface_cells(&point.lower));
    row
}

/// Writes the long CSV: one header row ([`LONG_CSV_COLUMNS`]), then one row per point in the
/// polar's order. Flags are quoted when they contain commas.
pub fn write_long_csv(out: &mut dyn Write, polar: &Polar) -> io::Result<()> {
    let mut writer = ::csv::Writer::from_writer(out);
    writer.write_record(LONG_CSV_COLUMNS)?;
    for point in &polar.points {
        writer.write_record(long_row(point))?;
    }
    writer.flush()
}

/// A quantity tabulated in a grid CSV.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum GridQuantity {
    /// Lift coefficient.
    Cl,
    /// Drag coefficient.
    Cd,
    /// Quarter-chord pitching moment.
    Cm,
    /// Angle of attack in degrees (in a cl sweep).
    AlphaDeg,
}

impl GridQuantity {
    /// Name used in file names and headers.
    pub fn name(self) -> &'static str {
        match self {
            GridQuantity::Cl => "cl",
            GridQuantity::Cd => "cd",
            GridQuantity::Cm => "cm",
            GridQuantity::AlphaDeg => "alpha_deg",
        }
    }

    fn of(self, point: &PolarPoint) -> Option<f64> {
        match self {
            GridQuantity::Cl => point.cl,
            GridQuantity::Cd => point.cd,
            GridQuantity::Cm => point.cm,
            GridQuantity::AlphaDeg => point.alpha_deg,
        }
    }
}

/// The grids of a polar: cl, cd, cm for an alpha sweep; alpha, cd, cm for a cl sweep.
pub fn grid_quantities(polar: &Polar) -> [GridQuantity; 3] {
    match polar.settings.target {
        TargetKind::AlphaDeg => [GridQuantity::Cl, GridQuantity::Cd, GridQuantity::Cm],
        TargetKind::Cl => [GridQuantity::AlphaDeg, GridQuantity::Cd, GridQuantity::Cm],
    }
}

/// Writes one grid: the first column is the swept target (`alpha_deg` or `target_cl`) in the
/// requested order, then one column per Reynolds number headed `re_<value>` (e.g.
/// `re_200000`). A cell is empty where the point is flagged (failed, skipped or outside the
/// model), so a wing tool never interpolates through an unconverged value.
pub fn write_grid(out: &mut dyn Write, polar: &Polar, quantity: GridQuantity) -> io::Result<()> {
    let mut writer = ::csv::Writer::from_writer(out);
    let key = match polar.settings.target {
        TargetKind::AlphaDeg => "alpha_deg",
        TargetKind::Cl => "target_cl",
    };
    let mut header = vec![key.to_owned()];
    header.extend(polar.reynolds.iter().map(|re| format!("re_{re}")));
    writer.write_record(&header)?;
    let columns: Vec<Vec<&PolarPoint>> = polar
        .reynolds
        .iter()
        .map(|&re| polar.points_at(re).collect())
        .collect();
    for (row, target) in polar.targets.iter().enumerate() {
        let mut record = vec![target.to_string()];
        record.extend(columns.iter().map(|column| {
            let value = column
                .get(row)
                .filter(|p| p.is_clean())
                .and_then(|p| quantity.of(p));
            cell(value)
        }));
        writer.write_record(&record)?;
    }
    writer.flush()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::write::test_support::sample_polar;

    fn text(write: impl FnOnce(&mut dyn Write) -> io::Result<()>) -> String {
        let mut buffer = Vec::new();
        write(&mut buffer).unwrap();
        String::from_utf8(buffer).unwrap()
    }

    #[test]
    fn long_csv_has_one_header_and_one_row_per_point() {
        let polar = sample_polar();
        let text = text(|out| write_long_csv(out, &polar));
        let mut reader = ::csv::Reader::from_reader(text.as_bytes());
        assert_eq!(reader.headers().unwrap(), LONG_CSV_COLUMNS.as_slice());
        let rows: Vec<::csv::StringRecord> = reader.records().map(Result::unwrap).collect();
        assert_eq!(rows.len(), polar.points.len());
        for row in &rows {
            assert_eq!(row.len(), LONG_CSV_COLUMNS.len());
        }
        // The failed point: flagged, no coefficients, iterations kept.
        let failed = &rows[3];
        assert_eq!(&failed[0], "200000");
        assert_eq!(&failed[1], "6");
        assert_eq!(&failed[3], "false");
        assert!(failed[4].starts_with("not converged"));
        assert_eq!(&failed[5], "");
        assert_eq!(&failed[11], "40");
        // A converged point round-trips its numbers.
        let good = &rows[6];
        assert_eq!(good[5].parse::<f64>().unwrap(), polar.points[6].cl.unwrap());
        assert_eq!(&good[15], "false");
    }

    #[test]
    fn grid_has_one_row_per_target_and_one_column_per_reynolds_number() {
        let polar = sample_polar();
        let text = text(|out| write_grid(out, &polar, GridQuantity::Cd));
        let lines: Vec<&str> = text.lines().collect();
        assert_eq!(lines[0], "alpha_deg,re_200000,re_1000000");
        assert_eq!(lines.len(), 1 + polar.targets.len());
        for line in &lines {
            assert_eq!(line.split(',').count(), 3);
        }
        // alpha 6 failed at Re 2e5 only.
        let last: Vec<&str> = lines[4].split(',').collect();
        assert_eq!(last[0], "6");
        assert_eq!(last[1], "");
        assert_eq!(last[2].parse::<f64>().unwrap(), polar.points[7].cd.unwrap());
    }
}
