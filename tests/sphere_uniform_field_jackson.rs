//! Permeable sphere in a uniform field.
//!
//! Source: J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.11 [section number from
//! memory] (sphere of linear material in a uniform field): B_in = 3μr/(μr + 2)·B0 and m = 4π a³ (μr − 1)/(μr + 2)·H0.
//! references.md §7 check #6 gives 2.994012 and 2.991018 for μr = 1000.
//! Sketch: sphere of radius a = 10 mm at the origin, B0 = 1 mT along z, no winding; the exact
//! open boundary on the automatic air sphere (3 a). Tolerance 0.5 % (interior B and dipole).
//! Fineness 2 (6.1k nodes, second order); measured: −1.8e-5 (B), −1.8e-5 / −4.2e-5 (dipole,
//! two routes).

mod common;

use axicore::pipeline::RunOptions;
use axicore_formulas as reference;
use common::{rel, solve};

#[test]
fn sphere_interior_field_and_dipole_match_jackson() {
    let out = solve(
        r#"
title = "sphere mu_r 1000 in 1 mT"
[core]
shape = "sphere"
diameter = "20 mm"
mu_r = 1000
[background]
b_axial = "1 mT"
[mesh]
fineness = 2
"#,
        &RunOptions {
            points: vec![[0.0, 0.0], [0.005, 0.003]],
            ..Default::default()
        },
    );
    let (mu_r, b0, a) = (1000.0, 1e-3, 0.010);
    let b_in = reference::sphere_interior_b(mu_r, b0);
    assert!(rel(b_in / b0, 2.994012) < 1e-6);
    for p in &out.report.points {
        assert!(
            rel(p.b_z_T, b_in) < 5e-3,
            "B_z at ({}, {}) = {} vs {b_in}",
            p.r_m,
            p.z_m,
            p.b_z_T
        );
        assert!(p.b_r_T.abs() < 5e-3 * b_in, "B_r = {}", p.b_r_T);
    }
    let m = reference::sphere_dipole(a, mu_r, b0 / reference::MU0);
    let r = &out.report;
    assert!(
        rel(r.dipole_moment_Am2, m) < 5e-3,
        "source route {} vs {m}",
        r.dipole_moment_Am2
    );
    assert!(
        rel(r.dipole_check_Am2, m) < 5e-3,
        "field route {} vs {m}",
        r.dipole_check_Am2
    );
}
