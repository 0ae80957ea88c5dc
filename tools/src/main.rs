//! `axicore`: rod-core coil cases to dipole moment, fields and VTK maps.

use std::path::PathBuf;
use std::process::ExitCode;

use axicore::accuracy::{self, History};
use axicore::case::{builtin_materials, find_material, parse_case, read_case_file, Case};
use axicore::pipeline::{discretise, run, RunError, RunOptions};
use axicore::report::summary;
use axicore::units::{self, Dimension};
use axicore::{output, EXAMPLE_CASE, EXAMPLE_NAME};
use axicore::{ramp, ramp_plot};
use axicore_mesher::MeshError;
use axicore_solver::SolverError;
use clap::{Parser, Subcommand};

const EXAMPLES: &str = "\
Examples:
  axicore solve                                   solve the built-in torquer-rod example
  axicore solve cases/torquer-rod/case.toml --json
  axicore solve my.toml --vtk field.vtu           also write a VTK map of the field
  axicore solve my.toml --line 2mm,-60mm:2mm,60mm:121 --csv line.csv
  axicore solve my.toml --point 0,0 --point 5mm,36mm
  axicore solve my.toml --tolerance 1e-3 --history-svg err.svg
                                                  refine until the dipole error estimate ≤ 1e-3
  axicore mesh my.toml --vtk mesh.vtu             mesh only, print statistics
  axicore ramp --to 300mA --steps 30 --csv m.csv --svg m.svg
                                                  moment–current curve of the example
  axicore example > my.toml                       start a case from the example
  axicore materials                               list built-in materials
  axicore materials nickel-iron-80 --csv          print a material's B–H curve

Exit codes: 0 success, 1 failure, 2 bad input, 3 the nonlinear solve did not converge.";

/// Axisymmetric finite-element magnetostatics for rod-core coils: dipole moment per winding
/// on a finite core, fields, inductance, VTK maps.
#[derive(Parser)]
#[command(name = "axicore", version, about, after_help = EXAMPLES)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Mesh, solve and report a case (the built-in example when CASE is omitted).
    #[command(after_help = EXAMPLES)]
    Solve {
        /// Case file (TOML).
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
        /// (e.g. 1e-3); reports the estimate and the refinement history.
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
        /// Draw the --tolerance history (unknowns against estimated error) as an SVG plot.
        #[arg(long, value_name = "FILE", requires = "tolerance")]
        history_svg: Option<PathBuf>,
    },
    /// Mesh a case and print mesh statistics.
    Mesh {
        /// Case file (TOML); the built-in example when omitted.
        case: Option<PathBuf>,
        /// Write the mesh with region ids to this VTK XML file (.vtu).
        #[arg(long, value_name = "FILE")]
        vtk: Option<PathBuf>,
    },
    /// Moment against current: solve rising currents with continuation, find the knee.
    #[command(after_help = EXAMPLES)]
    Ramp {
        /// Case file (TOML); the built-in example when omitted.
        case: Option<PathBuf>,
        /// Final current of the first winding (others scale with it), e.g. "2 A".
        #[arg(long, value_name = "CURRENT")]
        to: String,
        /// Number of equal current steps.
        #[arg(long, default_value_t = 40)]
        steps: usize,
        /// Write the curve as CSV.
        #[arg(long, value_name = "FILE")]
        csv: Option<PathBuf>,
        /// Draw the curve as an SVG plot.
        #[arg(long, value_name = "FILE")]
        svg: Option<PathBuf>,
        /// Print the result as JSON instead of the summary.
        #[arg(long)]
        json: bool,
    },
    /// Print the built-in example case file.
    Example,
    /// List the built-in materials, or print one material's B–H curve.
    Materials {
        /// A built-in material name: print its curve.
        name: Option<String>,
        /// Print the curve as CSV (H in A/m, B in T).
        #[arg(long, requires = "name")]
        csv: bool,
    },
}

/// A failure with its exit code: 2 for bad input, 1 for anything else.
struct Failure {
    code: u8,
    message: String,
}

fn input_error(message: String) -> Failure {
    Failure { code: 2, message }
}

/// Writes a line to standard output; a closed pipe (`axicore … | head`) ends the program
/// quietly instead of panicking, as the reader wants no more.
macro_rules! emitln {
    ($($t:tt)*) => {
        emit_text(format!($($t)*) + "\n")
    };
}

/// As [`emitln!`], without the newline.
#[allow(unused_macros)]
macro_rules! emit {
    ($($t:tt)*) => {
        emit_text(format!($($t)*))
    };
}

fn emit_text(text: String) {
    use std::io::Write;
    let mut out = std::io::stdout().lock();
    if let Err(e) = out.write_all(text.as_bytes()).and_then(|_| out.flush()) {
        if e.kind() == std::io::ErrorKind::BrokenPipe {
            std::process::exit(0);
        }
        eprintln!("axicore: error: cannot write the output: {e}");
        std::process::exit(1);
    }
}

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) => {
            use clap::error::ErrorKind;
            if matches!(
                e.kind(),
                ErrorKind::DisplayHelp
                    | ErrorKind::DisplayVersion
                    | ErrorKind::DisplayHelpOnMissingArgumentOrSubcommand
            ) {
                e.exit();
            }
            // One line, as for every other input fault: clap's first line names the option
            // and the fault; its usage block and tips follow on further lines.
            let text = e.render().to_string();
            let mut lines = text.lines();
            let mut first = lines.next().unwrap_or("bad arguments").to_string();
            if first.ends_with(':') {
                // "the following required arguments were not provided:" lists them below.
                let listed: Vec<&str> = lines
                    .take_while(|l| !l.trim().is_empty())
                    .map(str::trim)
                    .collect();
                first = format!("{first} {}", listed.join(", "));
            }
            let first = first.strip_prefix("error: ").unwrap_or(&first);
            eprintln!("axicore: error: {first} (see axicore --help)");
            return ExitCode::from(2);
        }
    };
    match dispatch(cli) {
        Ok(()) => ExitCode::SUCCESS,
        Err(f) => {
            eprintln!("axicore: error: {}", f.message);
            ExitCode::from(f.code)
        }
    }
}

/// How a case is named in messages.
fn case_name(case: &Option<PathBuf>) -> String {
    case.as_ref()
        .map_or(EXAMPLE_NAME.to_string(), |p| p.display().to_string())
}

fn load(case: &Option<PathBuf>) -> Result<Case, Failure> {
    match case {
        Some(p) => read_case_file(p).map_err(|e| input_error(e.to_string())),
        None => parse_case(EXAMPLE_CASE, EXAMPLE_NAME).map_err(|e| input_error(e.to_string())),
    }
}

/// Largest `--threads` accepted.
const MAX_THREADS: usize = 1024;

fn parse_point(text: &str, what: &str) -> Result<[f64; 2], Failure> {
    let mut parts = text.split(',');
    let (Some(r), Some(z), None) = (parts.next(), parts.next(), parts.next()) else {
        return Err(input_error(format!("{what}: '{text}' must be R,Z")));
    };
    let parse = |t| {
        units::parse_supported(t, Dimension::Length)
            .map_err(|e| input_error(format!("{what}: {e}")))
    };
    let (r, z) = (parse(r)?, parse(z)?);
    if r < 0.0 {
        return Err(input_error(format!(
            "{what}: r = {r} m must not be negative"
        )));
    }
    Ok([r, z])
}

fn parse_line(text: &str) -> Result<([f64; 2], [f64; 2], usize), Failure> {
    let parts: Vec<&str> = text.split(':').collect();
    let [a, b, n] = parts[..] else {
        return Err(input_error(format!(
            "--line: '{text}' must be R0,Z0:R1,Z1:N"
        )));
    };
    let n: usize = n
        .trim()
        .parse()
        .ok()
        .filter(|&n| (2..=1_000_000).contains(&n))
        .ok_or_else(|| {
            input_error(format!(
                "--line: sample count '{n}' must be an integer from 2 to 1000000"
            ))
        })?;
    Ok((parse_point(a, "--line")?, parse_point(b, "--line")?, n))
}

/// Exit code of a failed run: 2 for a probe outside the mesh (bad input), 3 for a nonlinear
/// solve that did not converge, 1 otherwise.
fn run_failure(e: RunError, file: &str) -> Failure {
    if let RunError::Mesh(MeshError::TooManyNodes { limit, .. }) = &e {
        // Almost always a size given without its unit (plain numbers are metres) or a
        // fineness far too high: an input fault, reported with the keys to check.
        return input_error(format!(
            "{file}: mesh.max_nodes: the mesh would need more than {limit} nodes; check the units of the lengths (plain numbers are metres) and mesh.fineness"
        ));
    }
    if let RunError::Mesh(m) = &e {
        // The case passed validation, so its proportions are what the mesher cannot meet
        // (e.g. a 100 m × 1 µm spheroid: its tip is sharper than any triangle allows).
        return input_error(format!(
            "{file}: core and winding geometry: cannot be meshed: {m}; check the proportions of the core and windings (and mesh.min_angle)"
        ));
    }
    let code = match &e {
        RunError::Probe { .. } => 2,
        RunError::Solve(SolverError::NotConverged { .. }) => 3,
        _ => 1,
    };
    Failure {
        code,
        message: e.to_string(),
    }
}

fn materials(name: Option<String>, csv: bool) -> Result<(), Failure> {
    let Some(name) = name else {
        emitln!(
            "{:<18} {:>6} {:>9} {:>9}  source",
            "name",
            "Bs/T",
            "μ_initial",
            "μ_max"
        );
        for m in builtin_materials() {
            emitln!(
                "{:<18} {:>6} {:>9} {:>9}  {}",
                m.name,
                m.saturation_t,
                m.mu_initial,
                m.mu_max,
                m.note
            );
        }
        return Ok(());
    };
    let Some(m) = find_material(&name) else {
        let names: Vec<&str> = builtin_materials().iter().map(|m| m.name).collect();
        return Err(input_error(format!(
            "unknown material '{name}'; built-in: {}",
            names.join(", ")
        )));
    };
    let law = m.material();
    // Logarithmic sweep of H: the knee of a high-permeability alloy sits at a few A/m.
    let points: Vec<[f64; 2]> = std::iter::once([0.0, 0.0])
        .chain((0..=120).map(|i| {
            let h = 10f64.powf(-1.0 + 7.0 * i as f64 / 120.0);
            [h, law.b_of_h(h)]
        }))
        .collect();
    if csv {
        emit!("{}", axicore::bh_csv::write(&points));
    } else {
        emitln!("{} — {}", m.name, m.note);
        emitln!("{:>14} {:>10} {:>12}", "H/(A/m)", "B/T", "μr = B/μ0H");
        for p in points.iter().skip(1).step_by(6) {
            emitln!(
                "{:>14.4e} {:>10.5} {:>12.1}",
                p[0],
                p[1],
                p[1] / (axicore_solver::MU0 * p[0])
            );
        }
    }
    Ok(())
}

fn history_text(c: &History, tolerance: f64) -> String {
    let mut s = if c.stop == accuracy::Stop::ZeroMoment {
        "Error control: the moment is exactly zero (nothing drives the field); a relative error \
         is undefined, refinement stopped\n"
            .to_string()
    } else {
        format!(
        "Error control: estimated relative error of the dipole {:.2e} ({} the tolerance {tolerance:.1e})\n",
        c.estimated_relative_error,
        match c.stop {
            accuracy::Stop::Tolerance => "within",
            accuracy::Stop::NodeCap => "NOT within — the node cap stopped refinement;",
            accuracy::Stop::TimeCap => "NOT within — the time cap stopped refinement;",
            accuracy::Stop::ZeroMoment => "",
            accuracy::Stop::MeshUnchanged =>
                "NOT within — adaptive refinement left the mesh unchanged;",
        }
        )
    };
    s.push_str("  level      nodes   unknowns     dipole/A·m²   est. rel. error  order  Newton\n");
    for (k, l) in c.levels.iter().enumerate() {
        s.push_str(&format!(
            "  {:>5} {:>10} {:>10} {:>15.9e} {:>16} {:>6} {:>7}\n",
            k,
            l.nodes,
            l.unknowns,
            l.dipole_moment_Am2,
            l.estimated_relative_error
                .map_or("-".into(), |e| format!("{e:.2e}")),
            l.order.map_or("-".into(), |p| format!("{p:.2}")),
            l.newton_iterations
        ));
    }
    s.push('\n');
    s
}

fn history_plot(c: &History) -> Result<String, axicore::plot::PlotError> {
    use axicore::plot::{render_svg, Chart, Scale, Series};
    let pts: Vec<(f64, f64)> = c
        .levels
        .iter()
        .filter_map(|l| l.estimated_relative_error.map(|e| (l.unknowns as f64, e)))
        .collect();
    let chart = if pts.is_empty() {
        // A cap stopped refinement after one level: no estimate yet, so show the moment.
        Chart {
            title: "Dipole moment per refinement level (no error estimate yet)".into(),
            x_label: "unknowns".into(),
            y_label: "dipole moment / A·m²".into(),
            x_scale: Scale::Log10,
            y_scale: Scale::Linear,
            series: vec![Series::line(
                "levels",
                c.levels
                    .iter()
                    .map(|l| (l.unknowns as f64, l.dipole_moment_Am2))
                    .collect(),
            )
            .with_markers()],
            marks: Vec::new(),
        }
    } else {
        Chart {
            title: "Estimated relative error of the dipole moment".into(),
            x_label: "unknowns".into(),
            y_label: "estimated relative error".into(),
            x_scale: Scale::Log10,
            y_scale: Scale::Log10,
            series: vec![Series::line("refinement levels", pts).with_markers()],
            marks: Vec::new(),
        }
    };
    render_svg(&chart, 800, 500)
}

fn ramp_command(
    case: &Case,
    file: &str,
    to: &str,
    steps: usize,
    csv: Option<PathBuf>,
    svg: Option<PathBuf>,
    json: bool,
) -> Result<(), Failure> {
    let to = units::parse_supported(to, Dimension::Current)
        .map_err(|e| input_error(format!("--to: {e}")))?;
    if !(to.is_finite() && to > 0.0) {
        return Err(input_error(format!("--to: {to} A must be positive")));
    }
    if !(1..=10_000).contains(&steps) {
        return Err(input_error(format!(
            "--steps: {steps} must be from 1 to 10000"
        )));
    }
    let outputs: Vec<(&str, &std::path::Path)> = [("--csv", &csv), ("--svg", &svg)]
        .into_iter()
        .filter_map(|(o, p)| p.as_deref().map(|p| (o, p)))
        .collect();
    output::check_paths(&outputs, Some(std::path::Path::new(file))).map_err(input_error)?;
    if case.windings.first().is_none_or(|w| w.current == 0.0) {
        return Err(input_error(
            "ramp: the first winding must exist and carry a nonzero current (it sets the scale)"
                .into(),
        ));
    }
    let result = ramp::ramp(case, to, steps).map_err(|e| run_failure(e, file))?;
    let mut files = Vec::new();
    if let Some(path) = csv {
        files.push((path, ramp::csv(&result).into_bytes()));
    }
    if let Some(path) = svg {
        let text = ramp_plot::moment_current_svg(&result).map_err(|e| Failure {
            code: 1,
            message: e.to_string(),
        })?;
        files.push((path, text.into_bytes()));
    }
    output::write_all(&files).map_err(|m| Failure {
        code: 1,
        message: m,
    })?;
    if json {
        let mut v = serde_json::to_value(&result).map_err(|e| Failure {
            code: 1,
            message: e.to_string(),
        })?;
        add_cautions(&mut v);
        emitln!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
    } else {
        emit!("{}", ramp::summary(&result));
    }
    Ok(())
}

fn dispatch(cli: Cli) -> Result<(), Failure> {
    match cli.command {
        Command::Example => {
            emit!("{EXAMPLE_CASE}");
            Ok(())
        }
        Command::Materials { name, csv } => materials(name, csv),
        Command::Ramp {
            case,
            to,
            steps,
            csv,
            svg,
            json,
        } => ramp_command(&load(&case)?, &case_name(&case), &to, steps, csv, svg, json),
        Command::Mesh { case, vtk } => {
            let file = case_name(&case);
            if let Some(v) = &vtk {
                output::check_paths(&[("--vtk", v)], case.as_deref()).map_err(input_error)?;
            }
            let case = load(&case)?;
            let d = discretise(&case).map_err(|e| run_failure(e, &file))?;
            let mut st = d.mesh.stats();
            (st.min_angle_deg, st.max_aspect_ratio) =
                axicore::pipeline::corner_quality(&d.problem.mesh);
            emitln!("{}", case.title);
            let fe_nodes = d.problem.mesh.nodes.len();
            if d.problem.mesh.order() == 2 {
                emitln!(
                    "nodes          {fe_nodes} (second order: {} corners, {} mid-edge)",
                    st.nodes,
                    fe_nodes - st.nodes
                );
            } else {
                emitln!("nodes          {fe_nodes} (first order)");
            }
            emitln!("triangles      {}", st.triangles);
            for (tag, n) in &st.triangles_per_tag {
                let name = match *tag {
                    0 => "air".to_string(),
                    1 => "core".to_string(),
                    k => format!("winding {}", k - 1),
                };
                emitln!("  region {tag} ({name}): {n}");
            }
            emitln!("smallest angle {:.2}°", st.min_angle_deg);
            emitln!("worst aspect   {:.3}", st.max_aspect_ratio);
            if let Some(path) = vtk {
                let region: Vec<i32> = d.problem.mesh.tags.iter().map(|&t| t as i32).collect();
                let bytes =
                    axicore_solver::export::vtk::vtu_bytes(&d.problem.mesh, &[], &[], &region)
                        .map_err(|e| Failure {
                            code: 1,
                            message: e.to_string(),
                        })?;
                output::write_all(&[(path, bytes)]).map_err(|m| Failure {
                    code: 1,
                    message: m,
                })?;
            }
            Ok(())
        }
        Command::Solve {
            case,
            json,
            vtk,
            line,
            csv,
            point,
            timings,
            threads,
            tolerance,
            max_nodes,
            max_seconds,
            refine,
            history_svg,
        } => {
            let file = case_name(&case);
            let outputs: Vec<(&str, &std::path::Path)> = [
                ("--vtk", &vtk),
                ("--csv", &csv),
                ("--history-svg", &history_svg),
            ]
            .into_iter()
            .filter_map(|(o, p)| p.as_deref().map(|p| (o, p)))
            .collect();
            output::check_paths(&outputs, case.as_deref()).map_err(input_error)?;
            if let Some(t) = max_seconds {
                if !(t.is_finite() && t > 0.0) {
                    return Err(input_error(format!(
                        "--max-seconds: {t} must be positive and finite"
                    )));
                }
            }
            let refine = match refine.as_str() {
                "uniform" => accuracy::Refine::Uniform,
                "adaptive" => accuracy::Refine::Adaptive,
                other => {
                    return Err(input_error(format!(
                        "--refine: '{other}' must be uniform or adaptive"
                    )))
                }
            };
            let case = load(&case)?;
            if let Some(t) = tolerance {
                if !(t.is_finite() && t > 0.0 && t < 1.0) {
                    return Err(input_error(format!(
                        "--tolerance: {t} must be a relative error between 0 and 1"
                    )));
                }
            }
            let mut opts = RunOptions {
                vtk: vtk.is_some(),
                ..Default::default()
            };
            for p in &point {
                opts.points.push(parse_point(p, "--point")?);
            }
            if let Some(l) = &line {
                opts.line = Some(parse_line(l)?);
            }
            let work = || -> Result<(axicore::pipeline::Outcome, Option<History>), RunError> {
                match tolerance {
                    Some(t) => {
                        let caps = accuracy::Caps {
                            max_nodes: max_nodes.unwrap_or(2_000_000),
                            max_seconds,
                        };
                        let c = accuracy::run_to_tolerance(&case, &opts, t, caps, refine)?;
                        Ok((c.outcome, Some(c.history)))
                    }
                    None => Ok((run(&case, &opts)?, None)),
                }
            };
            let outcome = match threads {
                // (A pool larger than this only costs start-up time: 1024 threads take ~6 s
                // on the example, against 0.2 s for 2.)
                Some(n) if !(1..=MAX_THREADS).contains(&n) => {
                    return Err(input_error(format!(
                        "--threads: {n} must be from 1 to {MAX_THREADS}"
                    )))
                }
                Some(n) => rayon::ThreadPoolBuilder::new()
                    .num_threads(n)
                    .build()
                    .map_err(|e| Failure {
                        code: 1,
                        message: e.to_string(),
                    })?
                    .install(work),
                None => work(),
            }
            .map_err(|e| run_failure(e, &file))?;
            let (outcome, controlled) = outcome;
            let mut files = Vec::new();
            if let (Some(path), Some(c)) = (history_svg, &controlled) {
                let svg = history_plot(c).map_err(|e| Failure {
                    code: 1,
                    message: e.to_string(),
                })?;
                files.push((path, svg.into_bytes()));
            }
            if let (Some(path), Some(bytes)) = (vtk, outcome.vtk) {
                files.push((path, bytes));
            }
            if let (Some(path), Some(text)) = (csv, outcome.line_csv) {
                files.push((path, text.into_bytes()));
            }
            output::write_all(&files).map_err(|m| Failure {
                code: 1,
                message: m,
            })?;
            if json {
                let mut v = serde_json::to_value(&outcome.report).map_err(|e| Failure {
                    code: 1,
                    message: e.to_string(),
                })?;
                if let Some(c) = &controlled {
                    v["estimated_relative_error"] = serde_json::json!(c.estimated_relative_error);
                    v["tolerance"] = serde_json::json!(tolerance);
                    v["tolerance_reached"] = serde_json::json!(c.reached);
                    v["refinement_stopped_by"] = serde_json::to_value(c.stop).unwrap_or_default();
                    v["convergence_history"] = serde_json::to_value(&c.levels).unwrap_or_default();
                }
                if timings {
                    v["timings_s"] =
                        serde_json::to_value(outcome.report.timings_s).map_err(|e| Failure {
                            code: 1,
                            message: e.to_string(),
                        })?;
                }
                add_cautions(&mut v);
                emitln!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
            } else {
                if let Some(c) = &controlled {
                    emit!("{}", history_text(c, tolerance.unwrap_or(0.0)));
                }
                emit!("{}", summary(&outcome.report, timings));
            }
            Ok(())
        }
    }
}

/// Adds the summary's cautions to a JSON report as `cautions` (one line): a report read by
/// another program carries them too.
fn add_cautions(v: &mut serde_json::Value) {
    let text = axicore::report::CAUTIONS
        .trim_start_matches("Cautions: ")
        .split_whitespace()
        .collect::<Vec<_>>()
        .join(" ");
    v["cautions"] = serde_json::json!(text);
}
