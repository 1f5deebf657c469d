//! Bad inputs to the direct march and the transition closures give errors carrying the station
//! index, never a panic; extreme but valid inputs give finite, flagged results.

use foilsweep_boundary_layer::closure::transition;
use foilsweep_boundary_layer::direct::{march_surface, march_wake, MarchSettings};
use foilsweep_boundary_layer::BoundaryLayerError as E;

fn stations() -> (Vec<f64>, Vec<f64>) {
    let s: Vec<f64> = (0..20).map(|i| 0.05 * f64::from(i)).collect();
    let u = s.iter().map(|&x| (20.0 * x).min(1.2)).collect();
    (s, u)
}

/// Runs the march and returns its error (panics in the test if it succeeds).
fn error_of(s: &[f64], u: &[f64], settings: &MarchSettings) -> E {
    march_surface(s, u, s, settings).expect_err("must be rejected")
}

#[test]
fn invalid_station_data() {
    let ok = MarchSettings::new(1e6);
    let (s, u) = stations();
    let mut bad = u.clone();
    bad[7] = f64::NAN;
    assert!(matches!(
        error_of(&s, &bad, &ok),
        E::InvalidValue { station: 7, .. }
    ));
    bad[7] = -0.3;
    assert!(matches!(
        error_of(&s, &bad, &ok),
        E::InvalidValue { station: 7, .. }
    ));
    bad[7] = 0.0;
    assert!(matches!(
        error_of(&s, &bad, &ok),
        E::VanishingEdgeVelocity { station: 7 }
    ));
    let mut s_bad = s.clone();
    s_bad[5] = s_bad[4];
    assert!(matches!(
        error_of(&s_bad, &u, &ok),
        E::NonIncreasingArcLength { station: 5, .. }
    ));
    s_bad[5] = f64::INFINITY;
    assert!(matches!(
        error_of(&s_bad, &u, &ok),
        E::InvalidValue { station: 5, .. }
    ));
    assert!(matches!(
        error_of(&s[..1], &u[..1], &ok),
        E::TooFewStations { count: 1, .. }
    ));
    assert!(matches!(
        march_surface(&s, &u[..5], &s, &ok),
        Err(E::LengthMismatch { .. })
    ));
    assert!(matches!(
        error_of(&[], &[], &ok),
        E::TooFewStations { count: 0, .. }
    ));
}

#[test]
fn invalid_settings() {
    let (s, u) = stations();
    for re in [5e2, 2e9, f64::NAN, -1e6] {
        assert!(matches!(
            error_of(&s, &u, &MarchSettings::new(re)),
            E::ReynoldsOutOfRange { .. }
        ));
    }
    let bad_n = MarchSettings {
        critical_n: f64::NAN,
        ..MarchSettings::new(1e6)
    };
    assert!(matches!(
        error_of(&s, &u, &bad_n),
        E::InvalidSetting {
            name: "critical_n",
            ..
        }
    ));
    let bad_h = MarchSettings {
        turbulent_start_shape_factor: 0.9,
        ..MarchSettings::new(1e6)
    };
    assert!(matches!(error_of(&s, &u, &bad_h), E::InvalidSetting { .. }));
    let bad_trip = MarchSettings {
        forced_transition_x_over_c: Some(f64::NAN),
        ..MarchSettings::new(1e6)
    };
    assert!(matches!(
        error_of(&s, &u, &bad_trip),
        E::InvalidSetting { .. }
    ));
    // messages are lowercase without a trailing period (error policy)
    let msg = error_of(&s, &u, &MarchSettings::new(1.0)).to_string();
    assert!(
        msg.starts_with(char::is_lowercase) && !msg.ends_with('.'),
        "{msg}"
    );
}

#[test]
fn invalid_wake_start() {
    let (s, u) = stations();
    let settings = MarchSettings::new(1e6);
    let surface = march_surface(&s, &u, &s, &settings).expect("valid");
    let mut te = *surface.stations.last().expect("stations");
    te.momentum_thickness = f64::NAN;
    let ws = [1.0, 1.1, 1.2];
    let wu = [1.0, 1.0, 1.0];
    assert!(matches!(
        march_wake(&te, &te, &ws, &wu, &settings),
        Err(E::InvalidValue { station: 0, .. })
    ));
}

#[test]
fn mack_out_of_range() {
    for tu in [0.0, -0.01, 5e-5, 0.031, f64::NAN, f64::INFINITY] {
        assert!(matches!(
            transition::critical_n_from_turbulence(tu),
            Err(E::TurbulenceOutOfRange { .. })
        ));
    }
}

#[test]
fn extreme_valid_inputs_stay_finite() {
    // A violent deceleration at the lowest and highest Reynolds numbers: the march must finish
    // with finite numbers and flag what happened (separation or bursting), not fail or panic.
    let s: Vec<f64> = (0..80).map(|i| (f64::from(i) / 79.0).powi(2)).collect();
    let u: Vec<f64> = s
        .iter()
        .map(|&x| (100.0 * x).min(2.0) * (1.0 - 0.7 * x))
        .collect();
    for re in [1e3, 1e9] {
        let m = march_surface(&s, &u, &s, &MarchSettings::new(re)).expect("valid");
        assert_eq!(m.stations.len(), s.len());
        assert!(!m.events.is_empty());
        for st in &m.stations {
            assert!(st.momentum_thickness.is_finite() && st.shape_factor.is_finite());
            assert!(st.skin_friction.is_finite() && st.amplification.is_finite());
        }
    }
}
