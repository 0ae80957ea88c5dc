//! Inductance of an air-core thick winding.
//!
//! Source: F. W. Grover, *Inductance Calculations* (1946): the inductance of a winding of
//! uniform current density as the sum of mutual inductances of coaxial filament loops
//! (Maxwell's formula, NIST DLMF §19.34), with each filament's self term from the geometric
//! mean distance of its rectangular cell (`reference::thick_winding_inductance_filaments`).
//! Sketch: references.md §7 check #4 coil (a1 = 10 mm, a2 = 20 mm, length 100 mm, N = 1000).
//! Tolerance 1 %. The finite element value is 2W/I² = λ/I from the solve.

mod common;

use axicore::pipeline::RunOptions;
use axicore_formulas as reference;
use common::{rel, solve};

#[test]
fn air_coil_inductance_matches_filament_sum() {
    let out = solve(common::THICK_COIL, &RunOptions::default());
    let want = reference::thick_winding_inductance_filaments(0.010, 0.020, 0.100, 1000.0, 20, 200);
    let l = out.report.inductance_H.expect("inductance");
    assert!(rel(l, want) < 1e-2, "FE {l} H vs filament sum {want} H");
    // Energy and flux linkage agree: W = L I²/2 for a single linear winding.
    assert!(rel(out.report.energy_J, 0.5 * l) < 1e-9);
}
