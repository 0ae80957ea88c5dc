//! Refining the mesh shrinks the air-core dipole error at the expected rate.
//!
//! Source of the exact value: the section integral m = N I π (a1² + a1a2 + a2²)/3 (derived in
//! air_core_thick_winding_montgomery.rs). The field-route estimator integrates A over a sphere;
//! for first-order elements (`order = 1`) the L2 error of A, and so this error, falls like h² (Ciarlet, *The
//! Finite Element Method for Elliptic Problems*, 1978, Thm. 3.2.5, Aubin–Nitsche). `fineness`
//! scales every element size and the grading by 1/fineness, so h ∝ 1/fineness.
//! The fitted log–log slope over fineness 1, 2, 4 must lie within 2 ± 0.4, and the error must
//! fall monotonically. Sketch: references.md §7 coil #4.

mod common;

use axicore::pipeline::RunOptions;
use axicore_formulas as reference;
use common::{rel, solve};

#[test]
fn air_coil_dipole_error_falls_like_h_squared() {
    let exact = reference::thick_solenoid_dipole(0.010, 0.020, 1000.0, 1.0);
    let mut pts = Vec::new();
    for f in [1.0f64, 2.0, 4.0] {
        let out = solve(
            &format!(
                "[[winding]]\nturns = 1000\ncurrent = \"1 A\"\ninner_radius = \"10 mm\"\nouter_radius = \"20 mm\"\nlength = \"100 mm\"\n[mesh]\nfineness = {f}\norder = 1\n"
            ),
            &RunOptions::default(),
        );
        pts.push(((1.0 / f).ln(), rel(out.report.dipole_check_Am2, exact).ln()));
    }
    assert!(pts[0].1 > pts[1].1 && pts[1].1 > pts[2].1, "{pts:?}");
    let n = pts.len() as f64;
    let (mx, my) = (
        pts.iter().map(|p| p.0).sum::<f64>() / n,
        pts.iter().map(|p| p.1).sum::<f64>() / n,
    );
    let slope = pts.iter().map(|p| (p.0 - mx) * (p.1 - my)).sum::<f64>()
        / pts.iter().map(|p| (p.0 - mx).powi(2)).sum::<f64>();
    assert!((slope - 2.0).abs() <= 0.4, "slope {slope}");
}
