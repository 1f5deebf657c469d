//! A readable text table of a polar: one block per Reynolds number.

use std::io::{self, Write};

use crate::output::{Polar, PolarPoint, SurfaceEvents, TargetKind};

/// `value` with `decimals` decimals right-aligned in `width`, or `-` when missing.
fn number(value: Option<f64>, width: usize, decimals: usize) -> String {
    match value {
        Some(v) => format!("{v:>width$.decimals$}"),
        None => format!("{:>width$}", "-"),
    }
}

/// Width of a bubble cell.
const BUBBLE_WIDTH: usize = 11;

/// The laminar separation bubble of a surface as "S-R" in x/c, "S-open" when the layer that
/// separates laminar does not reattach before the trailing edge, `-` without laminar
/// separation.
fn bubble(events: &SurfaceEvents) -> String {
    let cell = match (
        events.laminar_separation_x_over_c,
        events.bubble_length_x_over_c,
    ) {
        (Some(s), Some(length)) => format!("{s:.3}-{:.3}", s + length),
        (Some(s), None) => format!("{s:.3}-open"),
        (None, _) => "-".to_owned(),
    };
    format!("{cell:>BUBBLE_WIDTH$}")
}

fn row(point: &PolarPoint, target: TargetKind) -> String {
    let mut cells = Vec::new();
    if target == TargetKind::Cl {
        cells.push(number(point.target_cl, 9, 3));
    }
    cells.extend([
        number(point.alpha_deg, 8, 2),
        number(point.cl, 8, 4),
        number(point.cd, 9, 5),
        number(point.cm, 8, 4),
        number(point.lift_to_drag(), 7, 1),
        number(point.upper.transition_x_over_c, 9, 3),
        number(point.lower.transition_x_over_c, 9, 3),
        bubble(&point.upper),
        bubble(&point.lower),
    ]);
    let mut line = cells.join(" ");
    if let Some(flag) = &point.flag {
        line.push_str("  ");
        line.push_str(flag);
    }
    line
}

/// Writes the table: a heading with the section and settings, then per Reynolds number a
/// block with alpha (deg), cl, cd, cm (quarter chord), L/D, transition x/c on the upper and
/// lower surface, the laminar separation bubble on each (laminar separation to reattachment,
/// x/c, or "open" when the separated layer does not reattach before the trailing edge), and the
/// flag of flagged points. Missing values print as `-`.
pub fn write_table(out: &mut dyn Write, polar: &Polar) -> io::Result<()> {
    let settings = &polar.settings;
    writeln!(
        out,
        "{} ({} panels), Mach {}, N_crit {:.2}",
        polar.section.name, polar.section.panels, settings.mach, settings.critical_n
    )?;
    let trip = |x: Option<f64>| x.map_or_else(|| "free".to_owned(), |x| format!("x/c {x}"));
    writeln!(
        out,
        "transition: upper {}, lower {}",
        trip(settings.trip_upper_x_over_c),
        trip(settings.trip_lower_x_over_c)
    )?;
    let mut header = Vec::new();
    if settings.target == TargetKind::Cl {
        header.push(format!("{:>9}", "target_cl"));
    }
    header.extend([
        format!("{:>8}", "alpha"),
        format!("{:>8}", "cl"),
        format!("{:>9}", "cd"),
        format!("{:>8}", "cm"),
        format!("{:>7}", "L/D"),
        format!("{:>9}", "tr_upper"),
        format!("{:>9}", "tr_lower"),
        format!("{:>BUBBLE_WIDTH$}", "bubble_up"),
        format!("{:>BUBBLE_WIDTH$}", "bubble_lo"),
    ]);
    let header = format!("{}  flag", header.join(" "));
    for &reynolds in &polar.reynolds {
        writeln!(out)?;
        writeln!(out, "Reynolds number {reynolds}")?;
        writeln!(out, "{header}")?;
        for point in polar.points_at(reynolds) {
            writeln!(out, "{}", row(point, settings.target))?;
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::write::test_support::sample_polar;

    #[test]
    fn table_has_a_block_per_reynolds_number_and_shows_flags() {
        let polar = sample_polar();
        let mut buffer = Vec::new();
        write_table(&mut buffer, &polar).unwrap();
        let text = String::from_utf8(buffer).unwrap();
        assert_eq!(text.matches("Reynolds number ").count(), 2);
        assert!(text.contains("Reynolds number 200000\n"));
        // Header, two block titles and headers, eight point rows, two blank lines.
        assert_eq!(text.lines().count(), 2 + 2 * 3 + 8);
        let failed = text.lines().find(|l| l.contains("not converged")).unwrap();
        assert!(failed.trim_start().starts_with("6.00        -"), "{failed}");
        // cl 0.22 / cd 0.006484 at alpha 2 (the invented sample): L/D 33.9.
        assert!(text.contains("   33.9"), "{text}");
        // Upper bubble at alpha 2: transition 0.5, separation 0.45, reattachment 0.53.
        assert!(text.contains("0.450-0.530"), "{text}");
    }

    #[test]
    fn bubble_cell_shows_separation_to_reattachment_or_open() {
        let closed = SurfaceEvents {
            laminar_separation_x_over_c: Some(0.42),
            reattachment_x_over_c: Some(0.64),
            bubble_length_x_over_c: Some(0.22),
            ..SurfaceEvents::default()
        };
        assert_eq!(bubble(&closed).trim(), "0.420-0.640");
        let open = SurfaceEvents {
            laminar_separation_x_over_c: Some(0.43),
            ..SurfaceEvents::default()
        };
        assert_eq!(bubble(&open).trim(), "0.430-open");
        assert_eq!(bubble(&SurfaceEvents::default()).trim(), "-");
        assert_eq!(bubble(&closed).len(), BUBBLE_WIDTH);
    }
}
