//! The moment–current curve: a sequence of operating points at rising current, each Newton
//! solve starting from the previous field (continuation), on one mesh.
//!
//! Every winding's current is scaled by the same factor, so the first winding goes from 0 to
//! the requested current. The knee is where the current-driven moment falls 10 % below the
//! straight line of the low-current slope (the small-signal moment per ampere at zero current).

use std::fmt::Write as _;

use axicore_solver::locate::Locator;
use axicore_solver::post::dipole;
use axicore_solver::Model;
use serde::Serialize;

use crate::case::Case;
use crate::operating_point::{self, axial_position_words};
use crate::pipeline::{discretise, RunError};

/// The knee criterion: the moment is this fraction of the low-current straight line.
pub const KNEE_RATIO: f64 = 0.9;

/// One point of the curve.
#[allow(non_snake_case)]
#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct RampRow {
    /// Current of the first winding, A.
    pub current_A: f64,
    /// Total moment, A·m².
    pub dipole_moment_Am2: f64,
    /// Moment of the core magnetisation, A·m².
    pub core_dipole_moment_Am2: f64,
    /// Moment with the core ÷ the windings in air.
    pub apparent_gain: Option<f64>,
    /// Corner-excluded peak |B| in the core, T.
    pub peak_core_b_T: Option<f64>,
    /// Volume fraction of the core above 90 % of B_sat.
    pub saturated_fraction: Option<f64>,
    /// dΨ/dI of the first winding, H.
    pub incremental_inductance_H: f64,
    /// Ψ/I of the first winding, H.
    pub apparent_inductance_H: f64,
    /// Newton iterations of this step (0 when linear).
    pub newton_iterations: usize,
}

/// The whole curve and what it says.
#[allow(non_snake_case)]
#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct RampResult {
    /// Case title.
    pub title: String,
    /// Moment at zero current (from a background field), A·m².
    pub zero_current_moment_Am2: f64,
    /// Small-signal moment per ampere at zero current, A·m²/A.
    pub low_current_slope_Am2_per_A: f64,
    /// Current where the driven moment is 90 % of the low-current line, A (None: not reached).
    pub knee_current_A: Option<f64>,
    /// First current at which part of the core exceeds 90 % of B_sat, A.
    pub first_saturation_current_A: Option<f64>,
    /// Where the core saturates first, in words and (r, z) in m.
    pub first_saturation_at: Option<(String, [f64; 2])>,
    /// The points.
    pub rows: Vec<RampRow>,
    /// Mesh nodes.
    pub nodes: usize,
}

/// Solves the curve for `steps` equal current steps from 0 to `to` (A, first winding; a
/// magnitude: the sign of the case's current sets the direction).
pub fn ramp(case: &Case, to: f64, steps: usize) -> Result<RampResult, RunError> {
    let i_case = case.windings.first().map_or(0.0, |w| w.current);
    let d = discretise(case)?;
    let nodes = d.problem.mesh.nodes.len();
    let model = Model::new(d.problem)?;
    let op = if model.is_linear() {
        Some(model.linear_operator()?)
    } else {
        None
    };
    let locator = Locator::new(model.mesh());

    // Zero current: the background alone (zero field without one); the small-signal slope
    // there from the tangent (the linear operator for linear cores).
    let zero_j = vec![0.0; model.mesh().triangles.len()];
    let (sol0, _) = operating_point::solve_field(
        &model,
        op.as_ref(),
        &zero_j,
        case.background_b,
        None,
        &case.newton,
    )?;
    let m0: f64 = dipole::source_moments(&model, &sol0, &zero_j)
        .iter()
        .map(|p| p.current + p.magnetization)
        .sum();
    let unit = operating_point::currents(&model, case, 1.0 / i_case);
    let response = match &op {
        Some(op) => op.solve(&unit, &vec![0.0; model.mesh().nodes.len()], 0.0),
        None => {
            let t = model.tangent_at(&sol0, &model.fixed_values())?;
            model.tangent_response(&t, &unit)
        }
    };
    let slope = dipole::incremental_moment(&model, &sol0, &response, &unit);

    let mut rows = Vec::with_capacity(steps);
    let mut prev = Some(sol0);
    let mut first_sat = None;
    for k in 1..=steps {
        // `to` is a magnitude; the ramp runs in the direction of the case's own current.
        let current = i_case.signum() * to.abs() * k as f64 / steps as f64;
        let scale = current / i_case;
        let j = operating_point::currents(&model, case, scale);
        let (sol, newton, tangent) = operating_point::solve_field_with_tangent(
            &model,
            op.as_ref(),
            &j,
            case.background_b,
            prev.as_ref(),
            &case.newton,
        )?;
        let fig = operating_point::figures(
            &model,
            op.as_ref(),
            tangent.as_ref(),
            case,
            &locator,
            &sol,
            &j,
            scale,
        )?;
        if first_sat.is_none() && fig.saturated_fraction.is_some_and(|f| f > 0.0) {
            first_sat = fig.peak.map(|p| (current, p.at));
        }
        rows.push(RampRow {
            current_A: current,
            dipole_moment_Am2: fig.total,
            core_dipole_moment_Am2: fig.core,
            apparent_gain: fig.gain,
            peak_core_b_T: fig.peak.map(|p| p.b),
            saturated_fraction: fig.saturated_fraction,
            incremental_inductance_H: fig.incremental_inductance.first().map_or(0.0, |r| r[0]),
            apparent_inductance_H: fig.flux_linkage.first().map_or(0.0, |p| p / current),
            newton_iterations: newton.map_or(0, |n| n.iterations),
        });
        prev = Some(sol);
    }
    let knee_current = knee(&rows, m0, slope);
    Ok(RampResult {
        title: case.title.clone(),
        zero_current_moment_Am2: m0,
        low_current_slope_Am2_per_A: slope,
        knee_current_A: knee_current,
        first_saturation_current_A: first_sat.map(|(i, _)| i),
        first_saturation_at: first_sat.map(|(_, at)| (axial_position_words(case, at).into(), at)),
        rows,
        nodes,
    })
}

/// First current where (m − m0)/(slope·I) falls to [`KNEE_RATIO`], interpolated linearly
/// between the two steps that bracket it (the ratio is 1 at zero current by definition).
pub fn knee(rows: &[RampRow], m0: f64, slope: f64) -> Option<f64> {
    let ratio = |r: &RampRow| (r.dipole_moment_Am2 - m0) / (slope * r.current_A);
    let mut last: Option<(f64, f64)> = Some((0.0, 1.0));
    for r in rows {
        let q = ratio(r);
        if q <= KNEE_RATIO {
            return Some(match last {
                Some((i0, q0)) if q0 > q => i0 + (r.current_A - i0) * (q0 - KNEE_RATIO) / (q0 - q),
                _ => r.current_A,
            });
        }
        last = Some((r.current_A, q));
    }
    None
}

/// The curve as CSV (SI units in the header).
pub fn csv(r: &RampResult) -> String {
    let mut s = String::from(
        "current_A,dipole_moment_Am2,core_dipole_moment_Am2,apparent_gain,peak_core_b_T,saturated_fraction,incremental_inductance_H,apparent_inductance_H,newton_iterations\n",
    );
    let opt = |v: Option<f64>| v.map_or(String::new(), |x| format!("{x:.9e}"));
    for row in &r.rows {
        let _ = writeln!(
            s,
            "{:.9e},{:.9e},{:.9e},{},{},{},{:.9e},{:.9e},{}",
            row.current_A,
            row.dipole_moment_Am2,
            row.core_dipole_moment_Am2,
            opt(row.apparent_gain),
            opt(row.peak_core_b_T),
            opt(row.saturated_fraction),
            row.incremental_inductance_H,
            row.apparent_inductance_H,
            row.newton_iterations
        );
    }
    s
}

/// A readable account of the curve.
pub fn summary(r: &RampResult) -> String {
    let mut s = String::new();
    let _ = writeln!(
        s,
        "{} — moment against current ({} nodes)",
        r.title, r.nodes
    );
    let _ = writeln!(
        s,
        "low-current slope        {:.6e} A·m²/A",
        r.low_current_slope_Am2_per_A
    );
    match r.knee_current_A {
        Some(i) => {
            let _ = writeln!(
                s,
                "knee current             {i:.6e} A  (moment 10 % below the low-current line)"
            );
            let step = r.rows.first().map_or(0.0, |p| p.current_A.abs());
            if i.abs() < 5.0 * step {
                let _ = writeln!(
                    s,
                    "                         (coarse: within five steps of zero; more --steps place it better)"
                );
            }
        }
        None => {
            let _ = writeln!(s, "knee current             not reached in this range");
        }
    }
    if let (Some(i), Some((words, at))) = (r.first_saturation_current_A, &r.first_saturation_at) {
        let _ = writeln!(
            s,
            "saturates first          at {i:.4e} A, in {words} (r, z) = ({:.4}, {:.4}) m",
            at[0], at[1]
        );
    }
    if let Some(last) = r.rows.last() {
        let line = r.zero_current_moment_Am2 + r.low_current_slope_Am2_per_A * last.current_A;
        let _ = writeln!(
            s,
            "at {:.4e} A               moment {:.6e} A·m², {:.1} % of the low-current line",
            last.current_A,
            last.dipole_moment_Am2,
            100.0 * last.dipole_moment_Am2 / line
        );
    }
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "{:>12} {:>14} {:>10} {:>10} {:>9} {:>12} {:>12} {:>4}",
        "current/A", "moment/A·m²", "gain", "peak B/T", "sat.frac", "L_inc/H", "L_app/H", "it"
    );
    let opt = |v: Option<f64>, p: usize| v.map_or("-".into(), |x| format!("{x:.p$}"));
    for row in &r.rows {
        let _ = writeln!(
            s,
            "{:>12.4e} {:>14.6e} {:>10} {:>10} {:>9} {:>12.4e} {:>12.4e} {:>4}",
            row.current_A,
            row.dipole_moment_Am2,
            opt(row.apparent_gain, 2),
            opt(row.peak_core_b_T, 4),
            opt(row.saturated_fraction, 4),
            row.incremental_inductance_H,
            row.apparent_inductance_H,
            row.newton_iterations
        );
    }
    let _ = writeln!(s);
    s.push_str(crate::report::CAUTIONS);
    s.push('\n');
    s
}
