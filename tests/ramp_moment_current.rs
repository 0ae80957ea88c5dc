//! The moment–current ramp: continuation agrees with a cold start, the moment rises with the
//! current, and the knee lies where saturation sets in.
//!
//! Sources: the magnetisation of a soft core with a single-valued monotone law rises
//! monotonically with the applied current (a consequence of the convex magnetic energy,
//! common practice); a converged solve does not depend on the starting point (uniqueness of
//! the minimiser of a strictly convex energy).

mod common;

use axicore::case::parse_case;
use axicore::pipeline::RunOptions;
use axicore::ramp::ramp;
use axicore::report::ramp_csv as csv;
use common::{arctan_rod, rel, solve};

#[test]
fn ramp_moment_is_monotone_and_continuation_matches_a_cold_start() {
    let case = parse_case(&arctan_rod(1.0), "ramp test").unwrap();
    let r = ramp(&case, 6.0, 8).unwrap();
    assert_eq!(r.rows.len(), 8);
    for w in r.rows.windows(2) {
        assert!(
            w[1].dipole_moment_Am2 > w[0].dipole_moment_Am2,
            "moment falls: {:?}",
            w
        );
        // The incremental inductance falls as the core saturates (convex energy).
        assert!(w[1].incremental_inductance_H <= w[0].incremental_inductance_H * (1.0 + 1e-6));
    }
    // The last step solved by continuation against a cold start at 6 A.
    let cold = solve(&arctan_rod(6.0), &RunOptions::default());
    let last = r.rows.last().unwrap();
    assert!(
        rel(last.dipole_moment_Am2, cold.report.dipole_moment_Am2) < 1e-8,
        "{} vs {}",
        last.dipole_moment_Am2,
        cold.report.dipole_moment_Am2
    );
    // The knee lies inside the range, after the low-current steps that stay on the line.
    let knee = r.knee_current_A.expect("knee inside 0–6 A");
    assert!(knee > 0.75 && knee < 6.0, "knee {knee}");
    let first = &r.rows[0];
    let line = r.low_current_slope_Am2_per_A * first.current_A;
    assert!(
        first.dipole_moment_Am2 < line * 1.05,
        "first step {first:?} vs line {line}"
    );
    // CSV: header plus one line per step.
    let text = csv(&r);
    assert_eq!(text.lines().count(), 9);
    assert!(text.starts_with("current_A,dipole_moment_Am2,"));
}

#[test]
fn low_current_slope_matches_a_small_current_solve() {
    // The small-signal slope at zero current (from the tangent) against m(I)/I at 1 mA, where
    // the core is far below its knee: equal to the nonlinearity of the first millitesla.
    let case = parse_case(&arctan_rod(1.0), "ramp test").unwrap();
    let r = ramp(&case, 1e-3, 1).unwrap();
    let m_per_a = r.rows[0].dipole_moment_Am2 / 1e-3;
    assert!(
        rel(m_per_a, r.low_current_slope_Am2_per_A) < 1e-3,
        "{m_per_a} vs {}",
        r.low_current_slope_Am2_per_A
    );
}

#[test]
fn ramp_follows_the_direction_of_the_case_current() {
    // `--to` is a magnitude: a winding wound (or fed) the other way ramps to negative current
    // and ends where a plain solve of the case ends (uniqueness, as above), here in a 50 µT
    // background that the winding opposes.
    let toml = format!("{}\n[background]\nb_axial = \"50 uT\"\n", arctan_rod(-1.0));
    let case = parse_case(&toml, "reversed").unwrap();
    let r = ramp(&case, 1.0, 2).unwrap();
    let last = r.rows.last().unwrap();
    assert_eq!(last.current_A, -1.0);
    let plain = solve(&toml, &RunOptions::default()).report;
    assert!(
        rel(last.dipole_moment_Am2, plain.dipole_moment_Am2) < 1e-8,
        "{} vs {}",
        last.dipole_moment_Am2,
        plain.dipole_moment_Am2
    );
}
