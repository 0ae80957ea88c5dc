//! A very long rod in a longer winding approaches the closed-core (infinitely long) limit.
//!
//! Source: Ampère's law for a long solenoid, H = n I, and B = μ0 μr H in a core whose
//! demagnetizing factor vanishes (references.md §5 and §7 check #11; the closed-core limit is
//! common practice). Sketch: rod 200 mm long, 2 mm diameter (L/D = 100), μr = 300, in a winding
//! 400 mm long (a1 = 1.2 mm, a2 = 1.6 mm, 4000 turns, 10 mA). The residual deficit is the rod's
//! fluxmetric demagnetization (Chen, Brug & Goldfarb, IEEE Trans. Magn. 27, 3601, 1991).
//!
//! Finding: at L/D = 100 the claim does not hold to 2 % for μr = 300. Our converged
//! finite-element value there is about 4.4 % below μr μ0 n I (fineness 0.5/1/2 give
//! 0.920/0.943/0.951 of it, extrapolating to ≈ 0.956): the flux-leakage length
//! R·√(μr ln(L/R)/2) ≈ 25 mm is not small against the 100 mm half-length. The 2 % check is
//! therefore made at L/D = 300 (which satisfies the "≥ 100" of the requirement), where
//! fineness 0.5/1/1.5 give 0.941/0.981/0.989 (release run, recorded in the README); the
//! L/D = 100 deficit is kept as a trend test below.

mod common;

use axicore::pipeline::RunOptions;
use axicore_formulas as reference;
use common::{rel, solve};

#[test]
fn long_rod_centre_field_is_mu_r_mu0_n_i_within_two_percent() {
    // L/D = 300: rod 300 mm × 1 mm in a 600 mm winding of 6000 turns (n = 1e4 /m), 10 mA.
    let out = solve(
        r#"
title = "long rod L/D = 300"
[core]
shape = "rod"
length = "300 mm"
diameter = "1 mm"
mu_r = 300
[[winding]]
turns = 6000
current = "10 mA"
inner_radius = "0.6 mm"
outer_radius = "1.0 mm"
length = "600 mm"
[mesh]
fineness = 1.2
"#,
        &RunOptions::default(),
    );
    let want = 300.0 * reference::MU0 * reference::long_solenoid_h(1e4, 0.010);
    let got = out.report.b_origin_T;
    assert!(
        got < want,
        "B at centre {got} above the closed-core bound {want}"
    );
    assert!(
        rel(got, want) < 2e-2,
        "B at centre {got} vs μr μ0 n I = {want}"
    );
}

fn centre_ratio(diameter_mm: f64, a1_mm: f64, a2_mm: f64) -> f64 {
    let out = solve(
        &format!(
            r#"
title = "long rod"
[core]
shape = "rod"
length = "200 mm"
diameter = "{diameter_mm} mm"
mu_r = 300
[[winding]]
turns = 4000
current = "10 mA"
inner_radius = "{a1_mm} mm"
outer_radius = "{a2_mm} mm"
length = "400 mm"
[mesh]
fineness = 0.5
"#
        ),
        &RunOptions::default(),
    );
    out.report.b_origin_T / (300.0 * reference::MU0 * reference::long_solenoid_h(1e4, 0.010))
}

#[test]
fn slender_rod_centre_field_approaches_the_closed_core_value_from_below() {
    // L/D = 100 and 200 at the same relative mesh: closer to μr μ0 n I for the longer ratio,
    // never above it (Ampère's law bound for a core inside a uniform-H winding, common practice).
    let g100 = centre_ratio(2.0, 1.2, 1.6);
    let g200 = centre_ratio(1.0, 0.6, 1.0);
    assert!(g100 < 1.0 && g200 < 1.0, "{g100} {g200}");
    assert!(g200 > g100 + 0.01, "{g100} {g200}");
    assert!(g200 > 0.94, "{g200}");
}
