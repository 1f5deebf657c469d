//! The laminar layer of the interacting method against a finite-difference solution of the full
//! laminar boundary-layer equations on the same edge speed.
//!
//! The reference is an implicit finite-difference march of the boundary-layer equations in
//! Falkner–Skan variables (below), checked here against Howarth's (1938) exact separation point
//! of the linearly retarded flow, ξ = 0.1198 (tests/data README; Howarth, Proc. R. Soc. A 164).
//! It then measures two things the integral method cannot get from similarity solutions alone:
//! the shape factor in a non-similar adverse gradient (Howarth's flow), and the e^N amplification
//! behind a suction peak, where the E387 at 7° and Re 3e5 transitions (the coupled solution's own
//! edge speed, with the envelope of Drela & Giles 1987 integrated along both solutions).

use foilsweep_boundary_layer::closure::{laminar, laminar_blend, transition};
use foilsweep_boundary_layer::state::{Regime, StationState};
use foilsweep_geometry::{Airfoil, ParseOptions};
use foilsweep_panel::PanelSolver;
use foilsweep_validation::airfoil_path;
use foilsweep_viscous::{solve_point, OperatingPoint, PointStatus, ViscousSettings};

/// Edge speed ue(s) interpolated linearly between stations (and its slope on each interval).
struct EdgeSpeed {
    s: Vec<f64>,
    ue: Vec<f64>,
}

impl EdgeSpeed {
    fn at(&self, s: f64) -> (f64, f64) {
        let k = self
            .s
            .partition_point(|&x| x <= s)
            .clamp(1, self.s.len() - 1);
        let slope = (self.ue[k] - self.ue[k - 1]) / (self.s[k] - self.s[k - 1]);
        (self.ue[k - 1] + slope * (s - self.s[k - 1]), slope)
    }
}

/// One station of a reference or integral solution: arc length, momentum thickness, shape factor
/// and envelope N.
#[derive(Debug, Clone, Copy)]
struct Station {
    s: f64,
    theta: f64,
    h: f64,
    n: f64,
}

/// Finite-difference solution of u uₓ + v u_y = ue ue′ + ν u_yy from s = 0 in the variables
/// η = y √(ue/(ν s)), F = u/ue, f = ∫F dη, m = (s/ue) ue′:
/// F″ + ½(m + 1) f F′ + m(1 − F²) = s (F ∂F/∂s − F′ ∂f/∂s),
/// backward Euler in s with step `ds`, central differences on a stretched η grid (601 points to
/// η = 20), Picard iteration on the nonlinear terms. Starts from the Hiemenz (`stagnation`) or
/// Blasius solution; stops at separation (wall shear ≤ 0) or at `s_end`. Returns a station every
/// `every` steps.
fn finite_difference(
    edge: &EdgeSpeed,
    stagnation: bool,
    reynolds: f64,
    ds: f64,
    s_end: f64,
    every: usize,
) -> (Vec<Station>, Option<f64>) {
    let nu = 1.0 / reynolds;
    let points = 601;
    let growth: f64 = 1.02;
    let first = 20.0 * (growth - 1.0) / (growth.powi(points as i32 - 1) - 1.0);
    let mut eta = vec![0.0; points];
    for j in 1..points {
        eta[j] = eta[j - 1] + first * growth.powi(j as i32 - 1);
    }
    let mut f_prev = vec![0.0; points];
    let mut u_prev: Vec<f64> = eta.iter().map(|e| (e / 3.0).min(1.0)).collect();
    let (mut s, mut n, mut rate_prev) = (0.0, 0.0, 0.0);
    let mut out = Vec::new();
    let mut step = 0usize;
    loop {
        let similar = step == 0;
        let s_new = if similar { 0.0 } else { s + ds };
        if s_new > s_end {
            return (out, None);
        }
        // Pressure-gradient parameter m; Hiemenz (m = 1) before the first station of a
        // stagnation-point flow, where ue rises linearly.
        let (ue, m) = if similar {
            (1.0, if stagnation { 1.0 } else { 0.0 })
        } else {
            let (ue, slope) = edge.at(s_new);
            let m = if stagnation && s_new < edge.s[1] {
                1.0
            } else {
                s_new / ue * slope
            };
            (ue, m)
        };
        let history = if similar { 0.0 } else { s_new / ds };
        let mut u = u_prev.clone();
        let mut f = f_prev.clone();
        for _ in 0..400 {
            for j in 1..points {
                f[j] = f[j - 1] + 0.5 * (u[j] + u[j - 1]) * (eta[j] - eta[j - 1]);
            }
            let (mut lower, mut diag, mut upper, mut rhs) = (
                vec![0.0; points],
                vec![1.0; points],
                vec![0.0; points],
                vec![0.0; points],
            );
            rhs[points - 1] = 1.0;
            for j in 1..points - 1 {
                let (hm, hp) = (eta[j] - eta[j - 1], eta[j + 1] - eta[j]);
                let a = 0.5 * (m + 1.0) * f[j] + history * (f[j] - f_prev[j]);
                let b = -m * u[j] - history * u[j];
                lower[j] = 2.0 / (hm * (hm + hp)) - a * hp / (hm * (hm + hp));
                upper[j] = 2.0 / (hp * (hm + hp)) + a * hm / (hp * (hm + hp));
                diag[j] = -2.0 / (hm * hp) + a * (hp - hm) / (hm * hp) + b;
                rhs[j] = -(m + history * u[j] * u_prev[j]);
            }
            for j in 1..points {
                let w = lower[j] / diag[j - 1];
                diag[j] -= w * upper[j - 1];
                rhs[j] -= w * rhs[j - 1];
            }
            let mut next = vec![0.0; points];
            next[points - 1] = rhs[points - 1] / diag[points - 1];
            for j in (0..points - 1).rev() {
                next[j] = (rhs[j] - upper[j] * next[j + 1]) / diag[j];
            }
            let change = next
                .iter()
                .zip(&u)
                .map(|(a, b)| (a - b).abs())
                .fold(0.0, f64::max);
            for (uj, nj) in u.iter_mut().zip(&next) {
                *uj = 0.5 * (*uj + nj);
            }
            if change < 1e-10 {
                break;
            }
        }
        let (mut displacement, mut momentum) = (0.0, 0.0);
        for j in 1..points {
            let h = eta[j] - eta[j - 1];
            displacement += 0.5 * h * ((1.0 - u[j - 1]) + (1.0 - u[j]));
            momentum += 0.5 * h * (u[j - 1] * (1.0 - u[j - 1]) + u[j] * (1.0 - u[j]));
        }
        let scale = if similar {
            0.0
        } else {
            (nu * s_new / ue).sqrt()
        };
        let theta = momentum * scale;
        let h = displacement / momentum;
        let rate = transition::amplification_rate(h, theta, ue * theta / nu);
        if !similar {
            n += 0.5 * (rate + rate_prev) * ds;
        }
        if u[1] <= 0.0 {
            return (out, Some(s_new));
        }
        if !similar && step.is_multiple_of(every) {
            out.push(Station {
                s: s_new,
                theta,
                h,
                n,
            });
        }
        rate_prev = rate;
        u_prev = u;
        f_prev = f;
        s = s_new;
        step += 1;
    }
}

/// Fine RK4 march of the two integral equations (momentum, kinetic energy) with a given closure
/// (H*, cf, C_D as functions of H and Re_θ) from the Blasius state at s = `start`, with the
/// envelope N. Returns a station every `every` steps.
fn integral_march(
    edge: &EdgeSpeed,
    closure: [fn(f64, f64) -> f64; 3],
    reynolds: f64,
    start: f64,
    ds: f64,
    s_end: f64,
    every: usize,
) -> Vec<Station> {
    let nu = 1.0 / reynolds;
    let [h_star, cf, cd] = closure;
    let rhs = |s: f64, theta: f64, h: f64| {
        let (ue, slope) = edge.at(s);
        let re_theta = ue * theta / nu;
        let g = theta / ue * slope;
        let d_theta = 0.5 * cf(h, re_theta) - (2.0 + h) * g;
        let hs = h_star(h, re_theta);
        let d_hs =
            (2.0 * cd(h, re_theta) - 0.5 * hs * cf(h, re_theta) + hs * (h - 1.0) * g) / theta;
        let e = 1e-6;
        let slope_hs = (h_star(h + e, re_theta) - h_star(h - e, re_theta)) / (2.0 * e);
        (d_theta, d_hs / slope_hs)
    };
    let mut s = start;
    let mut theta = 0.6641 * (nu * s / edge.at(s).0).sqrt();
    let mut h = 2.5911;
    let (mut n, mut rate_prev) = (0.0, 0.0);
    let mut out = Vec::new();
    let mut step = 0usize;
    while s + ds <= s_end {
        let (a1, b1) = rhs(s, theta, h);
        let (a2, b2) = rhs(s + 0.5 * ds, theta + 0.5 * ds * a1, h + 0.5 * ds * b1);
        let (a3, b3) = rhs(s + 0.5 * ds, theta + 0.5 * ds * a2, h + 0.5 * ds * b2);
        let (a4, b4) = rhs(s + ds, theta + ds * a3, h + ds * b3);
        theta += ds / 6.0 * (a1 + 2.0 * a2 + 2.0 * a3 + a4);
        h += ds / 6.0 * (b1 + 2.0 * b2 + 2.0 * b3 + b4);
        s += ds;
        let rate = transition::amplification_rate(h, theta, edge.at(s).0 * theta / nu);
        n += 0.5 * (rate + rate_prev) * ds;
        rate_prev = rate;
        step += 1;
        if step.is_multiple_of(every) {
            out.push(Station { s, theta, h, n });
        }
    }
    out
}

/// The station of `stations` nearest to arc length `s`.
fn nearest(stations: &[Station], s: f64) -> Station {
    *stations
        .iter()
        .min_by(|a, b| (a.s - s).abs().total_cmp(&(b.s - s).abs()))
        .expect("stations")
}

/// Howarth's flow ue = 1 − s/8 (so ξ = s/8), Re 1e6 on the unit length.
///
/// - The reference separates at ξ = 0.1198 ± 0.0005 (exact value: Howarth 1938; measured
///   0.1199; the tolerance allows for the first-order march with Δξ = 5e-5).
/// - The two-equation method with the interacting closure (`laminar_blend`: our Falkner–Skan
///   table on this attached branch) follows θ within 1 % and H within 0.06 up to ξ = 0.1. A
///   one-parameter profile family cannot carry the history of a non-similar flow, so H runs
///   high as separation nears: measured +0.054 at ξ = 0.1 (the published fit of Drela & Giles
///   1987, `laminar`, gives +0.072 and fails this level; the finite-difference H there is 3.13).
///   The 0.06 guards the reached level, it is not a published tolerance.
#[test]
fn howarth_flow_against_the_finite_difference_reference() {
    let edge = EdgeSpeed {
        s: (0..=2000).map(|i| i as f64 * 0.0005).collect(),
        ue: (0..=2000).map(|i| 1.0 - i as f64 * 0.0005 / 8.0).collect(),
    };
    let (reference, separation) = finite_difference(&edge, false, 1.0e6, 4.0e-4, 1.0, 25);
    let separation = separation.expect("Howarth's flow separates");
    println!(
        "finite difference: separation at xi = {:.4}",
        separation / 8.0
    );
    assert!((separation / 8.0 - 0.1198).abs() <= 0.0005);

    let blend = [
        |h, _| laminar_blend::energy_shape_factor(h),
        laminar_blend::skin_friction,
        laminar_blend::dissipation,
    ];
    let fit = [
        |h, _| laminar::energy_shape_factor(h),
        laminar::skin_friction,
        laminar::dissipation,
    ];
    let blend_march = integral_march(&edge, blend, 1.0e6, 1e-4, 1e-5, 0.81, 100);
    let fit_march = integral_march(&edge, fit, 1.0e6, 1e-4, 1e-5, 0.81, 100);
    for xi in [0.02, 0.05, 0.08, 0.1] {
        let exact = nearest(&reference, 8.0 * xi);
        let two_equation = nearest(&blend_march, 8.0 * xi);
        let published_fit = nearest(&fit_march, 8.0 * xi);
        println!(
            "xi {xi}: H {:.3} (finite difference {:.3}, published fit {:.3}), theta ratio {:.4}",
            two_equation.h,
            exact.h,
            published_fit.h,
            two_equation.theta / exact.theta
        );
        assert!((two_equation.h - exact.h).abs() <= 0.06, "H at xi {xi}");
        assert!(
            (two_equation.theta / exact.theta - 1.0).abs() <= 0.01,
            "theta at xi {xi}"
        );
    }
}

/// E387 upper surface at 7.15°, Re 3e5 (the point whose cd the model over-predicts by 13.6 %,
/// see tests/viscous_validation.rs): the coupled solution's laminar layer against the
/// finite-difference solution on the coupled solution's own edge speed, up to the station
/// before transition.
///
/// - θ within 3 % from x/c 0.05 on (the coupled stations are 0.003–0.01 c apart).
/// - N at the last laminar station: the coupled solution runs ahead of the reference, which
///   moves transition upstream. Measured 0.69 ahead (8.85 against 8.16 at x/c 0.192, transition
///   0.201). Part of it is the one-parameter closure (a fine integral march on the same edge
///   speed runs about 0.3 ahead by x/c 0.17); the rest comes from the coarse stations behind the
///   suction peak, where the coupled H overshoots (3.53 against 3.25 one station after the
///   peak). With the published fit in attached flow and the upstream amplification rate (before
///   `closure::laminar_blend` and the trapezoidal rule) it was 1.37 ahead (8.99 against 7.62 at
///   x/c 0.181, transition 0.182) and this check failed. It guards ≤ 0.8, the reached level.
#[test]
fn e387_suction_peak_amplification_against_the_finite_difference_reference() {
    let text = std::fs::read_to_string(airfoil_path("e387.dat")).expect("shipped E387");
    let airfoil = Airfoil::parse(&text, "e387.dat", &ParseOptions::default())
        .expect("E387 parses")
        .0;
    let solver = PanelSolver::new(airfoil.repanel(160).expect("repanel").points()).expect("panels");
    let settings = ViscousSettings::default();
    // Approach 7.15° in 0.5° steps from 0°, as a polar does.
    let mut warm = None;
    let mut result = None;
    for alpha in [
        0.0, 0.5, 1.0, 1.5, 2.0, 2.5, 3.0, 3.5, 4.0, 4.5, 5.0, 5.5, 6.0, 6.5, 7.0, 7.15,
    ] {
        let point = OperatingPoint::at_alpha_deg(alpha, 3.0e5);
        let r = solve_point(&solver, &point, &settings, warm.as_ref()).expect("solves");
        warm = Some(r.warm_start.clone());
        result = Some(r);
    }
    let result = result.expect("solved");
    assert_eq!(result.status, PointStatus::Converged);
    let upper = &result.upper;
    let transition = upper.transition_x_over_c.expect("upper transition");
    // Laminar stations from the stagnation point (s = 0) up to transition.
    let laminar: Vec<(f64, f64, &StationState)> = upper
        .stations
        .iter()
        .zip(&upper.x_over_c)
        .take_while(|(st, _)| matches!(st.regime, Regime::Laminar | Regime::LaminarSeparated))
        .map(|(st, &x)| (st.arc_length, x, st))
        .collect();
    let edge = EdgeSpeed {
        s: std::iter::once(0.0)
            .chain(laminar.iter().map(|(s, _, _)| *s))
            .collect(),
        ue: std::iter::once(0.0)
            .chain(laminar.iter().map(|(_, _, st)| st.edge_velocity))
            .collect(),
    };
    let s_last = laminar.last().expect("laminar stations").0;
    let (reference, separation) = finite_difference(&edge, true, 3.0e5, 2.0e-5, s_last, 50);
    assert!(
        separation.is_none(),
        "reference separates at {separation:?}"
    );

    let mut worst_theta: f64 = 0.0;
    for &(s, _, st) in laminar.iter().filter(|(_, x, _)| *x >= 0.05) {
        let exact = nearest(&reference, s);
        worst_theta = worst_theta.max((st.momentum_thickness / exact.theta - 1.0).abs());
    }
    // N at the last laminar station (x/c ≈ 0.19, just ahead of transition at 0.20).
    let &(s, x, st) = laminar.last().expect("laminar stations");
    let (coupled_n, exact_n) = (st.amplification, nearest(&reference, s).n);
    println!(
        "E387 7.15 deg Re 3e5: transition {transition:.3}; theta within {:.1} %; N at x/c {x:.3}: \
         coupled {coupled_n:.2}, finite difference {exact_n:.2}",
        100.0 * worst_theta
    );
    assert!(worst_theta <= 0.03);
    assert!(coupled_n - exact_n <= 0.8 && coupled_n > exact_n - 0.3);
}
