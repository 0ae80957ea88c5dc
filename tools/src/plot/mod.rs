//! SVG line charts for reports: moment–current curves and convergence histories.
//!
//! Text is measured with an embedded DejaVu Sans (`tools/assets`, Bitstream Vera licence), so a chart lays out
//! the same on a machine without system fonts; the SVG names the family `sans-serif` for the viewer to resolve.
//! Output depends only on the input, so reruns give byte-identical files that diff cleanly.

use std::sync::OnceLock;

use plotters::coord::ranged1d::{AsRangedCoord, Ranged, ValueFormatter};
use plotters::coord::Shift;
use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::{register_font, FontStyle};
use thiserror::Error;

pub mod colormap;
pub mod contour;
pub mod demag;
pub mod demag_map;
pub mod field_map;
pub mod field_map_case;
mod field_map_draw;
mod field_map_scene;
pub mod field_source;
pub mod history;
pub mod materials;
pub mod outline;
pub mod overlay;
pub mod ramp;
pub mod raster;
pub mod view;

const FONT_BYTES: &[u8] = include_bytes!("../../assets/DejaVuSans.ttf");
pub(crate) const FAMILY: &str = "sans-serif";
/// Smallest accepted chart, in pixels; below this the label areas leave no room to plot.
pub const MIN_SIZE: (u32, u32) = (240, 180);

/// Series colours in drawing order, chosen to stay apart in hue and lightness on white.
const PALETTE: [RGBColor; 6] = [
    RGBColor(24, 72, 140),  // deep blue
    RGBColor(196, 78, 38),  // burnt orange
    RGBColor(46, 128, 74),  // leaf green
    RGBColor(128, 60, 150), // violet
    RGBColor(170, 130, 20), // ochre
    RGBColor(30, 140, 160), // teal
];
const MARK_COLOUR: RGBColor = RGBColor(90, 90, 90);

/// One curve: a polyline through `points` (x, y), optionally dashed and with a dot at every point.
#[derive(Debug, Clone, PartialEq)]
pub struct Series {
    /// Legend text.
    pub label: String,
    /// Data points (x, y) in the caller's units, drawn in the given order.
    pub points: Vec<(f64, f64)>,
    /// Draw a dot at every point.
    pub markers: bool,
    /// Draw the line dashed, e.g. for an extrapolation.
    pub dashed: bool,
}

impl Series {
    /// A solid line without markers.
    pub fn line(label: impl Into<String>, points: Vec<(f64, f64)>) -> Self {
        Self {
            label: label.into(),
            points,
            markers: false,
            dashed: false,
        }
    }

    /// The same series with a dot at every point.
    pub fn with_markers(mut self) -> Self {
        self.markers = true;
        self
    }

    /// The same series drawn dashed.
    pub fn dashed(mut self) -> Self {
        self.dashed = true;
        self
    }
}

/// How an axis maps values to length.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Scale {
    /// Evenly spaced values.
    #[default]
    Linear,
    /// Evenly spaced decades; every value on this axis must be positive.
    Log10,
}

/// A labelled annotation: a vertical line at `x`, a horizontal line at `y`, or a dot at
/// (`x`, `y`).
#[derive(Debug, Clone, PartialEq)]
pub struct Mark {
    /// Text written beside the mark, e.g. "knee 0.12 A".
    pub label: String,
    /// Position on the x axis (`None` for a horizontal line).
    pub x: Option<f64>,
    /// Position on the y axis (`None` for a vertical line).
    pub y: Option<f64>,
}

impl Mark {
    /// A vertical line at `x`.
    pub fn vertical(label: impl Into<String>, x: f64) -> Self {
        Self {
            label: label.into(),
            x: Some(x),
            y: None,
        }
    }

    /// A horizontal line at `y`.
    pub fn horizontal(label: impl Into<String>, y: f64) -> Self {
        Self {
            label: label.into(),
            x: None,
            y: Some(y),
        }
    }

    /// A dot at (`x`, `y`).
    pub fn point(label: impl Into<String>, x: f64, y: f64) -> Self {
        Self {
            label: label.into(),
            x: Some(x),
            y: Some(y),
        }
    }
}

/// A chart: labelled axes (units are part of the label text), series and marks.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Chart {
    /// Caption above the plot.
    pub title: String,
    /// Horizontal axis label including its unit, e.g. "coil current I / A".
    pub x_label: String,
    /// Vertical axis label including its unit.
    pub y_label: String,
    /// Horizontal axis scale.
    pub x_scale: Scale,
    /// Vertical axis scale.
    pub y_scale: Scale,
    /// Curves, coloured in palette order.
    pub series: Vec<Series>,
    /// Annotations drawn over the curves.
    pub marks: Vec<Mark>,
}

impl Chart {
    /// An empty chart with linear axes.
    pub fn new(
        title: impl Into<String>,
        x_label: impl Into<String>,
        y_label: impl Into<String>,
    ) -> Self {
        Self {
            title: title.into(),
            x_label: x_label.into(),
            y_label: y_label.into(),
            ..Self::default()
        }
    }
}

/// Why a chart could not be drawn.
#[derive(Debug, Error, Clone, PartialEq)]
pub enum PlotError {
    /// The chart has no series.
    #[error("the chart has no series")]
    NoSeries,
    /// The series with this label has no points.
    #[error("series \"{0}\" has no points")]
    EmptySeries(String),
    /// More series than distinct palette colours.
    #[error("{0} series but only {max} distinct colours", max = PALETTE.len())]
    TooManySeries(usize),
    /// A coordinate is NaN or infinite.
    #[error("{item}: non-finite {axis} value at point {index}")]
    NonFinite {
        /// The series or mark, e.g. `series "FE"`.
        item: String,
        /// Axis of the bad coordinate.
        axis: char,
        /// Index of the point in its series (0 for a mark).
        index: usize,
    },
    /// A value on a logarithmic axis is zero or negative.
    #[error("{item}: {axis} = {value} at point {index} cannot go on a logarithmic axis")]
    NonPositiveOnLogAxis {
        /// The series or mark.
        item: String,
        /// The logarithmic axis.
        axis: char,
        /// Index of the point in its series (0 for a mark).
        index: usize,
        /// The offending value.
        value: f64,
    },
    /// The data on this axis span no drawable range (overflow or underflow).
    #[error("data on the {0} axis span no drawable range")]
    DegenerateRange(char),
    /// The requested width and height in pixels are below [`MIN_SIZE`].
    #[error("chart size {0}x{1} px is below the minimum {w}x{h} px", w = MIN_SIZE.0, h = MIN_SIZE.1)]
    TooSmall(u32, u32),
    /// The embedded font could not be registered.
    #[error("the embedded font could not be loaded")]
    Font,
    /// The drawing library reported an error.
    #[error("drawing failed: {0}")]
    Draw(String),
}

/// Draws `chart` as a `width` × `height` pixel SVG document.
pub fn render_svg(chart: &Chart, width: u32, height: u32) -> Result<String, PlotError> {
    if width < MIN_SIZE.0 || height < MIN_SIZE.1 {
        return Err(PlotError::TooSmall(width, height));
    }
    validate(chart)?;
    ensure_font()?;
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (width, height)).into_drawing_area();
        root.fill(&WHITE).map_err(draw_err)?;
        draw_scaled(&root, chart)?;
        root.present().map_err(draw_err)?;
    }
    Ok(svg)
}

/// Draws `charts` as panels stacked top to bottom in one `width` × `height` pixel SVG
/// document (each panel gets an equal share of the height).
pub fn render_svg_stack(charts: &[Chart], width: u32, height: u32) -> Result<String, PlotError> {
    let n = charts.len().max(1) as u32;
    if width < MIN_SIZE.0 || height / n < MIN_SIZE.1 {
        return Err(PlotError::TooSmall(width, height / n));
    }
    for chart in charts {
        validate(chart)?;
    }
    ensure_font()?;
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (width, height)).into_drawing_area();
        root.fill(&WHITE).map_err(draw_err)?;
        for (area, chart) in root.split_evenly((charts.len(), 1)).iter().zip(charts) {
            draw_scaled(area, chart)?;
        }
        root.present().map_err(draw_err)?;
    }
    Ok(svg)
}

/// Draws one chart in `area` with the axis scales it asks for.
fn draw_scaled(area: &DrawingArea<SVGBackend<'_>, Shift>, chart: &Chart) -> Result<(), PlotError> {
    let (x0, x1) = axis_range(chart, 'x', chart.x_scale)?;
    let (y0, y1) = axis_range(chart, 'y', chart.y_scale)?;
    match (chart.x_scale, chart.y_scale) {
        (Scale::Linear, Scale::Linear) => draw(area, chart, x0..x1, y0..y1),
        (Scale::Linear, Scale::Log10) => draw(area, chart, x0..x1, (y0..y1).log_scale()),
        (Scale::Log10, Scale::Linear) => draw(area, chart, (x0..x1).log_scale(), y0..y1),
        (Scale::Log10, Scale::Log10) => {
            draw(area, chart, (x0..x1).log_scale(), (y0..y1).log_scale())
        }
    }
}

fn draw_err<E: std::error::Error + Send + Sync>(e: DrawingAreaErrorKind<E>) -> PlotError {
    PlotError::Draw(e.to_string())
}

/// Registers the embedded font once per process; later calls only read the stored outcome.
pub(crate) fn ensure_font() -> Result<(), PlotError> {
    static REGISTERED: OnceLock<bool> = OnceLock::new();
    let ok =
        REGISTERED.get_or_init(|| register_font(FAMILY, FontStyle::Normal, FONT_BYTES).is_ok());
    ok.then_some(()).ok_or(PlotError::Font)
}

/// Every (kind, label, index, x, y) the axes must cover; a vertical mark has no y, a
/// horizontal one no x.
fn all_points(
    chart: &Chart,
) -> impl Iterator<Item = (&str, &str, usize, Option<f64>, Option<f64>)> {
    let series = chart.series.iter().flat_map(|s| {
        let at =
            |(i, &(x, y)): (usize, &(f64, f64))| ("series", s.label.as_str(), i, Some(x), Some(y));
        s.points.iter().enumerate().map(at)
    });
    let marks = chart
        .marks
        .iter()
        .map(|m| ("mark", m.label.as_str(), 0, m.x, m.y));
    series.chain(marks)
}

fn validate(chart: &Chart) -> Result<(), PlotError> {
    if chart.series.is_empty() {
        return Err(PlotError::NoSeries);
    } else if chart.series.len() > PALETTE.len() {
        return Err(PlotError::TooManySeries(chart.series.len()));
    }
    if let Some(s) = chart.series.iter().find(|s| s.points.is_empty()) {
        return Err(PlotError::EmptySeries(s.label.clone()));
    }
    for (kind, label, index, x, y) in all_points(chart) {
        for (axis, value, scale) in [('x', x, chart.x_scale), ('y', y, chart.y_scale)] {
            let Some(value) = value else { continue };
            if value.is_finite() && (scale == Scale::Linear || value > 0.0) {
                continue;
            }
            let item = format!("{kind} \"{label}\"");
            return Err(if value.is_finite() {
                PlotError::NonPositiveOnLogAxis {
                    item,
                    axis,
                    index,
                    value,
                }
            } else {
                PlotError::NonFinite { item, axis, index }
            });
        }
    }
    Ok(())
}

/// Data extent plus a 5 % margin each side (in decades on a log axis); a flat extent is widened around itself.
fn axis_range(chart: &Chart, axis: char, scale: Scale) -> Result<(f64, f64), PlotError> {
    let to_axis = |v: f64| if scale == Scale::Log10 { v.log10() } else { v };
    let values = all_points(chart).filter_map(|(_, _, _, x, y)| if axis == 'x' { x } else { y });
    let (lo, hi) = values
        .map(to_axis)
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| {
            (lo.min(v), hi.max(v))
        });
    let magnitude = lo.abs().max(hi.abs());
    let pad = if hi - lo > 1e-9 * magnitude {
        0.05 * (hi - lo)
    } else if scale == Scale::Log10 {
        0.1
    } else if magnitude > 0.0 {
        0.05 * magnitude
    } else {
        1.0
    };
    // A log axis runs over whole decades, so it always carries labelled decade ticks (a
    // narrow range otherwise showed none).
    let (a, b) = match scale {
        Scale::Linear => (lo - pad, hi + pad),
        Scale::Log10 => (
            10f64.powf((lo - pad).floor()),
            10f64.powf((hi + pad).ceil()),
        ),
    };
    let drawable = a.is_finite() && b.is_finite() && a < b && (scale == Scale::Linear || a > 0.0);
    drawable
        .then_some((a, b))
        .ok_or(PlotError::DegenerateRange(axis))
}

/// Tick text with about four significant digits; values below `span`·1e-9 are rounding noise around zero.
fn tick_label(v: f64, span: f64) -> String {
    let trim = |m: &str| match m.contains('.') {
        true => m.trim_end_matches('0').trim_end_matches('.').to_string(),
        false => m.to_string(),
    };
    let a = v.abs();
    if a <= span * 1e-9 || a == 0.0 {
        "0".to_string()
    } else if (1e-3..1e4).contains(&a) {
        // About four significant digits, more when the axis spans less than that resolves
        // (a moment converging in its fifth digit must not label every tick alike).
        let resolve = if span > 0.0 {
            (-(span / 10.0).log10()).ceil() as i32
        } else {
            0
        };
        let decimals = (3 - a.log10().floor() as i32).max(resolve).clamp(0, 9) as usize;
        trim(&format!("{v:.decimals$}"))
    } else {
        let s = format!("{v:.3e}");
        s.split_once('e')
            .map_or(s.clone(), |(m, e)| format!("{}e{e}", trim(m)))
    }
}

/// Rising curves that bend over (saturation) leave the lower right empty, falling ones the
/// upper right; the first series decides. The top edge is kept for vertical marks' labels.
fn legend_corner(chart: &Chart) -> SeriesLabelPosition {
    let pts = chart.series.first().map_or(&[][..], |s| &s.points[..]);
    match (pts.first(), pts.last()) {
        (Some(a), Some(b)) if b.1 < a.1 => SeriesLabelPosition::UpperRight,
        _ => SeriesLabelPosition::LowerRight,
    }
}

/// Draws axes, curves, marks and legend; generic so one body serves every pair of axis scales.
fn draw<XS, YS>(
    root: &DrawingArea<SVGBackend<'_>, Shift>,
    chart: &Chart,
    xs: XS,
    ys: YS,
) -> Result<(), PlotError>
where
    XS: AsRangedCoord<Value = f64>,
    YS: AsRangedCoord<Value = f64>,
    XS::CoordDescType: Ranged<ValueType = f64> + ValueFormatter<f64>,
    YS::CoordDescType: Ranged<ValueType = f64> + ValueFormatter<f64>,
{
    let mut ctx = ChartBuilder::on(root)
        .caption(&chart.title, (FAMILY, 20))
        .margin(12)
        .x_label_area_size(48)
        .y_label_area_size(78)
        .build_cartesian_2d(xs, ys)
        .map_err(draw_err)?;
    let (x_range, y_range) = (ctx.x_range(), ctx.y_range());
    let span = |scale, r: &std::ops::Range<f64>| match scale {
        Scale::Linear => r.end - r.start,
        Scale::Log10 => 0.0, // a log axis never shows zero
    };
    let (x_span, y_span) = (span(chart.x_scale, &x_range), span(chart.y_scale, &y_range));
    let x_fmt = move |v: &f64| tick_label(*v, x_span);
    let y_fmt = move |v: &f64| tick_label(*v, y_span);
    ctx.configure_mesh()
        .x_desc(chart.x_label.as_str())
        .y_desc(chart.y_label.as_str())
        .x_label_formatter(&x_fmt)
        .y_label_formatter(&y_fmt)
        .axis_desc_style((FAMILY, 15))
        .label_style((FAMILY, 13))
        .light_line_style(RGBColor(235, 235, 235))
        .bold_line_style(RGBColor(205, 205, 205))
        .draw()
        .map_err(draw_err)?;

    for (series, &colour) in chart.series.iter().zip(PALETTE.iter()) {
        let style = colour.stroke_width(2);
        let pts = series.points.iter().copied();
        let anno = if series.dashed {
            ctx.draw_series(DashedLineSeries::new(pts, 8u32, 5u32, style))
                .map_err(draw_err)?
        } else {
            ctx.draw_series(LineSeries::new(pts, style))
                .map_err(draw_err)?
        };
        let (dashed, markers) = (series.dashed, series.markers || series.points.len() == 1);
        // Legend glyph: a 24 px stroke in the series style (one 24 px dash when solid), dotted if the curve is.
        let dash = if dashed { 5u32 } else { 24u32 };
        anno.label(series.label.as_str()).legend(move |(lx, ly)| {
            let stroke = [(0, 0), (24, 0)];
            let dot = Circle::new((12, 0), if markers { 3 } else { 0 }, colour.filled());
            EmptyElement::at((lx, ly)) + DashedPathElement::new(stroke, dash, 3u32, style) + dot
        });
        if markers {
            let dots = series
                .points
                .iter()
                .map(|&p| Circle::new(p, 3, colour.filled()));
            ctx.draw_series(dots).map_err(draw_err)?;
        }
    }

    let text = TextStyle::from((FAMILY, 13).into_font()).color(&MARK_COLOUR);
    for mark in &chart.marks {
        let (anchor, offset) = match (mark.x, mark.y) {
            (Some(x), Some(y)) => {
                let dot = Circle::new((x, y), 4, MARK_COLOUR.filled());
                ctx.draw_series([dot]).map_err(draw_err)?;
                ((x, y), (7, -18))
            }
            (Some(x), None) => {
                let line = [(x, y_range.start), (x, y_range.end)];
                let dashes = DashedLineSeries::new(line, 6u32, 4u32, MARK_COLOUR.stroke_width(1));
                ctx.draw_series(dashes).map_err(draw_err)?;
                ((x, y_range.end), (5, 5))
            }
            (None, Some(y)) => {
                let line = [(x_range.start, y), (x_range.end, y)];
                let dashes = DashedLineSeries::new(line, 6u32, 4u32, MARK_COLOUR.stroke_width(1));
                ctx.draw_series(dashes).map_err(draw_err)?;
                ((x_range.start, y), (6, -17))
            }
            (None, None) => continue,
        };
        let label = EmptyElement::at(anchor) + Text::new(mark.label.clone(), offset, text.clone());
        ctx.draw_series([label]).map_err(draw_err)?;
    }

    ctx.configure_series_labels()
        .position(legend_corner(chart))
        .label_font((FAMILY, 14))
        .background_style(WHITE.mix(0.9))
        .border_style(RGBColor(160, 160, 160))
        .draw()
        .map_err(draw_err)?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Demo data only (an invented torquer-rod curve), not a reference.
    fn moment_chart() -> Chart {
        let fe: Vec<_> = (0..=10)
            .map(|k| (0.02 * f64::from(k), 3.0 * (f64::from(k) / 4.0).tanh()))
            .collect();
        let mut c = Chart::new("Moment vs current", "coil current I / A", "moment m / A·m²");
        let fit = vec![(0.0, 0.0), (0.2, 7.5)];
        c.series = vec![
            Series::line("FE", fe).with_markers(),
            Series::line("linear & <fit>", fit).dashed(),
        ];
        c.marks = vec![
            Mark::vertical("knee 0.08 A", 0.08),
            Mark::point("rated", 0.16, 2.9),
        ];
        c
    }

    /// Demo data only: error falling as 1/N over five refinements.
    fn convergence_chart() -> Chart {
        let pts = (0..6)
            .map(|k| (1e3 * 4f64.powi(k), 0.2 / 4f64.powi(k)))
            .collect();
        let mut c = Chart::new("Convergence", "unknowns N", "estimated relative error");
        (c.x_scale, c.y_scale) = (Scale::Log10, Scale::Log10);
        c.series = vec![Series::line("adaptive", pts).with_markers()];
        c
    }

    /// Which check rejected a value, on which axis and at which point; `None` if none did.
    fn rejected_at(c: &Chart) -> Option<(&'static str, char, usize)> {
        match render_svg(c, 500, 360) {
            Err(PlotError::NonFinite { axis, index, .. }) => Some(("non-finite", axis, index)),
            Err(PlotError::NonPositiveOnLogAxis { axis, index, .. }) => Some(("log", axis, index)),
            _ => None,
        }
    }

    /// True if every start tag has its end tag, properly nested (W3C XML 1.0, §2.1 well-formed documents).
    fn tags_balanced(svg: &str) -> bool {
        let mut open: Vec<&str> = Vec::new();
        for piece in svg.split('<').skip(1) {
            let (tag, _) = piece.split_once('>').unwrap_or(("/unclosed", ""));
            let name = tag.trim_start_matches('/').split_whitespace().next();
            if tag.starts_with('/') && open.pop() != name {
                return false;
            } else if !tag.starts_with('/') && !tag.ends_with('/') {
                open.extend(name);
            }
        }
        open.is_empty()
    }

    #[test]
    fn svg_is_balanced_with_svg_root_title_axis_labels_and_legend() {
        // Root element per W3C SVG 1.1, ch. 5; text is escaped per W3C XML 1.0, §2.4.
        for c in [moment_chart(), convergence_chart()] {
            let svg = render_svg(&c, 640, 420).expect("demo chart renders");
            assert!(svg.starts_with("<svg") && svg.trim_end().ends_with("</svg>"));
            assert!(tags_balanced(&svg));
            for text in [&c.title, &c.x_label, &c.y_label, &c.series[0].label] {
                assert!(svg.contains(text.as_str()), "missing {text:?}");
            }
        }
        let svg = render_svg(&moment_chart(), 640, 420).expect("demo chart renders");
        assert!(svg.contains("linear &amp; &lt;fit&gt;") && svg.contains("knee 0.08 A"));
    }

    #[test]
    fn same_chart_gives_byte_identical_svg() {
        for c in [moment_chart(), convergence_chart()] {
            assert_eq!(render_svg(&c, 500, 360), render_svg(&c, 500, 360));
        }
    }

    #[test]
    fn log_axis_rejects_zero_and_negative_values() {
        let mut c = convergence_chart();
        c.series[0].points[2].1 = 0.0;
        assert_eq!(rejected_at(&c), Some(("log", 'y', 2)));
        let mut c = moment_chart();
        c.x_scale = Scale::Log10; // the FE curve starts at I = 0
        assert_eq!(rejected_at(&c), Some(("log", 'x', 0)));
        let mut c = convergence_chart();
        c.marks.push(Mark::vertical("bad", -1.0));
        assert_eq!(rejected_at(&c), Some(("log", 'x', 0)));
    }

    #[test]
    fn nan_and_infinite_values_are_rejected() {
        let mut c = moment_chart();
        c.series[1].points[1].1 = f64::NAN;
        assert_eq!(rejected_at(&c), Some(("non-finite", 'y', 1)));
        let mut c = moment_chart();
        c.marks.push(Mark::point("far", f64::INFINITY, 1.0));
        assert_eq!(rejected_at(&c), Some(("non-finite", 'x', 0)));
    }

    #[test]
    fn empty_chart_empty_series_too_many_series_and_tiny_size_are_rejected() {
        let err = |c: &Chart, width, height| render_svg(c, width, height).unwrap_err();
        assert_eq!(err(&Chart::default(), 500, 360), PlotError::NoSeries);
        let mut c = moment_chart();
        c.series.push(Series::line("nothing", vec![]));
        assert_eq!(err(&c, 500, 360), PlotError::EmptySeries("nothing".into()));
        c.series = vec![Series::line("dot", vec![(0.0, 1.0)]); PALETTE.len() + 1];
        assert_eq!(
            err(&c, 500, 360),
            PlotError::TooManySeries(PALETTE.len() + 1)
        );
        assert_eq!(err(&moment_chart(), 10, 10), PlotError::TooSmall(10, 10));
    }

    #[test]
    fn flat_and_single_point_data_get_a_range_but_overflow_is_rejected() {
        let mut c = Chart::new("flat", "x / m", "y / T");
        c.series.push(Series::line("one point", vec![(2.0, 0.0)]));
        assert!(render_svg(&c, 300, 200).is_ok());
        (c.y_scale, c.series[0].points[0].1) = (Scale::Log10, 1e-3);
        assert!(render_svg(&c, 300, 200).is_ok());
        c.series[0].points = vec![(-f64::MAX, 1.0), (f64::MAX, 1.0)];
        assert_eq!(
            render_svg(&c, 300, 200),
            Err(PlotError::DegenerateRange('x'))
        );
    }

    #[test]
    fn tick_labels_are_short_and_snap_noise_to_zero() {
        assert_eq!(tick_label(0.30000000000000004, 1.0), "0.3");
        assert_eq!(tick_label(-1.1e-17, 1.0), "0");
        assert_eq!(tick_label(1500.0, 0.0), "1500");
        assert_eq!(tick_label(1e4, 0.0), "1e4");
        assert_eq!(tick_label(2.5e-6, 0.0), "2.5e-6");
    }
}
