//! SVG plots of a polar (plotters, SVG backend): cl–alpha, cl–cd, cm–alpha and transition
//! x/c–alpha, one series per Reynolds number.
//!
//! Only unflagged converged points are drawn. Lines join neighbouring targets only; a flagged
//! point breaks the line, so no curve is drawn through a point that was not computed. A point
//! where either surface separates laminar and does not reattach before the trailing edge (an
//! open bubble, [`crate::output::SurfaceEvents::bubble_is_open`]) gets a black ring and one
//! legend entry, so the states the model predicts least reliably stand out. Every caption says
//! the numbers are an engineering estimate.

use std::io;

use plotters::prelude::*;

use crate::output::{Polar, PolarPoint};

/// Which plot.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PlotKind {
    /// Lift coefficient against angle of attack.
    ClAlpha,
    /// Lift coefficient against drag coefficient (drag polar).
    ClCd,
    /// Quarter-chord moment coefficient against angle of attack.
    CmAlpha,
    /// Transition x/c on both surfaces against angle of attack.
    TransitionAlpha,
}

impl PlotKind {
    /// Every plot, in the order [`crate::write::write_all`] writes them.
    pub const ALL: [PlotKind; 4] = [
        PlotKind::ClAlpha,
        PlotKind::ClCd,
        PlotKind::CmAlpha,
        PlotKind::TransitionAlpha,
    ];

    /// File-name suffix (`cl_alpha`, …).
    pub fn file_suffix(self) -> &'static str {
        match self {
            PlotKind::ClAlpha => "cl_alpha",
            PlotKind::ClCd => "cl_cd",
            PlotKind::CmAlpha => "cm_alpha",
            PlotKind::TransitionAlpha => "transition_alpha",
        }
    }

    fn title(self) -> &'static str {
        match self {
            PlotKind::ClAlpha => "lift curve",
            PlotKind::ClCd => "drag polar",
            PlotKind::CmAlpha => "pitching moment",
            PlotKind::TransitionAlpha => "transition position",
        }
    }

    fn axis_labels(self) -> (&'static str, &'static str) {
        match self {
            PlotKind::ClAlpha => ("angle of attack alpha (deg)", "lift coefficient cl (-)"),
            PlotKind::ClCd => ("drag coefficient cd (-)", "lift coefficient cl (-)"),
            PlotKind::CmAlpha => (
                "angle of attack alpha (deg)",
                "moment coefficient cm, quarter chord (-)",
            ),
            PlotKind::TransitionAlpha => ("angle of attack alpha (deg)", "transition x/c (-)"),
        }
    }

    /// The curves of one point: (label suffix, (x, y)) per curve; `None` where not drawn.
    fn values(self, point: &PolarPoint) -> Vec<Option<(f64, f64)>> {
        let pair = |x: Option<f64>, y: Option<f64>| x.zip(y);
        match self {
            PlotKind::ClAlpha => vec![pair(point.alpha_deg, point.cl)],
            PlotKind::ClCd => vec![pair(point.cd, point.cl)],
            PlotKind::CmAlpha => vec![pair(point.alpha_deg, point.cm)],
            PlotKind::TransitionAlpha => vec![
                pair(point.alpha_deg, point.upper.transition_x_over_c),
                pair(point.alpha_deg, point.lower.transition_x_over_c),
            ],
        }
    }

    fn curve_names(self) -> &'static [&'static str] {
        match self {
            PlotKind::TransitionAlpha => &["upper", "lower"],
            _ => &[""],
        }
    }
}

/// Legend entry of the rings around open-bubble points.
const OPEN_BUBBLE_LABEL: &str = "laminar separation not reattaching (open bubble)";

/// One drawn curve: its legend label, its unbroken segments and its open-bubble points.
struct Curve {
    label: String,
    segments: Vec<Vec<(f64, f64)>>,
    open_bubble: Vec<(f64, f64)>,
    colour: usize,
    triangles: bool,
}

fn curves(polar: &Polar, kind: PlotKind) -> Vec<Curve> {
    let mut curves = Vec::new();
    for (colour, &reynolds) in polar.reynolds.iter().enumerate() {
        // Points in order of the requested target, so lines follow the sweep.
        let mut points: Vec<(f64, &PolarPoint)> = polar
            .targets
            .iter()
            .copied()
            .zip(polar.points_at(reynolds))
            .collect();
        points.sort_by(|a, b| a.0.total_cmp(&b.0));
        for (curve, name) in kind.curve_names().iter().enumerate() {
            let mut segments = vec![Vec::new()];
            let mut open_bubble = Vec::new();
            for (_, point) in &points {
                let value = if point.is_clean() {
                    kind.values(point)[curve].filter(|(x, y)| x.is_finite() && y.is_finite())
                } else {
                    None
                };
                if point.has_open_bubble() {
                    open_bubble.extend(value);
                }
                match (value, segments.last_mut()) {
                    (Some(xy), Some(segment)) => segment.push(xy),
                    _ => segments.push(Vec::new()),
                }
            }
            segments.retain(|s: &Vec<(f64, f64)>| !s.is_empty());
            let label = if name.is_empty() {
                format!("Re {reynolds:.0}")
            } else {
                format!("Re {reynolds:.0} {name}")
            };
            curves.push(Curve {
                label,
                segments,
                open_bubble,
                colour,
                triangles: curve == 1,
            });
        }
    }
    curves
}

/// Axis range covering `values` with 5 % margins; a unit range when empty or degenerate.
fn range(values: impl Iterator<Item = f64>) -> std::ops::Range<f64> {
    let (low, high) = values.fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| {
        (lo.min(v), hi.max(v))
    });
    if !(low.is_finite() && high.is_finite()) {
        return -1.0..1.0;
    }
    let margin = if high > low {
        0.05 * (high - low)
    } else {
        0.05 * low.abs().max(1.0)
    };
    (low - margin)..(high + margin)
}

fn draw(polar: &Polar, kind: PlotKind, svg: &mut String) -> Result<(), String> {
    let curves = curves(polar, kind);
    let all = || {
        curves
            .iter()
            .flat_map(|c| c.segments.iter().flatten().copied())
    };
    let x_range = range(all().map(|p| p.0));
    let y_range = range(all().map(|p| p.1));
    let (x_label, y_label) = kind.axis_labels();
    // Long section titles (a file's whole title line) are shortened so the caption fits.
    let name: String = if polar.section.name.chars().count() > 40 {
        polar.section.name.chars().take(39).chain(['…']).collect()
    } else {
        polar.section.name.clone()
    };
    let caption = format!(
        "{name}: {} at Mach {}, engineering estimate",
        kind.title(),
        polar.settings.mach
    );
    let error = |e: DrawingAreaErrorKind<_>| e.to_string();
    let root = SVGBackend::with_string(svg, (900, 620)).into_drawing_area();
    root.fill(&WHITE).map_err(error)?;
    let mut chart = ChartBuilder::on(&root)
        .caption(caption, ("sans-serif", 18))
        .margin(16)
        .x_label_area_size(45)
        .y_label_area_size(70)
        .build_cartesian_2d(x_range, y_range)
        .map_err(error)?;
    chart
        .configure_mesh()
        .x_desc(x_label)
        .y_desc(y_label)
        .draw()
        .map_err(error)?;
    for curve in &curves {
        let colour = Palette99::pick(curve.colour).to_rgba();
        for segment in &curve.segments {
            chart
                .draw_series(LineSeries::new(
                    segment.iter().copied(),
                    colour.stroke_width(2),
                ))
                .map_err(error)?;
        }
        let markers = curve.segments.iter().flatten().copied();
        let line = move |x: i32, y: i32| {
            EmptyElement::at((x, y)) + PathElement::new([(0, 0), (20, 0)], colour.stroke_width(2))
        };
        if curve.triangles {
            chart
                .draw_series(markers.map(|p| TriangleMarker::new(p, 5, colour.filled())))
                .map_err(error)?
                .label(curve.label.clone())
                .legend(move |(x, y)| {
                    line(x, y) + TriangleMarker::new((10, 0), 5, colour.filled())
                });
        } else {
            chart
                .draw_series(markers.map(|p| Circle::new(p, 3, colour.filled())))
                .map_err(error)?
                .label(curve.label.clone())
                .legend(move |(x, y)| line(x, y) + Circle::new((10, 0), 3, colour.filled()));
        }
    }
    let rings: Vec<(f64, f64)> = curves
        .iter()
        .flat_map(|c| c.open_bubble.iter().copied())
        .collect();
    if !rings.is_empty() {
        let ring = BLACK.stroke_width(1);
        chart
            .draw_series(rings.into_iter().map(|p| Circle::new(p, 7, ring)))
            .map_err(error)?
            .label(OPEN_BUBBLE_LABEL)
            .legend(move |(x, y)| Circle::new((x + 10, y), 7, ring));
    }
    if !curves.is_empty() {
        chart
            .configure_series_labels()
            .position(SeriesLabelPosition::UpperLeft)
            .background_style(WHITE.mix(0.85))
            .border_style(BLACK)
            .draw()
            .map_err(error)?;
    }
    root.present().map_err(error)
}

/// Draws one plot of `polar` and returns the SVG text.
pub fn plot_svg(polar: &Polar, kind: PlotKind) -> io::Result<String> {
    let mut svg = String::new();
    draw(polar, kind, &mut svg).map_err(|e| io::Error::other(format!("plot failed: {e}")))?;
    Ok(svg)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::write::test_support::sample_polar;

    #[test]
    fn flagged_points_break_the_line_and_are_not_drawn() {
        let polar = sample_polar();
        let lift = curves(&polar, PlotKind::ClAlpha);
        assert_eq!(lift.len(), 2);
        // Re 2e5: alpha 6 failed, so three points in one segment.
        assert_eq!(lift[0].segments.len(), 1);
        assert_eq!(lift[0].segments[0].len(), 3);
        assert_eq!(lift[1].segments[0].len(), 4);
        assert_eq!(lift[0].label, "Re 200000");
        // Upper and lower transition per Reynolds number.
        assert_eq!(curves(&polar, PlotKind::TransitionAlpha).len(), 4);
    }

    #[test]
    fn every_plot_is_svg_with_the_caution_in_its_caption() {
        let polar = sample_polar();
        for kind in PlotKind::ALL {
            let svg = plot_svg(&polar, kind).unwrap();
            assert!(svg.contains("<svg"));
            assert!(svg.contains("engineering estimate"));
            assert!(svg.contains("Re 1000000"));
        }
    }

    #[test]
    fn open_bubble_points_are_ringed_and_named_in_the_legend() {
        let mut polar = sample_polar();
        assert!(!plot_svg(&polar, PlotKind::ClAlpha)
            .unwrap()
            .contains(OPEN_BUBBLE_LABEL));
        // Re 1e6, alpha 2: the upper bubble no longer reattaches.
        polar.points[6].upper.reattachment_x_over_c = None;
        polar.points[6].upper.bubble_length_x_over_c = None;
        let lift = curves(&polar, PlotKind::ClAlpha);
        assert!(lift[0].open_bubble.is_empty());
        assert_eq!(lift[1].open_bubble, vec![(2.0, 0.11 * 2.0)]);
        let svg = plot_svg(&polar, PlotKind::ClAlpha).unwrap();
        assert!(svg.contains(OPEN_BUBBLE_LABEL));
    }

    #[test]
    fn a_polar_without_converged_points_still_plots() {
        let mut polar = sample_polar();
        for point in &mut polar.points {
            point.converged = false;
        }
        let svg = plot_svg(&polar, PlotKind::ClCd).unwrap();
        assert!(svg.contains("<svg"));
    }
}
