//! Panel method against the exact Kármán–Trefftz / Joukowski potential flow.
//!
//! Exact solution: Kármán & Trefftz (1918), "Potentialströmung um gegebene Tragflächenquerschnitte",
//! Z. Flugtech. Motorluftschiffahrt 9; Milne-Thomson, *Theoretical Aerodynamics* (1958), ch. 6–7.
//! A circle through ζ = b with centre ζc is mapped by z = n b (1 + w)/(1 − w),
//! w = ((ζ − b)/(ζ + b))^n, n = 2 − τ/π (τ = trailing-edge angle; n = 2 is Joukowski). With the
//! Kutta condition Γ = 4π a V∞ sin(α + β) (clockwise), cl = 8π a sin(α + β)/c, and the surface
//! speed is u_φ/|dz/dζ| with u_φ = −2V∞[sin(φ − α) + sin(α + β)]. The moment about the origin
//! follows from Blasius' theorem with the far-field expansion z = ζ + k/ζ + …, k = (n² − 1)b²/3:
//! M_O = −2πρV∞²k sin 2α + ρV∞Γ(xc cos α + yc sin α) (counter-clockwise positive).
//!
//! Panel nodes are uniform in the circle angle φ, which clusters them at the leading and trailing
//! edges.

use approx::assert_relative_eq;
use foilsweep_panel::PanelSolver;
use nalgebra::{Complex, Point2};
use std::f64::consts::PI;

/// One Kármán–Trefftz section with b = 1.
struct KarmanTrefftz {
    n: f64,
    centre: Complex<f64>,
    radius: f64,
    beta: f64,
    chord: f64,
    leading_edge: Complex<f64>,
}

impl KarmanTrefftz {
    fn new(n: f64, xc: f64, yc: f64) -> KarmanTrefftz {
        let centre = Complex::new(xc, yc);
        let radius = (Complex::new(1.0, 0.0) - centre).norm();
        let beta = yc.atan2(1.0 - xc);
        let mut section = KarmanTrefftz {
            n,
            centre,
            radius,
            beta,
            chord: 0.0,
            leading_edge: Complex::new(0.0, 0.0),
        };
        // Chord = largest distance from the trailing edge z = n b: coarse scan, then golden
        // section on the bracket (to 1e-13 in φ).
        let dist = |phi: f64| (section.z(phi) - Complex::new(n, 0.0)).norm();
        let samples = 4000;
        let step = 2.0 * PI / samples as f64;
        let best = (1..samples)
            .map(|k| -beta + k as f64 * step)
            .max_by(|a, b| dist(*a).total_cmp(&dist(*b)))
            .unwrap_or(PI);
        let (mut lo, mut hi) = (best - step, best + step);
        let g = 0.5 * (5f64.sqrt() - 1.0);
        while hi - lo > 1e-13 {
            let m1 = hi - g * (hi - lo);
            let m2 = lo + g * (hi - lo);
            if dist(m1) > dist(m2) {
                hi = m2;
            } else {
                lo = m1;
            }
        }
        let phi_le = 0.5 * (lo + hi);
        section.chord = dist(phi_le);
        section.leading_edge = section.z(phi_le);
        section
    }

    fn zeta(&self, phi: f64) -> Complex<f64> {
        self.centre + Complex::from_polar(self.radius, phi)
    }

    fn w(&self, zeta: Complex<f64>) -> Complex<f64> {
        ((zeta - 1.0) / (zeta + 1.0)).powf(self.n)
    }

    /// Surface point at circle angle φ (the trailing edge φ = −β maps exactly to z = n).
    fn z(&self, phi: f64) -> Complex<f64> {
        if ((phi + self.beta) / (2.0 * PI)).fract().abs() < 1e-15 {
            return Complex::new(self.n, 0.0);
        }
        let w = self.w(self.zeta(phi));
        (w + 1.0) / (-w + 1.0) * self.n
    }

    /// |dz/dζ| = |4n²b²w / ((1 − w)²(ζ² − b²))|.
    fn map_derivative(&self, phi: f64) -> f64 {
        let zeta = self.zeta(phi);
        let w = self.w(zeta);
        (w * (4.0 * self.n * self.n) / ((-w + 1.0) * (-w + 1.0) * (zeta * zeta - 1.0))).norm()
    }

    fn phi(&self, i: usize, panels: usize) -> f64 {
        -self.beta + 2.0 * PI * i as f64 / panels as f64
    }

    /// Nodes uniform in φ, counter-clockwise from the trailing edge; the last equals the first.
    fn nodes(&self, panels: usize) -> Vec<Point2<f64>> {
        (0..=panels)
            .map(|i| {
                let z = self.z(self.phi(i % panels, panels));
                Point2::new(z.re, z.im)
            })
            .collect()
    }

    fn gamma(&self, phi: f64, alpha: f64) -> f64 {
        -2.0 * ((phi - alpha).sin() + (alpha + self.beta).sin()) / self.map_derivative(phi)
    }

    fn circulation(&self, alpha: f64) -> f64 {
        4.0 * PI * self.radius * (alpha + self.beta).sin()
    }

    fn cl(&self, alpha: f64) -> f64 {
        2.0 * self.circulation(alpha) / self.chord
    }

    /// Point of the section plane that the circle-plane point ζ maps to.
    fn map(&self, zeta: Complex<f64>) -> Point2<f64> {
        let w = self.w(zeta);
        let z = (w + 1.0) / (-w + 1.0) * self.n;
        Point2::new(z.re, z.im)
    }

    /// Circulation about the section (counter-clockwise positive) that a unit counter-clockwise
    /// point vortex at circle-plane point ζv induces, without free stream: the circle theorem
    /// gives an image vortex −1 at ζc + a²/conj(ζv − ζc) (Milne-Thomson 1958, §6.2), and the
    /// Kutta condition dW/dζ = 0 at ζ = b = 1 fixes a vortex Γ0 at the centre. Returns
    /// (Γ0 − 1, imaginary part of Γ0, which is zero when the algebra is right).
    fn circulation_from_vortex(&self, zeta_v: Complex<f64>) -> (f64, f64) {
        let one = Complex::new(1.0, 0.0);
        let image = self.centre + self.radius * self.radius / (zeta_v - self.centre).conj();
        let gamma_0 = -(one - self.centre) * (one / (one - zeta_v) - one / (one - image));
        (gamma_0.re - 1.0, gamma_0.im)
    }

    /// cm about the quarter-chord point of the LE–TE line, nose-up positive.
    fn cm_c4(&self, alpha: f64) -> f64 {
        let p = self.leading_edge + (Complex::new(self.n, 0.0) - self.leading_edge) * 0.25;
        self.cm_about(alpha, Point2::new(p.re, p.im), self.chord)
    }

    /// Moment coefficient about `p`, normalised by `chord`, nose-up positive.
    fn cm_about(&self, alpha: f64, p: Point2<f64>, chord: f64) -> f64 {
        let k = (self.n * self.n - 1.0) / 3.0;
        let gam = self.circulation(alpha);
        let (s, c) = alpha.sin_cos();
        let m_origin =
            -2.0 * PI * k * (2.0 * alpha).sin() + gam * (self.centre.re * c + self.centre.im * s);
        let m_p = m_origin - gam * (p.x * c + p.y * s);
        -m_p / (0.5 * chord * chord)
    }
}

fn cambered_joukowski() -> KarmanTrefftz {
    KarmanTrefftz::new(2.0, -0.1, 0.1)
}

fn symmetric_joukowski() -> KarmanTrefftz {
    KarmanTrefftz::new(2.0, -0.1, 0.0)
}

/// Kármán–Trefftz section with τ = 10.8° (n = 1.94).
fn karman_trefftz() -> KarmanTrefftz {
    KarmanTrefftz::new(1.94, -0.08, 0.06)
}

/// Relative error of the panel circulation Γ = cl·c/2 at `panels` panels. Γ does not depend on
/// how the chord is measured: nodes uniform in φ miss the exact leading edge by up to half a
/// panel, which changes the node-based chord by O(h²) with an irregular sign.
fn circulation_error(section: &KarmanTrefftz, alpha_deg: f64, panels: usize) -> f64 {
    let alpha = alpha_deg.to_radians();
    let solver = PanelSolver::new(&section.nodes(panels)).expect("valid exact section");
    let sol = solver.solve(alpha);
    0.5 * sol.cl * solver.chord() / section.circulation(alpha) - 1.0
}

/// Observed orders of convergence from errors at successively halved panel sizes.
fn observed_orders(errors: &[f64]) -> Vec<f64> {
    errors
        .windows(2)
        .map(|w| (w[0] / w[1]).abs().log2())
        .collect()
}

#[test]
fn exact_solution_code_reproduces_closed_form_values() {
    // Guard on the test's own exact-solution code: chord, cl and cm evaluated independently of
    // the panel method from the closed forms above (values to 6 decimals, b = 1). Tolerance 2e-6
    // = rounding of the sixth decimal.
    let cases = [
        (cambered_joukowski(), 4.033609, 0.0, 0.623083, -0.142919),
        (cambered_joukowski(), 4.033609, 10.0, 1.803787, -0.150701),
        (karman_trefftz(), 3.905128, 5.0, 0.990474, -0.099101),
        (symmetric_joukowski(), 4.033333, 5.0, 0.597399, -0.002347),
    ];
    for (section, chord, alpha_deg, cl, cm) in cases {
        let alpha = f64::to_radians(alpha_deg);
        assert_relative_eq!(section.chord, chord, epsilon = 2e-6);
        assert_relative_eq!(section.cl(alpha), cl, epsilon = 2e-6);
        assert_relative_eq!(section.cm_c4(alpha), cm, epsilon = 2e-6);
    }
}

#[test]
fn cl_and_cm_match_exact_at_160_panels() {
    // Project accuracy target: cl within 0.1 % at 160 panels (METHODS §1.7 reports 0.02–0.06 %
    // with this spacing). Checked both as the solver reports it (its chord from the nodes) and
    // against the exact chord; the node-based chord differs from the exact one by ≤ 1.3e-4 here.
    // cm: the exact moment about the solver's own reference point (quarter chord of its
    // node-based LE–TE line, normalised by its chord), within 2e-4: the 0.1 % accuracy applied
    // to a loading of |cl| ≲ 1.6 acting a quarter chord from the reference point gives ≈ 4e-4;
    // 2e-4 keeps a factor two under it.
    let cases = [
        (symmetric_joukowski(), 5.0),
        (karman_trefftz(), 0.0),
        (karman_trefftz(), 5.0),
        (karman_trefftz(), 10.0),
        (cambered_joukowski(), 5.0),
    ];
    for (section, alpha_deg) in cases {
        let alpha = f64::to_radians(alpha_deg);
        let solver = PanelSolver::new(&section.nodes(160)).expect("valid exact section");
        let sol = solver.solve(alpha);
        let c = solver.chord();
        let exact_cl_same_chord = 2.0 * section.circulation(alpha) / c;
        let le = solver.leading_edge();
        let reference = le + 0.25 * (solver.trailing_edge_midpoint() - le);
        let exact_cm = section.cm_about(alpha, reference, c);
        let cl_err = sol.cl / exact_cl_same_chord - 1.0;
        let cl_err_exact_chord = sol.cl / section.cl(alpha) - 1.0;
        let clp_err = sol.cl_pressure / exact_cl_same_chord - 1.0;
        let cm_err = sol.cm_c4 - exact_cm;
        let msg = format!(
            "n = {}, alpha = {alpha_deg}°: cl error {:+.4} % ({:+.4} % with exact chord), \
             pressure cl error {:+.4} %, cm error {cm_err:+.2e}",
            section.n,
            100.0 * cl_err,
            100.0 * cl_err_exact_chord,
            100.0 * clp_err
        );
        eprintln!("{msg}");
        assert!(cl_err.abs() < 1e-3, "{msg}");
        assert!(cl_err_exact_chord.abs() < 1e-3, "{msg}");
        assert!(clp_err.abs() < 1e-3, "{msg}");
        assert!(cm_err.abs() < 2e-4, "{msg}");
    }
}

#[test]
fn lift_converges_at_second_order() {
    // Linear vorticity on straight panels with a trapezoidal circulation sum is a second-order
    // method: halving the panel size should divide the error by ≈ 4 (observed order ≈ 2). The
    // accepted band 1.6–2.6 allows for the pre-asymptotic range at 80 panels and for the
    // trailing-edge singularity (cusp or finite angle), which can shift the observed order a few
    // tenths either way; a first-order defect or a stalled error fails it. The cambered
    // Joukowski errors are also held to METHODS §1.7 (−0.13/−0.03/−0.008 % there): within 0.1 %
    // at 160 panels.
    let cases = [
        (karman_trefftz(), 5.0),
        (symmetric_joukowski(), 5.0),
        (cambered_joukowski(), 0.0),
    ];
    for (section, alpha_deg) in cases {
        let e: Vec<f64> = [80, 160, 320]
            .iter()
            .map(|&p| circulation_error(&section, alpha_deg, p))
            .collect();
        let orders = observed_orders(&e);
        let msg = format!(
            "n = {}, alpha = {alpha_deg}°: errors {:+.4} % {:+.4} % {:+.4} %, orders {:.2} {:.2}",
            section.n,
            100.0 * e[0],
            100.0 * e[1],
            100.0 * e[2],
            orders[0],
            orders[1]
        );
        eprintln!("{msg}");
        assert!(orders.iter().all(|p| (1.6..2.6).contains(p)), "{msg}");
        assert!(e[1].abs() < 1e-3, "{msg}");
    }
}

#[test]
fn surface_speed_converges_to_exact() {
    // Node speeds against u_φ/|dz/dζ| on the finite-angle Kármán–Trefftz section, all nodes but
    // the trailing-edge pair. The largest error sits at the leading-edge suction peak; it must
    // fall at second order (same reasoning and band as for the lift) and be below 0.5 % of V∞
    // at 320 panels (common practice, no source: pointwise Cp good to about 1 %).
    let section = karman_trefftz();
    let alpha = 5f64.to_radians();
    let max_error = |panels: usize| {
        let solver = PanelSolver::new(&section.nodes(panels)).expect("valid exact section");
        let sol = solver.solve(alpha);
        (1..panels)
            .map(|i| (sol.gamma[i] - section.gamma(section.phi(i, panels), alpha)).abs())
            .fold(0.0, f64::max)
    };
    let e: Vec<f64> = [80, 160, 320].iter().map(|&p| max_error(p)).collect();
    let orders = observed_orders(&e);
    let msg = format!(
        "max |γ error| {:.2e} {:.2e} {:.2e}, orders {orders:.2?}",
        e[0], e[1], e[2]
    );
    eprintln!("{msg}");
    assert!(orders.iter().all(|p| (1.6..2.6).contains(p)), "{msg}");
    assert!(e[2] < 5e-3, "{msg}");
}

#[test]
fn wake_vortex_influence_matches_exact_vortex_circulation() {
    // A short constant vortex panel (length 1e-3, total strength 1) stands for a point vortex
    // behind the trailing edge; the body circulation it induces through the Kutta condition is
    // exact from the circle theorem (`circulation_from_vortex`). The short panel differs from a
    // point vortex by O((ε/r)²) ≈ 1e-5 here. The panel circulation Σ ½(Δγ_i + Δγ_{i+1}) L_i must
    // converge at second order like the lift (same band as `lift_converges_at_second_order`)
    // and be within 0.5 % at 320 panels (the free-stream circulation is within 0.1 % at 160;
    // a vortex a few panel lengths from the trailing edge loads the trailing-edge panels more).
    let epsilon = 1e-3;
    let cases = [
        (symmetric_joukowski(), Complex::new(2.5, 0.3)),
        (karman_trefftz(), Complex::new(1.6, 0.1)),
        (karman_trefftz(), Complex::new(3.0, -0.5)),
    ];
    for (section, zeta_v) in cases {
        let (exact, imaginary) = section.circulation_from_vortex(zeta_v);
        assert!(
            imaginary.abs() < 1e-12,
            "Kutta vortex not real: {imaginary:e}"
        );
        let centre = section.map(zeta_v);
        let half = nalgebra::Vector2::new(0.5 * epsilon, 0.0);
        let wake = foilsweep_panel::WakeLine {
            nodes: vec![centre - half, centre + half],
            tangents: vec![nalgebra::Vector2::x(); 2],
        };
        let error = |panels: usize| {
            let nodes = section.nodes(panels);
            let solver = PanelSolver::new(&nodes).expect("valid exact section");
            let dgamma = solver.wake_vortex_influence(&wake);
            let circulation: f64 = (0..panels)
                .map(|i| {
                    let length = (nodes[i + 1] - nodes[i]).norm();
                    0.5 * (dgamma[(i, 0)] + dgamma[(i + 1, 0)]) * length / epsilon
                })
                .sum();
            circulation / exact - 1.0
        };
        let e: Vec<f64> = [80, 160, 320].iter().map(|&p| error(p)).collect();
        let orders = observed_orders(&e);
        let msg = format!(
            "n = {}, vortex at {:.3?}: exact circulation {exact:.5}, errors {:+.2e} {:+.2e} \
             {:+.2e}, orders {orders:.2?}",
            section.n, centre, e[0], e[1], e[2]
        );
        eprintln!("{msg}");
        assert!(orders.iter().all(|p| (1.6..2.6).contains(p)), "{msg}");
        assert!(e[2].abs() < 5e-3, "{msg}");
    }
}
