//! The sweep: Reynolds numbers in parallel, targets by continuation with retries.
//!
//! Continuation within one Reynolds number ([`continue_over`]): the targets are ordered by value;
//! the march starts at the requested value nearest zero (ties go to the larger value), goes
//! upward through the larger values and then downward from the start through the smaller ones.
//! Each point is warm-started from the last converged point of its direction; a requested step
//! longer than [`SweepSettings::max_alpha_step_deg`] (or `max_cl_step`) is walked through
//! equally spaced intermediate values that are not reported. A point that fails (error or not
//! converged) is retried
//! 1. cold (no warm start), if the first try was warm and [`SweepSettings::retry_cold`] is set
//!    (off by default: `solve_point` itself falls back to a cold start when a warm start fails,
//!    so a second cold solve would repeat the same deterministic computation);
//! 2. by approaching it from the last converged neighbour in steps of half the gap, halving the
//!    step after each failure up to [`SweepSettings::max_step_halvings`] times; the intermediate
//!    values only warm up the solver and are not reported.
//!
//! A run of failed points that the march gets past (it converges at a value beyond them) is
//! given a second chance from that side: walked back from the converged point beyond, each with
//! the same retries, until one still fails (a continuation can fail on its way up a branch yet
//! reach the same branch from the far side; near a laminar bubble the discrete equations have
//! more than one root and the approach decides which one Newton finds). Failed points are
//! reported after that second chance. If a point still fails it is kept, flagged with the reason
//! of its first failure and the approaches that were tried.
//!
//! A start point that fails cold (it has no neighbour) is approached from a lead-in solution at alpha 0°
//! ([`SolveAt::lead_in`], not reported), where a cold start is most likely to succeed, through
//! intermediate values at the requested spacing (at most a quarter of the way and at most
//! [`MAX_LEAD_IN_STEPS`] of them), so a list such as 5°…7° or 10°…16° does not depend on a
//! cold start at its first value. If that fails too, it is approached
//! again from the first converged point above it before the downward march starts from it.
//!
//! Giving up: after [`SweepSettings::give_up_after_failures`] consecutive failures in one
//! direction *past stall* the rest of that direction is listed as not attempted. Past stall
//! means the last two converged points of the direction have a lift-curve slope below half the
//! thin-airfoil value 2π per radian (thin-airfoil slope: Abbott & von Doenhoff 1959, §4.3; the
//! half is common practice, no source): the lift curve has bent over or fallen. Failures on the
//! straight part of the lift curve never end a direction, since they are numerical, not
//! physical.
//!
//! Output order is the requested order, so it does not depend on the thread count.

use foilsweep_viscous::{
    solve_point, OperatingPoint, PointResult, PointStatus, Target, ViscousSettings,
};
use rayon::prelude::*;

use crate::output::{Polar, PolarPoint, PolarSettings, TargetKind, CAUTION, SCHEMA_VERSION};
use crate::request::{PolarRequest, RequestError, SweepSettings, Targets};

/// Why one try at a point did not give a converged solution.
#[derive(Debug, Clone, PartialEq)]
pub(crate) struct Failure {
    /// One-line reason.
    pub reason: String,
    /// Newton iterations, when the solver ran out of them.
    pub iterations: Option<usize>,
    /// Final residual, when the solver ran out of iterations.
    pub residual: Option<f64>,
}

/// Solves one value of the swept quantity, optionally warm-started from a converged neighbour.
pub(crate) trait SolveAt {
    /// A converged solution (also what warm-starts a neighbour).
    type Solved: Clone;
    /// One try at `value`.
    fn solve_at(&self, value: f64, warm: Option<&Self::Solved>) -> Result<Self::Solved, Failure>;
    /// True when two neighbouring converged points of a march show the section past (or at)
    /// stall, so that further failures in that direction are expected.
    fn beyond_stall(&self, previous: &(f64, Self::Solved), last: &(f64, Self::Solved)) -> bool;
    /// A cold solve at the operating point where cold starts are most reliable (alpha 0°), with
    /// its value in the swept quantity, to approach a start at `start` that failed cold; `None`
    /// when that would repeat the failed solve.
    fn lead_in(&self, start: f64) -> Option<Result<(f64, Self::Solved), Failure>>;
}

/// What became of one requested value.
#[derive(Debug, Clone, PartialEq)]
pub(crate) enum Outcome<S> {
    /// Converged, possibly after retries.
    Converged(S),
    /// Still failing after every retry; the first failure at the value itself.
    Failed(Failure),
    /// Skipped after too many consecutive failures in its direction.
    NotAttempted,
}

/// One requested value's outcome and the solves spent on it.
#[derive(Debug, Clone, PartialEq)]
pub(crate) struct Record<S> {
    pub outcome: Outcome<S>,
    pub solves: usize,
}

/// The order of the march as indices into `values`: upward from the value nearest zero
/// (inclusive), then downward from just below it.
pub(crate) fn march_order(values: &[f64]) -> (Vec<usize>, Vec<usize>) {
    let mut sorted: Vec<usize> = (0..values.len()).collect();
    sorted.sort_by(|&a, &b| values[a].total_cmp(&values[b]));
    // Smallest |value|; among equal magnitudes the later (larger) one.
    let start = sorted
        .iter()
        .enumerate()
        .min_by(|(ia, &a), (ib, &b)| values[a].abs().total_cmp(&values[b].abs()).then(ib.cmp(ia)))
        .map_or(0, |(i, _)| i);
    let upward = sorted[start..].to_vec();
    let downward = sorted[..start].iter().rev().copied().collect();
    (upward, downward)
}

/// Tries `value` with the retries of the module doc. Returns the outcome and the solves spent.
fn attempt<P: SolveAt>(
    solver: &P,
    value: f64,
    neighbour: Option<&(f64, P::Solved)>,
    settings: &SweepSettings,
    max_step: f64,
) -> (Outcome<P::Solved>, usize) {
    let mut solves = 0;
    // Walk a step longer than `max_step` through intermediate values (not reported); the
    // retries below start from the last one that converged.
    let mut walked = None;
    if let Some((from, warm)) = neighbour {
        for v in intermediate_values(*from, value, max_step) {
            solves += 1;
            let warm = walked.as_ref().map_or(warm, |(_, s)| s);
            match solver.solve_at(v, Some(warm)) {
                Ok(solved) => walked = Some((v, solved)),
                Err(_) => break,
            }
        }
    }
    let neighbour = walked.as_ref().or(neighbour);
    solves += 1;
    let first = match solver.solve_at(value, neighbour.map(|(_, s)| s)) {
        Ok(solved) => return (Outcome::Converged(solved), solves),
        Err(failure) => failure,
    };
    let Some((from, warm)) = neighbour else {
        // The first try was already cold and there is nothing to approach from.
        return (Outcome::Failed(first), solves);
    };
    let mut retries = Vec::new();
    if settings.retry_cold {
        solves += 1;
        if let Ok(solved) = solver.solve_at(value, None) {
            return (Outcome::Converged(solved), solves);
        }
        retries.push("a cold restart".to_owned());
    }
    // Approach from the converged neighbour in smaller steps.
    let mut current = (*from, warm.clone());
    let mut step = (value - from) / 2.0;
    let mut halvings = 1;
    while halvings <= settings.max_step_halvings {
        let remaining = value - current.0;
        let next = if remaining.abs() <= step.abs() * (1.0 + 1e-9) {
            value
        } else {
            current.0 + step
        };
        solves += 1;
        match solver.solve_at(next, Some(&current.1)) {
            Ok(solved) if next == value => return (Outcome::Converged(solved), solves),
            Ok(solved) => current = (next, solved),
            Err(_) => {
                halvings += 1;
                step /= 2.0;
            }
        }
    }
    if settings.max_step_halvings > 0 {
        let finest = (value - from) / 2f64.powi(settings.max_step_halvings.min(60) as i32);
        retries.push(format!(
            "an approach from {from} in steps down to {:.3}",
            finest.abs()
        ));
    }
    let retried = if retries.is_empty() {
        String::new()
    } else {
        format!("; {} also failed", retries.join(" and "))
    };
    let reason = format!("{}{retried}", first.reason);
    (Outcome::Failed(Failure { reason, ..first }), solves)
}

/// One marching direction: its last converged points (for warm starts and the stall test) and
/// its run of consecutive failures.
struct Direction<S> {
    /// The last two converged points, oldest first.
    converged: Vec<(f64, S)>,
    /// The first point this direction converged (to re-approach a failed start from).
    first_converged: Option<(f64, S)>,
    consecutive_failures: usize,
}

impl<S: Clone> Direction<S> {
    fn from(start: Option<(f64, S)>) -> Self {
        Self {
            converged: start.into_iter().collect(),
            first_converged: None,
            consecutive_failures: 0,
        }
    }

    fn neighbour(&self) -> Option<&(f64, S)> {
        self.converged.last()
    }

    /// True once the direction has failed `give_up_after` times in a row past stall.
    fn gave_up<P: SolveAt<Solved = S>>(&self, solver: &P, settings: &SweepSettings) -> bool {
        let limit = settings.give_up_after_failures;
        limit > 0
            && self.consecutive_failures >= limit
            && matches!(self.converged.as_slice(), [previous, last] if solver.beyond_stall(previous, last))
    }

    fn record(&mut self, value: f64, outcome: &Outcome<S>) {
        match outcome {
            Outcome::Converged(solved) => {
                self.consecutive_failures = 0;
                if self.first_converged.is_none() {
                    self.first_converged = Some((value, solved.clone()));
                }
                self.converged.push((value, solved.clone()));
                if self.converged.len() > 2 {
                    self.converged.remove(0);
                }
            }
            Outcome::Failed(_) => self.consecutive_failures += 1,
            Outcome::NotAttempted => {}
        }
    }
}

/// Values strictly between `from` and `to`, equally spaced at no more than `max_step` (none
/// when the distance is within `max_step` or not finite).
fn intermediate_values(from: f64, to: f64, max_step: f64) -> Vec<f64> {
    let distance = to - from;
    if !(max_step > 0.0 && distance.is_finite()) || distance.abs() <= max_step * (1.0 + 1e-9) {
        return Vec::new();
    }
    let intervals = (distance.abs() / max_step * (1.0 - 1e-9)).ceil() as usize;
    (1..intervals)
        .map(|k| from + distance * k as f64 / intervals as f64)
        .collect()
}

/// Most intermediate values between a lead-in and the start it approaches (our choice: 16 keep
/// 0.5° steps up to a start at 8.5°; a farther start is approached in proportionally longer
/// steps, each then walked at the continuation limit by `attempt`).
const MAX_LEAD_IN_STEPS: usize = 16;

/// Intermediate values from a lead-in at `from` to the start `to` (both excluded), equally
/// spaced at no more than the smallest gap between the requested `values` and no more than a
/// quarter of the distance, and at most [`MAX_LEAD_IN_STEPS`] of them.
fn lead_in_path(from: f64, to: f64, values: &[f64]) -> Vec<f64> {
    let distance = (to - from).abs();
    let mut sorted = values.to_vec();
    sorted.sort_by(f64::total_cmp);
    let gap = sorted
        .windows(2)
        .map(|w| w[1] - w[0])
        .filter(|&g| g > 0.0)
        .fold(f64::INFINITY, f64::min);
    let spacing = gap
        .min(0.25 * distance)
        .max(distance / (MAX_LEAD_IN_STEPS + 1) as f64);
    intermediate_values(from, to, spacing)
}

/// Most step halvings of the approach from the far side (our choice: the far side is a
/// second path to the same branch, tried at the requested step and at half of it; with the
/// full three halvings a point that fails either way, E387 Re 1.5e5 at 14.5° past stall, cost
/// 14 solves).
const MAX_FAR_SIDE_HALVINGS: u32 = 1;

/// Second chance for a run of failed points (`pending`, in march order) that the march has
/// passed: each is approached from the converged point just beyond it (`beyond`), walking back
/// towards the last converged point before the run, with the usual retries but at most
/// [`MAX_FAR_SIDE_HALVINGS`] step halvings. Stops at the first that still fails: its flag gains
/// the far-side approach; the points before it (not tried again) keep their first failure.
fn approach_from_beyond<P: SolveAt>(
    solver: &P,
    values: &[f64],
    pending: &mut [(usize, Record<P::Solved>)],
    beyond: (f64, P::Solved),
    settings: &SweepSettings,
    max_step: f64,
) {
    let settings = &SweepSettings {
        max_step_halvings: settings.max_step_halvings.min(MAX_FAR_SIDE_HALVINGS),
        ..*settings
    };
    let mut from = beyond;
    for (index, record) in pending.iter_mut().rev() {
        let value = values[*index];
        let (outcome, solves) = attempt(solver, value, Some(&from), settings, max_step);
        record.solves += solves;
        match outcome {
            Outcome::Converged(solved) => {
                from = (value, solved.clone());
                record.outcome = Outcome::Converged(solved);
            }
            _ => {
                if let Outcome::Failed(failure) = &mut record.outcome {
                    failure.reason = format!(
                        "{}; an approach from {} on the far side also failed",
                        failure.reason, from.0
                    );
                }
                return;
            }
        }
    }
}

/// Solves every value by continuation (module doc). `on_done(index, record)` is called once as
/// each requested value is finished; the records come back in the order of `values`.
pub(crate) fn continue_over<P: SolveAt>(
    solver: &P,
    values: &[f64],
    settings: &SweepSettings,
    max_step: f64,
    on_done: &mut dyn FnMut(usize, &Record<P::Solved>),
) -> Vec<Record<P::Solved>> {
    let (upward, downward) = march_order(values);
    let Some((&start, upward)) = upward.split_first() else {
        return Vec::new();
    };
    type Records<S> = Vec<Option<Record<S>>>;
    let march = |order: &[usize],
                 direction: &mut Direction<P::Solved>,
                 records: &mut Records<P::Solved>,
                 on_done: &mut dyn FnMut(usize, &Record<P::Solved>)| {
        // Failed points since the last converged one, in march order; reported once the
        // march has converged past them and they have had their approach from the far side.
        let mut pending: Vec<(usize, Record<P::Solved>)> = Vec::new();
        for &index in order {
            let value = values[index];
            let (outcome, solves) = if direction.gave_up(solver, settings) {
                (Outcome::NotAttempted, 0)
            } else {
                attempt(solver, value, direction.neighbour(), settings, max_step)
            };
            direction.record(value, &outcome);
            let record = Record { outcome, solves };
            match &record.outcome {
                Outcome::Failed(_) => {
                    pending.push((index, record));
                    continue;
                }
                Outcome::Converged(solved) => {
                    approach_from_beyond(
                        solver,
                        values,
                        &mut pending,
                        (value, solved.clone()),
                        settings,
                        max_step,
                    );
                }
                Outcome::NotAttempted => {}
            }
            for (failed, failed_record) in pending.drain(..).chain([(index, record)]) {
                on_done(failed, &failed_record);
                records[failed] = Some(failed_record);
            }
        }
        for (failed, failed_record) in pending {
            on_done(failed, &failed_record);
            records[failed] = Some(failed_record);
        }
    };

    let mut records: Records<P::Solved> = vec![None; values.len()];
    let start_value = values[start];
    let (outcome, solves) = attempt(solver, start_value, None, settings, max_step);
    let mut start_record = Record { outcome, solves };
    // A start that failed cold is approached from the lead-in solution.
    if matches!(start_record.outcome, Outcome::Failed(_)) {
        if let Some(lead) = solver.lead_in(start_value) {
            start_record.solves += 1;
            if let Ok(lead) = lead {
                // Walk from the lead-in towards the start through intermediate values (not
                // reported), each with the usual retries; stop at the first that fails.
                let mut current = lead;
                for value in lead_in_path(current.0, start_value, values) {
                    let (outcome, solves) =
                        attempt(solver, value, Some(&current), settings, max_step);
                    start_record.solves += solves;
                    match outcome {
                        Outcome::Converged(solved) => current = (value, solved),
                        _ => break,
                    }
                }
                let (outcome, solves) =
                    attempt(solver, start_value, Some(&current), settings, max_step);
                if matches!(outcome, Outcome::Converged(_)) {
                    start_record.outcome = outcome;
                }
                start_record.solves += solves;
            }
        }
    }
    let converged_start = |record: &Record<P::Solved>| match &record.outcome {
        Outcome::Converged(solved) => Some((start_value, solved.clone())),
        _ => None,
    };
    let mut up = Direction::from(converged_start(&start_record));
    // A converged start is reported at once; a failed one after its second chance below.
    let reported_early = up.neighbour().is_some();
    if reported_early {
        on_done(start, &start_record);
    }
    march(upward, &mut up, &mut records, on_done);
    // A start that failed cold is approached again from the first converged point above it.
    if let (Outcome::Failed(_), Some(from)) = (&start_record.outcome, &up.first_converged) {
        let (outcome, solves) = attempt(solver, start_value, Some(from), settings, max_step);
        if matches!(outcome, Outcome::Converged(_)) {
            start_record.outcome = outcome;
        }
        start_record.solves += solves;
    }
    let mut down = Direction::from(converged_start(&start_record));
    if !reported_early {
        on_done(start, &start_record);
    }
    records[start] = Some(start_record);
    march(&downward, &mut down, &mut records, on_done);
    records
        .into_iter()
        .map(|r| {
            r.unwrap_or(Record {
                outcome: Outcome::NotAttempted,
                solves: 0,
            })
        })
        .collect()
}

/// The viscous solver at one Reynolds number of a request.
struct ViscousAt<'a> {
    request: &'a PolarRequest,
    reynolds: f64,
}

impl SolveAt for ViscousAt<'_> {
    type Solved = PointResult;

    fn solve_at(&self, value: f64, warm: Option<&PointResult>) -> Result<PointResult, Failure> {
        let target = match self.request.targets {
            Targets::AlphaDeg(_) => Target::AlphaDeg(value),
            Targets::Cl(_) => Target::Cl(value),
        };
        self.solve(target, warm)
    }

    fn beyond_stall(&self, previous: &(f64, PointResult), last: &(f64, PointResult)) -> bool {
        let (previous, last) = (&previous.1, &last.1);
        let run_deg = last.alpha_deg - previous.alpha_deg;
        if run_deg.abs() < 1e-9 {
            return false;
        }
        let slope_per_deg = (last.cl - previous.cl) / run_deg;
        slope_per_deg < STALL_SLOPE_FRACTION * THIN_AIRFOIL_SLOPE_PER_DEG
    }

    fn lead_in(&self, start: f64) -> Option<Result<(f64, PointResult), Failure>> {
        let alpha_mode = matches!(self.request.targets, Targets::AlphaDeg(_));
        if alpha_mode && start == 0.0 {
            return None;
        }
        Some(self.solve(Target::AlphaDeg(0.0), None).map(|solved| {
            let value = if alpha_mode { 0.0 } else { solved.cl };
            (value, solved)
        }))
    }
}

impl ViscousAt<'_> {
    /// One solve of `target` at this Reynolds number, a status other than converged as a
    /// [`Failure`].
    fn solve(&self, target: Target, warm: Option<&PointResult>) -> Result<PointResult, Failure> {
        let request = self.request;
        let point = OperatingPoint {
            target,
            reynolds: self.reynolds,
            mach: request.mach,
            critical_n: request.critical_n,
            trip_upper_x_over_c: request.trip_upper_x_over_c,
            trip_lower_x_over_c: request.trip_lower_x_over_c,
        };
        let warm = warm.map(|w| &w.warm_start);
        match solve_point(&request.solver, &point, &request.viscous, warm) {
            Ok(result) => match result.status {
                PointStatus::Converged => Ok(result),
                PointStatus::NotConverged => Err(Failure {
                    reason: format!(
                        "not converged: residual {:.1e} after {} iterations",
                        result.residual, result.iterations
                    ),
                    iterations: Some(result.iterations),
                    residual: Some(result.residual),
                }),
                PointStatus::Implausible(why) => Err(Failure {
                    reason: format!("converged to an implausible state: {why}"),
                    iterations: Some(result.iterations),
                    residual: Some(result.residual),
                }),
            },
            Err(error) => Err(Failure {
                reason: error.to_string(),
                iterations: None,
                residual: None,
            }),
        }
    }
}

/// Thin-airfoil lift-curve slope, 2π per radian in per degree (Abbott & von Doenhoff 1959,
/// §4.3).
const THIN_AIRFOIL_SLOPE_PER_DEG: f64 = 2.0 * std::f64::consts::PI * std::f64::consts::PI / 180.0;

/// A lift-curve slope below this fraction of the thin-airfoil slope counts as stalled (common
/// practice, no source).
const STALL_SLOPE_FRACTION: f64 = 0.5;

fn polar_point(
    request: &PolarRequest,
    reynolds: f64,
    value: f64,
    record: &Record<PointResult>,
    give_up_after: usize,
) -> PolarPoint {
    let (requested_alpha, target_cl) = match request.targets {
        Targets::AlphaDeg(_) => (Some(value), None),
        Targets::Cl(_) => (None, Some(value)),
    };
    match &record.outcome {
        Outcome::Converged(result) => {
            PolarPoint::converged(reynolds, target_cl, result, record.solves)
        }
        Outcome::Failed(failure) => PolarPoint::flagged(
            reynolds,
            requested_alpha,
            target_cl,
            failure.reason.clone(),
            failure.iterations,
            failure.residual,
            record.solves,
        ),
        Outcome::NotAttempted => PolarPoint::flagged(
            reynolds,
            requested_alpha,
            target_cl,
            format!("not attempted: past stall, beyond {give_up_after} consecutive failed points"),
            None,
            None,
            0,
        ),
    }
}

/// The largest continuation step of `request` in its swept quantity.
fn max_continuation_step(request: &PolarRequest) -> f64 {
    match request.targets {
        Targets::AlphaDeg(_) => request.sweep.max_alpha_step_deg,
        Targets::Cl(_) => request.sweep.max_cl_step,
    }
}

fn polar_settings(request: &PolarRequest) -> PolarSettings {
    let ViscousSettings {
        wake_length,
        wake_stations,
        max_iterations,
        tolerance,
        max_relocations,
        transition_entrainment_fraction,
        wake_curvature,
    } = request.viscous;
    PolarSettings {
        target: match request.targets {
            Targets::AlphaDeg(_) => TargetKind::AlphaDeg,
            Targets::Cl(_) => TargetKind::Cl,
        },
        mach: request.mach,
        critical_n: request.critical_n,
        trip_upper_x_over_c: request.trip_upper_x_over_c,
        trip_lower_x_over_c: request.trip_lower_x_over_c,
        wake_length_chords: wake_length,
        wake_stations,
        max_iterations,
        tolerance,
        max_relocations,
        transition_entrainment_fraction,
        wake_curvature,
        max_continuation_step: max_continuation_step(request),
        retry_cold: request.sweep.retry_cold,
        max_step_halvings: request.sweep.max_step_halvings,
        give_up_after_failures: request.sweep.give_up_after_failures,
    }
}

/// Runs the sweep of `request` (module doc). `progress` is called once per finished requested
/// point, from the worker threads.
///
/// # Errors
/// [`RequestError`] if the request fails [`PolarRequest::check`]; failed points are not errors
/// (they are flagged in the polar).
pub fn run_polar(
    request: &PolarRequest,
    progress: Option<&(dyn Fn(&PolarPoint) + Sync)>,
) -> Result<Polar, RequestError> {
    request.check()?;
    let values = request.targets.values();
    let give_up_after = request.sweep.give_up_after_failures;
    let points: Vec<Vec<PolarPoint>> = request
        .reynolds
        .par_iter()
        .map(|&reynolds| {
            let solver = ViscousAt { request, reynolds };
            let mut report = |index: usize, record: &Record<PointResult>| {
                if let Some(progress) = progress {
                    progress(&polar_point(
                        request,
                        reynolds,
                        values[index],
                        record,
                        give_up_after,
                    ));
                }
            };
            continue_over(
                &solver,
                values,
                &request.sweep,
                max_continuation_step(request),
                &mut report,
            )
            .iter()
            .zip(values)
            .map(|(record, &value)| polar_point(request, reynolds, value, record, give_up_after))
            .collect()
        })
        .collect();
    Ok(Polar {
        schema_version: SCHEMA_VERSION,
        tool_version: env!("CARGO_PKG_VERSION").to_owned(),
        caution: CAUTION.to_owned(),
        section: request.section.clone(),
        settings: polar_settings(request),
        reynolds: request.reynolds.clone(),
        targets: values.to_vec(),
        points: points.into_iter().flatten().collect(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::cell::RefCell;

    /// A stand-in solver: the "solution" is the value itself. It fails at `value` when
    /// `fails(value, warm_from)` says so, counts as stalled beyond `stalled(value)`, and
    /// records every call as (value, warm-start value).
    struct Scripted {
        fails: Box<dyn Fn(f64, Option<f64>) -> bool>,
        stalled: Box<dyn Fn(f64) -> bool>,
        calls: RefCell<Vec<(f64, Option<f64>)>>,
    }

    impl SolveAt for Scripted {
        type Solved = f64;
        fn solve_at(&self, value: f64, warm: Option<&f64>) -> Result<f64, Failure> {
            self.calls.borrow_mut().push((value, warm.copied()));
            if (self.fails)(value, warm.copied()) {
                Err(Failure {
                    reason: format!("scripted failure at {value}"),
                    iterations: Some(40),
                    residual: Some(1.0),
                })
            } else {
                Ok(value)
            }
        }

        fn beyond_stall(&self, _previous: &(f64, f64), last: &(f64, f64)) -> bool {
            (self.stalled)(last.0)
        }

        fn lead_in(&self, start: f64) -> Option<Result<(f64, f64), Failure>> {
            (start != 0.0).then(|| self.solve_at(0.0, None).map(|solved| (0.0, solved)))
        }
    }

    /// A solver that never stalls.
    fn scripted(fails: impl Fn(f64, Option<f64>) -> bool + 'static) -> Scripted {
        stalling(fails, |_| false)
    }

    fn stalling(
        fails: impl Fn(f64, Option<f64>) -> bool + 'static,
        stalled: impl Fn(f64) -> bool + 'static,
    ) -> Scripted {
        Scripted {
            fails: Box::new(fails),
            stalled: Box::new(stalled),
            calls: RefCell::new(Vec::new()),
        }
    }

    fn run(
        solver: &Scripted,
        values: &[f64],
        settings: &SweepSettings,
    ) -> (Vec<Record<f64>>, Vec<usize>) {
        let mut finished = Vec::new();
        let records = continue_over(solver, values, settings, f64::INFINITY, &mut |i, _| {
            finished.push(i)
        });
        (records, finished)
    }

    fn kind(record: &Record<f64>) -> &'static str {
        match record.outcome {
            Outcome::Converged(_) => "converged",
            Outcome::Failed(_) => "failed",
            Outcome::NotAttempted => "not attempted",
        }
    }

    #[test]
    fn march_starts_nearest_zero_goes_up_then_down() {
        assert_eq!(
            march_order(&[-4.0, -2.0, 0.0, 2.0, 4.0]),
            (vec![2, 3, 4], vec![1, 0])
        );
        // Requested out of order: indices refer to the request.
        assert_eq!(
            march_order(&[4.0, 0.5, -2.0, 2.0]),
            (vec![1, 3, 0], vec![2])
        );
        // All positive: start at the smallest; a tie in |value| goes to the positive one.
        assert_eq!(march_order(&[7.0, 3.0, 5.0]), (vec![1, 2, 0], vec![]));
        assert_eq!(march_order(&[-1.0, 1.0]), (vec![1], vec![0]));
        assert_eq!(march_order(&[]), (vec![], vec![]));
    }

    #[test]
    fn every_point_is_warm_started_from_its_converged_neighbour() {
        let solver = scripted(|_, _| false);
        let values = [-4.0, -2.0, 0.0, 2.0, 4.0];
        let (records, finished) = run(&solver, &values, &SweepSettings::default());
        assert_eq!(
            *solver.calls.borrow(),
            [
                (0.0, None),
                (2.0, Some(0.0)),
                (4.0, Some(2.0)),
                (-2.0, Some(0.0)),
                (-4.0, Some(-2.0)),
            ]
        );
        assert_eq!(finished, [2, 3, 4, 1, 0]);
        for (record, value) in records.iter().zip(values) {
            assert_eq!(record.outcome, Outcome::Converged(value));
            assert_eq!(record.solves, 1);
        }
    }

    #[test]
    fn a_failed_point_is_retried_cold_then_approached_in_smaller_steps() {
        // Fails at 4 unless warm-started from at most 1 away (and always cold).
        let fails = |v: f64, warm: Option<f64>| {
            v == 4.0 && !matches!(warm, Some(w) if (v - w).abs() <= 1.0)
        };
        let solver = scripted(fails);
        let settings = SweepSettings {
            retry_cold: true,
            ..SweepSettings::default()
        };
        let (records, _) = run(&solver, &[0.0, 2.0, 4.0], &settings);
        assert_eq!(records[2].outcome, Outcome::Converged(4.0));
        assert_eq!(
            solver.calls.borrow()[2..],
            [
                (4.0, Some(2.0)), // warm from the neighbour
                (4.0, None),      // cold restart
                (3.0, Some(2.0)), // half step: warm-up only
                (4.0, Some(3.0)), // the point itself, from the warm-up
            ]
        );
        assert_eq!(records[2].solves, 4);

        // By default there is no separate cold restart.
        let solver = scripted(fails);
        let (records, _) = run(&solver, &[0.0, 2.0, 4.0], &SweepSettings::default());
        assert_eq!(records[2].outcome, Outcome::Converged(4.0));
        assert_eq!(
            solver.calls.borrow()[2..],
            [(4.0, Some(2.0)), (3.0, Some(2.0)), (4.0, Some(3.0))]
        );
    }

    #[test]
    fn step_is_halved_up_to_the_limit_then_the_point_is_flagged() {
        // Fails beyond 2.3 however it is approached; each halving is tried once.
        let solver = scripted(|v, _| v > 2.3);
        let settings = SweepSettings {
            retry_cold: true,
            max_step_halvings: 3,
            give_up_after_failures: 0,
            ..SweepSettings::default()
        };
        let (records, _) = run(&solver, &[0.0, 2.0, 4.0], &settings);
        let calls: Vec<f64> = solver.calls.borrow()[2..].iter().map(|c| c.0).collect();
        // warm, cold, 3 (step 1) fails, 2.5 (step 0.5) fails, 2.25 (step 0.25) converges,
        // then 2.5 from there fails again: three halvings used up.
        assert_eq!(calls, [4.0, 4.0, 3.0, 2.5, 2.25, 2.5]);
        match &records[2].outcome {
            Outcome::Failed(failure) => {
                assert_eq!(
                    failure.reason,
                    "scripted failure at 4; a cold restart and an approach from 2 in steps \
                     down to 0.250 also failed"
                );
                assert_eq!(failure.iterations, Some(40));
            }
            other => panic!("expected a failure, got {other:?}"),
        }
        assert_eq!(records[2].solves, 6);
    }

    #[test]
    fn after_a_failure_the_next_point_starts_from_the_last_converged_one() {
        let solver = scripted(|v, _| v == 2.0);
        let settings = SweepSettings {
            retry_cold: false,
            max_step_halvings: 0,
            give_up_after_failures: 2,
            ..SweepSettings::default()
        };
        let (records, _) = run(&solver, &[0.0, 2.0, 4.0], &settings);
        assert_eq!(records[2].outcome, Outcome::Converged(4.0));
        // 4 from 0, then the failed 2 once more from 4, beyond it.
        assert_eq!(
            solver.calls.borrow()[2..],
            [(4.0, Some(0.0)), (2.0, Some(4.0))]
        );
        match &records[1].outcome {
            Outcome::Failed(failure) => assert_eq!(
                failure.reason,
                "scripted failure at 2; an approach from 4 on the far side also failed"
            ),
            other => panic!("expected a failure, got {other:?}"),
        }
    }

    #[test]
    fn failed_points_are_approached_again_from_beyond_and_reported_in_turn() {
        // 2 and 3 fail when approached from below, converge from above; 4 converges from 1.
        let solver = scripted(|v, warm| (v == 2.0 || v == 3.0) && warm.is_some_and(|w| w < v));
        let settings = SweepSettings {
            max_step_halvings: 0,
            ..SweepSettings::default()
        };
        let values = [0.0, 1.0, 2.0, 3.0, 4.0, 5.0];
        let (records, finished) = run(&solver, &values, &settings);
        for (record, value) in records.iter().zip(values) {
            assert_eq!(record.outcome, Outcome::Converged(value));
        }
        assert_eq!(
            solver.calls.borrow()[2..],
            [
                (2.0, Some(1.0)),
                (3.0, Some(1.0)),
                (4.0, Some(1.0)),
                (3.0, Some(4.0)), // the run of failures, walked back from 4
                (2.0, Some(3.0)),
                (5.0, Some(4.0)),
            ]
        );
        // Each failed point is reported once, after its second chance, in march order.
        assert_eq!(finished, [0, 1, 2, 3, 4, 5]);
        assert_eq!((records[2].solves, records[3].solves), (2, 2));
    }

    #[test]
    fn two_consecutive_failures_past_stall_end_a_direction_but_keep_every_point() {
        // Fails above 5 and below -3; the lift curve bends over from 4 and from -2.
        let solver = stalling(
            |v, _| !(-3.0..=5.0).contains(&v),
            |v| !(-2.0..=3.0).contains(&v),
        );
        let values: Vec<f64> = (-6..=10).map(f64::from).collect();
        let (records, finished) = run(&solver, &values, &SweepSettings::default());
        assert_eq!(records.len(), values.len());
        let mut sorted = finished.clone();
        sorted.sort_unstable();
        assert_eq!(sorted, (0..values.len()).collect::<Vec<_>>());
        for (record, &value) in records.iter().zip(&values) {
            let expected = match value {
                v if (-3.0..=5.0).contains(&v) => "converged",
                6.0 | 7.0 | -4.0 | -5.0 => "failed",
                _ => "not attempted",
            };
            assert_eq!(kind(record), expected, "alpha {value}");
        }
        // Nothing beyond the two failures was solved.
        assert!(solver
            .calls
            .borrow()
            .iter()
            .all(|c| (-5.0..=7.0).contains(&c.0)));
    }

    #[test]
    fn failures_before_stall_never_end_a_direction() {
        let solver = scripted(|v, _| v == 2.0 || v == 3.0);
        let values: Vec<f64> = (0..=6).map(f64::from).collect();
        let (records, _) = run(&solver, &values, &SweepSettings::default());
        let kinds: Vec<&str> = records.iter().map(kind).collect();
        assert_eq!(
            kinds,
            [
                "converged",
                "converged",
                "failed",
                "failed",
                "converged",
                "converged",
                "converged"
            ]
        );
        // 4 was warm-started from 1, the last converged point.
        assert!(solver.calls.borrow().contains(&(4.0, Some(1.0))));
    }

    #[test]
    fn a_start_that_fails_cold_is_approached_from_above() {
        let solver = scripted(|v, warm| v == 0.0 && warm.is_none());
        let (records, finished) = run(&solver, &[-1.0, 0.0, 1.0], &SweepSettings::default());
        assert_eq!(records[1].outcome, Outcome::Converged(0.0));
        assert_eq!(records[1].solves, 2);
        assert_eq!(
            *solver.calls.borrow(),
            [
                (0.0, None),
                (1.0, None),
                (0.0, Some(1.0)),
                (-1.0, Some(0.0))
            ]
        );
        // Reported once each, the start after the upward march.
        assert_eq!(finished, [2, 1, 0]);
    }

    #[test]
    fn a_start_away_from_zero_that_fails_cold_is_approached_from_the_lead_in() {
        // Every value fails cold except 0, so only the lead-in can start the march.
        let solver = scripted(|v, warm| v != 0.0 && warm.is_none());
        let (records, finished) = run(&solver, &[5.0, 6.0], &SweepSettings::default());
        assert_eq!(records[0].outcome, Outcome::Converged(5.0));
        assert_eq!(records[1].outcome, Outcome::Converged(6.0));
        // Cold at 5 fails, the lead-in at 0, then 1…4 (the requested spacing) and 5 each warm
        // from the one before; 6 warm from 5.
        assert_eq!(records[0].solves, 7);
        assert_eq!(
            *solver.calls.borrow(),
            [
                (5.0, None),
                (0.0, None),
                (1.0, Some(0.0)),
                (2.0, Some(1.0)),
                (3.0, Some(2.0)),
                (4.0, Some(3.0)),
                (5.0, Some(4.0)),
                (6.0, Some(5.0))
            ]
        );
        assert_eq!(finished, [0, 1]);
    }

    #[test]
    fn a_long_step_is_walked_through_intermediate_values() {
        // Warm starts from more than 0.6 away fail, so 1° steps need the 0.5° walk.
        let solver = scripted(|v, warm| warm.is_some_and(|w| (v - w).abs() > 0.6));
        let settings = SweepSettings {
            max_step_halvings: 0,
            ..SweepSettings::default()
        };
        let records = continue_over(&solver, &[0.0, 1.0, 2.0], &settings, 0.5, &mut |_, _| {});
        assert!(records
            .iter()
            .all(|r| matches!(r.outcome, Outcome::Converged(_))));
        assert_eq!(
            *solver.calls.borrow(),
            [
                (0.0, None),
                (0.5, Some(0.0)),
                (1.0, Some(0.5)),
                (1.5, Some(1.0)),
                (2.0, Some(1.5))
            ]
        );
        assert_eq!(records[1].solves, 2);
        assert_eq!(intermediate_values(0.0, 1.0, 0.5), [0.5]);
        assert_eq!(intermediate_values(0.0, 0.5, 0.5), Vec::<f64>::new());
        assert_eq!(
            intermediate_values(0.0, 1.0, f64::INFINITY),
            Vec::<f64>::new()
        );
        let thirds = intermediate_values(2.0, 1.0, 0.4);
        assert_eq!(thirds.len(), 2);
        assert!((thirds[0] - 5.0 / 3.0).abs() < 1e-12);
    }

    #[test]
    fn a_start_far_from_the_lead_in_is_reached_in_steps() {
        // Only warm starts from within 1.5 succeed, so 0 → 10 needs the intermediate values.
        let solver = scripted(|v, warm| v != 0.0 && warm.is_none_or(|w| (v - w).abs() > 1.5));
        let settings = SweepSettings {
            max_step_halvings: 0,
            ..SweepSettings::default()
        };
        let (records, _) = run(&solver, &[10.0, 11.0], &settings);
        assert_eq!(records[0].outcome, Outcome::Converged(10.0));
        assert_eq!(records[1].outcome, Outcome::Converged(11.0));
        // Cold at 10, the lead-in, 1…9, then 10.
        assert_eq!(records[0].solves, 12);
        // A single requested value: quarter steps.
        assert_eq!(lead_in_path(0.0, 10.0, &[10.0]), [2.5, 5.0, 7.5]);
        // Capped at 16 intermediate values; spacing 0.5 would need 19.
        let path = lead_in_path(0.0, -10.0, &[-10.0, -9.5]);
        assert_eq!(path.len(), 16);
        assert!((path[0] + 10.0 / 17.0).abs() < 1e-12);
    }

    #[test]
    fn a_start_that_always_fails_leaves_the_downward_march_cold() {
        let solver = scripted(|v, _| v == 0.0);
        let settings = SweepSettings {
            retry_cold: true,
            max_step_halvings: 0,
            give_up_after_failures: 2,
            ..SweepSettings::default()
        };
        let (records, _) = run(&solver, &[-1.0, 0.0, 1.0], &settings);
        assert_eq!(kind(&records[1]), "failed");
        // Cold first try, then warm from 1 and cold again.
        assert_eq!(records[1].solves, 3);
        assert_eq!(solver.calls.borrow().last(), Some(&(-1.0, None)));
        assert_eq!(kind(&records[0]), "converged");
    }
}

#[cfg(test)]
mod viscous_tests {
    use super::*;
    use foilsweep_geometry::naca::{naca_section, TrailingEdge};

    /// NACA 0012 at Re 1e6 and 3e6 (the second exercises the parallel path), alpha -2..4 step
    /// 2 requested out of order. Kept small (8 requested points, no stepped retries) so the
    /// test stays fast.
    #[test]
    fn naca0012_sweep_lists_every_point_once_in_requested_order() {
        let airfoil = naca_section("naca0012", 161, TrailingEdge::Open).unwrap();
        let alphas = vec![4.0, -2.0, 0.0, 2.0];
        let mut request = PolarRequest::new(
            &airfoil,
            160,
            vec![1.0e6, 3.0e6],
            Targets::AlphaDeg(alphas.clone()),
        )
        .unwrap();
        request.sweep.max_step_halvings = 0;
        let reported = std::sync::atomic::AtomicUsize::new(0);
        let count = |_: &PolarPoint| {
            reported.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
        };
        let polar = run_polar(&request, Some(&count)).unwrap();
        assert_eq!(reported.into_inner(), 8);
        assert_eq!(polar.points.len(), 8);
        let order: Vec<(f64, Option<f64>)> = polar
            .points
            .iter()
            .map(|p| (p.reynolds, p.alpha_deg))
            .collect();
        let expected: Vec<(f64, Option<f64>)> = [1.0e6, 3.0e6]
            .iter()
            .flat_map(|&re| alphas.iter().map(move |&a| (re, Some(a))))
            .collect();
        assert_eq!(order, expected);
        for point in &polar.points {
            if point.converged {
                assert!(point.cl.is_some_and(f64::is_finite));
                assert!(point.cd.is_some_and(|cd| cd.is_finite() && cd > 0.0));
            } else {
                assert!(point.flag.is_some());
                assert_eq!(point.cl, None);
                assert_eq!(point.cd, None);
            }
        }
        // A symmetric section has no lift at zero incidence, and cl(-2 deg) = -cl(2 deg)
        // (exact symmetry). Tolerance 1e-6: far above round-off and the Newton tolerance's
        // effect on cl, far below any asymmetry a wrong warm start or surface mix-up gives.
        for block in polar.points.chunks(4) {
            if let (Some(minus), Some(zero), Some(plus)) = (block[1].cl, block[2].cl, block[3].cl) {
                assert!(zero.abs() < 1e-6, "cl at 0 deg {zero}");
                assert!((minus + plus).abs() < 1e-6, "cl(-2) {minus}, cl(2) {plus}");
            }
        }
    }

    #[test]
    fn a_bad_request_is_refused_before_any_solve() {
        let airfoil = naca_section("naca0012", 81, TrailingEdge::Open).unwrap();
        let request =
            PolarRequest::new(&airfoil, 80, vec![50.0], Targets::AlphaDeg(vec![0.0])).unwrap();
        let called = |_: &PolarPoint| panic!("no point may be solved");
        assert_eq!(
            run_polar(&request, Some(&called)).unwrap_err(),
            RequestError::Reynolds(50.0)
        );
    }
}
