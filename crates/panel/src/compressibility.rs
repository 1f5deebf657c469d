//! Subsonic compressibility corrections applied to the incompressible panel solution
//! (METHODS §7.1): Kármán–Tsien in pressure and velocity form, and the critical pressure
//! coefficient. Valid for 0 ≤ M∞ < 1 and subcritical flow; outside 0 ≤ M∞ < 1 the functions
//! return NaN (a flagged value, never a panic).

/// Ratio of specific heats of air.
const GAMMA_AIR: f64 = 1.4;

/// β = √(1 − M²), or NaN outside 0 ≤ M < 1.
fn prandtl_glauert_beta(mach: f64) -> f64 {
    if (0.0..1.0).contains(&mach) {
        (1.0 - mach * mach).sqrt()
    } else {
        f64::NAN
    }
}

/// Kármán–Tsien pressure coefficient from the incompressible one (Kármán 1941, J. Aeronaut. Sci.
/// 8, 337–356; Tsien 1939, J. Aeronaut. Sci. 6, 399–407):
/// `Cp = Cp0 / [β + (M²/(1 + β))·Cp0/2]`, β = √(1 − M²).
pub fn karman_tsien_cp(cp0: f64, mach: f64) -> f64 {
    let beta = prandtl_glauert_beta(mach);
    cp0 / (beta + mach * mach / (1.0 + beta) * 0.5 * cp0)
}

/// Kármán–Tsien speed (V∞ = 1) from the incompressible speed `q0`, velocity form of METHODS §7.1:
/// `q = q0 (1 − λ)/(1 − λ q0²)`, λ = M²/(1 + β)². Odd in `q0`, so a signed surface speed γ
/// keeps its sign.
pub fn karman_tsien_speed(q0: f64, mach: f64) -> f64 {
    let beta = prandtl_glauert_beta(mach);
    let lambda = mach * mach / ((1.0 + beta) * (1.0 + beta));
    q0 * (1.0 - lambda) / (1.0 - lambda * q0 * q0)
}

/// Critical pressure coefficient, where the local flow reaches M = 1 (isentropic, γ = 1.4):
/// `Cp* = (2/(γM²))·{[(2 + (γ−1)M²)/(γ+1)]^(γ/(γ−1)) − 1}`. NaN for M ≤ 0 or M ≥ 1.
pub fn critical_cp(mach: f64) -> f64 {
    if !(mach > 0.0 && mach < 1.0) {
        return f64::NAN;
    }
    let g = GAMMA_AIR;
    let m2 = mach * mach;
    2.0 / (g * m2) * (((2.0 + (g - 1.0) * m2) / (g + 1.0)).powf(g / (g - 1.0)) - 1.0)
}

/// Isentropic pressure coefficient of a local speed `q` (V∞ = 1) at free-stream Mach `mach`,
/// used to compare the velocity and pressure forms:
/// `Cp = (2/(γM²))·{[1 + ½(γ−1)M²(1 − q²)]^(γ/(γ−1)) − 1}`. NaN for M ≤ 0 or M ≥ 1.
pub fn isentropic_cp(q: f64, mach: f64) -> f64 {
    if !(mach > 0.0 && mach < 1.0) {
        return f64::NAN;
    }
    let g = GAMMA_AIR;
    let m2 = mach * mach;
    2.0 / (g * m2) * ((1.0 + 0.5 * (g - 1.0) * m2 * (1.0 - q * q)).powf(g / (g - 1.0)) - 1.0)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn incompressible_limit_is_identity() {
        // M = 0: β = 1, λ = 0, so both forms return their input exactly.
        assert_relative_eq!(karman_tsien_cp(-0.7, 0.0), -0.7, epsilon = 1e-15);
        assert_relative_eq!(karman_tsien_speed(1.3, 0.0), 1.3, epsilon = 1e-15);
    }

    #[test]
    fn out_of_range_mach_is_nan() {
        assert!(karman_tsien_cp(-1.0, 1.0).is_nan());
        assert!(karman_tsien_speed(1.0, -0.1).is_nan());
        assert!(critical_cp(0.0).is_nan());
        assert!(critical_cp(f64::NAN).is_nan());
        assert!(isentropic_cp(1.0, 1.2).is_nan());
    }
}
