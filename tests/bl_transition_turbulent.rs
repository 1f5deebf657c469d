//! Validation of transition (e^N envelope, Mack's N_crit) and of the turbulent part of the direct
//! boundary-layer march (lag-entrainment and Head) against published flat-plate data, and of
//! the wake march against its conservation identity.

use approx::assert_relative_eq;
use foilsweep_boundary_layer::closure::{head, transition};
use foilsweep_boundary_layer::direct::{
    march_surface, march_wake, squire_young_drag, MarchSettings, TurbulentModel,
};
use foilsweep_boundary_layer::state::{EventKind, Regime, TransitionKind};

/// Flat-plate stations: the leading edge and a geometric spacing from `first` to 1.
fn flat_plate_stations(n: usize, first: f64) -> Vec<f64> {
    let mut s = vec![0.0];
    s.extend((0..n).map(|i| first * (1.0 / first).powf(i as f64 / (n - 1) as f64)));
    s
}

/// Re_x of N = 9 for the exact Blasius layer (H = 2.5911, θ = 0.6641 x/√Re_x) with our
/// envelope rate, by the trapezoidal rule on a fine geometric grid in Re_x (ν = 1, ue = 1).
fn blasius_envelope_transition_rex(critical_n: f64) -> f64 {
    let rate = |rex: f64| {
        let theta = 0.6641 * rex.sqrt();
        transition::amplification_rate(2.5911, theta, theta)
    };
    let (mut n, mut rex) = (0.0, 1e3);
    let mut prev = rate(rex);
    loop {
        let next = rex * 1.0001;
        let r = rate(next);
        let dn = 0.5 * (prev + r) * (next - rex);
        if n + dn >= critical_n {
            return rex + (critical_n - n) / dn * (next - rex);
        }
        n += dn;
        prev = r;
        rex = next;
    }
}

#[test]
fn envelope_on_exact_blasius_layer() {
    // METHODS §4.2 / §8 #12 (Drela & Giles 1987 correlation): N = 9 at Re_x = 2.78e6 when N grows
    // as 0.01035 (Re_θ − 244) with the exact dRe_θ/ds = 0.2205/θ. The correlation's own
    // ½(1+m)ℓ/θ is 0.2163/θ at the Blasius H (1.9 % lower), which alone moves N = 9 to
    // Re_x ≈ 2.90e6 (+4 %); the C¹ onset ramp then shifts it slightly. Tolerance 5 %.
    let rex = blasius_envelope_transition_rex(9.0);
    println!("exact Blasius layer, envelope e^9: Re_x = {rex:.4e} (METHODS 2.78e6)");
    assert_relative_eq!(rex, 2.78e6, max_relative = 0.05);
}

#[test]
fn flat_plate_natural_transition() {
    // Low-turbulence flat plate: transition near Re_x ≈ 3e6 (Schubauer & Skramstad 1947, from
    // memory); the envelope on the exact Blasius layer gives 2.78e6 at N = 9 and 1.90e6 / 3.83e6
    // at N = 7 / 11 (METHODS §4.2). The march integrates the envelope on Thwaites's H = 2.61
    // (exact 2.591), which raises dN/dRe_θ by 8 % and lowers Re_θ0 from 244 to 206; we measure
    // Re_x,tr = 2.34e6, 16 % below 2.78e6. Tolerance: the N_crit = 7–11 band of METHODS §4.2,
    // i.e. the scatter of N_crit between low-turbulence facilities (±2, common practice, no
    // source). The shortfall is reported.
    let reynolds = 1e7;
    let s = flat_plate_stations(300, 1e-4);
    let u = vec![1.0; s.len()];
    let march = march_surface(&s, &u, &s, &MarchSettings::new(reynolds)).expect("valid");
    let tr = march.events.first().expect("transition");
    assert_eq!(tr.kind, EventKind::Transition(TransitionKind::Natural));
    let rex = tr.arc_length * reynolds;
    println!("flat plate, Thwaites + envelope, N = 9: Re_x,tr = {rex:.4e}");
    assert!((1.90e6..=3.83e6).contains(&rex), "Re_x,tr = {rex}");
    // transition is interpolated inside the interval, not snapped to a station
    assert!(s.iter().all(|&x| (x - tr.arc_length).abs() > 1e-9));
}

#[test]
fn mack_relation() {
    // Mack (1977), METHODS §4.3 / §8 #13: Tu = 0.07 % → 9.00, 1 % → 2.62, also 0.1 % → 8.15,
    // 0.5 % → 4.29 (printed to 2 decimals; tolerance half a unit of the last digit).
    for (tu, n) in [(0.0007, 9.00), (0.001, 8.15), (0.005, 4.29), (0.01, 2.62)] {
        let got = transition::critical_n_from_turbulence(tu).expect("in range");
        assert_relative_eq!(got, n, epsilon = 5e-3);
    }
    assert!(transition::critical_n_from_turbulence(0.05).is_err());
}

#[test]
fn head_closure_sample_values() {
    // METHODS §3.2 / §8 #15 (Head 1958 via Cebeci & Bradshaw 1977 fits; Ludwieg & Tillmann
    // 1949): H1(1.4) = 7.178, F = 0.01267, cf_LT(1.4, Re_θ = 1000) = 0.00434. Tolerance half a
    // unit of the last printed digit.
    let h1 = head::entrainment_shape_factor(1.4);
    assert_relative_eq!(h1, 7.178, epsilon = 5e-4);
    assert_relative_eq!(head::entrainment_function(h1), 0.01267, epsilon = 5e-6);
    assert_relative_eq!(
        head::ludwieg_tillmann_skin_friction(1.4, 1000.0),
        0.00434,
        epsilon = 5e-6
    );
    assert_relative_eq!(head::shape_factor_from_entrainment(h1), 1.4, epsilon = 1e-9);
}

/// Turbulent flat-plate correlations at Re_x (METHODS §3.6; README of the validation data):
/// White cf = 0.455/ln²(0.06 Re_x); Schultz-Grunow (1940) cf = 0.370 (log10 Re_x)^−2.584;
/// Schlichting cf = (2 log10 Re_x − 0.65)^−2.3; 1/7-power cf = 0.0576 Re_x^−0.2 (≤ 1e7).
fn flat_plate_correlations(rex: f64) -> Vec<f64> {
    let mut c = vec![
        0.455 / (0.06 * rex).ln().powi(2),
        0.370 * rex.log10().powf(-2.584),
        (2.0 * rex.log10() - 0.65).powf(-2.3),
    ];
    if rex <= 1e7 {
        c.push(0.0576 * rex.powf(-0.2));
    }
    c
}

/// Turbulent flat plate at Re = 1e8 tripped at x = 3e-3 (Re_x,tr = 3e5); returns
/// (Re_x, cf, H) at the turbulent stations.
fn turbulent_flat_plate(model: TurbulentModel) -> Vec<(f64, f64, f64)> {
    let reynolds = 1e8;
    let s = flat_plate_stations(300, 1e-5);
    let u = vec![1.0; s.len()];
    let settings = MarchSettings {
        forced_transition_x_over_c: Some(3e-3),
        turbulent_model: model,
        ..MarchSettings::new(reynolds)
    };
    let march = march_surface(&s, &u, &s, &settings).expect("valid");
    assert_eq!(
        march.events[0].kind,
        EventKind::Transition(TransitionKind::Forced)
    );
    assert_eq!(march.events.len(), 1, "no separation on a flat plate");
    march
        .stations
        .iter()
        .filter(|st| st.regime == Regime::Turbulent)
        .map(|st| (st.arc_length * reynolds, st.skin_friction, st.shape_factor))
        .collect()
}

#[test]
fn lag_entrainment_turbulent_flat_plate() {
    // Started by a trip at Re_x = 3e5 (θ continuous, H = 1.4, C_E at equilibrium). Compared over
    // 1e6 ≤ Re_x ≤ 1e8 with White, Schultz-Grunow and Schlichting. (Against the 1/7 power law,
    // meant for Re_x ≲ 1e7, the march is up to 7.9 % higher over 1e6–1e7: printed, reported,
    // not asserted.) Tolerance ±5 % of each of the three: the correlations themselves differ by up to 8.7 % at
    // Re_x = 1e8 (Schultz-Grunow 0.00172 vs White 0.00187), so 5 % of every one of them is as
    // close as agreement can be asked. H: METHODS §3.6 "expect H ≈ 1.3–1.4" up to 1e7; the 1/7
    // power profile has H = 9/7 = 1.286 and measured H falls slowly with Re (common practice, no
    // source); band 1.25–1.45 over 1e6–1e7, 1.2–1.45 up to 1e8.
    let (mut worst, mut worst_power_law) = (0.0f64, 0.0f64);
    for (rex, cf, h) in turbulent_flat_plate(TurbulentModel::LagEntrainment) {
        if !(1e6..=1e8 * (1.0 + 1e-9)).contains(&rex) {
            continue;
        }
        let c = flat_plate_correlations(rex);
        for &c in &c[..3] {
            worst = worst.max((cf / c - 1.0).abs());
            assert_relative_eq!(cf, c, max_relative = 0.05);
        }
        if let Some(&p) = c.get(3) {
            worst_power_law = worst_power_law.max((cf / p - 1.0).abs());
        }
        let band = if rex <= 1e7 { 1.25 } else { 1.2 };
        assert!((band..=1.45).contains(&h), "Re_x {rex:.3e}: H = {h}");
    }
    println!(
        "lag-entrainment flat plate: worst |cf/correlation − 1| = {:.2} % (1/7 power law {:.2} %)",
        100.0 * worst,
        100.0 * worst_power_law
    );
}

#[test]
fn head_turbulent_flat_plate() {
    // As above with Head's method (Ludwieg–Tillmann cf). METHODS §3.6: "a flat-plate run of
    // Head's method should fall within about ±8 % of these [1/7-power, Schultz-Grunow, White]
    // for 5·10⁵ < Re_x < 10⁷"; checked against their mean over 1e6–1e7 with ±8 %. Above 1e7
    // Ludwieg–Tillmann falls off (measured −11 % vs Schultz-Grunow and −18 % vs White at
    // Re_x = 1e8): reported, not asserted.
    let mut worst = 0.0f64;
    for (rex, cf, h) in turbulent_flat_plate(TurbulentModel::Head) {
        if !(1e6..=1e7).contains(&rex) {
            continue;
        }
        let c = flat_plate_correlations(rex);
        let mean = [c[0], c[1], c[3]].iter().sum::<f64>() / 3.0;
        worst = worst.max((cf / mean - 1.0).abs());
        assert_relative_eq!(cf, mean, max_relative = 0.08);
        assert!((1.25..=1.45).contains(&h), "Re_x {rex:.3e}: H = {h}");
    }
    println!(
        "Head flat plate 1e6–1e7: worst |cf/mean − 1| = {:.2} %",
        100.0 * worst
    );
}

#[test]
fn wake_conserves_momentum_at_constant_edge_speed() {
    // Momentum integral with cf = 0 and due/ds = 0: θ is constant along the wake (exact), the
    // wake starts from θ_u + θ_l and δ*_u + δ*_l, and its shape factor relaxes towards 1.
    // Squire & Young (1938) at ue = 1 is then exactly 2θ (METHODS §6.7).
    let reynolds = 1e6;
    let s = flat_plate_stations(200, 1e-4);
    let u = vec![1.0; s.len()];
    let settings = MarchSettings {
        forced_transition_x_over_c: Some(0.05),
        ..MarchSettings::new(reynolds)
    };
    let surface = march_surface(&s, &u, &s, &settings).expect("valid");
    let te = *surface.stations.last().expect("stations");
    let wake_s: Vec<f64> = (0..=100).map(|i| 1.0 + 0.01 * f64::from(i)).collect();
    let wake_u = vec![1.0; wake_s.len()];
    let wake = march_wake(&te, &te, &wake_s, &wake_u, &settings).expect("valid");
    assert_relative_eq!(wake[0].momentum_thickness, 2.0 * te.momentum_thickness);
    assert_relative_eq!(wake[0].shape_factor, te.shape_factor);
    for w in &wake {
        assert_eq!(w.regime, Regime::Wake);
        assert_eq!(w.skin_friction, 0.0);
        assert_relative_eq!(
            w.momentum_thickness,
            wake[0].momentum_thickness,
            max_relative = 1e-12
        );
    }
    let end = wake.last().expect("stations");
    assert!(end.shape_factor < te.shape_factor && end.shape_factor > 1.0);
    assert_relative_eq!(
        squire_young_drag(end.momentum_thickness, end.shape_factor, 1.0),
        2.0 * end.momentum_thickness
    );
}
