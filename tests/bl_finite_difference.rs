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
//!
//! The second reference is linear stability theory on the finite-difference profiles: an
//! Orr–Sommerfeld solver (Chebyshev collocation, checked against Orszag's 1971 plane-Poiseuille
//! eigenvalue and the Blasius critical Reynolds number) gives e^N with fixed frequencies, which
//! the envelope approximates. On Falkner–Skan flows it checks the envelope correlation itself
//! (recalled from memory); on the E387 at 7.15° it shows how much of the early transition there
//! is the envelope and how much the critical N itself.
//!
//! The third is spatial linear stability (the same equation with the frequency given and the
//! complex wavenumber sought, checked against Gaster's transformation on Blasius), which also
//! holds on the reversed-flow profiles of a separated layer where the temporal route fails: it
//! checks the envelope's rate inside laminar separation bubbles, on Stewartson's profiles and
//! along the E387 bubble at 4°, Re 2e5.

use foilsweep_boundary_layer::closure::{laminar, laminar_blend, transition};
use foilsweep_boundary_layer::falkner_skan::{self, Branch};
use foilsweep_boundary_layer::state::{EventKind, Regime, StationState};
use foilsweep_geometry::{Airfoil, ParseOptions};
use foilsweep_panel::PanelSolver;
use foilsweep_validation::airfoil_path;
use foilsweep_viscous::{solve_point, OperatingPoint, PointStatus, SurfaceResult, ViscousSettings};
use nalgebra::{Complex, DMatrix};

/// Complex numbers of the stability problem.
type C = Complex<f64>;

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

/// Points of the finite-difference grid in η.
const FD_POINTS: usize = 601;

/// The stretched η grid of the finite-difference solution: [`FD_POINTS`] points to η = 20,
/// neighbouring steps in the ratio 1.02.
fn eta_grid() -> Vec<f64> {
    let growth: f64 = 1.02;
    let first = 20.0 * (growth - 1.0) / (growth.powi(FD_POINTS as i32 - 1) - 1.0);
    let mut eta = vec![0.0; FD_POINTS];
    for j in 1..FD_POINTS {
        eta[j] = eta[j - 1] + first * growth.powi(j as i32 - 1);
    }
    eta
}

/// A velocity profile at arc length `s`: u/ue and its second derivative at the points `eta`,
/// with the edge speed and the length scale that turns η into y (√(ν s/ue) for the
/// finite-difference solution).
struct Profile {
    s: f64,
    edge_velocity: f64,
    length: f64,
    eta: Vec<f64>,
    u: Vec<f64>,
    u_second: Vec<f64>,
}

/// Finite-difference solution of u uₓ + v u_y = ue ue′ + ν u_yy from s = 0 in the variables
/// η = y √(ue/(ν s)), F = u/ue, f = ∫F dη, m = (s/ue) ue′:
/// F″ + ½(m + 1) f F′ + m(1 − F²) = s (F ∂F/∂s − F′ ∂f/∂s),
/// backward Euler in s with step `ds`, central differences on a stretched η grid (601 points to
/// η = 20), Picard iteration on the nonlinear terms. Starts from the Hiemenz (`stagnation`) or
/// Blasius solution; stops at separation (wall shear ≤ 0) or at `s_end`. Returns a station every
/// `every` steps, with its velocity profile in the second list when `profiles` is set.
fn finite_difference(
    edge: &EdgeSpeed,
    stagnation: bool,
    reynolds: f64,
    ds: f64,
    s_end: f64,
    every: usize,
    profiles: bool,
) -> (Vec<Station>, Option<f64>, Vec<Profile>) {
    let nu = 1.0 / reynolds;
    let points = FD_POINTS;
    let eta = eta_grid();
    let mut kept = Vec::new();
    let mut f_prev = vec![0.0; points];
    let mut u_prev: Vec<f64> = eta.iter().map(|e| (e / 3.0).min(1.0)).collect();
    let (mut s, mut n, mut rate_prev) = (0.0, 0.0, 0.0);
    let mut out = Vec::new();
    let mut step = 0usize;
    loop {
        let similar = step == 0;
        let s_new = if similar { 0.0 } else { s + ds };
        if s_new > s_end {
            return (out, None, kept);
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
            return (out, Some(s_new), kept);
        }
        if !similar && step.is_multiple_of(every) {
            out.push(Station {
                s: s_new,
                theta,
                h,
                n,
            });
            if profiles {
                let mut u_second = vec![0.0; points];
                for j in 1..points - 1 {
                    let (hm, hp) = (eta[j] - eta[j - 1], eta[j + 1] - eta[j]);
                    u_second[j] = 2.0 * (u[j + 1] * hm - u[j] * (hm + hp) + u[j - 1] * hp)
                        / (hm * hp * (hm + hp));
                }
                u_second[0] = u_second[1];
                kept.push(Profile {
                    s: s_new,
                    edge_velocity: ue,
                    length: scale,
                    eta: eta.clone(),
                    u: u.clone(),
                    u_second,
                });
            }
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
    let (reference, separation, _) = finite_difference(&edge, false, 1.0e6, 4.0e-4, 1.0, 25, false);
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

/// Critical N of the coupled solutions here (the default of the validation checks).
const CRITICAL_N: f64 = 9.0;

/// Upper surface of the coupled E387 solution at `alpha_deg` and `reynolds`, 160 panels, reached
/// in 0.5° steps from 0° as a polar does, with the given critical N.
fn e387_upper_surface(alpha_deg: f64, reynolds: f64, critical_n: f64) -> SurfaceResult {
    let text = std::fs::read_to_string(airfoil_path("e387.dat")).expect("shipped E387");
    let airfoil = Airfoil::parse(&text, "e387.dat", &ParseOptions::default())
        .expect("E387 parses")
        .0;
    let solver = PanelSolver::new(airfoil.repanel(160).expect("repanel").points()).expect("panels");
    let settings = ViscousSettings::default();
    let mut warm = None;
    let mut alpha: f64 = 0.0;
    loop {
        let mut point = OperatingPoint::at_alpha_deg(alpha, reynolds);
        point.critical_n = critical_n;
        let result = solve_point(&solver, &point, &settings, warm.as_ref()).expect("solves");
        if alpha >= alpha_deg {
            assert_eq!(result.status, PointStatus::Converged);
            return result.upper;
        }
        warm = Some(result.warm_start);
        alpha = (alpha + 0.5).min(alpha_deg);
    }
}

/// Laminar stations (arc length, x/c, state) from the stagnation point up to transition.
fn laminar_stations(upper: &SurfaceResult) -> Vec<(f64, f64, &StationState)> {
    upper
        .stations
        .iter()
        .zip(&upper.x_over_c)
        .take_while(|(st, _)| matches!(st.regime, Regime::Laminar | Regime::LaminarSeparated))
        .map(|(st, &x)| (st.arc_length, x, st))
        .collect()
}

/// The coupled solution's edge speed on its laminar stations, from ue = 0 at s = 0.
fn laminar_edge_speed(laminar: &[(f64, f64, &StationState)]) -> EdgeSpeed {
    EdgeSpeed {
        s: std::iter::once(0.0)
            .chain(laminar.iter().map(|(s, _, _)| *s))
            .collect(),
        ue: std::iter::once(0.0)
            .chain(laminar.iter().map(|(_, _, st)| st.edge_velocity))
            .collect(),
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
    let upper = e387_upper_surface(7.15, 3.0e5, CRITICAL_N);
    let transition = upper.transition_x_over_c.expect("upper transition");
    let laminar = laminar_stations(&upper);
    let edge = laminar_edge_speed(&laminar);
    let s_last = laminar.last().expect("laminar stations").0;
    let (reference, separation, _) =
        finite_difference(&edge, true, 3.0e5, 2.0e-5, s_last, 50, false);
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

// ---------------------------------------------------------------------------------------------
// Linear stability (Orr–Sommerfeld) of the finite-difference profiles: the e^N method with
// fixed frequencies, against which the envelope of Drela & Giles (1987) is an approximation.
// ---------------------------------------------------------------------------------------------

/// Chebyshev–Gauss–Lobatto points on [−1, 1] and the differentiation matrix (Trefethen 2000,
/// *Spectral Methods in MATLAB*, program `cheb`).
fn chebyshev(n: usize) -> (Vec<f64>, DMatrix<f64>) {
    let x: Vec<f64> = (0..=n)
        .map(|j| (std::f64::consts::PI * j as f64 / n as f64).cos())
        .collect();
    let weight = |j: usize| {
        let end = if j == 0 || j == n { 2.0 } else { 1.0 };
        if j.is_multiple_of(2) {
            end
        } else {
            -end
        }
    };
    let mut d = DMatrix::<f64>::zeros(n + 1, n + 1);
    for i in 0..=n {
        for j in (0..=n).filter(|&j| j != i) {
            d[(i, j)] = weight(i) / weight(j) / (x[i] - x[j]);
        }
        d[(i, i)] = -(0..=n).filter(|&j| j != i).map(|j| d[(i, j)]).sum::<f64>();
    }
    (x, d)
}

/// Collocation grid with first, second and fourth derivative matrices.
struct Grid {
    y: Vec<f64>,
    d1: DMatrix<f64>,
    d2: DMatrix<f64>,
    d4: DMatrix<f64>,
}

impl Grid {
    /// Chebyshev points on [−1, 1] (a channel).
    fn channel(n: usize) -> Self {
        let (y, d1) = chebyshev(n);
        Self::with_first_derivative(y, d1)
    }

    /// A boundary layer on [0, y_max]: y = a(1 + ξ)/(b − ξ), half the points below `y_half`
    /// (the algebraic mapping common in boundary-layer stability work, e.g. Malik 1990,
    /// J. Comput. Phys. 86).
    fn boundary_layer(n: usize, y_half: f64, y_max: f64) -> Self {
        let (xi, d) = chebyshev(n);
        let a = y_half * y_max / (y_max - 2.0 * y_half);
        let b = 1.0 + 2.0 * a / y_max;
        let y = xi.iter().map(|&t| a * (1.0 + t) / (b - t)).collect();
        let mut d1 = d;
        for (i, &t) in xi.iter().enumerate() {
            let dxi_dy = (b - t) * (b - t) / (a * (1.0 + b));
            d1.row_mut(i).scale_mut(dxi_dy);
        }
        Self::with_first_derivative(y, d1)
    }

    fn with_first_derivative(y: Vec<f64>, d1: DMatrix<f64>) -> Self {
        let d2 = &d1 * &d1;
        let d4 = &d2 * &d2;
        Grid { y, d1, d2, d4 }
    }
}

/// Temporal eigenvalues c = ω/α of the Orr–Sommerfeld equation
/// (U − c)(φ″ − α²φ) − U″φ = (φ⁗ − 2α²φ″ + α⁴φ)/(iαRe)
/// for the profile `u`, `u_second` at the grid points, with φ = φ′ = 0 at both ends. Solved as
/// A φ = c B φ by shift and invert, (A − σB)⁻¹B v = v/(c − σ); the boundary rows of B are zero,
/// so their infinite eigenvalues map to zero and are dropped.
fn orr_sommerfeld(grid: &Grid, u: &[f64], u_second: &[f64], alpha: f64, re: f64) -> Vec<C> {
    let n = grid.y.len();
    let a2 = alpha * alpha;
    let viscous = C::new(0.0, -1.0 / (alpha * re)); // 1/(iαRe)
    let mut a = DMatrix::<C>::zeros(n, n);
    let mut b = DMatrix::<C>::zeros(n, n);
    for i in 0..n {
        for j in 0..n {
            let identity = if i == j { 1.0 } else { 0.0 };
            let laplace = grid.d2[(i, j)] - a2 * identity;
            let biharmonic = grid.d4[(i, j)] - 2.0 * a2 * grid.d2[(i, j)] + a2 * a2 * identity;
            a[(i, j)] = C::from(u[i] * laplace - u_second[i] * identity) - viscous * biharmonic;
            b[(i, j)] = C::from(laplace);
        }
    }
    impose_boundary_conditions(&mut a, &mut b, grid, 0);
    finite_eigenvalues(&a, &b, C::from(0.3))
}

/// Replaces the equation rows at both ends of the row block starting at `first_row` with
/// φ = φ′ = 0 at the wall and at the outer edge, acting on the first n unknowns (φ).
fn impose_boundary_conditions(
    a: &mut DMatrix<C>,
    b: &mut DMatrix<C>,
    grid: &Grid,
    first_row: usize,
) {
    let n = grid.y.len();
    for (row, node, slope) in [
        (0, 0, false),
        (1, 0, true),
        (n - 1, n - 1, false),
        (n - 2, n - 1, true),
    ] {
        let row = first_row + row;
        a.row_mut(row).fill(C::from(0.0));
        b.row_mut(row).fill(C::from(0.0));
        for j in 0..n {
            a[(row, j)] = C::from(if slope {
                grid.d1[(node, j)]
            } else if j == node {
                1.0
            } else {
                0.0
            });
        }
    }
}

/// Finite eigenvalues λ of A z = λ B z by shift and invert, (A − σB)⁻¹B v = v/(λ − σ): the
/// boundary rows of B are zero, so their infinite eigenvalues map to zero and are dropped.
fn finite_eigenvalues(a: &DMatrix<C>, b: &DMatrix<C>, shift: C) -> Vec<C> {
    let inverse = (a - b * shift)
        .lu()
        .solve(b)
        .expect("shifted Orr-Sommerfeld operator is regular");
    inverse
        .eigenvalues()
        .expect("eigenvalues of a complex matrix")
        .iter()
        .filter(|mu| mu.norm() > 1e-8)
        .map(|mu| shift + C::from(1.0) / mu)
        .collect()
}

/// The least stable Tollmien–Schlichting eigenvalue: largest imaginary part among
/// 0 < c_r < 0.9 and |c_i| < 0.1 (bounds our choice, no source). This leaves out the continuous
/// spectrum of the boundary layer (c_r → 1, the free-stream speed) and the spurious modes of the
/// collocation (|c_i| of order 1/α, c_r near 1); `None` when no such mode exists (the wave is
/// far outside the unstable band).
fn least_stable(eigenvalues: &[C]) -> Option<C> {
    eigenvalues
        .iter()
        .filter(|c| c.re > 0.0 && c.re < 0.9 && c.im.abs() < 0.1)
        .max_by(|p, q| p.im.total_cmp(&q.im))
        .copied()
}

/// u/ue and its second derivative at height `y` (in η) by linear interpolation on the
/// finite-difference grid; the free stream above it.
fn profile_at(eta: &[f64], u: &[f64], u_second: &[f64], y: f64) -> (f64, f64) {
    if y >= eta[eta.len() - 1] {
        return (1.0, 0.0);
    }
    let k = eta.partition_point(|&e| e <= y).clamp(1, eta.len() - 1);
    let t = (y - eta[k - 1]) / (eta[k] - eta[k - 1]);
    (
        u[k - 1] + t * (u[k] - u[k - 1]),
        u_second[k - 1] + t * (u_second[k] - u_second[k - 1]),
    )
}

/// Least stable temporal eigenvalue of a profile given on the η grid, at wavenumber `alpha`
/// and Reynolds number `re`, both on the profile's length scale.
fn temporal_eigenvalue(
    grid: &Grid,
    eta: &[f64],
    u: &[f64],
    u_second: &[f64],
    alpha: f64,
    re: f64,
) -> Option<C> {
    let (u, u_second): (Vec<f64>, Vec<f64>) = grid
        .y
        .iter()
        .map(|&y| profile_at(eta, u, u_second, y))
        .unzip();
    least_stable(&orr_sommerfeld(grid, &u, &u_second, alpha, re))
}

/// Smallest group velocity (in units of the edge speed) accepted by Gaster's transformation (our
/// choice, no source: Tollmien–Schlichting waves travel at roughly 0.3–0.5 of the edge speed;
/// below 0.1 the transformation divides by a vanishing slope and the rate is meaningless).
const MIN_GROUP_VELOCITY: f64 = 0.1;

/// Wavenumbers (on the profile length √(ν s/ue)) over which the growth rates are computed.
fn wavenumbers() -> Vec<f64> {
    (0..31).map(|k| 0.08 + 0.03 * k as f64).collect()
}

/// e^N with fixed frequencies along a sequence of profiles: at each profile the temporal
/// eigenvalues over [`wavenumbers`] (on the profile's length scale) give ω_r and, by Gaster's
/// (1962, JFM 14) transformation, the spatial growth rate −α_i = ω_i/(∂ω_r/∂α); for each of a
/// set of physical frequencies (log-spaced over the band the profiles can amplify, ratio
/// 1.035) the rate is interpolated in ω_r and integrated along s from where that frequency
/// first amplifies. Returns (s, max over frequencies of N) per profile. `grid` is the
/// collocation grid on the profiles' η.
fn fixed_frequency_n(profiles: &[Profile], reynolds: f64, grid: &Grid) -> Vec<(f64, f64)> {
    let alphas = wavenumbers();
    // Local frequencies ω_r L/ue of Tollmien–Schlichting waves lie well inside 0.005–0.5.
    let scale = |p: &Profile| p.edge_velocity / p.length;
    let low = profiles
        .iter()
        .map(|p| 0.005 * scale(p))
        .fold(f64::MAX, f64::min);
    let high = profiles.iter().map(|p| 0.5 * scale(p)).fold(0.0, f64::max);
    let mut integral = FixedFrequencies::new(low, high, 1.035);
    let mut out = Vec::new();
    for p in profiles {
        let re = p.edge_velocity * p.length * reynolds;
        let omega: Vec<Option<C>> = alphas
            .iter()
            .map(|&a| temporal_eigenvalue(grid, &p.eta, &p.u, &p.u_second, a, re).map(|c| c * a))
            .collect();
        let last = alphas.len() - 1;
        // (physical ω_r, −α_i per unit length) where the mode and both neighbours exist.
        let spatial: Vec<Option<(f64, f64)>> = (0..=last)
            .map(|k| {
                let (k0, k1) = (k.saturating_sub(1), (k + 1).min(last));
                let (w, w0, w1) = (omega[k]?, omega[k0]?, omega[k1]?);
                let group_velocity = (w1.re - w0.re) / (alphas[k1] - alphas[k0]);
                // Gaster's transformation needs a well-defined group velocity; Tollmien–
                // Schlichting waves travel at a fraction of the edge speed.
                (MIN_GROUP_VELOCITY..1.0)
                    .contains(&group_velocity)
                    .then_some((
                        w.re * p.edge_velocity / p.length,
                        w.im / group_velocity / p.length,
                    ))
            })
            .collect();
        out.push((p.s, integral.advance(p.s, &spatial)));
    }
    out
}

/// N of a set of fixed physical frequencies (log-spaced from `low` to `high` with the given
/// ratio), integrated along s by the trapezoidal rule from where each frequency first amplifies;
/// the growth rate of a frequency at a station is interpolated linearly in ω between the
/// station's tabulated (ω, rate) pairs.
struct FixedFrequencies {
    frequencies: Vec<f64>,
    n: Vec<f64>,
    rate_before: Vec<Option<f64>>,
    s_before: f64,
}

impl FixedFrequencies {
    fn new(low: f64, high: f64, ratio: f64) -> Self {
        let count = ((high / low).ln() / ratio.ln()).ceil() as i32 + 1;
        let frequencies: Vec<f64> = (0..count).map(|k| low * ratio.powi(k)).collect();
        let count = frequencies.len();
        FixedFrequencies {
            frequencies,
            n: vec![0.0; count],
            rate_before: vec![None; count],
            s_before: 0.0,
        }
    }

    /// Moves to the station at arc length `s` with its (ω, rate) table (`None` where no wave
    /// was found) and returns the largest N there.
    fn advance(&mut self, s: f64, rates: &[Option<(f64, f64)>]) -> f64 {
        for (i, &f) in self.frequencies.iter().enumerate() {
            let rate = rates
                .windows(2)
                .filter_map(|w| Some((w[0]?, w[1]?)))
                .find(|(a, b)| (a.0 - f) * (b.0 - f) <= 0.0)
                .map(|(a, b)| a.1 + (f - a.0) / (b.0 - a.0) * (b.1 - a.1));
            match (rate, self.rate_before[i]) {
                (Some(r), Some(before)) => {
                    self.n[i] += 0.5 * (r + before) * (s - self.s_before);
                    self.rate_before[i] = Some(r);
                }
                (Some(r), None) if r > 0.0 => self.rate_before[i] = Some(r),
                _ => {}
            }
        }
        self.s_before = s;
        self.n.iter().copied().fold(0.0, f64::max)
    }
}

/// The Orr–Sommerfeld solver against published eigenvalues.
///
/// - Plane Poiseuille flow U = 1 − y², Re 10⁴, α = 1: c = 0.23752649 + 0.00373967 i (Orszag
///   1971, JFM 50, 689–703, to the eight digits quoted there); 80 collocation intervals.
///   Tolerance 1e-7 (the last quoted digit).
/// - Blasius boundary layer: the lowest Reynolds number with an amplified wave, Re_δ* ≈ 519.4 at
///   α δ* ≈ 0.30 (Jordinson 1970, JFM 43, 801–811; values from memory). Tolerance 1 % on the
///   Reynolds number (the bisection and the wavenumber grid, step 0.004 on the η scale).
#[test]
fn orr_sommerfeld_solver_against_published_eigenvalues() {
    let channel = Grid::channel(80);
    let u: Vec<f64> = channel.y.iter().map(|y| 1.0 - y * y).collect();
    let c = least_stable(&orr_sommerfeld(
        &channel,
        &u,
        &vec![-2.0; u.len()],
        1.0,
        1.0e4,
    ))
    .expect("Poiseuille mode");
    println!(
        "Poiseuille Re 1e4, alpha 1: c = {:.8} + {:.8} i",
        c.re, c.im
    );
    assert!((c.re - 0.23752649).abs() <= 1e-7 && (c.im - 0.00373967).abs() <= 1e-7);

    // Blasius: the Falkner–Skan profile at β = 0, on the similarity variable η = y √(ue/(2νx)).
    let (eta, u, u_second, theta_eta, h) = falkner_skan_profile(0.0, Branch::Attached);
    let displacement = h * theta_eta; // δ* on this η scale
    let grid = Grid::boundary_layer(60, 3.0, 60.0);
    let most_amplified = |re: f64| {
        (0..15)
            .map(|k| {
                let a = 0.21 + 0.004 * k as f64;
                (
                    a * temporal_eigenvalue(&grid, &eta, &u, &u_second, a, re)
                        .expect("Blasius mode")
                        .im,
                    a,
                )
            })
            .fold(
                (f64::MIN, 0.0),
                |best, v| if v.0 > best.0 { v } else { best },
            )
    };
    let (mut stable, mut unstable) = (350.0, 500.0);
    for _ in 0..20 {
        let mid = 0.5 * (stable + unstable);
        if most_amplified(mid).0 > 0.0 {
            unstable = mid;
        } else {
            stable = mid;
        }
    }
    let critical = unstable * displacement;
    let alpha = most_amplified(unstable).1 * displacement;
    println!("Blasius: critical Re_dstar {critical:.1}, alpha dstar {alpha:.3}");
    assert!((critical / 519.4 - 1.0).abs() <= 0.01);
    assert!((alpha - 0.30).abs() <= 0.02);
}

/// The e^N envelope of Drela & Giles (1987) against e^N with fixed frequencies from linear
/// stability theory (Orr–Sommerfeld, parallel flow, Gaster's transformation; the solver is
/// checked above) on the finite-difference profiles of the E387 upper surface at 7.15°, Re 3e5,
/// where the model's cd is 13.6 % above the wind-tunnel value (tests/viscous_validation.rs).
///
/// - With N_crit 9 (the validated setting; transition at x/c 0.20, no bubble): at the last
///   laminar station the envelope on the reference profiles is above the fixed-frequency
///   maximum by 0.26 (8.20 against 7.94 at x/c 0.19; 7.99 with profiles twice as dense, 46
///   wavenumbers and 80 collocation intervals). The bound 0.5 guards that level with room for
///   the discretisation (no published tolerance). The coupled solution's N there (8.85) is 0.9
///   above linear theory; the envelope approximation is under a third of that.
/// - With transition held off (N_crit 14) the coupled solution separates laminar at x/c 0.30
///   and a short bubble closes at 0.33, with cd 0.01275, 2.7 % below the measured 0.0131
///   (Selig & McGranahan 2004). Linear theory on that layer reaches N = 9 at x/c 0.184 and
///   N = 12.2 at x/c 0.287, just ahead of the separation (refined as above: 0.180 and 12.5). So
///   with N_crit 9 even exact linear stability puts transition more than a tenth of the chord
///   ahead of the bubble that the measured drag points to: the 7° misses come from the critical
///   N itself (or from what parallel linear theory leaves out), not from the envelope or its
///   integration.
#[test]
fn e387_envelope_against_fixed_frequency_linear_stability() {
    let reynolds = 3.0e5;
    let grid = Grid::boundary_layer(60, 4.0, 80.0);
    let upper = e387_upper_surface(7.15, 3.0e5, CRITICAL_N);
    let laminar = laminar_stations(&upper);
    let edge = laminar_edge_speed(&laminar);
    let s_last = laminar.last().expect("laminar stations").0;
    let (envelope, _, profiles) =
        finite_difference(&edge, true, reynolds, 5.0e-5, s_last, 80, true);
    let fixed = fixed_frequency_n(&profiles, reynolds, &grid);
    let (s, n_fixed) = *fixed.last().expect("profiles");
    let n_envelope = nearest(&envelope, s).n;
    let x = upper_x_over_c(&laminar, s);
    println!("N_crit 9: at x/c {x:.3} envelope {n_envelope:.2}, fixed frequencies {n_fixed:.2}");
    assert!(n_fixed < n_envelope && n_envelope - n_fixed <= 0.5);

    let held_off = e387_upper_surface(7.15, 3.0e5, 14.0);
    let separation = held_off
        .events
        .iter()
        .find(|e| matches!(e.kind, EventKind::LaminarSeparation))
        .expect("laminar separation with transition held off");
    let laminar = laminar_stations(&held_off);
    let edge = laminar_edge_speed(&laminar);
    let s_last = laminar.last().expect("laminar stations").0;
    let (_, _, profiles) = finite_difference(&edge, true, reynolds, 5.0e-5, s_last, 80, true);
    let fixed = fixed_frequency_n(&profiles, reynolds, &grid);
    let (s_end, n_end) = *fixed.last().expect("profiles");
    let s_nine = fixed
        .iter()
        .find(|&&(_, n)| n >= 9.0)
        .map(|&(s, _)| s)
        .expect("N = 9 reached");
    let (x_nine, x_end) = (
        upper_x_over_c(&laminar, s_nine),
        upper_x_over_c(&laminar, s_end),
    );
    println!(
        "transition held off: laminar separation at x/c {:.3}; fixed-frequency N = 9 at x/c \
         {x_nine:.3}, N = {n_end:.2} at x/c {x_end:.3}",
        separation.x_over_c
    );
    assert!(n_end >= 11.0);
    assert!(x_nine <= separation.x_over_c - 0.08);
}

/// x/c at arc length `s` on the upper surface, interpolated between the laminar stations.
fn upper_x_over_c(laminar: &[(f64, f64, &StationState)], s: f64) -> f64 {
    let k = laminar
        .partition_point(|&(sk, _, _)| sk <= s)
        .clamp(1, laminar.len() - 1);
    let (s0, x0, _) = laminar[k - 1];
    let (s1, x1, _) = laminar[k];
    x0 + (s - s0) / (s1 - s0) * (x1 - x0)
}

/// Falkner–Skan profile at `beta` (attached branch) on a uniform η grid of the similarity
/// variable η = y √((m + 1) ue/(2 ν x)): RK4 on f‴ = −f f″ − β(1 − f′²) from the solver's wall
/// shear, returning (η, u = f′, u″ = f‴), θ in η units and H.
fn falkner_skan_profile(beta: f64, branch: Branch) -> (Vec<f64>, Vec<f64>, Vec<f64>, f64, f64) {
    let solution = falkner_skan::solve(beta, branch).expect("Falkner-Skan solution");
    let step = 1e-3;
    let rhs = |f: f64, fp: f64, fpp: f64| [fp, fpp, -f * fpp - beta * (1.0 - fp * fp)];
    let mut state = [0.0, 0.0, solution.wall_shear];
    let (mut eta, mut u, mut u_second) = (Vec::new(), Vec::new(), Vec::new());
    for i in 0..=(solution.eta_max / step) as usize {
        let [f, fp, fpp] = state;
        eta.push(i as f64 * step);
        u.push(fp);
        u_second.push(rhs(f, fp, fpp)[2]);
        let k1 = rhs(f, fp, fpp);
        let k2 = rhs(
            f + 0.5 * step * k1[0],
            fp + 0.5 * step * k1[1],
            fpp + 0.5 * step * k1[2],
        );
        let k3 = rhs(
            f + 0.5 * step * k2[0],
            fp + 0.5 * step * k2[1],
            fpp + 0.5 * step * k2[2],
        );
        let k4 = rhs(f + step * k3[0], fp + step * k3[1], fpp + step * k3[2]);
        for q in 0..3 {
            state[q] += step / 6.0 * (k1[q] + 2.0 * k2[q] + 2.0 * k3[q] + k4[q]);
        }
    }
    (
        eta,
        u,
        u_second,
        solution.momentum_thickness,
        solution.shape_factor,
    )
}

/// Re_θ at which N reaches 9 along (Re_θ, N) pairs, by linear interpolation.
fn re_theta_at_nine(curve: &[(f64, f64)]) -> f64 {
    let k = curve
        .iter()
        .position(|&(_, n)| n >= 9.0)
        .expect("N reaches 9");
    let ((r0, n0), (r1, n1)) = (curve[k - 1], curve[k]);
    r0 + (9.0 - n0) / (n1 - n0) * (r1 - r0)
}

/// The envelope correlation of Drela & Giles (1987) (`closure::transition`; its formulas are
/// recalled from memory, METHODS §4.2) against e^N with fixed frequencies from linear stability
/// theory on Falkner–Skan flows ue ∝ x^m, where the envelope was fitted: the momentum-thickness
/// Reynolds number at which N reaches 9. Both are integrated in x on the same 60 stations
/// (Re_θ from 60 to 3000, log-spaced) with ν = 1 and ue = x^m.
///
/// Measured (envelope against linear theory): Blasius (β = 0, H 2.59) 1125 against 1229,
/// −8.5 %; β = −0.1 (H 2.80) 549 against 558, −1.6 %; β = −0.16 (H 3.09) 315 against 316,
/// −0.5 %. The recalled correlation is within 10 % of linear theory on its own family (the
/// bound guards the Blasius figure; no published tolerance), slightly early on the flat plate.
#[test]
fn envelope_correlation_against_linear_stability_on_falkner_skan_flows() {
    let grid = Grid::boundary_layer(60, 3.0, 60.0);
    for beta in [0.0, -0.1, -0.16] {
        let (eta, u, u_second, theta_eta, h) = falkner_skan_profile(beta, Branch::Attached);
        let m = beta / (2.0 - beta);
        // η scale L = √(2x/((m + 1) ue)) with ν = 1, ue = x^m; Re_θ = ue θ_η L.
        let c0 = (2.0 / (m + 1.0)).sqrt();
        let x_at = |re_theta: f64| (re_theta / (c0 * theta_eta)).powf(2.0 / (1.0 + m));
        let profiles: Vec<Profile> = (0..60)
            .map(|k| {
                let x = x_at(60.0 * 50.0f64.powf(k as f64 / 59.0));
                Profile {
                    s: x,
                    edge_velocity: x.powf(m),
                    length: c0 * x.powf((1.0 - m) / 2.0),
                    eta: eta.clone(),
                    u: u.clone(),
                    u_second: u_second.clone(),
                }
            })
            .collect();
        let theory = fixed_frequency_n(&profiles, 1.0, &grid);
        let re_theta = |p: &Profile| p.edge_velocity * theta_eta * p.length;
        let (mut n, mut rate_before, mut x_before) = (0.0, 0.0, profiles[0].s);
        let mut envelope = Vec::new();
        for p in &profiles {
            let theta = theta_eta * p.length;
            let rate = transition::amplification_rate(h, theta, re_theta(p));
            n += 0.5 * (rate + rate_before) * (p.s - x_before);
            (rate_before, x_before) = (rate, p.s);
            envelope.push((re_theta(p), n));
        }
        let theory: Vec<(f64, f64)> = profiles
            .iter()
            .zip(&theory)
            .map(|(p, &(_, n))| (re_theta(p), n))
            .collect();
        let (by_envelope, by_theory) = (re_theta_at_nine(&envelope), re_theta_at_nine(&theory));
        println!(
            "beta {beta} (H {h:.2}): N = 9 at Re_theta {by_envelope:.0} (envelope), {by_theory:.0} \
             (linear theory), {:+.1} %",
            100.0 * (by_envelope / by_theory - 1.0)
        );
        assert!((by_envelope / by_theory - 1.0).abs() <= 0.1);
    }
}

/// Spatial eigenvalues α (complex wavenumbers) of the Orr–Sommerfeld equation at the real
/// frequency `omega`, written as a polynomial in α,
/// Σ αᵏ Cₖ φ = 0 with C₀ = −ωD² + (i/Re)D⁴, C₁ = U D² − U″, C₂ = ω − (2i/Re)D², C₃ = −U,
/// C₄ = i/Re, and linearised in the companion form on z = (φ, αφ, α²φ, α³φ). The boundary rows
/// (φ = φ′ = 0 at both ends) replace the equation's rows at the end points; as in the temporal
/// solver the shift and invert maps their infinite eigenvalues to zero.
fn orr_sommerfeld_spatial(grid: &Grid, u: &[f64], u_second: &[f64], omega: f64, re: f64) -> Vec<C> {
    let n = grid.y.len();
    let i_re = C::new(0.0, 1.0 / re);
    let mut a = DMatrix::<C>::zeros(4 * n, 4 * n);
    let mut b = DMatrix::<C>::zeros(4 * n, 4 * n);
    for k in 0..3 * n {
        a[(k, k + n)] = C::from(1.0);
        b[(k, k)] = C::from(1.0);
    }
    let last = 3 * n;
    for i in 0..n {
        for j in 0..n {
            let identity = if i == j { 1.0 } else { 0.0 };
            let (d2, d4) = (grid.d2[(i, j)], grid.d4[(i, j)]);
            let c0 = C::from(-omega * d2) + i_re * d4;
            let c1 = C::from(u[i] * d2 - u_second[i] * identity);
            let c2 = C::from(omega * identity) - i_re * (2.0 * d2);
            let c3 = C::from(-u[i] * identity);
            a[(last + i, j)] = -c0;
            a[(last + i, n + j)] = -c1;
            a[(last + i, 2 * n + j)] = -c2;
            a[(last + i, 3 * n + j)] = -c3;
            b[(last + i, 3 * n + j)] = i_re * identity;
        }
    }
    impose_boundary_conditions(&mut a, &mut b, grid, last);
    finite_eigenvalues(&a, &b, C::from(0.2))
}

/// The downstream-travelling wave with the largest spatial growth among the spatial eigenvalues
/// at frequency `omega`: phase speed ω/α_r between 0.1 and 0.9 of the edge speed, |α_i| < α_r and
/// |α| θ < 2 with `theta` on the profile's scale (bounds our choice, no source). This leaves out
/// the evanescent branches (α_r ≈ 0 with large −α_i), the continuous spectrum (phase speed → 1)
/// and a slow mode of the reversed-flow profiles (phase speed about 0.06, −α_i ≈ α_r) whose
/// direction of travel the spatial problem alone cannot tell (that needs the Briggs–Bers
/// criterion, not applied here).
fn most_amplified_spatial(alphas: &[C], omega: f64, theta: f64) -> Option<C> {
    alphas
        .iter()
        .filter(|a| {
            let phase_speed = omega / a.re;
            a.re > 0.0
                && (0.1..0.9).contains(&phase_speed)
                && a.im.abs() < a.re
                && a.norm() * theta < 2.0
        })
        .min_by(|p, q| p.im.total_cmp(&q.im))
        .copied()
}

/// A Falkner–Skan profile (attached or reversed branch, whichever carries this shape factor)
/// interpolated onto a collocation grid, with its momentum thickness in η units.
struct SimilarityProfile {
    u: Vec<f64>,
    u_second: Vec<f64>,
    theta_eta: f64,
}

impl SimilarityProfile {
    fn with_shape_factor(shape_factor: f64, grid: &Grid) -> Self {
        let solution = falkner_skan::solve_shape_factor(shape_factor).expect("Falkner-Skan by H");
        Self::new(solution.beta, solution.branch, grid)
    }

    fn new(beta: f64, branch: Branch, grid: &Grid) -> Self {
        let (eta, u, u_second, theta_eta, _) = falkner_skan_profile(beta, branch);
        let (u, u_second) = grid
            .y
            .iter()
            .map(|&y| profile_at(&eta, &u, &u_second, y))
            .unzip();
        SimilarityProfile {
            u,
            u_second,
            theta_eta,
        }
    }

    /// Spatial growth rate −α_i θ of the most amplified downstream wave at the local frequency
    /// ω θ/ue = `omega_theta` and Reynolds number `re_theta` (both on the momentum thickness).
    fn growth_rate(&self, grid: &Grid, omega_theta: f64, re_theta: f64) -> Option<f64> {
        let omega = omega_theta / self.theta_eta;
        let re = re_theta / self.theta_eta;
        let alphas = orr_sommerfeld_spatial(grid, &self.u, &self.u_second, omega, re);
        most_amplified_spatial(&alphas, omega, self.theta_eta).map(|a| -a.im * self.theta_eta)
    }
}

/// The spatial solver against Gaster's (1962, JFM 14) transformation on the Blasius profile at
/// Re_δ* = 1000, ω δ*/ue = 0.1, where the wave grows slowly and the transformation
/// −α_i = ω_i/(∂ω_r/∂α) is accurate to first order in the growth rate. The temporal solver is
/// the one checked against Orszag (1971) above.
///
/// Measured: spatial α δ* = 0.27983 − 0.00729 i; the temporal eigenvalue at that real α gives
/// ω_r δ*/ue = 0.10008 and, through the group velocity 0.426, −α_i δ* = 0.00724 (−0.8 %).
/// Tolerance 2 % on the growth rate (the transformation's own first-order error at this growth)
/// and 0.5 % on ω_r.
#[test]
fn spatial_solver_against_gaster_transformation() {
    let grid = Grid::boundary_layer(60, 3.0, 60.0);
    let (eta, u, u_second, theta_eta, h) = falkner_skan_profile(0.0, Branch::Attached);
    let blasius = SimilarityProfile::new(0.0, Branch::Attached, &grid);
    let displacement = h * theta_eta; // δ* on the η scale
    let (omega, re) = (0.1 / displacement, 1000.0 / displacement);
    let alphas = orr_sommerfeld_spatial(&grid, &blasius.u, &blasius.u_second, omega, re);
    let spatial = most_amplified_spatial(&alphas, omega, theta_eta).expect("Blasius TS wave");
    let temporal = |a: f64| {
        temporal_eigenvalue(&grid, &eta, &u, &u_second, a, re).expect("temporal TS wave") * a
    };
    let (below, at, above) = (
        temporal(0.99 * spatial.re),
        temporal(spatial.re),
        temporal(1.01 * spatial.re),
    );
    let group_velocity = (above.re - below.re) / (0.02 * spatial.re);
    let gaster = at.im / group_velocity;
    println!(
        "Blasius Re_dstar 1000, omega 0.1: spatial alpha dstar {:.5} {:+.5} i; temporal omega_r \
         {:.5}, group velocity {group_velocity:.3}, Gaster -alpha_i dstar {:.5}",
        spatial.re * displacement,
        spatial.im * displacement,
        at.re * displacement,
        gaster * displacement
    );
    assert!((at.re / omega - 1.0).abs() <= 0.005);
    assert!((gaster / -spatial.im - 1.0).abs() <= 0.02);
}

/// Largest local spatial growth rate −α_i θ over frequencies at `re_theta`: a scan in ω θ/ue from
/// 0.012 in steps of 15 % and a parabola in ln ω through the best point and its neighbours.
fn largest_growth_rate(profile: &SimilarityProfile, grid: &Grid, re_theta: f64) -> f64 {
    let omegas: Vec<f64> = (0..17).map(|k| 0.012 * 1.15f64.powi(k)).collect();
    let rates: Vec<f64> = omegas
        .iter()
        .map(|&w| {
            profile
                .growth_rate(grid, w, re_theta)
                .unwrap_or(f64::NEG_INFINITY)
        })
        .collect();
    let k = (1..rates.len() - 1)
        .max_by(|&i, &j| rates[i].total_cmp(&rates[j]))
        .expect("frequencies");
    let (r0, r1, r2) = (rates[k - 1], rates[k], rates[k + 1]);
    assert!(
        r1.is_finite() && r1 >= r0 && r1 >= r2,
        "maximum inside the scan"
    );
    // Vertex of the parabola through three equally spaced points (in ln ω).
    let curvature = r0 - 2.0 * r1 + r2;
    if curvature < 0.0 {
        r1 - (r2 - r0).powi(2) / (8.0 * curvature)
    } else {
        r1
    }
}

/// The envelope rate of Drela & Giles (1987) in separated flow against spatial linear stability
/// on Stewartson's reversed-flow Falkner–Skan profiles (the branch the correlation is said to
/// cover, METHODS §4.2), at Re_θ = 300, the level of the E387 bubbles at Re 2e5.
///
/// The envelope N of fixed frequencies grows at the local rate of the frequency that currently
/// has the largest N, so its rate can never exceed the largest local rate at that station. In
/// attached similar flows it stays well below it (the band moves to lower frequencies as the
/// layer thickens; the envelope there matches fixed-frequency N within 8.5 %, test above). In a
/// bubble the layer hardly thickens and the largest local rate is what the waves see.
///
/// Measured (envelope / largest local rate, both in 1/θ): H 2.80 0.0053 / 0.0096 (0.55); H 3.48
/// 0.0196 / 0.0273 (0.72); reversed branch H 4.56 0.0337 / 0.0437 (0.77), H 5.53 0.0413 /
/// 0.0499 (0.83), H 6.75 0.0502 / 0.0529 (0.95), H 8.20 0.0612 / 0.0530 (1.16). Theory's rate
/// levels off near 0.053/θ above H ≈ 6 while the correlation keeps rising with H, so above
/// H ≈ 7 the correlation amplifies faster than any single wave can (16 % at H 8.2; the E387
/// bubbles transition at H 7.6–8.5). The checks guard these levels: the envelope below the
/// local maximum up to H 6.75 and at most 20 % above it at H 8.2 (no published tolerance;
/// 40 collocation intervals, the same to three digits with 50 and 80).
#[test]
fn envelope_rate_against_spatial_stability_on_reversed_flow_profiles() {
    let grid = Grid::boundary_layer(40, 4.0, 60.0);
    let re_theta = 300.0;
    for (beta, branch) in [
        (-0.1, Branch::Attached),
        (-0.19, Branch::Attached),
        (-0.195, Branch::Reversed),
        (-0.18, Branch::Reversed),
        (-0.16, Branch::Reversed),
        (-0.14, Branch::Reversed),
    ] {
        let h = falkner_skan::solve(beta, branch)
            .expect("Falkner-Skan solution")
            .shape_factor;
        let profile = SimilarityProfile::new(beta, branch, &grid);
        let theory = largest_growth_rate(&profile, &grid, re_theta);
        let envelope = transition::amplification_rate(h, 1.0, re_theta);
        println!(
            "H {h:.2} ({branch:?}): envelope {envelope:.4}/theta, largest local rate \
             {theory:.4}/theta, ratio {:.2}",
            envelope / theory
        );
        if h < 7.0 {
            assert!(envelope < theory, "H {h:.2}");
        } else {
            assert!(envelope <= 1.2 * theory, "H {h:.2}");
        }
    }
}

/// e^N with fixed frequencies and spatial growth rates along the coupled E387 solution at 4°,
/// Re 2e5 (a bubble from x/c 0.42 to 0.65 with transition at 0.565, N_crit 9), on the
/// Falkner–Skan profile with each station's shape factor and momentum thickness: the profile
/// family the envelope correlation itself assumes, so this isolates the correlation (the attached
/// part ahead of separation is checked on true profiles in the tests above; the separated
/// profiles have no reference here).
///
/// Measured: linear theory reaches N = 9 at x/c 0.542, the coupled solution's envelope at 0.565,
/// 0.023 c later: theory leads by 0.7 at the separation (3.85 against 3.17 at x/c 0.430) and
/// gains 5.25 against the envelope's 4.71 from there to x/c 0.544. The same computation at 0°,
/// 2° and 6° (not repeated here, 35 s each) puts N = 9 0.025, 0.017 and 0.041 c ahead of the
/// model's transition. With the envelope, transition that early takes a critical N of about
/// 8.3: then the reattachment at Re 2e5 moves to within 0.024 c of the oil flow at 0°–5°
/// (0.741, 0.694, 0.631, 0.584 against 0.74, 0.67, 0.62, 0.59; 0.506 against 0.55 at 6°), but cd
/// falls further (33 of the 40 UIUC points within 10 %, against 36 at N 9): the model's
/// mid-range drag deficit does not come from the transition in the bubble (see the README's
/// cautions for where else it may lie). The check guards
/// the level: theory ahead, by at most 0.04 c.
#[test]
fn e387_bubble_amplification_against_spatial_stability() {
    let reynolds = 2.0e5;
    let upper = e387_upper_surface(4.0, reynolds, CRITICAL_N);
    let transition_x = upper.transition_x_over_c.expect("natural transition");
    let laminar = laminar_stations(&upper);
    let grid = Grid::boundary_layer(40, 4.0, 60.0);
    // Local frequencies ω θ/ue over the band these profiles amplify (ratio 1.27 per step).
    let local: Vec<f64> = (0..16).map(|k| 0.004 * 1.27f64.powi(k)).collect();
    // Per station: arc length, x/c and (physical frequency, rate per unit chord) over `local`.
    let mut stations = Vec::new();
    for &(s, x, st) in &laminar {
        let (h, theta, ue) = (st.shape_factor, st.momentum_thickness, st.edge_velocity);
        let re_theta = ue * theta * reynolds;
        // Below Re_θ 80 no wave grows (Blasius: Re_θ ≈ 200) and the filter lets through
        // collocation modes of the thin layer near the stagnation point.
        if re_theta < 80.0 {
            continue;
        }
        let profile = SimilarityProfile::with_shape_factor(h, &grid);
        let rates: Vec<Option<(f64, f64)>> = local
            .iter()
            .map(|&w| {
                let rate = profile.growth_rate(&grid, w, re_theta)?;
                Some((w * ue / theta, rate / theta))
            })
            .collect();
        stations.push((s, x, rates));
    }
    let band = stations
        .iter()
        .flat_map(|t| t.2.iter().flatten().map(|r| r.0));
    let low = band.clone().fold(f64::MAX, f64::min);
    let high = band.fold(0.0, f64::max);
    let mut integral = FixedFrequencies::new(low, high, 1.04);
    let (mut x_before, mut n_max_before) = (0.0, 0.0);
    let mut x_nine = None;
    for (s, x, rates) in &stations {
        let n_max = integral.advance(*s, rates);
        if x_nine.is_none() && n_max >= 9.0 {
            x_nine =
                Some(x_before + (9.0 - n_max_before) / (n_max - n_max_before) * (x - x_before));
        }
        (x_before, n_max_before) = (*x, n_max);
    }
    let x_nine = x_nine.expect("theory reaches N = 9 before the model's transition");
    println!(
        "E387 4 deg, Re 2e5: linear theory N = 9 at x/c {x_nine:.3}, model transition at \
         {transition_x:.3}"
    );
    assert!(x_nine < transition_x && transition_x - x_nine <= 0.04);
}
