//! Two-equation laminar closure (momentum + kinetic-energy integrals), valid through reversed
//! flow: energy shape factor H*(H), skin friction cf(H, Re_θ) and dissipation coefficient
//! C_D(H, Re_θ).
//!
//! Source: Drela & Giles (1987), AIAA J. 25(10), 1347–1355, laminar closure fitted to the
//! Falkner–Skan profiles and Stewartson's (1954) reversed-flow lower-branch profiles, written in
//! the kinematic shape factor H_k (= H in incompressible flow). The fits below are as restated in
//! METHODS §5.5 (recalled from memory there, checked against Falkner–Skan solutions; the paper's
//! equation numbers are not quoted because we could not confirm them):
//!
//! ```text
//! H* = 1.515 + 0.076 (4 − H)²/H                          H < 4
//! H* = 1.515 + 0.040 (H − 4)²/H                          H ≥ 4
//! Re_θ cf/2 = −0.067 + 0.01977 (7.4 − H)²/(H − 1)        H < 7.4
//! Re_θ cf/2 = −0.067 + 0.022 (1 − 1.4/(H − 6))²          H ≥ 7.4
//! 2 Re_θ C_D/H* = 0.207 + 0.00205 (4 − H)^5.5            H < 4
//! 2 Re_θ C_D/H* = 0.207 − 0.003 (H − 4)²/(1 + 0.02 (H − 4)²)   H ≥ 4
//! ```
//!
//! with C_D = (1/ρue³)∫τ ∂u/∂y dy. Every branch join (H = 4, H = 7.4) has matching value and
//! slope, so all three functions are C¹ in H. The fits have cf = 0 at H ≈ 4.14 (exact
//! Falkner–Skan separation: H = 4.029).
//!
//! Guards: H is passed through a C¹ floor at 1.05 (identity for H ≥ 1.1; see
//! [`crate::closure`]) because of the pole at H = 1; Re_θ must be positive (cf and C_D scale as
//! 1/Re_θ; Re_θ ≤ 0 is floored at 1e-12 to stay finite — the caller should not ask).

use super::guarded_shape_factor;

/// Smallest Re_θ used in the 1/Re_θ scaling (keeps the result finite at Re_θ = 0).
const RE_THETA_MIN: f64 = 1e-12;

/// Energy shape factor H* = θ*/θ (kinetic-energy thickness over momentum thickness) as a function
/// of the shape factor `h` (Drela & Giles 1987; METHODS §5.5). Minimum 1.515 at H = 4.
pub fn energy_shape_factor(h: f64) -> f64 {
    let h = guarded_shape_factor(h);
    if h < 4.0 {
        1.515 + 0.076 * (4.0 - h).powi(2) / h
    } else {
        1.515 + 0.040 * (h - 4.0).powi(2) / h
    }
}

/// Re_θ cf/2 as a function of `h` (Drela & Giles 1987; METHODS §5.5).
fn skin_friction_parameter(h: f64) -> f64 {
    if h < 7.4 {
        -0.067 + 0.01977 * (7.4 - h).powi(2) / (h - 1.0)
    } else {
        -0.067 + 0.022 * (1.0 - 1.4 / (h - 6.0)).powi(2)
    }
}

/// 2 Re_θ C_D/H* as a function of `h` (Drela & Giles 1987; METHODS §5.5).
fn dissipation_parameter(h: f64) -> f64 {
    if h < 4.0 {
        0.207 + 0.00205 * (4.0 - h).powf(5.5)
    } else {
        let d2 = (h - 4.0).powi(2);
        0.207 - 0.003 * d2 / (1.0 + 0.02 * d2)
    }
}

/// Laminar skin-friction coefficient cf = τw/(½ρue²) (dimensionless) at shape factor `h` and
/// momentum-thickness Reynolds number `re_theta` = ue θ/ν (Drela & Giles 1987; METHODS §5.5).
/// Negative for H > 4.14 (reversed flow).
pub fn skin_friction(h: f64, re_theta: f64) -> f64 {
    let h = guarded_shape_factor(h);
    2.0 * skin_friction_parameter(h) / re_theta.max(RE_THETA_MIN)
}

/// Laminar dissipation coefficient C_D = (1/ρue³)∫τ ∂u/∂y dy (dimensionless) at shape factor `h`
/// and `re_theta` = ue θ/ν (Drela & Giles 1987; METHODS §5.5): C_D = H*·fit/(2 Re_θ).
pub fn dissipation(h: f64, re_theta: f64) -> f64 {
    let h = guarded_shape_factor(h);
    energy_shape_factor(h) * dissipation_parameter(h) / (2.0 * re_theta.max(RE_THETA_MIN))
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn blasius_values() {
        // METHODS §5.5 / §8 #17 [✓num vs Falkner–Skan]: at H = 2.591 the fits give H* = 1.5732,
        // Re_θ cf/2 = 0.2204, 2Re_θ C_D/H* = 0.2205. Tolerance: the printed 4–5 digits.
        let h = 2.591;
        assert_relative_eq!(energy_shape_factor(h), 1.5732, epsilon = 1e-4);
        assert_relative_eq!(
            skin_friction(h, 1000.0) * 1000.0 / 2.0,
            0.2204,
            epsilon = 1e-4
        );
        let d = 2.0 * 1000.0 * dissipation(h, 1000.0) / energy_shape_factor(h);
        assert_relative_eq!(d, 0.2205, epsilon = 1e-4);
    }

    #[test]
    fn c1_at_branch_joins() {
        // Value and slope continuous at H = 4 and H = 7.4 (they feed a Newton solver).
        // Centred vs one-sided differences with step 1e-6: tolerance covers FD truncation.
        crate::closure::assert_laminar_closure_c1(
            energy_shape_factor,
            skin_friction,
            dissipation,
            &[4.0, 7.4],
            1e-5,
        );
    }

    #[test]
    fn finite_for_any_finite_shape_factor() {
        for h in [-5.0, 0.0, 0.5, 1.0, 1.01, 1.05, 1.1, 2.0, 10.0, 100.0, 1e6] {
            assert!(energy_shape_factor(h).is_finite(), "H* at {h}");
            assert!(skin_friction(h, 300.0).is_finite(), "cf at {h}");
            assert!(dissipation(h, 300.0).is_finite(), "C_D at {h}");
        }
        assert!(skin_friction(2.6, 0.0).is_finite());
    }
}
