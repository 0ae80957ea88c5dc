//! `axicore solve`: mesh, solve and report one case, optionally to a requested accuracy.

use std::path::PathBuf;

use clap::Args;

use super::args::{self, case_name, load, parse_line, parse_point};
use super::failure::{run_failure, EXIT_OK, EXIT_TOLERANCE_MISSED};
use super::{emit, Failure};
use crate::accuracy::{self, History};
use crate::output;
use crate::pipeline::{run, Outcome, RunError, RunOptions};
use crate::plot::field_map::{FieldMapOptions, MapScale, PictureFormat};
use crate::plot::history::history_svg;
use crate::plot::view::Window;
use crate::progress::Progress;
use crate::report::format::digits_for;
use crate::report::{history_text, summary, to_json};
use crate::units::{self, Dimension};

/// Options of `axicore solve`.
#[derive(Args, Debug)]
pub struct SolveArgs {
    /// Case file (TOML); the built-in example when omitted.
    case: Option<PathBuf>,
    /// Print the results as JSON instead of the summary.
    #[arg(long)]
    json: bool,
    /// Write the mesh and field to this VTK XML file (.vtu).
    #[arg(long, value_name = "FILE")]
    vtk: Option<PathBuf>,
    /// Sample B and H along a line "R0,Z0:R1,Z1:N" (lengths in m or with units).
    #[arg(long, value_name = "R0,Z0:R1,Z1:N", requires = "csv")]
    line: Option<String>,
    /// CSV file for the --line samples.
    #[arg(long, value_name = "FILE", requires = "line")]
    csv: Option<PathBuf>,
    /// Report B and H at a point "R,Z" (repeatable).
    #[arg(long, value_name = "R,Z")]
    point: Vec<String>,
    /// Show stage timings (in the summary, or as timings_s in JSON).
    #[arg(long)]
    timings: bool,
    /// Worker threads for element loops (default: all cores).
    #[arg(long)]
    threads: Option<usize>,
    /// Refine until the estimated relative error of the dipole moment is at most this
    /// (e.g. 1e-3); reports the estimate and the refinement history. Exit code 4 when a cap
    /// stops refinement first.
    #[arg(long, value_name = "REL")]
    tolerance: Option<f64>,
    /// Node cap for --tolerance (default 2000000).
    #[arg(long, value_name = "N", requires = "tolerance")]
    max_nodes: Option<usize>,
    /// Wall-time cap for --tolerance, seconds (makes the result machine-dependent).
    #[arg(long, value_name = "S", requires = "tolerance")]
    max_seconds: Option<f64>,
    /// Refinement between --tolerance levels: "uniform" (default) or "adaptive".
    #[arg(
        long,
        value_name = "MODE",
        requires = "tolerance",
        default_value = "uniform"
    )]
    refine: String,
    /// Draw a field-map picture (|B| colour map, flux lines, outlines) to FILE.png or FILE.svg.
    #[arg(long, value_name = "FILE")]
    picture: Option<PathBuf>,
    /// Window of the picture "R0,R1,Z0,Z1" (lengths with units; default: core and windings
    /// with a margin).
    #[arg(long, value_name = "R0,R1,Z0,Z1", requires = "picture")]
    picture_window: Option<String>,
    /// Draw the full section (mirrored about the axis) instead of the half-plane.
    #[arg(long, requires = "picture")]
    picture_mirror: bool,
    /// Colour scale of |B|: "log" (default) or "linear".
    #[arg(
        long,
        value_name = "SCALE",
        requires = "picture",
        default_value = "log"
    )]
    picture_scale: String,
    /// Picture width in pixels.
    #[arg(long, value_name = "PX", requires = "picture", default_value_t = 800)]
    picture_width: u32,
    /// Draw the --tolerance history (error against unknowns, moment per level) as an SVG plot.
    #[arg(long, value_name = "FILE", requires = "tolerance")]
    history_svg: Option<PathBuf>,
}

/// Runs `axicore solve`; returns the exit code.
pub fn solve(a: SolveArgs, quiet: bool) -> Result<u8, Failure> {
    let file = case_name(a.case.as_deref());
    let outputs = args::outputs(&[
        ("--vtk", &a.vtk),
        ("--csv", &a.csv),
        ("--history-svg", &a.history_svg),
        ("--picture", &a.picture),
    ]);
    args::check_outputs(&outputs, a.case.as_deref())?;
    if let Some(t) = a.max_seconds {
        if !(t.is_finite() && t > 0.0) {
            return Err(Failure::input(format!(
                "--max-seconds: {t} must be positive and finite"
            )));
        }
    }
    let refine = match a.refine.as_str() {
        "uniform" => accuracy::Refine::Uniform,
        "adaptive" => accuracy::Refine::Adaptive,
        other => {
            return Err(Failure::input(format!(
                "--refine: '{other}' must be uniform or adaptive"
            )))
        }
    };
    let case = load(a.case.as_deref())?;
    if let Some(t) = a.tolerance {
        if !(t.is_finite() && t > 0.0 && t < 1.0) {
            return Err(Failure::input(format!(
                "--tolerance: {t} must be a relative error between 0 and 1"
            )));
        }
    }
    let mut opts = RunOptions {
        vtk: a.vtk.is_some(),
        picture: picture_options(&a)?,
        ..Default::default()
    };
    for p in &a.point {
        opts.points.push(parse_point(p, "--point")?);
    }
    if let Some(l) = &a.line {
        opts.line = Some(parse_line(l)?);
    }
    let (tolerance, max_nodes, max_seconds) = (a.tolerance, a.max_nodes, a.max_seconds);
    let work = || -> Result<(Outcome, Option<History>), RunError> {
        match tolerance {
            Some(t) => {
                let caps = accuracy::Caps {
                    max_nodes: max_nodes.unwrap_or(2_000_000),
                    max_seconds,
                };
                let bar = Progress::new(None, "refining", quiet);
                let c =
                    accuracy::run_to_tolerance_observed(&case, &opts, t, caps, refine, &mut |l| {
                        bar.message(format!(
                            "level with {} unknowns, estimated error {}",
                            l.unknowns,
                            l.estimated_relative_error
                                .map_or("-".into(), |e| format!("{e:.1e}"))
                        ))
                    })?;
                Ok((c.outcome, Some(c.history)))
            }
            None => Ok((run(&case, &opts)?, None)),
        }
    };
    let (outcome, controlled) =
        args::with_threads(a.threads, work)?.map_err(|e| run_failure(e, &case, &file))?;

    let mut files = Vec::new();
    if let (Some(path), Some(c)) = (a.history_svg, &controlled) {
        let svg = history_svg(c, tolerance.unwrap_or(0.0)).map_err(Failure::other)?;
        files.push((path, svg.into_bytes()));
    }
    if let (Some(path), Some(bytes)) = (a.vtk, outcome.vtk) {
        files.push((path, bytes));
    }
    if let (Some(path), Some(bytes)) = (a.picture, outcome.picture) {
        files.push((path, bytes));
    }
    if let (Some(path), Some(text)) = (a.csv, outcome.line_csv) {
        files.push((path, text.into_bytes()));
    }
    output::write_all(&files).map_err(Failure::other)?;

    let controlled = controlled.as_ref().zip(tolerance);
    if a.json {
        let v = to_json(&outcome.report, controlled, a.timings).map_err(Failure::other)?;
        emit(&(serde_json::to_string_pretty(&v).map_err(Failure::other)? + "\n"));
    } else {
        let mut text = String::new();
        if let Some((c, t)) = controlled {
            text.push_str(&history_text(c, t));
        }
        let digits = digits_for(controlled.map(|(c, _)| c.estimated_relative_error));
        text.push_str(&summary(&outcome.report, a.timings, digits));
        emit(&text);
    }
    match controlled {
        Some((c, t)) if !c.reached => {
            eprintln!(
                "axicore: warning: the tolerance {t:.1e} was not reached (estimated relative error {:.2e}, stopped by {}); exit code {EXIT_TOLERANCE_MISSED}",
                c.estimated_relative_error,
                c.stop.words()
            );
            Ok(EXIT_TOLERANCE_MISSED)
        }
        _ => Ok(EXIT_OK),
    }
}

/// The field-map options asked for, checked before any work.
fn picture_options(a: &SolveArgs) -> Result<Option<FieldMapOptions>, Failure> {
    let Some(path) = &a.picture else {
        return Ok(None);
    };
    let fault = |e: &dyn std::fmt::Display| Failure::input(format!("--picture: {e}"));
    let mut o = FieldMapOptions {
        format: PictureFormat::from_path(path).map_err(|e| fault(&e))?,
        width_px: a.picture_width,
        mirror: a.picture_mirror,
        ..Default::default()
    };
    o.scale = match a.picture_scale.as_str() {
        "log" => MapScale::Log,
        "linear" => MapScale::Linear,
        other => {
            return Err(Failure::input(format!(
                "--picture-scale: '{other}' must be log or linear"
            )))
        }
    };
    if let Some(w) = &a.picture_window {
        let v: Vec<&str> = w.split(',').collect();
        let [r0, r1, z0, z1] = v[..] else {
            return Err(Failure::input(format!(
                "--picture-window: '{w}' must be R0,R1,Z0,Z1"
            )));
        };
        let len = |t: &str| {
            units::parse_supported(t, Dimension::Length)
                .map_err(|e| Failure::input(format!("--picture-window: {e}")))
        };
        o.window = Some(Window {
            r0: len(r0)?,
            r1: len(r1)?,
            z0: len(z0)?,
            z1: len(z1)?,
        });
    }
    o.validate().map_err(|e| fault(&e))?;
    Ok(Some(o))
}
