//! Robustness of the viscous sweep over the range where the published sections are attached:
//! for every section and Reynolds number of the validation data, alpha from −4° up to 1° below
//! the measured stall (the alpha of maximum measured cl) in 1° steps.
//!
//! Requirement (issue): at least 98 % of these points converge, and every point that does not
//! is reported with a flag. The sections and data are those of `viscous_validation.rs`: the
//! Eppler 387 at the four UIUC Reynolds numbers (Selig & McGranahan 2004, NREL/SR-500-34515) and
//! the NACA 0012 at Re 6e6, Mach 0.15, tripped at 5 % chord (Ladson 1988, NASA TM-4074).
//! The same level is required of 0.25° steps on the Eppler 387 at Re 2e5 and 1e6, together
//! with a smooth drag curve (no point on a spurious branch). Beyond the published sections,
//! NACA sections with their blunt trailing edge and trips near the leading edge must converge at
//! low Reynolds number (a turbulator study; no data compared).

use foilsweep_driver::{run_polar, PolarRequest, Targets};
use foilsweep_geometry::naca::{naca_section, TrailingEdge};
use foilsweep_geometry::{Airfoil, ParseOptions};
use foilsweep_validation::{airfoil_path, data_path};
use rayon::prelude::*;

/// (Reynolds number, alpha in degrees, cl) of every row of a published polar file.
fn published_polar(file: &str) -> Vec<(f64, f64, f64)> {
    let mut reader = csv::Reader::from_path(data_path(file)).expect("published data file");
    let headers = reader.headers().expect("header row").clone();
    let column = |name: &str| {
        headers
            .iter()
            .position(|h| h == name)
            .unwrap_or_else(|| panic!("column {name} in {file}"))
    };
    let (re, alpha, cl) = (column("reynolds"), column("alpha_deg"), column("cl"));
    reader
        .records()
        .map(|record| {
            let record = record.expect("data row");
            let value = |i: usize| -> f64 { record[i].trim().parse().expect("number") };
            (value(re), value(alpha), value(cl))
        })
        .collect()
}

/// Measured stall angle: the alpha of the largest measured cl at `reynolds`.
fn stall_alpha_deg(rows: &[(f64, f64, f64)], reynolds: f64) -> f64 {
    rows.iter()
        .filter(|r| r.0 == reynolds)
        .max_by(|a, b| a.2.total_cmp(&b.2))
        .map(|r| r.1)
        .expect("rows at this Reynolds number")
}

/// Alpha from −4° in 1° steps up to and including 1° below `stall_deg`.
fn alphas_below_stall(stall_deg: f64) -> Vec<f64> {
    (0..)
        .map(|k| -4.0 + f64::from(k))
        .take_while(|&a| a <= stall_deg - 1.0)
        .collect()
}

/// The shipped Eppler 387 coordinates.
fn e387() -> Airfoil {
    let text = std::fs::read_to_string(airfoil_path("e387.dat")).expect("shipped E387");
    Airfoil::parse(&text, "e387.dat", &ParseOptions::default())
        .expect("E387 parses")
        .0
}

/// Prints the converged fraction and checks it against the 98 %.
fn assert_converged_fraction(converged: usize, requested: usize) {
    let fraction = converged as f64 / requested as f64;
    println!(
        "overall: {converged} of {requested} converged ({:.1} %)",
        100.0 * fraction
    );
    assert!(
        fraction >= 0.98,
        "converged fraction {:.1} % (target 98 %)",
        100.0 * fraction
    );
}

/// One section at one Reynolds number, ready to sweep.
struct Case {
    label: String,
    request: PolarRequest,
}

fn cases() -> Vec<Case> {
    let mut cases = Vec::new();

    // Eppler 387, clean, at the four UIUC Reynolds numbers; stall from the same data.
    let uiuc = published_polar("e387_uiuc2004_drag_polars.csv");
    let e387 = e387();
    for reynolds in [199_879.0, 300_289.0, 349_865.0, 500_094.0] {
        let stall = stall_alpha_deg(&uiuc, reynolds);
        let alphas = alphas_below_stall(stall);
        let request = PolarRequest::new(&e387, 160, vec![reynolds], Targets::AlphaDeg(alphas))
            .expect("E387 request");
        cases.push(Case {
            label: format!("E387 Re {reynolds:.0} (stall {stall}°)"),
            request,
        });
    }

    // NACA 0012, Re 6e6, Mach 0.15, transition fixed at 5 % chord on both surfaces, as in the
    // Ladson (1988) runs with grit strips.
    let ladson = published_polar("naca0012_ladson1988_re6e6_fixed_transition.csv");
    let stall = stall_alpha_deg(&ladson, 6.0e6);
    let naca0012 = naca_section("0012", 161, TrailingEdge::Closed).expect("NACA 0012");
    let mut request = PolarRequest::new(
        &naca0012,
        160,
        vec![6.0e6],
        Targets::AlphaDeg(alphas_below_stall(stall)),
    )
    .expect("NACA 0012 request");
    request.mach = 0.15;
    request.trip_upper_x_over_c = Some(0.05);
    request.trip_lower_x_over_c = Some(0.05);
    cases.push(Case {
        label: format!("NACA 0012 Re 6e6 tripped (stall {stall}°)"),
        request,
    });
    cases
}

#[test]
fn attached_range_converges_or_is_flagged() {
    let cases = cases();
    // The cases are independent; sweeping them in parallel keeps the test's wall time down.
    let polars: Vec<_> = cases
        .par_iter()
        .map(|case| run_polar(&case.request, None).expect("sweep runs"))
        .collect();

    let (mut requested, mut converged) = (0usize, 0usize);
    for (case, polar) in cases.iter().zip(&polars) {
        let alphas = case.request.targets.values();
        assert_eq!(
            polar.points.len(),
            alphas.len(),
            "{}: every requested alpha is reported",
            case.label
        );
        let mut flagged = Vec::new();
        for (point, &alpha) in polar.points.iter().zip(alphas) {
            if !point.converged {
                let flag = point.flag.as_deref().unwrap_or("");
                assert!(
                    !flag.is_empty(),
                    "{}: alpha {alpha} neither converged nor flagged",
                    case.label
                );
                flagged.push(format!("{alpha}° ({flag})"));
            }
        }
        let ok = alphas.len() - flagged.len();
        println!(
            "{}: {ok} of {} converged; flagged: [{}]",
            case.label,
            alphas.len(),
            flagged.join(", ")
        );
        requested += alphas.len();
        converged += ok;
    }
    // Target 98 % (issue); measured 98.7 % (76 of 77; the NACA 0012 tripped at 14° is flagged)
    // at the time of writing; 100 % without the wake-curvature term.
    assert_converged_fraction(converged, requested);
}

/// Small steps: a polar in 0.25° steps (the spacing users pick to resolve the lift curve) must
/// converge as well as one in 1° steps, and no converged point may sit on a spurious branch.
/// Eppler 387 at Re 2e5 and 1e6 (the ends of the low-Re range this tool is for), −2° to 8°:
/// - at least 98 % of the 82 points converge (the robustness level); the rest are
///   flagged;
/// - no drag spike: no converged cd exceeds 1.15 times the median cd of its (up to four)
///   nearest converged neighbours. A measured polar at this spacing changes smoothly (common
///   practice, no source); the spurious long-bubble states this guards against were 25–35 %
///   above their neighbours (e.g. Re 2e5, 2.25°: cd 0.0144 between 0.0110 and 0.0114).
#[test]
fn small_alpha_steps_converge_without_drag_spikes() {
    let e387 = e387();
    let alphas: Vec<f64> = (0..=40).map(|k| -2.0 + 0.25 * f64::from(k)).collect();
    let request = PolarRequest::new(
        &e387,
        160,
        vec![2.0e5, 1.0e6],
        Targets::AlphaDeg(alphas.clone()),
    )
    .expect("E387 request");
    let polar = run_polar(&request, None).expect("sweep runs");
    assert_eq!(polar.points.len(), 2 * alphas.len());
    let mut converged = 0;
    for (reynolds, points) in [2.0e5, 1.0e6].iter().zip(polar.points.chunks(alphas.len())) {
        let cd: Vec<Option<f64>> = points
            .iter()
            .map(|p| p.converged.then_some(p.cd).flatten())
            .collect();
        let flagged: Vec<String> = points
            .iter()
            .zip(&alphas)
            .filter(|(p, _)| !p.converged)
            .map(|(p, a)| {
                assert!(
                    p.flag.is_some(),
                    "Re {reynolds} alpha {a}: failed without a flag"
                );
                format!("{a}°")
            })
            .collect();
        println!(
            "E387 Re {reynolds:.0}, 0.25° steps: {} of {} converged; flagged: {flagged:?}",
            alphas.len() - flagged.len(),
            alphas.len()
        );
        converged += alphas.len() - flagged.len();
        for (i, value) in cd.iter().enumerate() {
            let Some(value) = value else { continue };
            let mut near: Vec<f64> = (i.saturating_sub(2)..(i + 3).min(cd.len()))
                .filter(|&j| j != i)
                .filter_map(|j| cd[j])
                .collect();
            if near.len() < 2 {
                continue;
            }
            near.sort_by(f64::total_cmp);
            let median = if near.len() % 2 == 1 {
                near[near.len() / 2]
            } else {
                0.5 * (near[near.len() / 2 - 1] + near[near.len() / 2])
            };
            assert!(
                *value <= 1.15 * median,
                "Re {reynolds}, alpha {}: cd {value:.5} against neighbours' median {median:.5}",
                alphas[i]
            );
        }
    }
    // Measured 81 of 82 at the time of writing (Re 1e6, −2°, flagged; 82 of 82 without the
    // wake-curvature term).
    assert_converged_fraction(converged, 2 * alphas.len());
}

/// No converged point carries the spurious attachment-side state: on the Eppler 387 at Re 1e6
/// and alpha 2°–6° the lower surface near the nose is the attachment side, where the flow
/// accelerates away from the stagnation point; a laminar separation and transition within the
/// first 5 % of the chord there is not physical (common practice, no source: the pressure side
/// of a lifting section stays laminar well past its nose at this Reynolds number). Such states
/// are solutions of the discrete equations; the solver must reject them (the point is then
/// re-solved or flagged), never report them as converged.
#[test]
fn no_converged_point_transitions_on_the_attachment_side() {
    let e387 = e387();
    let alphas = vec![2.0, 3.0, 4.0, 5.0, 6.0];
    let request = PolarRequest::new(&e387, 160, vec![1.0e6], Targets::AlphaDeg(alphas.clone()))
        .expect("E387 request");
    let polar = run_polar(&request, None).expect("sweep runs");
    assert_eq!(polar.points.len(), alphas.len());
    for (point, alpha) in polar.points.iter().zip(&alphas) {
        println!(
            "E387 Re 1e6 alpha {alpha}: converged {}, lower transition {:?}, flag {:?}",
            point.converged, point.lower.transition_x_over_c, point.flag
        );
        if point.converged {
            let lower = point.lower.transition_x_over_c.unwrap_or(1.0);
            assert!(
                lower > 0.05,
                "alpha {alpha}: lower-surface transition at x/c {lower:.3} reported as converged"
            );
        } else {
            assert!(point.flag.is_some(), "alpha {alpha}: failed without a flag");
        }
    }
}

/// Trip strips near the leading edge of sections with a blunt trailing edge at low Reynolds
/// number (the NACA four-digit sections as defined, trailing-edge thickness 0.25 % chord; trips
/// at 10 % chord on both surfaces): every point of a moderate-alpha polar converges with
/// transition at the trips. A plain cold start fails here (the initial marches put so much
/// displacement at the thick trailing edge that the edge speed there doubles and Newton
/// diverges); the interacting solve then ramps the interaction law in from a quarter of its
/// strength, and `solve_point` can carry a solution down from a higher Reynolds number. The
/// requirement is the issue's: points converge or are flagged, and for these ordinary
/// conditions (a designer's turbulator study) they must converge.
#[test]
fn tripped_sections_with_a_blunt_trailing_edge_converge_at_low_reynolds_number() {
    let cases: Vec<(&str, f64)> = ["2412", "4412"]
        .iter()
        .flat_map(|&s| [(s, 1.0e5), (s, 3.0e5)])
        .chain([("0018", 6.0e4)])
        .collect();
    let failures: Vec<String> = cases
        .par_iter()
        .flat_map(|&(code, reynolds)| {
            let airfoil = naca_section(code, 80, TrailingEdge::Open).expect("NACA section");
            let mut request = PolarRequest::new(
                &airfoil,
                160,
                vec![reynolds],
                Targets::AlphaDeg(vec![0.0, 2.0, 4.0, 6.0]),
            )
            .expect("request");
            request.trip_upper_x_over_c = Some(0.1);
            request.trip_lower_x_over_c = Some(0.1);
            let points = run_polar(&request, None).expect("sweep").points;
            points
                .into_iter()
                .filter_map(|p| {
                    let forced = p.upper.transition_forced == Some(true)
                        && p.lower.transition_forced == Some(true);
                    println!(
                        "NACA {code} Re {reynolds:e} alpha {:?}: converged {}, cl {:?}, cd {:?}, \
                         forced transition {forced}",
                        p.alpha_deg, p.converged, p.cl, p.cd
                    );
                    (!(p.converged && forced)).then(|| {
                        format!(
                            "NACA {code} Re {reynolds:e} alpha {:?}: {:?}",
                            p.alpha_deg, p.flag
                        )
                    })
                })
                .collect::<Vec<_>>()
        })
        .collect();
    assert!(failures.is_empty(), "{failures:#?}");
}

/// True when the laminar layer of a surface separates and then transitions ahead of the trailing
/// edge (a bubble, closed or bursting), not a laminar layer separated to the trailing edge.
fn separates_then_transitions(surface: &foilsweep_driver::SurfaceEvents) -> bool {
    matches!(
        (surface.laminar_separation_x_over_c, surface.transition_x_over_c),
        (Some(s), Some(t)) if s < t && t < 1.0
    )
}

/// Prints one point of a long-bubble test: convergence, cl, cd and, per surface, laminar
/// separation and transition x/c.
fn print_bubble_point(label: &str, p: &foilsweep_driver::PolarPoint) {
    let events = |s: &foilsweep_driver::SurfaceEvents| {
        (s.laminar_separation_x_over_c, s.transition_x_over_c)
    };
    println!(
        "{label} alpha {:?}: converged {}, cl {:?}, cd {:?}, separation/transition upper {:?}, \
         lower {:?}",
        p.alpha_deg,
        p.converged,
        p.cl,
        p.cd,
        events(&p.upper),
        events(&p.lower)
    );
}

/// Long laminar separation bubbles at the bottom of the Reynolds-number range: the NACA 4412 as
/// defined, no trips, Re 6e4, 0°–6°. Every point converges, and on the upper surface the
/// laminar layer separates and then transitions ahead of the trailing edge (a bubble, closed or
/// bursting, not a laminar layer separated to the trailing edge). This guards the separated
/// branch of the laminar closure: with the Falkner–Skan table used there too (Stewartson's
/// lower-branch profiles, whose H* rises faster with H than the published fit's), separated
/// shear layers grew too slowly for the bubble to close and every one of these points failed;
/// the published fit is used there (`closure::laminar_blend`). The requirement is the issue's:
/// converge or flag, and a designer's ordinary low-Re polar must converge.
#[test]
fn long_bubbles_at_the_bottom_of_the_reynolds_range_converge() {
    let airfoil = naca_section("4412", 80, TrailingEdge::Open).expect("NACA 4412");
    let request = PolarRequest::new(
        &airfoil,
        160,
        vec![6.0e4],
        Targets::AlphaDeg(vec![0.0, 2.0, 4.0, 6.0]),
    )
    .expect("request");
    let points = run_polar(&request, None).expect("sweep").points;
    let failures: Vec<String> = points
        .iter()
        .filter_map(|p| {
            print_bubble_point("NACA 4412 Re 6e4", p);
            (!(p.converged && separates_then_transitions(&p.upper)))
                .then(|| format!("alpha {:?}: {:?}", p.alpha_deg, p.flag))
        })
        .collect();
    assert!(failures.is_empty(), "{failures:#?}");
}

/// A thick symmetric section at the bottom of the Reynolds-number range, where long laminar
/// bubbles on both surfaces reach far aft: the NACA 0018 (a common blade section), no trips,
/// Re 1e5, −3° to 3°, as the command line defines the section (161 points per side). Every point
/// converges with, on each surface, laminar separation ahead of transition, and the polar is
/// mirror-symmetric, as the section is: cl(−α) = −cl(α) and cd(−α) = cd(α) within 1e-4 (the
/// panelling is symmetric and the iterations converge to updates of 1e-6; the asymmetric roots
/// that the discrete equations also have differ by more: 0.003 in cl at 0°, Re 1.2e5).
///
/// Guards three changes. (1) The entrainment shape factor's continuation above H = 8
/// (`closure::lag_entrainment::ENTRAINMENT_CONTINUATION_SHAPE_FACTOR`): with Green's quadratic
/// H1, negative past H ≈ 18.8, ±2° and ±1° failed (residual 2.4e6 and 9.4e9) and near 0° the
/// Newton iterates fell into a root in which θ collapsed by 60 % across transition. (2) and (3),
/// either of which makes 0° converge: the direct march's starting wake held at the
/// trailing-edge speed behind the blunt base (`interaction::march_sweep`), with which 0°
/// converges cold, and the Reynolds-number continuation's shorter steps (`foilsweep_viscous`),
/// the fallback with which it converged before (the step from 2e5 to 1e5 failed, shorter ones
/// do not). Without both, 0° failed (residual 3.4e7). The symmetric state has cd 0.0203, the
/// value 200 panels give cold.
#[test]
fn thick_section_with_long_bubbles_on_both_surfaces_converges() {
    let airfoil = naca_section("0018", 161, TrailingEdge::Open).expect("NACA 0018");
    let alphas = vec![-3.0, -2.0, -1.0, 0.0, 1.0, 2.0, 3.0];
    let request =
        PolarRequest::new(&airfoil, 160, vec![1.0e5], Targets::AlphaDeg(alphas)).expect("request");
    let points = run_polar(&request, None).expect("sweep").points;
    let failures: Vec<String> = points
        .iter()
        .filter_map(|p| {
            print_bubble_point("NACA 0018 Re 1e5", p);
            let both = separates_then_transitions(&p.upper) && separates_then_transitions(&p.lower);
            (!(p.converged && both)).then(|| format!("alpha {:?}: {:?}", p.alpha_deg, p.flag))
        })
        .collect();
    assert!(failures.is_empty(), "{failures:#?}");
    let n = points.len();
    for (p, q) in points.iter().zip(points.iter().rev()).take(n / 2 + 1) {
        let (cl_p, cl_q) = (p.cl.expect("cl"), q.cl.expect("cl"));
        let (cd_p, cd_q) = (p.cd.expect("cd"), q.cd.expect("cd"));
        println!(
            "alpha {:?} / {:?}: cl sum {:.2e}, cd difference {:.2e}",
            p.alpha_deg,
            q.alpha_deg,
            cl_p + cl_q,
            cd_p - cd_q
        );
        assert!((cl_p + cl_q).abs() <= 1e-4, "cl {cl_p} vs {cl_q}");
        assert!((cd_p - cd_q).abs() <= 1e-4, "cd {cd_p} vs {cd_q}");
    }
}
