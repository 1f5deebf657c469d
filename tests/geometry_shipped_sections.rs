//! The shipped sections in `airfoils/` parse cleanly and are what their titles say.
//!
//! The NACA files were written from the published definitions (Abbott & von Doenhoff 1959, §6.4
//! and §6.5) with 81 cosine-spaced stations per side and 7 decimals, so each point must equal the
//! crate's own `naca_section(code, 81, Open)` to the file's rounding (5e-8 c).

use foilsweep_geometry::naca::{naca_section, TrailingEdge};
use foilsweep_geometry::{Airfoil, ParseOptions};
use foilsweep_validation::airfoil_path;

fn load(file: &str) -> Airfoil {
    let text = std::fs::read_to_string(airfoil_path(file)).expect("shipped file");
    let (foil, report) = Airfoil::parse(&text, file, &ParseOptions::default()).expect("valid");
    assert!(report.warnings.is_empty(), "{file}: {report:?}");
    foil
}

#[test]
fn shipped_naca_files_match_the_generator() {
    for code in ["0012", "2412", "4412", "23012"] {
        let file = format!("naca{code}.dat");
        let foil = load(&file);
        assert_eq!(
            foil.name(),
            format!("NACA {code} (generated from the published NACA definition)")
        );
        let generated = naca_section(code, 81, TrailingEdge::Open).unwrap();
        assert_eq!(foil.points().len(), generated.points().len());
        for (a, b) in foil.points().iter().zip(generated.points()) {
            assert!((a - b).amax() <= 5e-8 + 1e-15, "{file}: {a} vs {b}");
        }
        let props = foil.properties();
        println!("{file}: {props:?}");
        // Nominal thickness 12 %: the 4-digit polynomial peaks at 12.004 %; measured at equal x
        // on a cambered section it reads up to 0.02 % c higher (thickness laid normal to the
        // mean line), so 3e-4 c.
        assert!(
            (props.max_thickness - 0.12).abs() < 3e-4,
            "{file}: {}",
            props.max_thickness
        );
    }
}

#[test]
fn shipped_e387_is_valid_and_normalised() {
    let foil = load("e387.dat");
    assert_eq!(foil.points().len(), 56);
    let props = foil.properties();
    println!("e387: {props:?}");
    assert!((props.chord - 1.0).abs() < 1e-4);
    // TE thickness: the file's trailing-edge points are (1, ±0.00083), exact.
    assert!((props.trailing_edge_thickness - 0.00166).abs() < 1e-9);
}
