//! `axicore ramp`: the moment–current curve of a case, its knee and saturation onset.

use std::path::PathBuf;

use clap::Args;

use super::args::{self, case_name, load};
use super::failure::{run_failure, EXIT_OK};
use super::{emit, Failure};
use crate::output;
use crate::plot::ramp::moment_current_svg;
use crate::progress::Progress;
use crate::ramp::ramp_observed;
use crate::report::{add_cautions, ramp_csv, ramp_summary};
use crate::units::{self, Dimension};

/// Options of `axicore ramp`.
#[derive(Args, Debug)]
pub struct RampArgs {
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
}

/// Runs `axicore ramp`.
pub fn ramp(a: RampArgs, quiet: bool) -> Result<u8, Failure> {
    let file = case_name(a.case.as_deref());
    let case = load(a.case.as_deref())?;
    let to = units::parse_supported(&a.to, Dimension::Current)
        .map_err(|e| Failure::input(format!("--to: {e}")))?;
    if !(to.is_finite() && to > 0.0) {
        return Err(Failure::input(format!("--to: {to} A must be positive")));
    }
    if !(1..=10_000).contains(&a.steps) {
        return Err(Failure::input(format!(
            "--steps: {} must be from 1 to 10000",
            a.steps
        )));
    }
    let outputs = args::outputs(&[("--csv", &a.csv), ("--svg", &a.svg)]);
    args::check_outputs(&outputs, a.case.as_deref())?;
    case.check_rampable(&file).map_err(Failure::input)?;
    let result = {
        let bar = Progress::new(Some(a.steps as u64), "ramp", quiet);
        ramp_observed(&case, to, a.steps, &mut |k| bar.set(k as u64))
    }
    .map_err(|e| run_failure(e, &case, &file))?;

    let mut files = Vec::new();
    if let Some(path) = a.csv {
        files.push((path, ramp_csv(&result).into_bytes()));
    }
    if let Some(path) = a.svg {
        let text = moment_current_svg(&result).map_err(Failure::other)?;
        files.push((path, text.into_bytes()));
    }
    output::write_all(&files).map_err(Failure::other)?;
    if a.json {
        let mut v = serde_json::to_value(&result).map_err(Failure::other)?;
        add_cautions(&mut v);
        emit(&(serde_json::to_string_pretty(&v).map_err(Failure::other)? + "\n"));
    } else {
        emit(&ramp_summary(&result));
    }
    Ok(EXIT_OK)
}
