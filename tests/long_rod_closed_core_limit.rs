//! A very long rod in a longer winding approaches the closed-core (infinitely long) limit.
//!
//! Source: Ampère's law for a long solenoid, H = n I, and B = μ0 μr H in a core whose
//! demagnetizing factor vanishes (references.md §5 and §7 check #11; the closed-core limit is
//! common practice). Sketch: rod 200 mm long, 2 mm diameter (L/D = 100), μr = 300, in a winding
//! 400 mm long (a1 = 1.2 mm, a2 = 1.6 mm, 4000 turns, 10 mA). The residual deficit is the rod's
//! fluxmetric demagnetization, 1/(1 + χ·Nf) with Nf(χ = 0, γ = 100) = 5.0e-5 (Chen, Brug &
//! Goldfarb, IEEE Trans. Magn. 27, 3601, 1991), about 1.5 %. Tolerance 2 %.

mod common;

use axicore::pipeline::RunOptions;
use common::{rel, solve};

#[test]
fn long_rod_centre_field_is_mu_r_mu0_n_i_within_two_percent() {
    let out = solve(
        r#"
title = "long rod L/D = 100"
[core]
shape = "rod"
length = "200 mm"
diameter = "2 mm"
mu_r = 300
[[winding]]
turns = 4000
current = "10 mA"
inner_radius = "1.2 mm"
outer_radius = "1.6 mm"
length = "400 mm"
"#,
        &RunOptions::default(),
    );
    let n_per_m = 4000.0 / 0.400;
    let want = 300.0 * reference::MU0 * reference::long_solenoid_h(n_per_m, 0.010);
    let got = out.report.b_origin_T;
    assert!(
        rel(got, want) < 2e-2,
        "B at centre {got} vs μr μ0 n I = {want}"
    );
    // The deficit has the sign and size of the fluxmetric demagnetization.
    let nf = reference::rod_nf_chi0(100.0);
    let with_demag = want / (1.0 + 299.0 * nf);
    assert!(
        got < want && rel(got, with_demag) < 1e-2,
        "{got} vs {with_demag}"
    );
}
