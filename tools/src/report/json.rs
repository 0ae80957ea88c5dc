//! The JSON record of a solve: the report's keys (SI units in the names), the error-control
//! history when asked, and the cautions.

use serde_json::{json, Value};

use super::Report;
use crate::accuracy::History;

/// The report as JSON; with `controlled`, the error-control keys; with `timings`, the stage
/// times (the only thing that varies run to run).
pub fn to_json(
    report: &Report,
    controlled: Option<(&History, f64)>,
    timings: bool,
) -> Result<Value, serde_json::Error> {
    let mut v = serde_json::to_value(report)?;
    if let Some((c, tolerance)) = controlled {
        v["estimated_relative_error"] = json!(c.estimated_relative_error);
        v["tolerance"] = json!(tolerance);
        v["tolerance_reached"] = json!(c.reached);
        v["refinement_stopped_by"] = serde_json::to_value(c.stop)?;
        v["convergence_history"] = serde_json::to_value(&c.levels)?;
    }
    if timings {
        v["timings_s"] = serde_json::to_value(report.timings_s)?;
    }
    add_cautions(&mut v);
    Ok(v)
}

/// Adds the summary's cautions to a JSON record as `cautions` (one line): a report read by
/// another program carries them too.
pub fn add_cautions(v: &mut Value) {
    let text = super::CAUTIONS
        .trim_start_matches("Cautions: ")
        .split_whitespace()
        .collect::<Vec<_>>()
        .join(" ");
    v["cautions"] = json!(text);
}
