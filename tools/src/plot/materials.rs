//! A material's law as an SVG plot: B(H) and the secant permeability μr(H) = B/(μ0 H).

use super::{render_svg_stack, Chart, PlotError, Scale, Series};

/// Two panels, 800 × 760 px, on a logarithmic H axis; `points` are (H in A/m, B in T), the
/// H = 0 point skipped.
pub fn bh_svg(name: &str, note: &str, points: &[[f64; 2]]) -> Result<String, PlotError> {
    let positive: Vec<[f64; 2]> = points.iter().copied().filter(|p| p[0] > 0.0).collect();
    let mut b = Chart::new(
        format!("{name}: B–H curve ({note})"),
        "field strength H / (A/m)",
        "flux density B / T",
    );
    b.x_scale = Scale::Log10;
    b.series.push(Series::line(
        "B(H)",
        positive.iter().map(|p| (p[0], p[1])).collect(),
    ));
    let mut mu = Chart::new(
        format!("{name}: relative permeability"),
        "field strength H / (A/m)",
        "μr = B/(μ0 H)",
    );
    (mu.x_scale, mu.y_scale) = (Scale::Log10, Scale::Log10);
    mu.series.push(Series::line(
        "secant μr",
        positive
            .iter()
            .map(|p| (p[0], p[1] / (axicore_solver::MU0 * p[0])))
            .collect(),
    ));
    render_svg_stack(&[b, mu], 800, 760)
}
