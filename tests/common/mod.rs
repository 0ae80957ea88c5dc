//! Shared helpers of the validation tests: run a case given as TOML text.
//! No outside check lives here; each test file names the source of its reference values.
#![allow(dead_code)]

use axicore::case::parse_case;
use axicore::pipeline::{run, Outcome, RunOptions};

/// Parses and solves `toml`, panicking with the message on any failure (tests only).
pub fn solve(toml: &str, opts: &RunOptions) -> Outcome {
    let case = parse_case(toml, "test case").unwrap_or_else(|e| panic!("{e}"));
    run(&case, opts).unwrap_or_else(|e| panic!("{e}"))
}

/// Relative error of `got` against `want`.
pub fn rel(got: f64, want: f64) -> f64 {
    (got - want).abs() / want.abs()
}

/// The thick air-core winding of references.md §7 checks #4/#5 (a1 = 10 mm, a2 = 20 mm,
/// length 100 mm, N = 1000, I = 1 A; source cited in the tests that use it).
pub const THICK_COIL: &str = r#"
title = "thick air-core winding"
[[winding]]
turns = 1000
current = "1 A"
inner_radius = "10 mm"
outer_radius = "20 mm"
length = "100 mm"
"#;

/// The built-in example's rod and winding geometry with the arctangent law Js = 1.5 T,
/// μri = 1000 (references.md §6; sources cited in the tests that use it), at winding current
/// `amps`, on a coarse mesh (fineness 0.5).
pub fn arctan_rod(amps: f64) -> String {
    format!(
        r#"
title = "rod, arctangent law"
[core]
shape = "rod"
length = "70 mm"
diameter = "8 mm"
[core.law]
kind = "arctan"
saturation = "1.5 T"
initial_mu_r = 1000
[[winding]]
turns = 1200
current = "{amps} A"
inner_radius = "4.2 mm"
outer_radius = "6.0 mm"
length = "60 mm"
[mesh]
fineness = 0.5
"#
    )
}
