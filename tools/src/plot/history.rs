//! The refinement history of an error-controlled solve as an SVG plot: the error against the
//! unknowns on log–log axes with the tolerance, and the moment per level below.

use super::{render_svg_stack, Chart, Mark, PlotError, Scale, Series};
use crate::accuracy::History;

/// Two panels, 800 × 760 px: estimated relative error (and each level's difference from the
/// finest) against unknowns with the tolerance as a line; the dipole moment per level.
pub fn history_svg(c: &History, tolerance: f64) -> Result<String, PlotError> {
    let unknowns = |k: usize| c.levels[k].unknowns as f64;
    let estimated: Vec<(f64, f64)> = c
        .levels
        .iter()
        .enumerate()
        .filter_map(|(k, l)| l.estimated_relative_error.map(|e| (unknowns(k), e)))
        .filter(|&(_, e)| e > 0.0)
        .collect();
    let finest = c.levels.last().map_or(0.0, |l| l.dipole_moment_Am2);
    let from_finest: Vec<(f64, f64)> = c.levels[..c.levels.len().saturating_sub(1)]
        .iter()
        .enumerate()
        .map(|(k, l)| {
            (
                unknowns(k),
                (l.dipole_moment_Am2 - finest).abs() / finest.abs(),
            )
        })
        .filter(|&(_, d)| d > 0.0 && d.is_finite())
        .collect();
    let mut error = Chart::new(
        "Relative error of the dipole moment per refinement level",
        "unknowns",
        "relative error",
    );
    (error.x_scale, error.y_scale) = (Scale::Log10, Scale::Log10);
    if !estimated.is_empty() {
        error
            .series
            .push(Series::line("estimated error", estimated).with_markers());
    }
    if !from_finest.is_empty() {
        error.series.push(
            Series::line("difference from the finest level", from_finest)
                .with_markers()
                .dashed(),
        );
    }
    if tolerance > 0.0 {
        error.marks.push(Mark::horizontal(
            format!("tolerance {tolerance:.0e}"),
            tolerance,
        ));
    }
    let mut moment = Chart::new(
        "Dipole moment per level",
        "unknowns",
        "dipole moment / A·m²",
    );
    moment.x_scale = Scale::Log10;
    moment.series.push(
        Series::line(
            "levels",
            (0..c.levels.len())
                .map(|k| (unknowns(k), c.levels[k].dipole_moment_Am2))
                .collect(),
        )
        .with_markers(),
    );
    let panels = if error.series.is_empty() {
        // One level only (a cap stopped refinement at once): no error to draw yet.
        vec![moment]
    } else {
        vec![error, moment]
    };
    let height = 380 * panels.len() as u32;
    render_svg_stack(&panels, 800, height)
}
