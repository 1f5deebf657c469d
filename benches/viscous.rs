//! Benchmark of the viscous solver on the shipped Eppler 387 (160 panels, N_crit 9): one
//! converged point (alpha 4°, Re 3e5), a 41-point polar at Re 3e5 (alpha −4° to 16° in 0.5°
//! steps) and the 8 Re × 41 alpha matrix on a 2-thread pool, against the floor of one dense LU
//! factorisation of a random 162 × 162 matrix (the size of the panel system, as in
//! `benches/inviscid.rs`), so that the cost of a point can be quoted in LU factorisations.
//!
//! The convergence counts of the polar and the matrix are printed once (from the first timed
//! run; the solver is deterministic, so every run gives the same counts).

use criterion::{criterion_group, criterion_main, BatchSize, Criterion, SamplingMode};
use foilsweep_driver::{run_polar, Polar, PolarRequest, Targets};
use foilsweep_geometry::{Airfoil, ParseOptions};
use foilsweep_panel::PanelSolver;
use foilsweep_validation::airfoil_path;
use foilsweep_viscous::{solve_point, OperatingPoint, ViscousSettings};
use std::hint::black_box;
use std::time::Duration;

/// Reynolds numbers of the matrix run.
const MATRIX_REYNOLDS: [f64; 8] = [1.0e5, 1.5e5, 2.0e5, 3.0e5, 4.0e5, 5.0e5, 7.0e5, 1.0e6];

/// The shipped E387 as parsed (not yet re-panelled).
fn e387() -> Airfoil {
    let text = std::fs::read_to_string(airfoil_path("e387.dat")).expect("shipped E387");
    Airfoil::parse(&text, "e387.dat", &ParseOptions::default())
        .expect("E387 parses")
        .0
}

/// Alpha −4° to 16° in 0.5° steps (41 values).
fn alphas() -> Vec<f64> {
    (0..41).map(|k| -4.0 + 0.5 * f64::from(k)).collect()
}

/// Prints, once, how many points of a polar converged and the alphas that did not, per Reynolds
/// number, and the total.
fn print_convergence(label: &str, polar: &Polar) {
    for &reynolds in &polar.reynolds {
        let points: Vec<_> = polar.points_at(reynolds).collect();
        let failed: Vec<String> = points
            .iter()
            .filter(|p| !p.converged)
            .filter_map(|p| p.alpha_deg.map(|a| format!("{a}")))
            .collect();
        println!(
            "{label}: Re {reynolds:.0}: {} of {} converged; not converged at alpha [{}]",
            points.len() - failed.len(),
            points.len(),
            failed.join(", ")
        );
    }
    let converged = polar.points.iter().filter(|p| p.converged).count();
    println!(
        "{label}: total {converged} of {} converged",
        polar.points.len()
    );
}

fn one_point(c: &mut Criterion) {
    let panelled = e387().repanel(160).expect("E387 re-panels");
    let solver = PanelSolver::new(panelled.points()).expect("panel solver");
    let point = OperatingPoint::at_alpha_deg(4.0, 3.0e5);
    let settings = ViscousSettings::default();
    let result = solve_point(&solver, &point, &settings, None).expect("point solves");
    println!(
        "viscous point: status {:?}, {} iterations, cl {:.4}, cd {:.5}",
        result.status, result.iterations, result.cl, result.cd
    );
    c.bench_function("viscous_point_e387_alpha4_re3e5", |b| {
        b.iter(|| solve_point(black_box(&solver), black_box(&point), &settings, None))
    });
}

fn polar_one_reynolds(c: &mut Criterion) {
    let request = PolarRequest::new(&e387(), 160, vec![3.0e5], Targets::AlphaDeg(alphas()))
        .expect("polar request");
    let mut last = None;
    let mut group = c.benchmark_group("polar");
    group
        .sample_size(10)
        .sampling_mode(SamplingMode::Flat)
        .measurement_time(Duration::from_secs(1));
    group.bench_function("e387_re3e5_41_alphas", |b| {
        b.iter(|| last = Some(run_polar(black_box(&request), None).expect("sweep runs")))
    });
    group.finish();
    if let Some(polar) = &last {
        print_convergence("41-point polar", polar);
    }
}

fn polar_matrix(c: &mut Criterion) {
    let request = PolarRequest::new(
        &e387(),
        160,
        MATRIX_REYNOLDS.to_vec(),
        Targets::AlphaDeg(alphas()),
    )
    .expect("matrix request");
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(2)
        .build()
        .expect("2-thread pool");
    let mut last = None;
    let mut group = c.benchmark_group("matrix");
    group
        .sample_size(10)
        .sampling_mode(SamplingMode::Flat)
        .warm_up_time(Duration::from_millis(1))
        .measurement_time(Duration::from_secs(1));
    group.bench_function("e387_8re_41_alphas_2_threads", |b| {
        b.iter(|| {
            last = Some(
                pool.install(|| run_polar(black_box(&request), None))
                    .expect("sweep runs"),
            )
        })
    });
    group.finish();
    if let Some(polar) = &last {
        print_convergence("8 Re x 41 alpha matrix", polar);
    }
}

fn dense_lu_floor(c: &mut Criterion) {
    let matrix = foilsweep_validation::seeded_matrix(162);
    c.bench_function("dense_lu_162_viscous_floor", |b| {
        b.iter_batched(
            || matrix.clone(),
            |m| black_box(m.lu()),
            BatchSize::SmallInput,
        )
    });
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(10);
    targets = one_point, polar_one_reynolds, polar_matrix, dense_lu_floor
}
criterion_main!(benches);
