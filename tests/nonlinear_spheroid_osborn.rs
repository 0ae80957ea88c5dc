//! Saturating prolate spheroid in a uniform field along its long axis.
//!
//! Source: the uniformly magnetised ellipsoid, H_in + N·M(H_in) = H0 (references.md §2), with
//! the demagnetizing factor of J. A. Osborn, Phys. Rev. 67, 351 (1945) for axis ratio 10.
//! Check values: references.md §7 check #10 (arctangent law Js = 1.5 T, μri = 1000:
//! J = 0.467826 T at μ0H0 = 0.01 T and 1.486930 T at 0.1 T), evaluated again here.
//! Sketch: spheroid 100 mm long, 10 mm in diameter, at the origin, no winding.
//! Tolerance 1 % on the core moment, Newton within 15 iterations.

mod common;

use axicore::pipeline::RunOptions;
use axicore_formulas as reference;
use common::{rel, solve};

const JS: f64 = 1.5;
const MU_RI: f64 = 1000.0;

fn check(b0_t: f64, j_table: f64) {
    let n = reference::prolate_demag_factor(10.0);
    let h0 = b0_t / reference::MU0;
    let m_of_h = |h: f64| reference::arctan_law_j(h, JS, MU_RI) / reference::MU0;
    let h_in = reference::nonlinear_ellipsoid_h_in(h0, n, m_of_h);
    let j = reference::MU0 * m_of_h(h_in);
    assert!(rel(j, j_table) < 2e-6, "scalar root {j} vs table {j_table}");
    let volume = std::f64::consts::PI * 0.010 * 0.010 * 0.100 / 6.0;
    let m_exact = volume * j / reference::MU0;
    let out = solve(
        &format!(
            r#"
title = "arctan spheroid"
[core]
shape = "spheroid"
length = "100 mm"
diameter = "10 mm"
[core.law]
kind = "arctan"
saturation = "{JS} T"
initial_mu_r = {MU_RI}
[background]
b_axial = "{b0_t} T"
"#
        ),
        &RunOptions::default(),
    );
    let r = &out.report;
    assert!(
        r.newton_iterations <= 15,
        "{} iterations",
        r.newton_iterations
    );
    assert!(
        rel(r.core_dipole_moment_Am2, m_exact) < 1e-2,
        "μ0H0 = {b0_t} T: {} vs {m_exact}",
        r.core_dipole_moment_Am2
    );
}

#[test]
fn saturating_spheroid_moment_matches_osborn_below_the_knee() {
    check(0.01, 0.467826);
}

#[test]
fn saturating_spheroid_moment_matches_osborn_in_saturation() {
    check(0.1, 1.486930);
}
