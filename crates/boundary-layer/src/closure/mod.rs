//! Closure relations of the integral boundary-layer methods: pure functions of the local
//! integral state (shape factor H, momentum-thickness Reynolds number Re_θ, …), each citing its
//! source and equation beside it.
//!
//! | module | method | used by |
//! |---|---|---|
//! | [`thwaites`] | Thwaites (1949) one-parameter laminar closure l(λ), H(λ) (Cebeci & Bradshaw 1977 fits) | direct march, attached laminar |
//! | [`laminar`] | two-equation laminar closure H*(H), cf(H, Re_θ), C_D(H, Re_θ) (Drela & Giles 1987), valid in reversed flow | interacting solver, separated flow (via `laminar_blend`) |
//! | [`laminar_table`] | the same functions from our own Falkner–Skan solutions (both branches) | interacting solver, attached flow (via `laminar_blend`) |
//! | [`laminar_blend`] | the table when attached, the fit when separated, C¹ over 4 ≤ H ≤ 5 | interacting solver |
//! | [`head`] | Head (1958) entrainment closure H1(H), F(H1) and Ludwieg & Tillmann (1949) cf | direct march (option) |
//! | [`lag_entrainment`] | Green, Weeks & Brooman (1973) lag-entrainment closure, incompressible, boundary layer and wake | direct march (default), wake, interacting solver |
//! | [`transition`] | Drela & Giles (1987) e^N envelope, Mack (1977) N_crit(Tu) | all marches |
//!
//! Conventions: all quantities are dimensionless unless stated; `h` is the shape factor
//! H = δ*/θ (the kinematic shape factor in incompressible flow); `re_theta` = ue θ/ν; skin friction
//! is based on the local edge speed, cf = τw/(½ρ ue²).
//!
//! Guards: the published fits have poles (at H = 1, at Re_θ ≈ 10, …) outside the range where
//! they were calibrated. Each function documents how it keeps its arguments away from a pole; the
//! guards use [`smooth_floor`], which is the identity above a threshold and joins an exponential
//! tail with a continuous first derivative below it, so functions stay C¹ for Newton solvers and
//! never return NaN for finite input.

pub mod head;
pub mod lag_entrainment;
pub mod laminar;
pub mod laminar_blend;
pub mod laminar_table;
pub mod thwaites;
pub mod transition;

/// C¹ lower bound: returns `x` for `x ≥ floor + width`, and below that
/// `floor + width·exp((x − floor − width)/width)`, which joins with value and slope 1 and tends to
/// `floor` (never reaching it) as `x → −∞`. Requires `width > 0`.
pub(crate) fn smooth_floor(x: f64, floor: f64, width: f64) -> f64 {
    let knee = floor + width;
    if x >= knee {
        x
    } else {
        floor + width * ((x - knee) / width).exp()
    }
}

/// C¹ blend weight 3t² − 2t³ of `t` clamped to [0, 1]: 0 at t ≤ 0, 1 at t ≥ 1, zero slope at
/// both ends (the joins between fits and tables use it).
pub(crate) fn smoothstep(t: f64) -> f64 {
    let t = t.clamp(0.0, 1.0);
    t * t * (3.0 - 2.0 * t)
}

/// Test helper for a two-equation laminar closure (H*(H), cf(H, Re_θ), C_D(H, Re_θ)): each of
/// the three is continuous at every shape factor of `joins` (at Re_θ = 500) and its one-sided
/// slopes there (finite differences, step 1e-6) agree within `slope_tolerance`.
#[cfg(test)]
pub(crate) fn assert_laminar_closure_c1(
    energy_shape_factor: fn(f64) -> f64,
    skin_friction: fn(f64, f64) -> f64,
    dissipation: fn(f64, f64) -> f64,
    joins: &[f64],
    slope_tolerance: f64,
) {
    let fs: [&dyn Fn(f64) -> f64; 3] = [&energy_shape_factor, &|h| skin_friction(h, 500.0), &|h| {
        dissipation(h, 500.0)
    }];
    let d = 1e-6;
    for f in fs {
        for &x in joins {
            approx::assert_relative_eq!(f(x - 1e-12), f(x + 1e-12), epsilon = 1e-9);
            let left = (f(x) - f(x - d)) / d;
            let right = (f(x + d) - f(x)) / d;
            approx::assert_relative_eq!(left, right, epsilon = slope_tolerance);
        }
    }
}

/// Smallest shape factor the laminar and turbulent fits are evaluated at: arguments below
/// `SHAPE_FACTOR_FLOOR + SHAPE_FACTOR_GUARD_WIDTH` are passed through [`smooth_floor`].
/// H = 1 is the physical lower limit (a plug profile); the fits have poles there.
pub(crate) const SHAPE_FACTOR_FLOOR: f64 = 1.05;
/// Width of the C¹ guard above [`SHAPE_FACTOR_FLOOR`].
pub(crate) const SHAPE_FACTOR_GUARD_WIDTH: f64 = 0.05;

/// Shape factor with the C¹ guard against H ≤ 1 applied (identity for H ≥ 1.1).
pub(crate) fn guarded_shape_factor(h: f64) -> f64 {
    smooth_floor(h, SHAPE_FACTOR_FLOOR, SHAPE_FACTOR_GUARD_WIDTH)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn smooth_floor_is_c1_and_bounded() {
        // identity above the knee
        assert_eq!(smooth_floor(2.0, 1.0, 0.1), 2.0);
        // value and slope continuous at the knee (finite differences, step 1e-7)
        let knee = 1.1;
        let d = 1e-7;
        assert_relative_eq!(smooth_floor(knee - d, 1.0, 0.1), knee - d, epsilon = 1e-12);
        let slope = (smooth_floor(knee, 1.0, 0.1) - smooth_floor(knee - d, 1.0, 0.1)) / d;
        assert_relative_eq!(slope, 1.0, epsilon = 1e-5);
        // never below the floor, never NaN
        for x in [-1e300, -10.0, 0.0, 1.0, 1.05] {
            let y = smooth_floor(x, 1.0, 0.1);
            assert!(y > 1.0 || (x < -1.0 && y >= 1.0), "x = {x}, y = {y}");
            assert!(y.is_finite());
        }
    }
}
