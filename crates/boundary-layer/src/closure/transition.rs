//! Transition closures: the Drela & Giles (1987) envelope e^N method and Mack's (1977) relation
//! between free-stream turbulence and the critical N-factor.
//!
//! **Envelope e^N** (Drela & Giles 1987, AIAA J. 25(10), 1347–1355; formulas as restated in
//! METHODS §4.2, recalled from memory there and checked against Falkner–Skan; the paper's
//! equation numbers are not confirmed). The envelope of the Orr–Sommerfeld amplification of the
//! Falkner–Skan family is approximated by
//!
//! ```text
//! dN/dRe_θ = 0.01 √{[2.4H − 3.7 + 2.5 tanh(1.5H − 4.65)]² + 0.25}
//! log10 Re_θ0 = (1.415/(H − 1) − 0.489) tanh(20/(H − 1) − 12.9) + 3.295/(H − 1) + 0.44
//! ℓ(H) = (6.54H − 14.07)/H²,   m(H) = [0.058 (H − 4)²/(H − 1) − 0.068]/ℓ(H)
//! dN/ds = dN/dRe_θ · ½(1 + m) ℓ/θ        for Re_θ > Re_θ0(H), else 0
//! ```
//!
//! ½(1 + m)ℓ = ½[ℓ + 0.058(H − 4)²/(H − 1) − 0.068] is evaluated in that form (no pole where ℓ = 0)
//! and floored C¹ at 0 (it fits dRe_θ/ds·θ of similar flows and turns negative only below
//! H ≈ 2.1, where Re_θ < Re_θ0 anyway). The switch at Re_θ0 is replaced by a C¹ ramp
//! r = 3t² − 2t³, t = (log10 Re_θ − log10 Re_θ0 + 0.08)/0.16 clamped to [0, 1], i.e. over ±0.08
//! decades (our choice, METHODS §4.2 suggests it) so that Newton solvers see no switching noise.
//! The rate keeps rising with H above 2.3, so the same formula serves separated shear layers.
//!
//! **Mack (1977)**, AGARD CP-224 / JPL Publ. 77-15 (which of the two carries it: not confirmed):
//! N_crit = −8.43 − 2.4 ln Tu, Tu as a fraction.

use super::{guarded_shape_factor, smooth_floor, smoothstep};
use crate::error::BoundaryLayerError;

/// Half-width of the onset ramp in decades of Re_θ.
const RAMP_HALF_WIDTH_DECADES: f64 = 0.08;
/// Smallest turbulence level accepted by [`critical_n_from_turbulence`] (0.01 %): below it the
/// relation gives N > 13.7, beyond any calibration.
pub const TURBULENCE_MIN: f64 = 1e-4;
/// Largest turbulence level accepted by [`critical_n_from_turbulence`]: the level at which Mack's
/// relation reaches N_crit = 0, exp(−8.43/2.4) ≈ 2.98 %. Bypass transition dominates well before.
pub fn turbulence_max() -> f64 {
    (-8.43f64 / 2.4).exp()
}

/// Envelope growth rate dN/dRe_θ (dimensionless) at shape factor `h` (Drela & Giles 1987;
/// METHODS §4.2). H guarded at 1.05.
pub fn growth_rate_per_re_theta(h: f64) -> f64 {
    let h = guarded_shape_factor(h);
    let a = 2.4 * h - 3.7 + 2.5 * (1.5 * h - 4.65).tanh();
    0.01 * (a * a + 0.25).sqrt()
}

/// log10 of the critical Re_θ0 (Drela & Giles 1987; METHODS §4.2).
fn log10_critical_re_theta(h: f64) -> f64 {
    let hm1 = guarded_shape_factor(h) - 1.0;
    (1.415 / hm1 - 0.489) * (20.0 / hm1 - 12.9).tanh() + 3.295 / hm1 + 0.44
}

/// Critical momentum-thickness Reynolds number Re_θ0 below which no disturbance grows, at shape
/// factor `h` (Drela & Giles 1987; METHODS §4.2).
pub fn critical_re_theta(h: f64) -> f64 {
    10f64.powf(log10_critical_re_theta(h))
}

/// ½(1 + m(H)) ℓ(H): θ dRe_θ/ds of the similar flow with this H, floored C¹ at 0.
fn re_theta_growth_factor(h: f64) -> f64 {
    let h = guarded_shape_factor(h);
    let ell = (6.54 * h - 14.07) / (h * h);
    let m_ell = 0.058 * (h - 4.0).powi(2) / (h - 1.0) - 0.068;
    smooth_floor(0.5 * (ell + m_ell), 0.0, 1e-3)
}

/// Spatial amplification rate dN/ds (per unit of the caller's length) of the envelope method at
/// shape factor `h`, momentum thickness `theta` (caller's length) and `re_theta` = ue θ/ν
/// (Drela & Giles 1987; METHODS §4.2), with the C¹ onset ramp of ±0.08 decades around Re_θ0.
/// Zero for Re_θ ≤ 0 or θ ≤ 0.
pub fn amplification_rate(h: f64, theta: f64, re_theta: f64) -> f64 {
    if !(re_theta > 0.0 && theta > 0.0) {
        return 0.0;
    }
    let ramp = smoothstep(
        (re_theta.log10() - log10_critical_re_theta(h) + RAMP_HALF_WIDTH_DECADES)
            / (2.0 * RAMP_HALF_WIDTH_DECADES),
    );
    if ramp == 0.0 {
        return 0.0;
    }
    ramp * growth_rate_per_re_theta(h) * re_theta_growth_factor(h) / theta
}

/// Critical N-factor from the free-stream turbulence level `tu_fraction` (a fraction, 0.001 =
/// 0.1 %), Mack (1977): N_crit = −8.43 − 2.4 ln Tu.
///
/// # Errors
/// [`BoundaryLayerError::TurbulenceOutOfRange`] if Tu is not within [`TURBULENCE_MIN`] ..
/// [`turbulence_max`] (≈ 0.01 % – 2.98 %) or is NaN.
pub fn critical_n_from_turbulence(tu_fraction: f64) -> Result<f64, BoundaryLayerError> {
    if !(TURBULENCE_MIN..=turbulence_max()).contains(&tu_fraction) {
        return Err(BoundaryLayerError::TurbulenceOutOfRange { tu: tu_fraction });
    }
    Ok(-8.43 - 2.4 * tu_fraction.ln())
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn envelope_table_values() {
        // METHODS §4.2 table [✓num arithmetic of the Drela & Giles 1987 correlation]. Tolerance:
        // half a unit of the last printed digit (relative 0.5 % for the 3-figure Re_θ0 values).
        let table = [
            (2.4, 0.00511, 1794.0),
            (2.59, 0.01035, 244.0),
            (3.0, 0.0317, 74.0),
            (4.0, 0.0810, 36.0),
            (5.0, 0.108, 25.0),
            (7.0, 0.156, 17.5),
        ];
        for (h, rate, re0) in table {
            assert_relative_eq!(growth_rate_per_re_theta(h), rate, max_relative = 6e-3);
            assert_relative_eq!(critical_re_theta(h), re0, max_relative = 0.02);
        }
    }

    #[test]
    fn growth_factor_matches_similar_flows() {
        // METHODS §4.2 [✓num]: ½(1+m)ℓ = 0.0849 at Hiemenz H = 2.216 (exact 0.0855).
        assert_relative_eq!(re_theta_growth_factor(2.216), 0.0849, epsilon = 5e-4);
    }

    #[test]
    fn ramp_is_off_below_and_on_above() {
        let h = 2.59;
        let re0 = critical_re_theta(h);
        assert_eq!(amplification_rate(h, 1e-3, re0 * 10f64.powf(-0.081)), 0.0);
        let full = growth_rate_per_re_theta(h) * re_theta_growth_factor(h) / 1e-3;
        assert_relative_eq!(
            amplification_rate(h, 1e-3, re0 * 10f64.powf(0.081)),
            full,
            max_relative = 1e-12
        );
        assert_relative_eq!(
            amplification_rate(h, 1e-3, re0),
            0.5 * full,
            max_relative = 1e-12
        );
        assert_eq!(amplification_rate(h, 0.0, 0.0), 0.0);
    }

    #[test]
    fn mack_published_values() {
        // Mack (1977), METHODS §4.3 / §8 #13: Tu = 0.07 % → 9.00, 1 % → 2.62 (printed to 2
        // decimals; tolerance half a unit of the last digit).
        assert_relative_eq!(
            critical_n_from_turbulence(0.0007).unwrap(),
            9.00,
            epsilon = 5e-3
        );
        assert_relative_eq!(
            critical_n_from_turbulence(0.01).unwrap(),
            2.62,
            epsilon = 5e-3
        );
        assert!(critical_n_from_turbulence(0.05).is_err());
        assert!(critical_n_from_turbulence(1e-5).is_err());
        assert!(critical_n_from_turbulence(f64::NAN).is_err());
    }
}
