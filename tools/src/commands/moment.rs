//! `axicore moment`: the dipole moment of a case by hierarchical elements whose degree rises
//! until the moment's estimated error meets the tolerance (exponential convergence on exact
//! curved geometry with corner grading); saturating cores by Newton's method with continuation
//! from each degree to the next.

use std::path::PathBuf;
use std::time::Instant;

use clap::Args;

use super::args::{self, case_name, load, with_threads};
use super::failure::{
    run_failure, EXIT_FAILURE, EXIT_NOT_CONVERGED, EXIT_OK, EXIT_TOLERANCE_MISSED,
};
use super::{emit, Failure};
use crate::hp_geometry::{discretise_hp, first_degree, layers_for, P_MIN, SPLIT_FACTOR};
use crate::output;
use axicore_solver::export::hp_map::hp_field_map;
use axicore_solver::hp::adapt::{raise_degree_keeping_field, DegreeRun};
use axicore_solver::hp::sample::MIN_DIVISIONS;
use axicore_solver::NewtonSettings;

/// Highest degree offered: beyond it the round-off of the moment, not the discretisation,
/// limits (measured on the torquer rod: p = 8 at 5e-13).
pub const P_MAX: u32 = 10;

/// Options of `axicore moment`.
#[derive(Args, Debug)]
pub struct MomentArgs {
    /// Case file (TOML); the built-in example when omitted.
    case: Option<PathBuf>,
    /// Raise the degree until the estimated relative error of the moment is at most this.
    #[arg(long, value_name = "REL", default_value = "1e-6")]
    tolerance: f64,
    /// Highest polynomial degree (2 to 10).
    #[arg(long, value_name = "P", default_value_t = 8)]
    max_degree: u32,
    /// Print the result as JSON.
    #[arg(long)]
    json: bool,
    /// Write the field at the final degree to this VTK XML file (.vtu), sampled on linear
    /// sub-triangles (k × k per element, k ≥ the degree).
    #[arg(long, value_name = "FILE")]
    vtk: Option<PathBuf>,
    /// Worker threads for element loops (default: all cores).
    #[arg(long)]
    threads: Option<usize>,
}

/// Runs `axicore moment`.
pub fn moment(a: MomentArgs, _quiet: bool) -> Result<u8, Failure> {
    if !(a.tolerance.is_finite() && a.tolerance > 0.0 && a.tolerance < 1.0) {
        return Err(Failure::input(format!(
            "--tolerance: {} must be a relative error between 0 and 1",
            a.tolerance
        )));
    }
    if !(P_MIN + 2..=P_MAX).contains(&a.max_degree) {
        return Err(Failure::input(format!(
            "--max-degree: {} must be from {} to {P_MAX}",
            a.max_degree,
            P_MIN + 2
        )));
    }
    if let Some(v) = &a.vtk {
        args::check_outputs(&[("--vtk", v)], a.case.as_deref())?;
    }
    let name = case_name(a.case.as_deref());
    let mut case = load(a.case.as_deref())?;
    if case.mesh.corner_layers == 0 {
        case.mesh.corner_layers = layers_for(a.tolerance);
    }
    let start = Instant::now();
    let want_map = a.vtk.is_some();
    let (run, map, seconds) = with_threads(a.threads, || -> Result<_, Failure> {
        let (problem, curved) = discretise_hp(&case).map_err(|e| run_failure(e, &case, &name))?;
        let fault = |e: axicore_solver::SolverError| Failure {
            code: if matches!(e, axicore_solver::SolverError::NotConverged { .. }) {
                EXIT_NOT_CONVERGED
            } else {
                EXIT_FAILURE
            },
            message: format!("{name}: {e}"),
        };
        let (run, model, sol) = raise_degree_keeping_field(
            &problem,
            &curved,
            a.tolerance,
            first_degree(a.tolerance).min(a.max_degree - 2),
            a.max_degree,
            &NewtonSettings::default(),
        )
        .map_err(fault)?;
        let seconds = start.elapsed().as_secs_f64();
        let map = if want_map {
            let labels = crate::vtk_map::labels(&case);
            Some(hp_field_map(&model, &sol, MIN_DIVISIONS, &labels).map_err(fault)?)
        } else {
            None
        };
        Ok((run, map, seconds))
    })??;
    if let (Some(path), Some(bytes)) = (a.vtk, map) {
        output::write_all(&[(path, bytes)]).map_err(Failure::other)?;
    }
    let text = if a.json {
        json(&name, &run, a.tolerance, case.mesh.corner_layers, seconds)
    } else {
        summary(&name, &run, a.tolerance, case.mesh.corner_layers, seconds)
    };
    emit(&text);
    Ok(if run.reached {
        EXIT_OK
    } else {
        EXIT_TOLERANCE_MISSED
    })
}

fn summary(name: &str, run: &DegreeRun, tolerance: f64, layers: u32, seconds: f64) -> String {
    let mut s = format!(
        "axicore moment — {name}\nhierarchical elements of rising degree on exact curves, \
         corner grading {layers} layers (factor {SPLIT_FACTOR})\n\n  p   equations   Newton   moment (A·m²)        \
         estimate\n"
    );
    for st in &run.steps {
        s += &format!(
            "{:>3} {:>11} {:>8}   {:<20.13e} {}\n",
            st.degree,
            st.equations,
            st.newton_iterations,
            st.moment,
            st.estimate.map_or("—".to_string(), |e| format!("{e:.1e}"))
        );
    }
    let last = run.last();
    let est = last
        .estimate
        .map_or("none".to_string(), |e| format!("{e:.1e}"));
    s += &format!(
        "\ndipole moment        {:.12e} A·m²  (relative error estimate {est}, requested \
         {tolerance:.0e}{})\nsecond route          {:.12e} A·m²  (moment of the sources)\n\
         time                 {seconds:.3} s\n",
        last.moment,
        if run.reached { "" } else { ": NOT reached" },
        last.check,
    );
    s += "\nThe estimate is of the discretisation error of the model as posed (geometry, \
          B–H law, currents). Confirm designs by measurement; winding temperature, \
          insulation and the applicable standards are outside this model.\n";
    s
}

fn json(name: &str, run: &DegreeRun, tolerance: f64, layers: u32, seconds: f64) -> String {
    let last = run.last();
    let steps: Vec<serde_json::Value> = run
        .steps
        .iter()
        .map(|st| {
            serde_json::json!({
                "degree": st.degree,
                "equations": st.equations,
                "unknowns": st.unknowns,
                "dipole_moment_Am2": st.moment,
                "dipole_check_Am2": st.check,
                "estimate_rel": st.estimate,
                "newton_iterations": st.newton_iterations,
                "ratio": st.ratio,
            })
        })
        .collect();
    let v = serde_json::json!({
        "case": name,
        "tolerance": tolerance,
        "reached": run.reached,
        "corner_layers": layers,
        "degree": last.degree,
        "equations": last.equations,
        "dipole_moment_Am2": last.moment,
        "dipole_check_Am2": last.check,
        "estimate_rel": last.estimate,
        "seconds": seconds,
        "steps": steps,
    });
    format!("{}\n", serde_json::to_string_pretty(&v).unwrap_or_default())
}
