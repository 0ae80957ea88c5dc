//! The moment–current curve as an SVG plot: the solved moments, the low-current straight line
//! they would follow without saturation, and the knee.

use super::{render_svg, Chart, Mark, PlotError, Scale, Series};
use crate::ramp::RampResult;
use crate::report::format::sig;

/// The polyline through `pts` (sorted in x) evaluated at `x`.
fn interpolate(pts: &[(f64, f64)], x: f64) -> f64 {
    pts.windows(2)
        .find(|w| (w[0].0 <= x && x <= w[1].0) || (w[1].0 <= x && x <= w[0].0))
        .map_or(pts.last().map_or(0.0, |p| p.1), |w| {
            let t = (x - w[0].0) / (w[1].0 - w[0].0);
            w[0].1 + t * (w[1].1 - w[0].1)
        })
}

/// Draws the curve with the low-current line and the knee (800 × 500 px).
pub fn moment_current_svg(r: &RampResult) -> Result<String, PlotError> {
    let mut fe: Vec<(f64, f64)> = vec![(0.0, r.zero_current_moment_Am2)];
    fe.extend(r.rows.iter().map(|p| (p.current_A, p.dipole_moment_Am2)));
    let i_max = r.rows.last().map_or(0.0, |p| p.current_A);
    // The straight line is drawn only up to where it leaves the plot by more than half again
    // the largest moment, so the saturating curve keeps its scale.
    let m_max = fe.iter().map(|p| p.1).fold(0.0, f64::max);
    let slope = r.low_current_slope_Am2_per_A;
    let i_line = if slope > 0.0 {
        i_max.min((1.5 * m_max - r.zero_current_moment_Am2) / slope)
    } else {
        i_max
    };
    let line = vec![
        (0.0, r.zero_current_moment_Am2),
        (i_line, r.zero_current_moment_Am2 + slope * i_line),
    ];
    let mut marks = Vec::new();
    if let Some(k) = r.knee_current_A {
        marks.push(Mark::vertical(format!("knee {} A", sig(k, 3)), k));
    }
    if let Some(o) = &r.saturation_onset {
        // The dot sits on the curve, interpolated like the onset current itself.
        let m = interpolate(&fe, o.current_A);
        marks.push(Mark::point(
            format!("90 % of B_sat at {} A", sig(o.current_A, 3)),
            o.current_A,
            m,
        ));
    }
    let chart = Chart {
        title: format!("{}: dipole moment against current", r.title),
        x_label: "current of the first winding / A".into(),
        y_label: "axial dipole moment / A·m²".into(),
        x_scale: Scale::Linear,
        y_scale: Scale::Linear,
        series: vec![
            Series::line("finite-element solution", fe).with_markers(),
            Series::line("zero-current slope (no saturation)", line).dashed(),
        ],
        marks,
    };
    render_svg(&chart, 800, 500)
}
