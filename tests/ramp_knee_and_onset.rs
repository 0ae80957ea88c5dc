//! The ramp's knee (dm/dI down to half its largest value) and saturation onset (the
//! corner-excluded peak |B| at 90 % of B_sat) hold for laws whose permeability falls from the
//! start (the knee law), for a table whose permeability first rises (a steel-like curve), and
//! for the hollow-tube reference case; both move with the step count only within a fraction
//! of a step.
//!
//! Sources: the definitions are ours (README, "ramp"); what is checked against the outside is
//! only common practice: the incremental moment of a soft core falls once it saturates, and a
//! steel's differential permeability first rises with field (Bozorth, *Ferromagnetism*, 1951,
//! the initial magnetization curve of iron and steel [from memory]). The table below is demo
//! data shaped like such a curve, not a measured steel.

mod common;

use axicore::case::parse_case;
use axicore::ramp::{ramp, RampResult};

/// A rod and winding like the built-in example's with `core` as the core's material lines, on a
/// coarse mesh (fineness 0.5) to keep the test short.
fn rod(core: &str) -> String {
    format!(
        r#"
title = "rod for the knee test"
[core]
shape = "rod"
length = "70 mm"
diameter = "8 mm"
{core}
[[winding]]
turns = 1200
current = "1 A"
inner_radius = "4.2 mm"
outer_radius = "6.0 mm"
length = "60 mm"
[mesh]
fineness = 0.5
"#
    )
}

/// Demo table: μr rises from ~800 to ~3000 by 300 A/m, then the curve saturates near 1.9 T.
const RISING_TABLE: &str = r#"[core.bh_curve]
h = ["0 A/m", "50 A/m", "100 A/m", "200 A/m", "400 A/m", "1000 A/m", "3000 A/m", "10000 A/m", "100000 A/m"]
b = ["0 T", "0.05 T", "0.2 T", "0.6 T", "1.0 T", "1.3 T", "1.5 T", "1.65 T", "1.9 T"]"#;

/// Checks what a knee must be on `r`: past the largest slope, with the step slopes on either
/// side of it bracketing half that slope.
fn check_knee(r: &RampResult, label: &str) -> f64 {
    let knee = r
        .knee_current_A
        .unwrap_or_else(|| panic!("{label}: no knee"));
    let (largest, at) = r.max_incremental_moment_Am2_per_A;
    assert!(
        knee > at,
        "{label}: knee {knee} A before the largest slope at {at} A"
    );
    let before = r.rows.iter().rev().find(|row| row.current_A <= knee);
    let after = r.rows.iter().find(|row| row.current_A >= knee).unwrap();
    let half = 0.5 * largest;
    assert!(
        after.incremental_moment_Am2_per_A <= half * (1.0 + 1e-9),
        "{label}: {after:?}"
    );
    if let Some(b) = before {
        assert!(
            b.incremental_moment_Am2_per_A >= half * 0.98,
            "{label}: {b:?}"
        );
    }
    knee
}

/// Runs `case` with 10 and 40 steps to `to` A; the knee and the onset must agree within a
/// quarter of the coarse step.
fn stable(toml: &str, to: f64, label: &str) -> (RampResult, RampResult) {
    let case = parse_case(toml, label).unwrap();
    let coarse = ramp(&case, to, 10).unwrap();
    let fine = ramp(&case, to, 40).unwrap();
    let step = to / 10.0;
    let (k10, k40) = (check_knee(&coarse, label), check_knee(&fine, label));
    assert!(
        (k10 - k40).abs() < 0.25 * step,
        "{label}: knee {k10} vs {k40} A"
    );
    let o10 = coarse.saturation_onset.as_ref().expect("onset at 10 steps");
    let o40 = fine.saturation_onset.as_ref().expect("onset at 40 steps");
    assert!(
        (o10.current_A - o40.current_A).abs() < 0.25 * step,
        "{label}: onset {} vs {} A",
        o10.current_A,
        o40.current_A
    );
    // Never a corner sliver: the onset lies inside the core, clear of its end faces.
    let half_length = 0.035;
    assert!(
        o40.at_m[1].abs() < half_length * 0.95,
        "{label}: {:?}",
        o40.at_m
    );
    (coarse, fine)
}

#[test]
fn knee_and_onset_on_the_knee_law_are_step_independent() {
    let (_, fine) = stable(&rod(r#"material = "nickel-iron-80""#), 2.0, "knee law");
    // The knee law's permeability only falls: the zero-current slope is the largest, and the
    // 10 %-below-the-line figure is reported beside the knee.
    assert!(fine.slope_largest_at_zero);
    assert!(fine.line_knee_current_A.is_some());
}

#[test]
fn knee_on_a_rising_permeability_table_lies_past_its_steepest_point() {
    let (_, fine) = stable(&rod(RISING_TABLE), 4.0, "rising table");
    assert!(
        !fine.slope_largest_at_zero,
        "{:?}",
        fine.max_incremental_moment_Am2_per_A
    );
    // The curve runs above the zero-current line first, so the 10 % figure is withheld.
    assert!(fine.line_knee_current_A.is_none());
}

#[test]
fn knee_and_onset_of_the_hollow_tube_case_are_step_independent() {
    // The case on a coarser mesh (fineness 0.5) to keep the test short.
    let toml = std::fs::read_to_string("cases/hollow-torquer-tube/case.toml").unwrap()
        + "\n[mesh]\nfineness = 0.5\n";
    let (_, fine) = stable(&toml, 3.0, "tube");
    // Low-carbon steel's knee law rises first (initial μr 300, maximum 2000).
    assert!(!fine.slope_largest_at_zero);
}
