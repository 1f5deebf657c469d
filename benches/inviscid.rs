//! Benchmark of the inviscid panel solver: build and factor the system for a 160-panel
//! NACA 2412 and solve 41 angles of attack, against the floor of one dense LU factorisation of a
//! random 162 × 162 matrix (the size of the panel system) with nalgebra.

use criterion::{criterion_group, criterion_main, BatchSize, Criterion};
use foilsweep_geometry::naca::{naca_section, TrailingEdge};
use foilsweep_panel::PanelSolver;
use nalgebra::Point2;
use std::hint::black_box;
use std::time::Duration;

/// 160-panel NACA 2412 with a sharp trailing edge.
fn section() -> Vec<Point2<f64>> {
    match naca_section("2412", 81, TrailingEdge::Closed) {
        Ok(airfoil) => airfoil.points().to_vec(),
        Err(e) => panic!("benchmark section: {e}"),
    }
}

fn solver_and_sweep(c: &mut Criterion) {
    let nodes = section();
    let alphas: Vec<f64> = (0..41)
        .map(|k| (-10.0 + 0.5 * k as f64).to_radians())
        .collect();
    c.bench_function("panel_160_new_and_41_alphas", |b| {
        b.iter(|| {
            let solver = match PanelSolver::new(black_box(&nodes)) {
                Ok(s) => s,
                Err(e) => panic!("benchmark solver: {e}"),
            };
            alphas.iter().map(|&a| solver.solve(a).cl).sum::<f64>()
        })
    });
}

fn dense_lu_floor(c: &mut Criterion) {
    let matrix = foilsweep_validation::seeded_matrix(162);
    c.bench_function("dense_lu_162", |b| {
        b.iter_batched(
            || matrix.clone(),
            |m| black_box(m.lu()),
            BatchSize::SmallInput,
        )
    });
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(20).measurement_time(Duration::from_secs(3));
    targets = solver_and_sweep, dense_lu_floor
}
criterion_main!(benches);
