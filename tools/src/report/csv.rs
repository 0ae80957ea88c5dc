//! CSV tables of our own: one header row naming each column with its SI unit, then one row per sample.

use std::fmt::Write as _;

use axicore_solver::PointField;

use crate::ramp::RampResult;

/// CSV of line samples: header with units, one row per sample.
pub fn line_csv(samples: &[PointField]) -> String {
    let mut s = String::from(
        "r_m,z_m,A_phi_Wb_per_m,B_r_T,B_z_T,B_magnitude_T,H_r_A_per_m,H_z_A_per_m,mu_r,region\n",
    );
    for p in samples {
        let _ = writeln!(
            s,
            "{:e},{:e},{:e},{:e},{:e},{:e},{:e},{:e},{:e},{}",
            p.at[0],
            p.at[1],
            p.a,
            p.b[0],
            p.b[1],
            p.b[0].hypot(p.b[1]),
            p.h[0],
            p.h[1],
            p.mu_r,
            p.tag
        );
    }
    s
}

/// The ramp as CSV (SI units in the header); empty fields where a value does not apply.
pub fn ramp_csv(r: &RampResult) -> String {
    let mut s = String::from(
        "current_A,dipole_moment_Am2,core_dipole_moment_Am2,moment_gain,incremental_moment_Am2_per_A,peak_core_b_T,saturated_fraction,incremental_inductance_H,secant_inductance_H,newton_iterations\n",
    );
    let opt = |v: Option<f64>| v.map_or(String::new(), |x| format!("{x:.9e}"));
    for row in &r.rows {
        let _ = writeln!(
            s,
            "{:.9e},{:.9e},{:.9e},{},{:.9e},{},{},{:.9e},{},{}",
            row.current_A,
            row.dipole_moment_Am2,
            row.core_dipole_moment_Am2,
            opt(row.moment_gain),
            row.incremental_moment_Am2_per_A,
            opt(row.peak_core_b_T),
            opt(row.saturated_fraction),
            row.incremental_inductance_H,
            opt(row.secant_inductance_H),
            row.newton_iterations
        );
    }
    s
}
