//! Thwaites's (1949) integral method for the attached laminar layer, marched from a stagnation
//! point or a sharp leading edge with the edge speed given.
//!
//! Thwaites linearised the momentum integral to ue d(θ²)/ds/ν ≈ 0.45 − 6λ, λ = (θ²/ν) due/ds,
//! which integrates to (Thwaites 1949, Aeronaut. Q. 1, 245–280; METHODS §2.2)
//!
//! ```text
//! θ²(s) ue(s)⁶ = θ0² ue0⁶ + 0.45 ν ∫_{s0}^{s} ue⁵ ds'
//! ```
//!
//! The integral is evaluated exactly for ue linear between stations,
//! ∫ ue⁵ ds = Δs (ua⁵ + ua⁴ub + … + ub⁵)/6, so a linear ue(s) = K s from a stagnation point
//! (ue0 = 0) gives θ² = 0.075 ν/K at every station: the Hiemenz start of METHODS §2.5 (λ = 0.075;
//! exact Hiemenz 0.0855) is built in, and station 0 takes that limit with K = due/ds there. With
//! ue0 > 0 the start is a sharp leading edge (θ0 = 0, Blasius-like).
//!
//! The edge-speed gradient is the three-point finite difference on the (non-uniform) stations,
//! exact for a quadratic ue(s), one-sided at the ends. No smoothing is applied: a noisy ue (for
//! example from a coarse panel solution near the leading edge) should be smoothed by the caller.

/// Edge-speed gradient due/ds at every station (units of ue per unit s): three-point
/// non-uniform central difference inside, two-point one-sided at the ends.
///
/// # Panics
/// If the slices differ in length or have fewer than two entries (a contract violation; the
/// direct march validates its inputs first).
#[track_caller]
pub fn edge_velocity_gradient(arc_length: &[f64], edge_velocity: &[f64]) -> Vec<f64> {
    let n = arc_length.len();
    assert!(
        n >= 2 && edge_velocity.len() == n,
        "need ≥ 2 stations of equal length"
    );
    let s = arc_length;
    let u = edge_velocity;
    (0..n)
        .map(|i| {
            if i == 0 {
                (u[1] - u[0]) / (s[1] - s[0])
            } else if i == n - 1 {
                (u[i] - u[i - 1]) / (s[i] - s[i - 1])
            } else {
                let h1 = s[i] - s[i - 1];
                let h2 = s[i + 1] - s[i];
                (-h2 / (h1 * (h1 + h2))) * u[i - 1]
                    + ((h2 - h1) / (h1 * h2)) * u[i]
                    + (h1 / (h2 * (h1 + h2))) * u[i + 1]
            }
        })
        .collect()
}

/// ∫ ue⁵ ds over one interval with ue linear from `ua` to `ub` over `ds` (exact).
pub(crate) fn integral_ue5(ua: f64, ub: f64, ds: f64) -> f64 {
    let (a2, b2) = (ua * ua, ub * ub);
    ds * (a2 * a2 * ua + a2 * a2 * ub + a2 * ua * b2 + a2 * b2 * ub + ua * b2 * b2 + b2 * b2 * ub)
        / 6.0
}

/// Momentum thickness θ at every station by Thwaites's integral (module doc), for kinematic
/// viscosity `kinematic_viscosity` (ν = 1/Re in chord units with V∞ = 1). A start with
/// `edge_velocity[0] == 0` is a stagnation point (θ0² = 0.075ν/K, K = due/ds there); otherwise
/// θ0 = 0 (sharp leading edge).
///
/// # Panics
/// If the slices differ in length or have fewer than two entries, or if the edge velocity is
/// zero at a station after the first (contract violations; the direct march validates first).
#[track_caller]
pub fn momentum_thickness(
    arc_length: &[f64],
    edge_velocity: &[f64],
    kinematic_viscosity: f64,
) -> Vec<f64> {
    let n = arc_length.len();
    assert!(
        n >= 2 && edge_velocity.len() == n,
        "need ≥ 2 stations of equal length"
    );
    let u = edge_velocity;
    let mut theta = Vec::with_capacity(n);
    let mut integral = 0.0; // θ² ue⁶ / ν at the current station (0 at either kind of start)
    theta.push(if u[0] == 0.0 {
        let k = (u[1] - u[0]) / (arc_length[1] - arc_length[0]);
        (0.075 * kinematic_viscosity / k).sqrt()
    } else {
        0.0
    });
    for i in 1..n {
        assert!(u[i] > 0.0, "edge velocity must be positive after the start");
        integral += crate::equations::THWAITES_COEFFICIENT
            * integral_ue5(u[i - 1], u[i], arc_length[i] - arc_length[i - 1]);
        let u3 = u[i] * u[i] * u[i];
        theta.push((kinematic_viscosity * integral).sqrt() / u3);
    }
    theta
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn stagnation_start_gives_lambda_0_075() {
        // ue = K s: Thwaites's integral gives θ² = 0.075 ν/K exactly (METHODS §2.5, §8 #6).
        let s: Vec<f64> = (0..20).map(|i| 0.01 * f64::from(i)).collect();
        let u: Vec<f64> = s.iter().map(|x| 3.0 * x).collect();
        let nu = 1e-5;
        for th in momentum_thickness(&s, &u, nu) {
            assert_relative_eq!(th * th * 3.0 / nu, 0.075, max_relative = 1e-12);
        }
    }

    #[test]
    fn gradient_is_exact_for_quadratics() {
        let s = [0.0, 0.1, 0.25, 0.3, 0.7];
        let u: Vec<f64> = s.iter().map(|x| 1.0 + 2.0 * x - 3.0 * x * x).collect();
        let g = edge_velocity_gradient(&s, &u);
        for i in 1..4 {
            assert_relative_eq!(g[i], 2.0 - 6.0 * s[i], epsilon = 1e-12);
        }
    }
}
