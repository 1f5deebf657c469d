//! Head's (1958) entrainment closure for attached turbulent layers, with the Ludwieg & Tillmann
//! (1949) skin-friction law.
//!
//! Source: Head, M.R. (1958), *Entrainment in the turbulent boundary layer*, ARC R&M 3152; curve
//! fits of Cebeci & Bradshaw (1977), *Momentum Transfer in Boundary Layers* (also Moran 1984),
//! as restated in METHODS §3.2:
//!
//! ```text
//! H1(H) = 3.3 + 0.8234 (H − 1.1)^−1.287      H ≤ 1.6
//! H1(H) = 3.3 + 1.5501 (H − 0.6778)^−3.064   H > 1.6
//! F(H1) = 0.0306 (H1 − 3.0)^−0.6169
//! cf    = 0.246 · 10^(−0.678 H) · Re_θ^−0.268        (Ludwieg & Tillmann 1949)
//! ```
//!
//! H1 = (δ − δ*)/θ is the entrainment shape factor; the entrainment equation is
//! d(ue θ H1)/ds = ue F(H1). The two branches of H1(H) differ by 0.4 % at H = 1.6 (5.309 against
//! 5.287): the published fit is discontinuous there, so [`shape_factor_from_entrainment`] returns
//! H = 1.6 for any H1 inside that gap. Head's closure is calibrated for attached layers
//! (1.3 ≲ H ≲ 2.4–2.8); do not use it in separated flow.
//!
//! Guards (documented clamps, outside the calibrated range): H is floored C¹ at 1.15 in H1(H)
//! (pole at 1.1); H1 is floored C¹ at 3.05 in F(H1) (pole at 3.0); Re_θ is floored at 1 in the
//! Ludwieg–Tillmann law; the inverse is searched on 1.15 < H ≤ [`MAX_SHAPE_FACTOR`].

use super::smooth_floor;

/// Largest shape factor returned by [`shape_factor_from_entrainment`]: H1 values below H1(10.0)
/// (≈ 3.30, the asymptote of the fit) give 10.0. Far beyond Head's calibration.
pub const MAX_SHAPE_FACTOR: f64 = 10.0;

/// Floor and guard width for H in H1(H) (pole of the first branch at H = 1.1).
const H_FLOOR: f64 = 1.15;
const H_GUARD_WIDTH: f64 = 0.02;
/// Floor and guard width for H1 in F(H1) (pole at H1 = 3.0).
const H1_FLOOR: f64 = 3.05;
const H1_GUARD_WIDTH: f64 = 0.02;
/// Branch point of the H1(H) fit.
const BRANCH_H: f64 = 1.6;

/// H1(H) and dH1/dH on the guarded argument (Cebeci & Bradshaw 1977 fit of Head 1958).
fn entrainment_shape_factor_and_slope(h: f64) -> (f64, f64) {
    let h = smooth_floor(h, H_FLOOR, H_GUARD_WIDTH);
    if h <= BRANCH_H {
        let a = 0.8234 * (h - 1.1).powf(-1.287);
        (3.3 + a, -1.287 * a / (h - 1.1))
    } else {
        let a = 1.5501 * (h - 0.6778).powf(-3.064);
        (3.3 + a, -3.064 * a / (h - 0.6778))
    }
}

/// Head's entrainment shape factor H1 = (δ − δ*)/θ as a function of the shape factor `h`
/// (Head 1958, Cebeci & Bradshaw 1977 fit; METHODS §3.2). Decreasing in H, tends to 3.3.
pub fn entrainment_shape_factor(h: f64) -> f64 {
    entrainment_shape_factor_and_slope(h).0
}

/// dH1/dH of [`entrainment_shape_factor`] (on the guarded argument; always negative; the
/// one-sided value of the lower branch at H = 1.6).
pub fn entrainment_shape_factor_slope(h: f64) -> f64 {
    entrainment_shape_factor_and_slope(h).1
}

/// Inverse of [`entrainment_shape_factor`]: the shape factor H with H1(H) = `h1`, found by a
/// bracketed Newton iteration on the forward fit so that the pair is consistent to 1e-12 (the
/// published explicit inverse is only good to ≈ 1e-3). Within the 0.4 % gap of the fit at
/// H = 1.6 the result is 1.6. Outside the range of the forward fit the result is clamped to
/// [H(floor), [`MAX_SHAPE_FACTOR`]] (module doc).
pub fn shape_factor_from_entrainment(h1: f64) -> f64 {
    if h1.is_nan() {
        return f64::NAN;
    }
    // H1(H) is strictly decreasing: bracket [lo, hi] with H1(lo) ≥ h1 ≥ H1(hi).
    let mut lo = H_FLOOR + H_GUARD_WIDTH;
    let mut hi = MAX_SHAPE_FACTOR;
    if h1 >= entrainment_shape_factor(lo) {
        return lo;
    }
    if h1 <= entrainment_shape_factor(hi) {
        return hi;
    }
    // Start from the explicit inverse (Cebeci & Bradshaw 1977; METHODS §3.2).
    let mut h = if h1 < 5.3 {
        0.6778 + 1.1536 * (h1 - 3.3).powf(-0.326)
    } else {
        1.1 + 0.86 * (h1 - 3.3).powf(-0.777)
    }
    .clamp(lo, hi);
    for _ in 0..100 {
        let (value, slope) = entrainment_shape_factor_and_slope(h);
        let residual = value - h1;
        if residual > 0.0 {
            lo = h;
        } else {
            hi = h;
        }
        let mut next = h - residual / slope;
        if !(next > lo && next < hi) {
            next = 0.5 * (lo + hi);
        }
        if (next - h).abs() <= 1e-13 * h || hi - lo <= 1e-13 * h {
            return next;
        }
        h = next;
    }
    h
}

/// Head's entrainment function F(H1) = (1/ue) d(ue θ H1)/ds (dimensionless), Cebeci & Bradshaw
/// (1977) fit, METHODS §3.2. H1 is floored C¹ at 3.05 (pole at 3.0).
pub fn entrainment_function(h1: f64) -> f64 {
    let h1 = smooth_floor(h1, H1_FLOOR, H1_GUARD_WIDTH);
    0.0306 * (h1 - 3.0).powf(-0.6169)
}

/// Turbulent skin friction cf = τw/(½ρue²) of Ludwieg & Tillmann (1949), Ing.-Arch. 17
/// (NACA TM 1285): cf = 0.246·10^(−0.678H)·Re_θ^(−0.268), at shape factor `h` and
/// `re_theta` = ue θ/ν (floored at 1). Never zero: separation must be judged from H.
pub fn ludwieg_tillmann_skin_friction(h: f64, re_theta: f64) -> f64 {
    0.246 * 10f64.powf(-0.678 * h) * re_theta.max(1.0).powf(-0.268)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn published_sample_values() {
        // METHODS §3.2 / §8 #15 [✓num arithmetic]: H1(1.4) = 7.178, F(H1(1.4)) = 0.01267,
        // H1(2.0) = 3.959, F = 0.0314, cf_LT(1.4, 1000) = 0.00434. Tolerance: half a unit in the
        // last printed digit.
        assert_relative_eq!(entrainment_shape_factor(1.4), 7.178, epsilon = 5e-4);
        assert_relative_eq!(entrainment_function(7.178), 0.01267, epsilon = 5e-6);
        assert_relative_eq!(entrainment_shape_factor(2.0), 3.959, epsilon = 5e-4);
        assert_relative_eq!(entrainment_function(3.959), 0.0314, epsilon = 5e-5);
        assert_relative_eq!(
            ludwieg_tillmann_skin_friction(1.4, 1000.0),
            0.00434,
            epsilon = 5e-6
        );
    }

    #[test]
    fn inverse_is_consistent() {
        // Newton on the forward fit: H1(H(h1)) = h1 to round-off, away from the branch gap.
        for i in 0..=300 {
            let h = 1.2 + 0.01 * f64::from(i);
            if (h - BRANCH_H).abs() < 1e-9 {
                continue;
            }
            let h1 = entrainment_shape_factor(h);
            assert_relative_eq!(shape_factor_from_entrainment(h1), h, epsilon = 1e-9);
        }
        // inside the gap at H = 1.6 the inverse returns the branch point
        let gap_mid = 0.5 * (entrainment_shape_factor(1.6) + entrainment_shape_factor(1.6 + 1e-12));
        assert_relative_eq!(shape_factor_from_entrainment(gap_mid), 1.6, epsilon = 1e-9);
    }

    #[test]
    fn guards_stay_finite() {
        for x in [-1.0, 0.0, 1.0, 1.1, 3.0, 3.3, 1e9] {
            assert!(entrainment_shape_factor(x).is_finite());
            assert!(entrainment_function(x).is_finite());
            assert!(shape_factor_from_entrainment(x).is_finite());
            assert!(ludwieg_tillmann_skin_friction(1.4, x).is_finite());
        }
    }
}
