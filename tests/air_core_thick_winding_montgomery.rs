//! Air-core thick winding: dipole moment and axial field.
//!
//! Sources:
//! - Dipole of a uniform-current-density winding: m = N I π (a1² + a1 a2 + a2²)/3, derived by
//!   integrating the loop moment π r² over the section: m = ∫ π r² J dr dz with
//!   J = N I /((a2 − a1)·ℓ), ∫_{a1}^{a2} r² dr = (a2³ − a1³)/3 = (a2 − a1)(a1² + a1a2 + a2²)/3.
//! - On-axis field of a thick solenoid: D. B. Montgomery, *Solenoid Magnet Design*, Wiley 1969,
//!   ch. 1 (evaluated by `reference::thick_solenoid_axial_field`).
//!
//! Geometry: references.md §7 check #4/#5 coil (a1 = 10 mm, a2 = 20 mm, length 100 mm,
//! N = 1000, I = 1 A). Tolerances: 1e-4 on the dipole (both estimators, default mesh) and on
//! B_z at 19 axis points inside the winding (fineness 4; measured worst 5e-5 there, 5e-4 at
//! fineness 2, where the two points 5 mm from the winding ends lag).

mod common;

use axicore::pipeline::RunOptions;
use axicore_formulas as reference;
use common::{rel, solve};

use common::THICK_COIL as COIL;

#[test]
fn air_core_dipole_matches_the_section_integral_by_both_estimators() {
    let out = solve(COIL, &RunOptions::default());
    let exact = reference::thick_solenoid_dipole(0.010, 0.020, 1000.0, 1.0);
    // references.md §7 check #5
    assert!(rel(exact, 0.7330383) < 1e-6);
    let r = &out.report;
    assert!(
        rel(r.winding_dipole_moment_Am2, exact) < 1e-9,
        "{}",
        r.winding_dipole_moment_Am2
    );
    assert!(
        rel(r.dipole_moment_Am2, exact) < 1e-4,
        "source route {}",
        r.dipole_moment_Am2
    );
    assert!(
        rel(r.dipole_check_Am2, exact) < 1e-4,
        "field route {} vs {exact}",
        r.dipole_check_Am2
    );
    assert_eq!(r.moment_gain, None, "an air coil has no core, so no gain");
}

#[test]
fn axial_field_inside_the_winding_matches_montgomery() {
    // Point values come from patch recovery (solver/src/recover.rs); fineness 4 resolves the
    // field variation near the winding ends to 1e-4.
    let fine = format!("{COIL}\n[mesh]\nfineness = 4\n");
    let out = solve(
        &fine,
        &RunOptions {
            line: Some(([0.0, -0.045], [0.0, 0.045], 19)),
            ..Default::default()
        },
    );
    let csv = out.line_csv.expect("line samples");
    let mut worst: f64 = 0.0;
    for row in csv.lines().skip(1) {
        let f: Vec<f64> = row.split(',').map(|x| x.parse().unwrap()).collect();
        let (z, bz) = (f[1], f[4]);
        let want = reference::thick_solenoid_axial_field(0.010, 0.020, 0.050, 1000.0, 1.0, z);
        worst = worst.max(rel(bz, want));
    }
    assert!(worst < 1e-4, "worst relative error {worst}");
    // Centre value, references.md §7 check #4: 1.2022574e-2 T.
    assert!(
        rel(out.report.b_origin_T, 1.2022574e-2) < 1e-4,
        "{}",
        out.report.b_origin_T
    );
}
