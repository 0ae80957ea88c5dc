//! The `axicore` command line: one file per subcommand, each a function from its parsed
//! options to an exit code; this file parses the arguments and dispatches.

use std::process::ExitCode;

use clap::{Parser, Subcommand};

mod args;
mod demag;
mod emit;
mod example;
mod failure;
mod materials;
mod mesh;
mod moment;
mod ramp;
mod solve;
mod sweep;

pub use emit::emit;
pub use failure::{
    run_failure, Failure, EXIT_BAD_INPUT, EXIT_FAILURE, EXIT_NOT_CONVERGED, EXIT_OK,
    EXIT_POINTS_FAILED, EXIT_TOLERANCE_MISSED,
};
pub use materials::curve_points;

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
  axicore sweep my.toml --vary core.length=50mm..100mm:6 --values core.mu_r=1000,10000 --out s.csv
                                                  12 solves into one CSV (rerun resumes)
  axicore demag --out demag.csv --json demag.json --plots plots/
                                                  Nm, Nf of rods over L/D and χ vs the formulas
  axicore demag my.toml                           the same verdict for the core of a case
  axicore moment my.toml --tolerance 1e-8         dipole moment of a linear case to 1e-8
                                                  (elements of rising degree)
  axicore example > my.toml                       start a case from the example
  axicore materials                               list built-in materials
  axicore materials nickel-iron-80 --csv          print a material's B–H curve

Exit codes: 0 success, 1 failure, 2 bad input, 3 the nonlinear solve did not converge,
4 --tolerance not reached (the result is printed, flagged), 5 some sweep points failed.";

/// The short usage line printed when no subcommand is given.
const USAGE: &str =
    "usage: axicore <solve|mesh|ramp|sweep|merge|demag|moment|example|materials> [CASE] [OPTIONS] (axicore --help for more)";

/// Axisymmetric finite-element magnetostatics for rod-core coils: dipole moment per winding
/// on a finite core, fields, inductance, VTK maps.
#[derive(Parser)]
#[command(name = "axicore", version, about, after_help = EXAMPLES)]
struct Cli {
    /// No progress bars (they are shown only on a terminal anyway).
    #[arg(long, short, global = true)]
    quiet: bool,
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Mesh, solve and report a case (the built-in example when CASE is omitted).
    #[command(after_help = EXAMPLES)]
    Solve(solve::SolveArgs),
    /// Mesh a case and print mesh statistics.
    Mesh(mesh::MeshArgs),
    /// Moment against current: solve rising currents with continuation, find the knee.
    #[command(after_help = EXAMPLES)]
    Ramp(ramp::RampArgs),
    /// Solve a grid of variants of a case (keys varied over ranges or lists) into one CSV.
    Sweep(sweep::SweepArgs),
    /// Join the shard files of a sweep into the file the unsharded sweep writes.
    Merge(sweep::MergeArgs),
    /// Demagnetizing factors Nm and Nf over a grid of L/D, χ and bore (or of one case's
    /// core), against the formulas users substitute for them.
    Demag(demag::DemagArgs),
    /// The dipole moment of a linear case to a tolerance, by elements of rising degree.
    Moment(moment::MomentArgs),
    /// Print the built-in example case file.
    Example,
    /// List the built-in materials, or print or draw one material's B–H curve.
    Materials(materials::MaterialsArgs),
}

/// Parses the process arguments, runs the command and returns its exit code; every failure
/// is one line on standard error.
pub fn main() -> ExitCode {
    if std::env::args_os().len() <= 1 {
        eprintln!("{USAGE}");
        return ExitCode::from(EXIT_BAD_INPUT);
    }
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) => return argument_fault(e),
    };
    let quiet = cli.quiet;
    let result = match cli.command {
        Command::Solve(a) => solve::solve(a, quiet),
        Command::Mesh(a) => mesh::mesh(a),
        Command::Ramp(a) => ramp::ramp(a, quiet),
        Command::Sweep(a) => sweep::sweep(a, quiet),
        Command::Merge(a) => sweep::merge_shards(a),
        Command::Demag(a) => demag::demag(a, quiet),
        Command::Moment(a) => moment::moment(a, quiet),
        Command::Example => example::example(),
        Command::Materials(a) => materials::materials(a),
    };
    match result {
        Ok(code) => ExitCode::from(code),
        Err(f) => {
            eprintln!("axicore: error: {}", f.message);
            ExitCode::from(f.code)
        }
    }
}

/// An argument-parser fault as one line: clap's first line names the option and the fault;
/// its "tip" lines (a similar subcommand or option) are kept on that line, its usage block
/// dropped.
fn argument_fault(e: clap::Error) -> ExitCode {
    use clap::error::ErrorKind;
    if matches!(e.kind(), ErrorKind::DisplayHelp | ErrorKind::DisplayVersion) {
        e.exit();
    }
    if e.kind() == ErrorKind::DisplayHelpOnMissingArgumentOrSubcommand {
        eprintln!("{USAGE}");
        return ExitCode::from(EXIT_BAD_INPUT);
    }
    eprintln!("axicore: error: {} (see axicore --help)", one_line(&e));
    ExitCode::from(EXIT_BAD_INPUT)
}

/// clap's rendered error folded to one line.
fn one_line(e: &clap::Error) -> String {
    let text = e.render().to_string();
    let mut lines = text.lines();
    let mut first = lines.next().unwrap_or("bad arguments").to_string();
    let rest: Vec<&str> = lines.map(str::trim).collect();
    if first.ends_with(':') {
        // "the following required arguments were not provided:" lists them below.
        let listed: Vec<&str> = rest.iter().copied().take_while(|l| !l.is_empty()).collect();
        first = format!("{first} {}", listed.join(", "));
    }
    let tips: Vec<&str> = rest
        .iter()
        .filter_map(|l| l.strip_prefix("tip: "))
        .filter(|t| !t.starts_with("to pass"))
        .collect();
    let first = first.strip_prefix("error: ").unwrap_or(&first).to_string();
    if tips.is_empty() {
        first
    } else {
        format!("{first}; {}", tips.join("; "))
    }
}
