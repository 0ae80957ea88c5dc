//! The human-readable account of a moment–current ramp.

use std::fmt::Write as _;

use super::format::{point_mm, sig};
use crate::ramp::{RampResult, KNEE_SLOPE_RATIO};

/// A readable account of the curve: its knee, saturation onset, and the table.
pub fn ramp_summary(r: &RampResult) -> String {
    let mut s = String::new();
    let _ = writeln!(
        s,
        "{} — moment against current ({} nodes)",
        r.title, r.nodes
    );
    let step = r.rows.first().map_or(0.0, |p| p.current_A.abs());
    let _ = writeln!(
        s,
        "zero-current slope dm/dI   {} A·m²/A",
        sig(r.low_current_slope_Am2_per_A, 4)
    );
    let (m_max, i_max) = r.max_incremental_moment_Am2_per_A;
    if !r.slope_largest_at_zero {
        let _ = writeln!(
            s,
            "largest slope dm/dI        {} A·m²/A at {} A (the core's permeability first rises with field)",
            sig(m_max, 4),
            sig(i_max, 4)
        );
    }
    match r.knee_current_A {
        Some(i) => {
            let _ = writeln!(
                s,
                "knee                       {} A  (dm/dI down to {:.0} % of its largest value)",
                sig(i, 4),
                100.0 * KNEE_SLOPE_RATIO
            );
            if i.abs() < 5.0 * step {
                let _ = writeln!(
                    s,
                    "                           (coarse: within five steps of zero; more --steps place it better)"
                );
            }
        }
        None => {
            let _ = writeln!(s, "knee                       not reached in this range");
        }
    }
    match (r.line_knee_current_A, r.slope_largest_at_zero) {
        (Some(i), _) => {
            let _ = writeln!(s, "10 % below the zero-current line at {} A", sig(i, 4));
        }
        (None, false) => {
            let _ = writeln!(
                s,
                "10 % below the zero-current line: not meaningful (the curve first rises above that line)"
            );
        }
        (None, true) => {}
    }
    match &r.saturation_onset {
        Some(o) => {
            let _ = writeln!(
                s,
                "saturation onset           {} A: peak |B| reaches 90 % of B_sat in {}, {}",
                sig(o.current_A, 4),
                o.place,
                point_mm(o.at_m)
            );
        }
        None if r.rows.iter().any(|row| row.peak_core_b_T.is_some()) => {
            let _ = writeln!(
                s,
                "saturation onset           not reached (peak |B| stays below 90 % of B_sat)"
            );
        }
        None => {}
    }
    if let Some(last) = r.rows.last() {
        let line = r.zero_current_moment_Am2 + r.low_current_slope_Am2_per_A * last.current_A;
        let _ = writeln!(
            s,
            "at {} A                 moment {} A·m², {:.1} % of the zero-current line",
            sig(last.current_A, 4),
            sig(last.dipole_moment_Am2, 4),
            100.0 * last.dipole_moment_Am2 / line
        );
    }
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "{:>11} {:>12} {:>9} {:>12} {:>9} {:>9} {:>11} {:>11} {:>3}",
        "current/A",
        "moment/A·m²",
        "gain",
        "dm/dI/A·m²/A",
        "peak B/T",
        "sat. %",
        "L_inc/H",
        "L_sec/H",
        "it"
    );
    let opt = |v: Option<f64>, f: &dyn Fn(f64) -> String| v.map_or("-".into(), f);
    for row in &r.rows {
        let _ = writeln!(
            s,
            "{:>11} {:>12} {:>9} {:>12} {:>9} {:>9} {:>11} {:>11} {:>3}",
            sig(row.current_A, 4),
            sig(row.dipole_moment_Am2, 4),
            opt(row.moment_gain, &|g| sig(g, 4)),
            sig(row.incremental_moment_Am2_per_A, 4),
            opt(row.peak_core_b_T, &|b| sig(b, 4)),
            opt(row.saturated_fraction, &|f| format!("{:.1}", 100.0 * f)),
            sig(row.incremental_inductance_H, 4),
            opt(row.secant_inductance_H, &|l| sig(l, 4)),
            row.newton_iterations
        );
    }
    let _ = writeln!(s);
    s.push_str(super::CAUTIONS);
    s.push('\n');
    s
}
