//! Thwaites (1949) one-parameter closure for attached laminar layers: the shear parameter
//! l(λ) = τw θ/(μ ue) = Re_θ cf/2 and the shape factor H(λ), as functions of the Thwaites
//! pressure-gradient parameter λ = (θ²/ν) due/ds.
//!
//! Fits (Cebeci & Bradshaw 1977, *Momentum Transfer in Boundary Layers*; METHODS §2.3):
//!
//! ```text
//! 0 ≤ λ ≤ 0.1:    l = 0.22 + 1.57λ − 1.8λ²                 H = 2.61 − 3.75λ + 5.24λ²
//! −0.1 ≤ λ ≤ 0:   l = 0.22 + 1.402λ + 0.018λ/(λ + 0.107)    H = 2.088 + 0.0731/(λ + 0.14)
//! ```
//!
//! **Extension above λ = 0.1** (strong favourable gradients, near a stagnation point with a noisy
//! gradient): White's fits (*Viscous Fluid Flow*, Thwaites's method section; valid
//! −0.09 ≤ λ ≤ 0.25)
//!
//! ```text
//! l = (λ + 0.09)^0.62      H = 2.0 + 4.14z − 83.5z² + 854z³ − 3337z⁴ + 4576z⁵,  z = 0.25 − λ
//! ```
//!
//! (At λ = 0 the two published branches meet with a jump of 1.4e-4 in H, 2.61014 against 2.61,
//! and slopes 0.5 % apart; harmless for the direct march, which is the only user.) White's fits
//! are blended in over 0.1 ≤ λ ≤ 0.15 with the C¹ weight w = 3t² − 2t³, t = (λ − 0.1)/0.05, so that
//! l and H are continuous with continuous slope. (At λ = 0.1 the two families differ by 0.6 % in l
//! and 0.2 % in H.) Above λ = 0.25, the end of White's range, H is held at its λ = 0.25 value 2.0
//! and l continues as White's power law; the exact Hiemenz value is λ = 0.0855, so such λ only come
//! from noisy gradients.
//!
//! **Below λ = −0.1** the Cebeci–Bradshaw fits run into poles (λ = −0.107 for l, −0.14 for H).
//! Thwaites's method has no meaning past separation at λ = [`SEPARATION_LAMBDA`]; the functions
//! hold their λ = −0.1 values there (l = −0.177, H = 3.92) so that they stay finite. Callers must
//! detect separation from λ, not from the returned values.

use super::smoothstep;

/// Laminar separation value of λ (Curle & Skan 1957 revision as used by White, *Viscous Fluid
/// Flow*; Thwaites's original value was −0.082). METHODS §2.4.
pub const SEPARATION_LAMBDA: f64 = -0.09;

/// Lower end of the Cebeci–Bradshaw fits; smaller λ are held at this value (see module doc).
const LAMBDA_MIN: f64 = -0.1;
/// Start and end of the blend from the Cebeci–Bradshaw fit to White's fit.
const BLEND_START: f64 = 0.1;
const BLEND_END: f64 = 0.15;
/// Upper end of White's fit range.
const WHITE_MAX: f64 = 0.25;

/// C¹ blend weight of White's fit: 0 below `BLEND_START`, 1 above `BLEND_END`.
fn white_weight(lambda: f64) -> f64 {
    smoothstep((lambda - BLEND_START) / (BLEND_END - BLEND_START))
}

/// Cebeci & Bradshaw (1977) l(λ), both branches (METHODS §2.3).
fn shear_parameter_cebeci_bradshaw(lambda: f64) -> f64 {
    if lambda >= 0.0 {
        0.22 + 1.57 * lambda - 1.8 * lambda * lambda
    } else {
        0.22 + 1.402 * lambda + 0.018 * lambda / (lambda + 0.107)
    }
}

/// Cebeci & Bradshaw (1977) H(λ), both branches (METHODS §2.3).
fn shape_factor_cebeci_bradshaw(lambda: f64) -> f64 {
    if lambda >= 0.0 {
        2.61 - 3.75 * lambda + 5.24 * lambda * lambda
    } else {
        2.088 + 0.0731 / (lambda + 0.14)
    }
}

/// White's l(λ) = (λ + 0.09)^0.62 (*Viscous Fluid Flow*, Thwaites's method).
fn shear_parameter_white(lambda: f64) -> f64 {
    (lambda + 0.09).powf(0.62)
}

/// White's H(λ) quintic in z = 0.25 − λ, held at λ = 0.25 above its range.
fn shape_factor_white(lambda: f64) -> f64 {
    let z = WHITE_MAX - lambda.min(WHITE_MAX);
    2.0 + z * (4.14 + z * (-83.5 + z * (854.0 + z * (-3337.0 + z * 4576.0))))
}

/// Thwaites shear parameter l = τw θ/(μ ue) = Re_θ cf/2 (dimensionless) at pressure-gradient
/// parameter `lambda` = (θ²/ν) due/ds. Cebeci & Bradshaw (1977) fits for −0.1 ≤ λ ≤ 0.1, blended
/// C¹ into White's fit above (module doc). Negative below λ ≈ −0.0898 (separated).
pub fn shear_parameter(lambda: f64) -> f64 {
    let lambda = lambda.max(LAMBDA_MIN);
    let w = white_weight(lambda);
    if w == 0.0 {
        shear_parameter_cebeci_bradshaw(lambda)
    } else if w == 1.0 {
        shear_parameter_white(lambda)
    } else {
        (1.0 - w) * shear_parameter_cebeci_bradshaw(lambda) + w * shear_parameter_white(lambda)
    }
}

/// Thwaites shape factor H = δ*/θ at pressure-gradient parameter `lambda` = (θ²/ν) due/ds.
/// Cebeci & Bradshaw (1977) fits for −0.1 ≤ λ ≤ 0.1, blended C¹ into White's fit above (module
/// doc).
pub fn shape_factor(lambda: f64) -> f64 {
    let lambda = lambda.max(LAMBDA_MIN);
    let w = white_weight(lambda);
    if w == 0.0 {
        shape_factor_cebeci_bradshaw(lambda)
    } else if w == 1.0 {
        shape_factor_white(lambda)
    } else {
        (1.0 - w) * shape_factor_cebeci_bradshaw(lambda) + w * shape_factor_white(lambda)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn flat_plate_values() {
        // METHODS §2.3 [✓num]: l(0) = 0.220, H(0) = 2.61 (the fit's own values; exact Blasius is
        // 0.2205 and 2.591, the fit is ≈ 0.7 % high in H). Tolerance: printed digits.
        assert_relative_eq!(shear_parameter(0.0), 0.220, epsilon = 5e-4);
        assert_relative_eq!(shape_factor(0.0), 2.61, epsilon = 5e-3);
    }

    #[test]
    fn zero_shear_near_minus_0_0898() {
        // METHODS §2.3 [✓num]: l = 0 at λ ≈ −0.0898. Tolerance: printed digits.
        assert!(shear_parameter(-0.0897) > 0.0);
        assert!(shear_parameter(-0.0899) < 0.0);
    }

    #[test]
    fn continuous_with_continuous_slope() {
        // The closure feeds Newton solvers: value and slope continuous everywhere; checked by
        // one-sided finite differences at the branch and blend joins (tolerance: FD truncation).
        for &x in &[0.0, BLEND_START, BLEND_END] {
            for f in [shear_parameter as fn(f64) -> f64, shape_factor] {
                let d = 1e-6;
                // the two published branches meet at λ = 0 with a jump of 1.4e-4 in H
                // (2.61014 vs 2.61); the blend joins are exact
                let jump = if x == 0.0 { 2e-4 } else { 1e-9 };
                assert_relative_eq!(f(x - 1e-12), f(x + 1e-12), epsilon = jump);
                let left = (f(x) - f(x - d)) / d;
                let right = (f(x + d) - f(x)) / d;
                // λ = 0 is a join of two published branches whose slopes differ (C⁰ only)
                if x != 0.0 {
                    assert_relative_eq!(left, right, epsilon = 1e-3, max_relative = 1e-3);
                }
            }
        }
    }

    #[test]
    fn finite_everywhere() {
        for i in -100..=100 {
            let lambda = f64::from(i) * 0.01;
            assert!(shear_parameter(lambda).is_finite());
            assert!(shape_factor(lambda).is_finite());
        }
    }
}
