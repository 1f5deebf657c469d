//! NACA 4-digit and 5-digit sections from their published analytic definitions.
//!
//! Thickness (both families): y_t = 5t (0.2969√x − 0.1260x − 0.3516x² + 0.2843x³ + a₄x⁴) with
//! a₄ = −0.1015 for the published, slightly open trailing edge (y_t(1) = 0.0021·5t) and −0.1036 for
//! the common closed variant (Abbott & von Doenhoff, *Theory of Wing Sections*, 1959, §6.4).
//! The ordinates are laid off normal to the mean line: x_u = x − y_t sin θ, y_u = y_c + y_t cos θ,
//! x_l = x + y_t sin θ, y_l = y_c − y_t cos θ with tan θ = dy_c/dx (Abbott & von Doenhoff §6.2).
//!
//! Mean lines:
//! * 4-digit `MPTT`: m = M/100, p = P/10; y_c = m/p² (2px − x²) for x < p and
//!   m/(1−p)² (1 − 2p + 2px − x²) for x ≥ p (Abbott & von Doenhoff §6.4).
//! * 5-digit `LPQTT` (Jacobs & Pinkerton, NACA Report 537, 1935; Abbott & von Doenhoff §6.5): design
//!   lift coefficient 0.15 L, maximum camber at x = 0.05 P, Q = 0 plain, Q = 1 reflexed. Plain:
//!   y_c = k₁/6 (x³ − 3r x² + r²(3 − r) x) for x < r, k₁r³/6 (1 − x) beyond. Reflexed:
//!   y_c = k₁/6 ((x − r)³ − (k₂/k₁)(1 − r)³x − r³x + r³) for x < r and
//!   k₁/6 ((k₂/k₁)(x − r)³ − (k₂/k₁)(1 − r)³x − r³x + r³) beyond. The tabulated r, k₁, k₂/k₁ are
//!   for a design lift coefficient of 0.3 and scale linearly with it.
//!
//! Points are cosine spaced in x, x = (1 − cos β)/2, so they cluster at both edges.

use nalgebra::Point2;

use crate::error::GeometryError;
use crate::{Airfoil, ParseOptions};

/// Trailing-edge variant of the NACA thickness polynomial.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum TrailingEdge {
    /// The published polynomial (last coefficient −0.1015): thickness 0.21 t at x = 1 (0.126 % c
    /// for a 12 % section), as in the Abbott & von Doenhoff tables.
    #[default]
    Open,
    /// Last coefficient −0.1036: zero thickness at x = 1.
    Closed,
}

impl TrailingEdge {
    fn last_coefficient(self) -> f64 {
        match self {
            TrailingEdge::Open => -0.1015,
            TrailingEdge::Closed => -0.1036,
        }
    }
}

/// Constants of a 5-digit mean line for design lift coefficient 0.3.
#[derive(Debug, Clone, Copy, PartialEq)]
struct FiveDigitLine {
    r: f64,
    k1: f64,
    /// k₂/k₁ for reflexed lines, `None` for the plain ones.
    k2_over_k1: Option<f64>,
}

/// Plain 5-digit mean lines 210 … 250: (r, k₁), Abbott & von Doenhoff (1959) §6.5 table
/// (from memory; the same constants appear in NACA Report 537).
const PLAIN_LINES: [(f64, f64); 5] = [
    (0.0580, 361.400),
    (0.1260, 51.640),
    (0.2025, 15.957),
    (0.2900, 6.643),
    (0.3910, 3.230),
];

/// Reflexed 5-digit mean lines 221 … 251: (r, k₁, k₂/k₁) (from memory, commonly tabulated with
/// the NACA Report 537 family; P = 1 has no reflexed line).
#[allow(clippy::approx_constant)] // r = 0.3180 is a published constant, not 1/π
const REFLEXED_LINES: [(f64, f64, f64); 4] = [
    (0.1300, 51.990, 0.000764),
    (0.2170, 15.793, 0.00677),
    (0.3180, 6.520, 0.0303),
    (0.4410, 3.191, 0.1355),
];

#[derive(Debug, Clone, Copy, PartialEq)]
enum MeanLine {
    /// Symmetric section.
    None,
    /// 4-digit: maximum camber m at x = p.
    FourDigit { m: f64, p: f64 },
    /// 5-digit: constants scaled by design cl / 0.3.
    FiveDigit { line: FiveDigitLine, cl_scale: f64 },
}

/// A parsed NACA 4- or 5-digit designation with its analytic ordinates.
#[derive(Debug, Clone, PartialEq)]
pub struct NacaDefinition {
    digits: String,
    thickness_ratio: f64,
    mean_line: MeanLine,
}

fn digit_values(digits: &str) -> Vec<u32> {
    digits.chars().filter_map(|c| c.to_digit(10)).collect()
}

impl NacaDefinition {
    /// Reads a designation such as `2412`, `NACA 23012`, `naca0012` or `NACA-23112`.
    pub fn parse(code: &str) -> Result<Self, GeometryError> {
        let invalid = |reason: &str| GeometryError::InvalidNacaCode {
            code: code.to_owned(),
            reason: reason.to_owned(),
        };
        let trimmed = code.trim();
        let lower = trimmed.to_ascii_lowercase();
        let digits = lower
            .strip_prefix("naca")
            .unwrap_or(&lower)
            .trim_start_matches([' ', '-', '_'])
            .to_owned();
        if digits.is_empty() || !digits.chars().all(|c| c.is_ascii_digit()) {
            return Err(invalid("expected 4 or 5 digits"));
        }
        let d = digit_values(&digits);
        let (thickness_digits, mean_line) = match d.len() {
            4 => {
                let (m, p) = (d[0] as f64 / 100.0, d[1] as f64 / 10.0);
                let mean_line = match (d[0], d[1]) {
                    (0, 0) => MeanLine::None,
                    (0, _) => return Err(invalid("camber position given without camber")),
                    (_, 0) => return Err(invalid("camber given without its position")),
                    _ => MeanLine::FourDigit { m, p },
                };
                (d[2] * 10 + d[3], mean_line)
            }
            5 => {
                if d[0] == 0 {
                    return Err(invalid("design lift digit must be 1 to 9"));
                }
                let position = d[1] as usize;
                let line = match (d[2], position) {
                    (0, 1..=5) => {
                        let (r, k1) = PLAIN_LINES[position - 1];
                        FiveDigitLine {
                            r,
                            k1,
                            k2_over_k1: None,
                        }
                    }
                    (1, 2..=5) => {
                        let (r, k1, ratio) = REFLEXED_LINES[position - 2];
                        FiveDigitLine {
                            r,
                            k1,
                            k2_over_k1: Some(ratio),
                        }
                    }
                    (0 | 1, _) => {
                        return Err(invalid(
                            "camber position digit must be 1 to 5 (2 to 5 for reflexed lines)",
                        ))
                    }
                    _ => return Err(invalid("third digit must be 0 (plain) or 1 (reflexed)")),
                };
                let design_cl = 0.15 * d[0] as f64;
                (
                    d[3] * 10 + d[4],
                    MeanLine::FiveDigit {
                        line,
                        cl_scale: design_cl / 0.3,
                    },
                )
            }
            _ => return Err(invalid("expected 4 or 5 digits")),
        };
        if thickness_digits == 0 {
            return Err(invalid("thickness must be greater than zero"));
        }
        Ok(Self {
            digits,
            thickness_ratio: thickness_digits as f64 / 100.0,
            mean_line,
        })
    }

    /// Display name, e.g. `NACA 2412`.
    pub fn name(&self) -> String {
        format!("NACA {}", self.digits)
    }

    /// Maximum thickness as a fraction of chord (last two digits / 100).
    pub fn thickness_ratio(&self) -> f64 {
        self.thickness_ratio
    }

    /// Half-thickness y_t at x (chord fractions), laid off normal to the mean line.
    pub fn half_thickness(&self, x: f64, trailing_edge: TrailingEdge) -> f64 {
        let x = x.clamp(0.0, 1.0);
        let polynomial = 0.2969 * x.sqrt()
            + x * (-0.1260 + x * (-0.3516 + x * (0.2843 + x * trailing_edge.last_coefficient())));
        5.0 * self.thickness_ratio * polynomial
    }

    /// Mean line y_c and slope dy_c/dx at x (chord fractions).
    pub fn mean_line(&self, x: f64) -> (f64, f64) {
        let x = x.clamp(0.0, 1.0);
        match self.mean_line {
            MeanLine::None => (0.0, 0.0),
            MeanLine::FourDigit { m, p } => {
                if x < p {
                    (
                        m / (p * p) * (2.0 * p * x - x * x),
                        2.0 * m / (p * p) * (p - x),
                    )
                } else {
                    let q = (1.0 - p) * (1.0 - p);
                    (
                        m / q * (1.0 - 2.0 * p + 2.0 * p * x - x * x),
                        2.0 * m / q * (p - x),
                    )
                }
            }
            MeanLine::FiveDigit { line, cl_scale } => {
                let FiveDigitLine { r, k1, k2_over_k1 } = line;
                let k = cl_scale * k1 / 6.0;
                let r3 = r * r * r;
                match k2_over_k1 {
                    None if x < r => (
                        k * (x * x * x - 3.0 * r * x * x + r * r * (3.0 - r) * x),
                        k * (3.0 * x * x - 6.0 * r * x + r * r * (3.0 - r)),
                    ),
                    None => (k * r3 * (1.0 - x), -k * r3),
                    Some(ratio) => {
                        let tail = ratio * (1.0 - r).powi(3);
                        let d = x - r;
                        let (cubic, cubic_slope) = if x < r {
                            (d * d * d, 3.0 * d * d)
                        } else {
                            (ratio * d * d * d, 3.0 * ratio * d * d)
                        };
                        (
                            k * (cubic - tail * x - r3 * x + r3),
                            k * (cubic_slope - tail - r3),
                        )
                    }
                }
            }
        }
    }

    /// Upper and lower surface points for mean-line station x.
    pub fn surface_points(
        &self,
        x: f64,
        trailing_edge: TrailingEdge,
    ) -> (Point2<f64>, Point2<f64>) {
        let yt = self.half_thickness(x, trailing_edge);
        let (yc, slope) = self.mean_line(x);
        let theta = slope.atan();
        let (sin, cos) = theta.sin_cos();
        (
            Point2::new(x - yt * sin, yc + yt * cos),
            Point2::new(x + yt * sin, yc - yt * cos),
        )
    }
}

/// Generates a NACA 4- or 5-digit section with `points_per_side` cosine-spaced stations per
/// surface (leading and trailing edge included; the leading-edge point is shared), ordered
/// trailing edge → upper → leading edge → lower → trailing edge. The chord is the NACA chord
/// (leading edge at the origin, mean-line trailing edge at (1, 0)) and is kept as defined.
pub fn naca_section(
    code: &str,
    points_per_side: usize,
    trailing_edge: TrailingEdge,
) -> Result<Airfoil, GeometryError> {
    let definition = NacaDefinition::parse(code)?;
    let name = definition.name();
    let minimum = crate::validate::MIN_POINTS.div_ceil(2) + 1;
    if points_per_side < minimum {
        return Err(GeometryError::TooFewPoints {
            source_name: name,
            count: points_per_side,
            minimum,
        });
    }
    let stations: Vec<f64> = (0..points_per_side)
        .map(|i| {
            let beta = std::f64::consts::PI * i as f64 / (points_per_side - 1) as f64;
            0.5 * (1.0 - beta.cos())
        })
        .collect();
    let (upper, lower): (Vec<_>, Vec<_>) = stations
        .iter()
        .map(|&x| definition.surface_points(x, trailing_edge))
        .unzip();
    let points: Vec<Point2<f64>> = upper
        .into_iter()
        .rev()
        .chain(lower.into_iter().skip(1))
        .collect();
    // The NACA chord is exact by construction; keep it rather than re-deriving it from the
    // farthest-point rule. The analytic contour needs no corrections, so the report is empty
    // unless the code describes an impossible shape, which validation then rejects as an error.
    let (airfoil, _report) =
        Airfoil::from_points(&name, points, &ParseOptions { keep_chord: true })?;
    Ok(airfoil)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn codes_are_read_with_or_without_prefix() {
        for code in ["2412", "NACA 2412", "naca2412", "NACA-2412"] {
            assert_eq!(NacaDefinition::parse(code).unwrap().name(), "NACA 2412");
        }
        for bad in [
            "", "24", "241x", "123456", "2012", "0412", "0000", "06012", "23212", "21112",
        ] {
            assert!(
                matches!(
                    NacaDefinition::parse(bad),
                    Err(GeometryError::InvalidNacaCode { .. })
                ),
                "{bad}"
            );
        }
    }

    #[test]
    fn mean_line_slope_matches_finite_difference() {
        for code in ["2412", "4415", "23012", "23112", "25112", "21012"] {
            let def = NacaDefinition::parse(code).unwrap();
            for i in 1..50 {
                let x = i as f64 / 50.0 + 0.003;
                let h = 1e-6;
                let fd = (def.mean_line(x + h).0 - def.mean_line(x - h).0) / (2.0 * h);
                assert_relative_eq!(def.mean_line(x).1, fd, epsilon = 1e-7);
            }
        }
    }

    #[test]
    fn mean_lines_are_continuous_and_end_at_zero() {
        // Both pieces of each published mean line meet at p (4-digit) or r (5-digit), and the
        // line ends at y_c(1) = 0 — properties of the definitions themselves.
        for code in ["2412", "4412", "23012", "22112", "23112", "24112", "25112"] {
            let def = NacaDefinition::parse(code).unwrap();
            assert_relative_eq!(def.mean_line(0.0).0, 0.0, epsilon = 1e-15);
            assert_relative_eq!(def.mean_line(1.0).0, 0.0, epsilon = 1e-5);
            let break_x = match def.mean_line {
                MeanLine::FourDigit { p, .. } => p,
                MeanLine::FiveDigit { line, .. } => line.r,
                MeanLine::None => unreachable!(),
            };
            let (left, right) = (def.mean_line(break_x - 1e-12), def.mean_line(break_x));
            assert_relative_eq!(left.0, right.0, epsilon = 1e-10);
            assert_relative_eq!(left.1, right.1, epsilon = 1e-6);
        }
    }

    #[test]
    fn closed_trailing_edge_has_zero_thickness() {
        let def = NacaDefinition::parse("0012").unwrap();
        assert_relative_eq!(
            def.half_thickness(1.0, TrailingEdge::Closed),
            0.0,
            epsilon = 1e-15
        );
        // Open: 5 · 0.12 · 0.0021 = 0.00126 (Abbott & von Doenhoff print 0.126 % c).
        assert_relative_eq!(
            def.half_thickness(1.0, TrailingEdge::Open),
            0.00126,
            epsilon = 1e-15
        );
    }

    #[test]
    fn sections_are_generated_in_contour_order() {
        let foil = naca_section("4412", 81, TrailingEdge::Open).unwrap();
        let p = foil.points();
        assert_eq!(p.len(), 161);
        assert!(p[0].y > 0.0 && p[160].y < 0.0);
        assert_relative_eq!(p[80].x, 0.0, epsilon = 1e-15);
        assert!(matches!(
            naca_section("0012", 3, TrailingEdge::Open),
            Err(GeometryError::TooFewPoints { .. })
        ));
    }
}
