//! Falkner-Skan similarity solutions, attached and reversed-flow (lower) branch, and the integral
//! quantities a two-equation laminar closure needs.
//!
//! Equation (Falkner & Skan 1931; Hartree 1937), with η = y·√((m+1)Ue/(2νx)), β = 2m/(m+1),
//! Ue ∝ x^m:
//!
//! ```text
//! f''' + f f'' + β (1 − f'²) = 0,    f(0) = f'(0) = 0,    f'(∞) = 1.
//! ```
//!
//! For β ≥ 0 there is one solution. For β_sep < β < 0 (β_sep = −0.19884, Hartree 1937) there are two:
//! the attached (upper) branch with f''(0) > 0 and Stewartson's (1954) reversed-flow (lower) branch
//! with f''(0) < 0, whose shape factor grows without bound as β → 0⁻. The two branches meet at the
//! fold β = β_sep, where f''(0) = 0 (zero wall shear: separation).
//!
//! **Method.** Shooting on s = f''(0): the ODE is integrated with fixed-step fourth-order Runge-Kutta
//! (h = 0.005) from the wall to η_max, together with the four thickness integrals as extra
//! quadrature states, and the residual R(β, s) = f'(η_max) − 1 is driven to zero. The family is a
//! curve R = 0 in the (β, s) plane with a fold at separation, so it is traced by pseudo-arclength
//! continuation from the fold (found with s = 0 fixed): each step predicts along the secant
//! tangent and corrects on the line normal to it. Every corrector is a damped Newton iteration on
//! (β, s) for R = 0 plus one linear constraint, with a central finite-difference Jacobian; it stops
//! at |R| < 1e-11 or at a Newton update below 1e-13 (the round-off floor for strong favourable
//! gradients). A point at given β or given H is then found between two continuation points by
//! regula falsi (Illinois) along the chord. H is single-valued and increasing along the whole
//! family (attached H ∈ [2.155, 4.029] for β ∈ [2, β_sep], reversed H ∈ [4.029, ∞)), which makes it
//! the table variable of a closure. η_max is at least 12 and at least δ*_η + 10: the outer layer
//! decays like a Gaussian about η ≈ δ*_η, so the truncation error is far below the 1e-9 that the
//! self-convergence test checks.
//!
//! **Integral quantities** (all in η units; every ratio below is independent of the η scaling):
//!
//! ```text
//! δ*_η = ∫(1 − f') dη,   θ_η = ∫ f'(1 − f') dη,   θ*_η = ∫ f'(1 − f'²) dη,   D = ∫ f''² dη,
//! H = δ*_η/θ_η,   H* = θ*_η/θ_η,
//! Re_θ cf/2 = f''(0) θ_η,                          (τw θ / (μ Ue))
//! 2 Re_θ C_D / H* = 2 θ_η D / H*,                  (C_D = (1/ρUe³) ∫ τ ∂u/∂y dy)
//! λ = (θ²/ν) dUe/dx = β θ_η²                        (exact, not Thwaites's empirical fit)
//! ```

use thiserror::Error;

/// Separation value of the pressure-gradient parameter (Hartree 1937), where f''(0) = 0 and the
/// attached and reversed branches meet. Rounded to the printed digits; [`separation`] computes it.
pub const BETA_SEPARATION: f64 = -0.19884;

/// Largest β accepted on the attached branch: a strong favourable gradient (H ≈ 2.155; H tends to
/// ≈ 2.0697 only as β → ∞, the sink-flow profile f' = 3 tanh²(·) − 2, by our quadrature). Beyond it |f'(η_max) − 1| is so sensitive to f''(0) that round-off
/// limits the shooting.
pub const BETA_ATTACHED_MAX: f64 = 2.0;

/// Largest β accepted on the reversed branch. Approaching β = 0⁻ the reversed-flow region and the
/// shear layer above it move out without bound; at this β the shape factor is already ≈ 76.
pub const BETA_REVERSED_MAX: f64 = -0.02;

/// Fourth-order Runge-Kutta steps per unit η.
const STEPS_PER_UNIT_ETA: f64 = 200.0;

/// Smallest far-field boundary position η_max.
const ETA_MAX_MIN: f64 = 12.0;

/// Margin between the displacement thickness δ*_η and η_max (Gaussian decay of the outer layer).
const ETA_MAX_MARGIN: f64 = 10.0;

/// Newton tolerance on the shooting residual |f'(η_max) − 1| and on the constraint.
const NEWTON_TOLERANCE: f64 = 1e-11;

/// Newton tolerance on the update of (β, f''(0)) (round-off floor of the shooting).
const NEWTON_STEP_TOLERANCE: f64 = 1e-13;

/// Newton iteration limit for one corrector.
const NEWTON_MAX_ITERATIONS: usize = 40;

/// Which solution of the Falkner-Skan equation is wanted when β < 0.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Branch {
    /// Upper branch, f''(0) ≥ 0: the attached boundary layer (the only branch for β ≥ 0).
    Attached,
    /// Lower branch of Stewartson (1954), f''(0) ≤ 0: reversed flow next to the wall,
    /// β_sep ≤ β < 0.
    Reversed,
}

/// One Falkner-Skan solution and its integral quantities. Thicknesses are in units of the
/// similarity variable η = y·√((m+1)Ue/(2νx)).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SimilaritySolution {
    /// Pressure-gradient parameter β = 2m/(m+1), Ue ∝ x^m.
    pub beta: f64,
    /// Which branch the solution is on.
    pub branch: Branch,
    /// Wall shear f''(0) (negative on the reversed branch).
    pub wall_shear: f64,
    /// Displacement thickness δ*_η = ∫(1 − f') dη.
    pub displacement_thickness: f64,
    /// Momentum thickness θ_η = ∫ f'(1 − f') dη.
    pub momentum_thickness: f64,
    /// Kinetic-energy thickness θ*_η = ∫ f'(1 − f'²) dη.
    pub energy_thickness: f64,
    /// Dissipation integral D = ∫ f''² dη.
    pub dissipation_integral: f64,
    /// Shape factor H = δ*/θ.
    pub shape_factor: f64,
    /// Energy shape factor H* = θ*/θ.
    pub energy_shape_factor: f64,
    /// Re_θ·cf/2 = τw θ/(μ Ue) = f''(0) θ_η.
    pub re_theta_cf_half: f64,
    /// 2 Re_θ C_D / H* with C_D = (1/ρUe³) ∫ τ ∂u/∂y dy; equals 2 θ_η D / H*.
    pub two_re_theta_cd_over_hstar: f64,
    /// Exact similarity value of Thwaites's parameter λ = (θ²/ν) dUe/dx = β θ_η².
    pub thwaites_lambda: f64,
    /// Outer boundary position η_max used for the shooting.
    pub eta_max: f64,
    /// Outer wall-shear-like residual f''(η_max); should be ≈ 0 for a converged, well-truncated
    /// solution.
    pub outer_shear: f64,
    /// Final shooting residual |f'(η_max) − 1|.
    pub residual: f64,
    /// Newton iterations of the last corrector.
    pub iterations: usize,
}

/// Why a Falkner-Skan solution could not be produced.
#[derive(Debug, Clone, Copy, PartialEq, Error)]
pub enum FalknerSkanError {
    /// β is NaN or infinite.
    #[error("pressure-gradient parameter beta is not finite ({beta})")]
    NonFiniteBeta {
        /// The offending value.
        beta: f64,
    },
    /// β is outside the range where the requested branch exists or is supported.
    #[error("no {branch:?} falkner-skan solution is supported for beta = {beta} (valid range {min} to {max})")]
    BetaOutOfRange {
        /// Requested β.
        beta: f64,
        /// Requested branch.
        branch: Branch,
        /// Smallest supported β on that branch.
        min: f64,
        /// Largest supported β on that branch.
        max: f64,
    },
    /// The requested shape factor is outside the traced family.
    #[error(
        "shape factor {shape_factor} is outside the traced falkner-skan family ({min} to {max})"
    )]
    ShapeFactorOutOfRange {
        /// Requested H.
        shape_factor: f64,
        /// Smallest supported H.
        min: f64,
        /// Largest supported H.
        max: f64,
    },
    /// A Newton corrector did not reach its tolerance.
    #[error("falkner-skan shooting did not converge near beta = {beta}, f''(0) = {wall_shear} after {iterations} iterations (residual {residual:e})")]
    NotConverged {
        /// Last β iterate.
        beta: f64,
        /// Last f''(0) iterate.
        wall_shear: f64,
        /// Iterations spent.
        iterations: usize,
        /// Last residual norm.
        residual: f64,
    },
    /// Fewer than two family members were requested.
    #[error("a falkner-skan family needs at least two members, got {n}")]
    TooFewMembers {
        /// Requested count.
        n: usize,
    },
    /// The continuation step fell below its minimum without a converged corrector.
    #[error("falkner-skan continuation stalled at shape factor {shape_factor}")]
    ContinuationStalled {
        /// Last converged H.
        shape_factor: f64,
    },
}

/// Result of one shooting integration from the wall to η_max.
#[derive(Debug, Clone, Copy)]
struct Shot {
    /// f'(η_max) − 1.
    residual: f64,
    /// f''(η_max).
    outer_shear: f64,
    displacement_thickness: f64,
    momentum_thickness: f64,
    energy_thickness: f64,
    dissipation_integral: f64,
}

impl Shot {
    fn shape_factor(&self) -> f64 {
        self.displacement_thickness / self.momentum_thickness
    }
}

/// State: f, f', f'', then the running integrals of (1 − f'), f'(1 − f'), f'(1 − f'²), f''².
type State = [f64; 7];

fn rhs(beta: f64, y: &State) -> State {
    let (f, fp, fpp) = (y[0], y[1], y[2]);
    [
        fp,
        fpp,
        -f * fpp - beta * (1.0 - fp * fp),
        1.0 - fp,
        fp * (1.0 - fp),
        fp * (1.0 - fp * fp),
        fpp * fpp,
    ]
}

/// Integrates from the wall with f''(0) = `wall_shear` to `eta_max` (RK4, fixed step, at least
/// `steps_per_unit_eta` steps per unit η). Returns `None` if the solution blows up (a far-off
/// Newton trial).
fn shoot(beta: f64, wall_shear: f64, eta_max: f64, steps_per_unit_eta: f64) -> Option<Shot> {
    // Number of steps: rounded up, so the step never exceeds 1/steps_per_unit_eta.
    let steps = (eta_max * steps_per_unit_eta).ceil().max(1.0) as usize;
    let h = eta_max / steps as f64;
    let mut y: State = [0.0, 0.0, wall_shear, 0.0, 0.0, 0.0, 0.0];
    for _ in 0..steps {
        let k1 = rhs(beta, &y);
        let k2 = rhs(beta, &axpy(&y, 0.5 * h, &k1));
        let k3 = rhs(beta, &axpy(&y, 0.5 * h, &k2));
        let k4 = rhs(beta, &axpy(&y, h, &k3));
        for i in 0..7 {
            y[i] += h / 6.0 * (k1[i] + 2.0 * k2[i] + 2.0 * k3[i] + k4[i]);
        }
        // A profile with |f'| this large is a diverging trial, not a boundary layer.
        if !(y[1].abs() < 1e3 && y[2].is_finite()) {
            return None;
        }
    }
    Some(Shot {
        residual: y[1] - 1.0,
        outer_shear: y[2],
        displacement_thickness: y[3],
        momentum_thickness: y[4],
        energy_thickness: y[5],
        dissipation_integral: y[6],
    })
}

fn axpy(y: &State, a: f64, k: &State) -> State {
    let mut out = *y;
    for i in 0..7 {
        out[i] += a * k[i];
    }
    out
}

/// The extra equation that, with the shooting condition, fixes a point on the family.
#[derive(Debug, Clone, Copy)]
enum Constraint {
    /// f''(0) given.
    WallShear(f64),
    /// Pseudo-arclength: (β, s) lies on the line through `origin` normal to `normal`.
    Plane {
        /// A point (β, s) on the line.
        origin: [f64; 2],
        /// Unit normal of the line in the (β, s) plane (the continuation direction).
        normal: [f64; 2],
    },
}

impl Constraint {
    fn value(self, beta: f64, wall_shear: f64) -> f64 {
        match self {
            Constraint::WallShear(s) => wall_shear - s,
            Constraint::Plane { origin, normal } => {
                (beta - origin[0]) * normal[0] + (wall_shear - origin[1]) * normal[1]
            }
        }
    }

    /// Gradient of `value` with respect to (β, s).
    fn gradient(self) -> [f64; 2] {
        match self {
            Constraint::WallShear(_) => [0.0, 1.0],
            Constraint::Plane { normal, .. } => normal,
        }
    }
}

/// A converged point of the family: (β, f''(0)), the shot there and the η_max used.
#[derive(Debug, Clone, Copy)]
struct Point {
    beta: f64,
    wall_shear: f64,
    eta_max: f64,
    shot: Shot,
    iterations: usize,
}

impl Point {
    fn shape_factor(&self) -> f64 {
        self.shot.shape_factor()
    }

    fn coordinates(&self) -> [f64; 2] {
        [self.beta, self.wall_shear]
    }
}

/// η_max for a profile whose displacement thickness is `displacement_thickness`.
fn eta_max_for(displacement_thickness: f64) -> f64 {
    (displacement_thickness + ETA_MAX_MARGIN)
        .max(ETA_MAX_MIN)
        .ceil()
}

/// Damped Newton on (β, s) for R(β, s) = 0 and `constraint` = 0 from the initial guess, with η_max
/// and the RK4 resolution fixed. ∂R/∂β and ∂R/∂s are central finite differences; the constraint is
/// linear.
fn correct_fixed_eta(
    constraint: Constraint,
    guess: [f64; 2],
    eta_max: f64,
    steps_per_unit_eta: f64,
) -> Result<Point, FalknerSkanError> {
    let shoot = |beta, s, eta_max| shoot(beta, s, eta_max, steps_per_unit_eta);
    let [mut beta, mut s] = guess;
    let failure = |beta, wall_shear, iterations, residual| FalknerSkanError::NotConverged {
        beta,
        wall_shear,
        iterations,
        residual,
    };
    let norm =
        |shot: &Shot, beta: f64, s: f64| shot.residual.abs().max(constraint.value(beta, s).abs());
    let Some(mut shot) = shoot(beta, s, eta_max) else {
        return Err(failure(beta, s, 0, f64::INFINITY));
    };
    // Finite-difference step: small against β and s (both O(0.1–1)), large against round-off.
    let d = 1e-7;
    for iteration in 0..NEWTON_MAX_ITERATIONS {
        let current = norm(&shot, beta, s);
        if current < NEWTON_TOLERANCE {
            return Ok(Point {
                beta,
                wall_shear: s,
                eta_max,
                shot,
                iterations: iteration,
            });
        }
        let derivative = |db: f64, ds: f64| -> Option<f64> {
            let plus = shoot(beta + db, s + ds, eta_max)?;
            let minus = shoot(beta - db, s - ds, eta_max)?;
            Some((plus.residual - minus.residual) / (2.0 * d))
        };
        let (Some(r_beta), Some(r_s)) = (derivative(d, 0.0), derivative(0.0, d)) else {
            return Err(failure(beta, s, iteration, current));
        };
        let [c_beta, c_s] = constraint.gradient();
        let det = r_beta * c_s - r_s * c_beta;
        if det == 0.0 || !det.is_finite() {
            return Err(failure(beta, s, iteration, current));
        }
        let r = shot.residual;
        let c = constraint.value(beta, s);
        let step_beta = -(r * c_s - r_s * c) / det;
        let step_s = -(r_beta * c - r * c_beta) / det;
        // Round-off floor: for strong favourable gradients R is so sensitive to s that |R| cannot
        // reach the tolerance; a Newton step this small means (β, s) is converged to round-off.
        if step_beta.abs().max(step_s.abs()) < NEWTON_STEP_TOLERANCE {
            return Ok(Point {
                beta,
                wall_shear: s,
                eta_max,
                shot,
                iterations: iteration,
            });
        }
        // Backtrack until the trial integrates and the residual does not grow.
        let mut alpha = 1.0;
        loop {
            let (bt, st) = (beta + alpha * step_beta, s + alpha * step_s);
            if let Some(trial) = shoot(bt, st, eta_max) {
                if norm(&trial, bt, st) < current {
                    beta = bt;
                    s = st;
                    shot = trial;
                    break;
                }
            }
            alpha *= 0.5;
            if alpha < 1e-3 {
                return Err(failure(beta, s, iteration, current));
            }
        }
    }
    Err(failure(
        beta,
        s,
        NEWTON_MAX_ITERATIONS,
        norm(&shot, beta, s),
    ))
}

/// Corrector with η_max adapted to the profile: re-solves with a larger η_max until
/// η_max ≥ δ*_η + margin (at most [`ETA_MAX_ADAPTATIONS`] times).
fn correct(
    constraint: Constraint,
    guess: [f64; 2],
    eta_max: f64,
) -> Result<Point, FalknerSkanError> {
    let mut point = correct_fixed_eta(constraint, guess, eta_max, STEPS_PER_UNIT_ETA)?;
    for _ in 0..ETA_MAX_ADAPTATIONS {
        let needed = eta_max_for(point.shot.displacement_thickness);
        if needed <= point.eta_max {
            return Ok(point);
        }
        point = correct_fixed_eta(constraint, point.coordinates(), needed, STEPS_PER_UNIT_ETA)?;
    }
    // δ*_η keeps outgrowing η_max: not a boundary-layer profile.
    Err(FalknerSkanError::NotConverged {
        beta: point.beta,
        wall_shear: point.wall_shear,
        iterations: point.iterations,
        residual: point.shot.residual.abs(),
    })
}

/// Largest number of η_max enlargements in one corrector (each settles δ*_η to well within one
/// unit of η, so two normally suffice).
const ETA_MAX_ADAPTATIONS: usize = 8;

/// The separation (fold) point: f''(0) = 0, β = β_sep (Hartree 1937).
fn fold() -> Result<Point, FalknerSkanError> {
    correct(Constraint::WallShear(0.0), [-0.19, 0.0], ETA_MAX_MIN)
}

/// Largest arclength step in the (β, s) plane.
const ARC_STEP_MAX: f64 = 0.05;

/// Smallest arclength step before the continuation gives up.
const ARC_STEP_MIN: f64 = 1e-6;

/// Largest relative change of H per continuation step (keeps the steps short where H grows fast).
const SHAPE_FACTOR_STEP_MAX: f64 = 0.05;

/// Pseudo-arclength continuation along one branch from the fold, calling `visit(previous, current)`
/// for each new converged point until it returns `false` or until β passes the branch's supported
/// maximum (both end with `Ok`; the caller checks whether it found what it was looking for).
fn trace(
    branch: Branch,
    mut visit: impl FnMut(&Point, &Point) -> Result<bool, FalknerSkanError>,
) -> Result<(), FalknerSkanError> {
    let start = fold()?;
    let (beta_max, sign) = match branch {
        Branch::Attached => (BETA_ATTACHED_MAX, 1.0),
        Branch::Reversed => (BETA_REVERSED_MAX, -1.0),
    };
    let mut prev = start;
    // At the fold the tangent is along s.
    let mut tangent = [0.0, sign];
    let mut step: f64 = 0.01;
    loop {
        let origin = [
            prev.beta + step * tangent[0],
            prev.wall_shear + step * tangent[1],
        ];
        let outcome = correct(
            Constraint::Plane {
                origin,
                normal: tangent,
            },
            origin,
            prev.eta_max,
        );
        let accepted = match outcome {
            Ok(next)
                if next.iterations <= 6
                    && (next.shape_factor() / prev.shape_factor()).ln().abs()
                        <= SHAPE_FACTOR_STEP_MAX =>
            {
                Some(next)
            }
            _ => None,
        };
        let Some(next) = accepted else {
            step *= 0.5;
            if step < ARC_STEP_MIN {
                return Err(FalknerSkanError::ContinuationStalled {
                    shape_factor: prev.shape_factor(),
                });
            }
            continue;
        };
        if !visit(&prev, &next)? || next.beta > beta_max {
            return Ok(());
        }
        let chord = [next.beta - prev.beta, next.wall_shear - prev.wall_shear];
        let length = chord[0].hypot(chord[1]);
        tangent = [chord[0] / length, chord[1] / length];
        if next.iterations <= 3 {
            step = (step * 1.5).min(ARC_STEP_MAX);
        }
        prev = next;
    }
}

/// Tolerance on the target (β or H) when refining a point between continuation points.
const REFINE_TOLERANCE: f64 = 1e-12;

/// Between two converged neighbours `a` and `b` of the continuation, finds the point of the
/// family where `target(point) = 0` (which must change sign from `a` to `b`), by the Illinois
/// variant of regula falsi on the distance along the chord a→b; each trial point is corrected onto
/// the family on the line normal to the chord.
fn refine(a: &Point, b: &Point, target: impl Fn(&Point) -> f64) -> Result<Point, FalknerSkanError> {
    let chord = [b.beta - a.beta, b.wall_shear - a.wall_shear];
    let length = chord[0].hypot(chord[1]);
    let normal = [chord[0] / length, chord[1] / length];
    let (mut lo, mut hi) = ((0.0, target(a), *a), (length, target(b), *b));
    if lo.1 == 0.0 {
        return Ok(*a);
    }
    if hi.1 == 0.0 {
        return Ok(*b);
    }
    let mut side = 0i8;
    for _ in 0..60 {
        let sigma = (lo.0 * hi.1 - hi.0 * lo.1) / (hi.1 - lo.1);
        let origin = [a.beta + sigma * normal[0], a.wall_shear + sigma * normal[1]];
        let p = correct(
            Constraint::Plane { origin, normal },
            origin,
            a.eta_max.max(b.eta_max),
        )?;
        let value = target(&p);
        if value.abs() < REFINE_TOLERANCE || (hi.0 - lo.0).abs() < 1e-14 {
            return Ok(p);
        }
        if (value < 0.0) == (lo.1 < 0.0) {
            lo = (sigma, value, p);
            if side == -1 {
                hi.1 *= 0.5;
            }
            side = -1;
        } else {
            hi = (sigma, value, p);
            if side == 1 {
                lo.1 *= 0.5;
            }
            side = 1;
        }
    }
    let best = if lo.1.abs() < hi.1.abs() { lo.2 } else { hi.2 };
    Err(FalknerSkanError::NotConverged {
        beta: best.beta,
        wall_shear: best.wall_shear,
        iterations: 60,
        residual: target(&best).abs(),
    })
}

fn finish(point: &Point, branch: Branch) -> SimilaritySolution {
    let shot = &point.shot;
    let theta = shot.momentum_thickness;
    let energy_shape_factor = shot.energy_thickness / theta;
    SimilaritySolution {
        beta: point.beta,
        branch,
        wall_shear: point.wall_shear,
        displacement_thickness: shot.displacement_thickness,
        momentum_thickness: theta,
        energy_thickness: shot.energy_thickness,
        dissipation_integral: shot.dissipation_integral,
        shape_factor: shot.shape_factor(),
        energy_shape_factor,
        re_theta_cf_half: point.wall_shear * theta,
        two_re_theta_cd_over_hstar: 2.0 * theta * shot.dissipation_integral / energy_shape_factor,
        thwaites_lambda: point.beta * theta * theta,
        eta_max: point.eta_max,
        outer_shear: shot.outer_shear,
        residual: shot.residual.abs(),
        iterations: point.iterations,
    }
}

/// Continuation points of one branch, from the fold up to and including the first point for which
/// `done` holds (or up to the end of the branch's supported β range, in which case the last point
/// does not satisfy `done`).
fn collect(branch: Branch, done: impl Fn(&Point) -> bool) -> Result<Vec<Point>, FalknerSkanError> {
    let mut points = vec![fold()?];
    trace(branch, |_, next| {
        points.push(*next);
        Ok(!done(next))
    })?;
    Ok(points)
}

/// Refines the zero of `target` between the first pair of consecutive `points` across which it
/// changes sign; `None` if it never does.
fn locate(
    points: &[Point],
    target: impl Fn(&Point) -> f64,
) -> Result<Option<Point>, FalknerSkanError> {
    for pair in points.windows(2) {
        if target(&pair[0]) * target(&pair[1]) <= 0.0 {
            return refine(&pair[0], &pair[1], &target).map(Some);
        }
    }
    Ok(None)
}

/// The separation profile (f''(0) = 0) at the fold of the family, β = β_sep ≈ −0.19884
/// (Hartree 1937).
///
/// # Errors
/// [`FalknerSkanError::NotConverged`] if the shooting fails (not expected).
pub fn separation() -> Result<SimilaritySolution, FalknerSkanError> {
    Ok(finish(&fold()?, Branch::Attached))
}

/// Solves the Falkner-Skan equation for `beta` on `branch`.
///
/// Attached: β_sep ≤ β ≤ [`BETA_ATTACHED_MAX`]. Reversed: β_sep ≤ β ≤ [`BETA_REVERSED_MAX`]. The
/// branch is followed by arclength continuation from the separation point, so the lower-branch
/// solution is found reliably (plain shooting from a guess usually lands on the attached one).
///
/// # Errors
/// [`FalknerSkanError::NonFiniteBeta`] for NaN/∞; [`FalknerSkanError::BetaOutOfRange`] below
/// separation (no solution exists) or beyond the supported range; the continuation or Newton
/// errors if the shooting fails.
pub fn solve(beta: f64, branch: Branch) -> Result<SimilaritySolution, FalknerSkanError> {
    if !beta.is_finite() {
        return Err(FalknerSkanError::NonFiniteBeta { beta });
    }
    let max = match branch {
        Branch::Attached => BETA_ATTACHED_MAX,
        Branch::Reversed => BETA_REVERSED_MAX,
    };
    let start = fold()?;
    let out_of_range = FalknerSkanError::BetaOutOfRange {
        beta,
        branch,
        min: start.beta,
        max,
    };
    if beta < start.beta || beta > max {
        return Err(out_of_range);
    }
    let points = collect(branch, |p| p.beta >= beta)?;
    match locate(&points, |p| p.beta - beta)? {
        Some(point) => Ok(finish(&point, branch)),
        None => Err(out_of_range),
    }
}

/// The family member with shape factor `shape_factor`: attached for H up to the separation value
/// (≈ 4.029), reversed above. H is single-valued along the whole family, which makes it the natural
/// table variable of a closure.
///
/// # Errors
/// [`FalknerSkanError::ShapeFactorOutOfRange`] outside [H(β = [`BETA_ATTACHED_MAX`]) ≈ 2.155,
/// H(β = [`BETA_REVERSED_MAX`]) ≈ 76] or for NaN; the continuation or Newton errors if the
/// shooting fails.
pub fn solve_shape_factor(shape_factor: f64) -> Result<SimilaritySolution, FalknerSkanError> {
    let start = fold()?;
    let branch = if shape_factor <= start.shape_factor() {
        Branch::Attached
    } else {
        Branch::Reversed
    };
    let points = if shape_factor.is_finite() {
        collect(branch, |p| match branch {
            Branch::Attached => p.shape_factor() <= shape_factor,
            Branch::Reversed => p.shape_factor() >= shape_factor,
        })?
    } else {
        vec![start]
    };
    match locate(&points, |p| p.shape_factor() - shape_factor)? {
        Some(point) => Ok(finish(&point, branch)),
        None => {
            let range = points.iter().map(Point::shape_factor);
            let min = range.clone().fold(f64::INFINITY, f64::min);
            let max = range.fold(f64::NEG_INFINITY, f64::max);
            Err(FalknerSkanError::ShapeFactorOutOfRange {
                shape_factor,
                min,
                max,
            })
        }
    }
}

/// Largest shape factor of [`family`] (on the reversed branch, β ≈ −0.054).
pub const FAMILY_SHAPE_FACTOR_MAX: f64 = 30.0;

/// `n` members of the family in increasing H: the first at β = [`BETA_ATTACHED_MAX`] (H ≈ 2.155),
/// then down the attached branch to separation (H ≈ 4.029) and out along the reversed branch to
/// H = [`FAMILY_SHAPE_FACTOR_MAX`]. The members are equally spaced in ln(H − 1), which puts about a
/// third of them on the attached branch and refines the spacing where the closure quantities
/// curve most.
///
/// # Errors
/// [`FalknerSkanError::TooFewMembers`] for `n < 2`; the continuation or Newton errors if the
/// shooting fails.
pub fn family(n: usize) -> Result<Vec<SimilaritySolution>, FalknerSkanError> {
    if n < 2 {
        return Err(FalknerSkanError::TooFewMembers { n });
    }
    let attached = collect(Branch::Attached, |p| p.beta >= BETA_ATTACHED_MAX)?;
    let Some(first) = locate(&attached, |p| p.beta - BETA_ATTACHED_MAX)? else {
        return Err(FalknerSkanError::ContinuationStalled {
            shape_factor: attached.last().map_or(f64::NAN, Point::shape_factor),
        });
    };
    let reversed = collect(Branch::Reversed, |p| {
        p.shape_factor() >= FAMILY_SHAPE_FACTOR_MAX
    })?;
    let h_separation = attached[0].shape_factor();
    let (u_min, u_max) = (
        (first.shape_factor() - 1.0).ln(),
        (FAMILY_SHAPE_FACTOR_MAX - 1.0).ln(),
    );
    let mut members = vec![finish(&first, Branch::Attached)];
    for k in 1..n {
        let h = 1.0 + (u_min + (u_max - u_min) * k as f64 / (n - 1) as f64).exp();
        let (points, branch) = if h <= h_separation {
            (&attached, Branch::Attached)
        } else {
            (&reversed, Branch::Reversed)
        };
        let Some(point) = locate(points, |p| p.shape_factor() - h)? else {
            return Err(FalknerSkanError::ShapeFactorOutOfRange {
                shape_factor: h,
                min: first.shape_factor(),
                max: reversed.last().map_or(f64::NAN, Point::shape_factor),
            });
        };
        members.push(finish(&point, branch));
    }
    Ok(members)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn bad_beta_is_an_error_not_a_panic() {
        for branch in [Branch::Attached, Branch::Reversed] {
            assert!(matches!(
                solve(f64::NAN, branch),
                Err(FalknerSkanError::NonFiniteBeta { .. })
            ));
            assert!(matches!(
                solve(f64::INFINITY, branch),
                Err(FalknerSkanError::NonFiniteBeta { .. })
            ));
            // Below separation no solution exists on either branch (Hartree 1937: −0.19884).
            for beta in [-0.19885, -0.2, -1.0] {
                assert!(
                    matches!(
                        solve(beta, branch),
                        Err(FalknerSkanError::BetaOutOfRange { .. })
                    ),
                    "beta {beta} on {branch:?}"
                );
            }
        }
        // Beyond the supported range of each branch (the reversed branch does not exist for β ≥ 0).
        assert!(matches!(
            solve(2.5, Branch::Attached),
            Err(FalknerSkanError::BetaOutOfRange { .. })
        ));
        for beta in [0.0, 0.5, -0.01] {
            assert!(matches!(
                solve(beta, Branch::Reversed),
                Err(FalknerSkanError::BetaOutOfRange { .. })
            ));
        }
        assert!(matches!(
            family(1),
            Err(FalknerSkanError::TooFewMembers { n: 1 })
        ));
        for h in [f64::NAN, 1.5, 2.0, 100.0] {
            assert!(matches!(
                solve_shape_factor(h),
                Err(FalknerSkanError::ShapeFactorOutOfRange { .. })
            ));
        }
    }

    #[test]
    fn branches_have_the_right_wall_shear_sign() {
        let upper = solve(-0.15, Branch::Attached).expect("attached");
        let lower = solve(-0.15, Branch::Reversed).expect("reversed");
        assert!(upper.wall_shear > 0.0 && lower.wall_shear < 0.0);
        assert!(lower.shape_factor > upper.shape_factor);
        // REFINE_TOLERANCE.
        assert_abs_diff_eq!(upper.beta, -0.15, epsilon = REFINE_TOLERANCE);
        assert_abs_diff_eq!(lower.beta, -0.15, epsilon = REFINE_TOLERANCE);
    }

    #[test]
    fn discretisation_and_truncation_errors_are_negligible() {
        // Self-convergence: re-solving at fixed β with half the RK4 step, or with the outer
        // boundary 10 units further out, must leave f''(0) and the integrals unchanged to 1e-9,
        // far below the 1e-6 to which the closure table is checked and the 5-digit published
        // values.
        for s in [
            separation().expect("fold"),
            solve(0.0, Branch::Attached).expect("Blasius"),
            solve(BETA_ATTACHED_MAX, Branch::Attached).expect("beta max"),
            solve_shape_factor(FAMILY_SHAPE_FACTOR_MAX).expect("H 30"),
        ] {
            let fixed_beta = Constraint::Plane {
                origin: [s.beta, s.wall_shear],
                normal: [1.0, 0.0],
            };
            let guess = [s.beta, s.wall_shear];
            let fine = correct_fixed_eta(fixed_beta, guess, s.eta_max, 2.0 * STEPS_PER_UNIT_ETA)
                .expect("fine");
            let long = correct_fixed_eta(fixed_beta, guess, s.eta_max + 10.0, STEPS_PER_UNIT_ETA)
                .expect("long");
            for other in [fine, long] {
                let o = finish(&other, s.branch);
                for (a, b) in [
                    (s.wall_shear, o.wall_shear),
                    (s.displacement_thickness, o.displacement_thickness),
                    (s.momentum_thickness, o.momentum_thickness),
                    (s.energy_thickness, o.energy_thickness),
                    (s.dissipation_integral, o.dissipation_integral),
                ] {
                    assert_abs_diff_eq!(a, b, epsilon = 1e-9);
                }
            }
            // The far field has relaxed: f'' → 0 at η_max.
            assert!(
                s.outer_shear.abs() < 1e-9,
                "f''(eta_max) = {}",
                s.outer_shear
            );
        }
    }

    #[test]
    fn family_is_ordered_and_continuous() {
        let members = family(24).expect("family");
        assert_eq!(members.len(), 24);
        assert_abs_diff_eq!(
            members[0].beta,
            BETA_ATTACHED_MAX,
            epsilon = REFINE_TOLERANCE
        );
        assert_abs_diff_eq!(
            members[23].shape_factor,
            FAMILY_SHAPE_FACTOR_MAX,
            epsilon = REFINE_TOLERANCE
        );
        for pair in members.windows(2) {
            assert!(pair[1].shape_factor > pair[0].shape_factor);
        }
        for m in &members {
            let expected = if m.wall_shear > 0.0 {
                Branch::Attached
            } else {
                Branch::Reversed
            };
            assert_eq!(m.branch, expected, "H = {}", m.shape_factor);
        }
    }
}
