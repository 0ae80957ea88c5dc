//! `axicore`: rod-core coil cases to dipole moment, fields and VTK maps.

use std::path::PathBuf;
use std::process::ExitCode;

use axicore::case::{builtin_materials, parse_case, read_case_file, Case};
use axicore::pipeline::{discretise, run, RunOptions};
use axicore::report::summary;
use axicore::units::{self, Dimension};
use axicore::{output, EXAMPLE_CASE, EXAMPLE_NAME};
use clap::{Parser, Subcommand};

const EXAMPLES: &str = "\
Examples:
  axicore solve                                   solve the built-in torquer-rod example
  axicore solve cases/torquer-rod/case.toml --json
  axicore solve my.toml --vtk field.vtu           also write a VTK map of the field
  axicore solve my.toml --line 0,-60mm:0,60mm:121 --csv axis.csv
  axicore solve my.toml --point 0,0 --point 5mm,36mm
  axicore mesh my.toml --vtk mesh.vtu             mesh only, print statistics
  axicore example > my.toml                       start a case from the example
  axicore materials                               list built-in materials";

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
    },
    /// Mesh a case and print mesh statistics.
    Mesh {
        /// Case file (TOML); the built-in example when omitted.
        case: Option<PathBuf>,
        /// Write the mesh with region ids to this VTK XML file (.vtu).
        #[arg(long, value_name = "FILE")]
        vtk: Option<PathBuf>,
    },
    /// Print the built-in example case file.
    Example,
    /// List the built-in materials.
    Materials,
}

/// A failure with its exit code: 2 for bad input, 1 for anything else.
struct Failure {
    code: u8,
    message: String,
}

fn input_error(message: String) -> Failure {
    Failure { code: 2, message }
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    match dispatch(cli) {
        Ok(()) => ExitCode::SUCCESS,
        Err(f) => {
            eprintln!("axicore: error: {}", f.message);
            ExitCode::from(f.code)
        }
    }
}

fn load(case: &Option<PathBuf>) -> Result<Case, Failure> {
    match case {
        Some(p) => read_case_file(p).map_err(|e| input_error(e.to_string())),
        None => parse_case(EXAMPLE_CASE, EXAMPLE_NAME).map_err(|e| input_error(e.to_string())),
    }
}

fn parse_point(text: &str, what: &str) -> Result<[f64; 2], Failure> {
    let mut parts = text.split(',');
    let (Some(r), Some(z), None) = (parts.next(), parts.next(), parts.next()) else {
        return Err(input_error(format!("{what}: '{text}' must be R,Z")));
    };
    let r = units::parse(r, Dimension::Length).map_err(|e| input_error(format!("{what}: {e}")))?;
    let z = units::parse(z, Dimension::Length).map_err(|e| input_error(format!("{what}: {e}")))?;
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

fn dispatch(cli: Cli) -> Result<(), Failure> {
    match cli.command {
        Command::Example => {
            print!("{EXAMPLE_CASE}");
            Ok(())
        }
        Command::Materials => {
            println!("{:<18} {:>10}  note", "name", "mu_r");
            for m in builtin_materials() {
                println!("{:<18} {:>10}  {}", m.name, m.mu_r, m.note);
            }
            Ok(())
        }
        Command::Mesh { case, vtk } => {
            let case = load(&case)?;
            let d = discretise(&case).map_err(|e| Failure {
                code: 1,
                message: e.to_string(),
            })?;
            let st = d.mesh.stats();
            println!("{}", case.title);
            println!("nodes          {}", st.nodes);
            println!("triangles      {}", st.triangles);
            for (tag, n) in &st.triangles_per_tag {
                let name = match *tag {
                    0 => "air".to_string(),
                    1 => "core".to_string(),
                    k => format!("winding {}", k - 1),
                };
                println!("  region {tag} ({name}): {n}");
            }
            println!("smallest angle {:.2}°", st.min_angle_deg);
            println!("worst aspect   {:.3}", st.max_aspect_ratio);
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
        } => {
            let case = load(&case)?;
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
            let work = || run(&case, &opts);
            let outcome = match threads {
                Some(0) => return Err(input_error("--threads must be at least 1".into())),
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
            .map_err(|e| Failure {
                code: match e {
                    axicore::pipeline::RunError::Probe(_) => 2,
                    _ => 1,
                },
                message: e.to_string(),
            })?;
            let mut files = Vec::new();
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
                if timings {
                    v["timings_s"] =
                        serde_json::to_value(outcome.report.timings_s).map_err(|e| Failure {
                            code: 1,
                            message: e.to_string(),
                        })?;
                }
                println!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
            } else {
                print!("{}", summary(&outcome.report, timings));
            }
            Ok(())
        }
    }
}
