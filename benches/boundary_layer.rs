//! Benchmark of the direct (non-interacting) boundary-layer march: one surface of 100 stations
//! with stagnation start, e^N transition and the lag-entrainment turbulent layer.

use criterion::{criterion_group, criterion_main, Criterion};
use foilsweep_boundary_layer::direct::{march_surface, MarchSettings};
use std::hint::black_box;

/// Invented suction-side distribution (stagnation point, peak ≈ 1.3, linear deceleration),
/// 100 stations clustered towards the front.
fn stations() -> (Vec<f64>, Vec<f64>) {
    let s: Vec<f64> = (0..100).map(|i| (f64::from(i) / 99.0).powi(2)).collect();
    let u = s
        .iter()
        .map(|&x| 1.3 * (1.0 - (-x / 0.01).exp()) - 0.4 * x)
        .collect();
    (s, u)
}

fn direct_march(c: &mut Criterion) {
    let (s, u) = stations();
    let settings = MarchSettings::new(1e6);
    c.bench_function("direct_march_100_stations", |b| {
        b.iter(|| march_surface(black_box(&s), black_box(&u), black_box(&s), &settings))
    });
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(20);
    targets = direct_march
}
criterion_main!(benches);
