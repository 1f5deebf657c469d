//! Laminar closure of the interacting equations: our Falkner–Skan table
//! ([`super::laminar_table`]) on the attached branch, the published fit of Drela & Giles (1987)
//! ([`super::laminar`]) in separated flow, joined C¹ between H = [`BLEND_START`] and
//! [`BLEND_END`] by the weight w = 3t² − 2t³ (the band is our choice).
//!
//! Why two sources. On the attached branch the table is exact for similar flows, and against a
//! finite-difference solution of the laminar boundary-layer equations (E387, 7.15°, Re 3e5, on
//! the coupled solution's edge speed) it carries the amplification factor much closer than the
//! fit (N at arc length 0.2 from the stagnation point, x/c 0.17: fit 0.5 above the table, table
//! 0.3 above the finite-difference solution; `tests/bl_finite_difference.rs`).
//! In separated flow the table follows Stewartson's (1954) lower-branch similarity profiles,
//! whose H* rises faster with H than the fit's; with it the shape factor of a separated shear
//! layer grows more slowly, bubbles lengthen, and at Re 6e4 the NACA 4412 bubble no longer
//! closed (the coupled solve failed from −2° up, where the fit converges; guarded by
//! `long_bubbles_at_the_bottom_of_the_reynolds_range_converge`). The fit is kept there.

use super::{laminar, laminar_table, smoothstep};

/// Shape factor where the blend from the table to the fit begins (Falkner–Skan separation is at
/// H = 4.029; the blend starts just below it so cf changes sign inside the table part).
pub const BLEND_START: f64 = 4.0;
/// Shape factor from which the fit alone is used.
pub const BLEND_END: f64 = 5.0;

/// Weight of the fit: 0 up to [`BLEND_START`], 1 from [`BLEND_END`], C¹ in between.
fn fit_weight(h: f64) -> f64 {
    smoothstep((h - BLEND_START) / (BLEND_END - BLEND_START))
}

fn blend(h: f64, table: f64, fit: f64) -> f64 {
    let w = fit_weight(h);
    (1.0 - w) * table + w * fit
}

/// Energy shape factor H*(H) (dimensionless).
pub fn energy_shape_factor(h: f64) -> f64 {
    blend(
        h,
        laminar_table::energy_shape_factor(h),
        laminar::energy_shape_factor(h),
    )
}

/// Skin-friction coefficient cf(H, Re_θ) (dimensionless).
pub fn skin_friction(h: f64, re_theta: f64) -> f64 {
    blend(
        h,
        laminar_table::skin_friction(h, re_theta),
        laminar::skin_friction(h, re_theta),
    )
}

/// Dissipation coefficient C_D(H, Re_θ) (dimensionless).
pub fn dissipation(h: f64, re_theta: f64) -> f64 {
    blend(
        h,
        laminar_table::dissipation(h, re_theta),
        laminar::dissipation(h, re_theta),
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn table_below_the_band_fit_above_it() {
        for h in [2.3, 2.591, 3.2, 3.9] {
            assert_eq!(
                energy_shape_factor(h),
                laminar_table::energy_shape_factor(h)
            );
            assert_eq!(
                skin_friction(h, 300.0),
                laminar_table::skin_friction(h, 300.0)
            );
            assert_eq!(dissipation(h, 300.0), laminar_table::dissipation(h, 300.0));
        }
        for h in [5.0, 7.0, 12.0] {
            assert_eq!(energy_shape_factor(h), laminar::energy_shape_factor(h));
            assert_eq!(skin_friction(h, 300.0), laminar::skin_friction(h, 300.0));
            assert_eq!(dissipation(h, 300.0), laminar::dissipation(h, 300.0));
        }
    }

    #[test]
    fn c1_across_the_band() {
        // One-sided slopes agree at the band ends and inside it (finite differences, step 1e-6:
        // the tolerance covers the truncation error).
        crate::closure::assert_laminar_closure_c1(
            energy_shape_factor,
            skin_friction,
            dissipation,
            &[BLEND_START, 4.5, BLEND_END],
            1e-4,
        );
    }
}
