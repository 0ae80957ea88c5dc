//! The moment–current curve as an SVG plot. (Being written: waits for the chart module.)

use crate::ramp::RampResult;

/// Draws the curve with the low-current line and the knee.
pub fn moment_current_svg(_r: &RampResult) -> Result<String, String> {
    Err("SVG plots are not available yet".into())
}
