//! Drawing a computed field-map scene with plotters (bitmap or SVG back end) and encoding it.
//!
//! The colour map goes in as one image the size of the plotting area: blitted directly in the
//! bitmap, and in an SVG as a PNG data URI that replaces a placeholder rectangle (the SVG back
//! end has no image element without the `image` crate). The colour bar and its ticks are drawn
//! by hand so tick values sit exactly on the colours they name.

use base64::Engine as _;
use plotters::coord::Shift;
use plotters::prelude::*;

use super::colormap::{viridis, ColourScale};
use super::field_map_scene::{FieldMapError, Scene};
use super::overlay;
use super::FAMILY;

/// Fill of the plotting area in an SVG until the raster image replaces it.
const PLACEHOLDER: RGBColor = RGBColor(1, 2, 3);
const PLACEHOLDER_FILL: &str = "fill=\"#010203\"";
const TEXT: RGBColor = RGBColor(20, 20, 20);
/// Colour-bar geometry, px: gap after the plotting area, bar width, pointed-end height.
const BAR_GAP: i32 = 18;
const BAR_WIDTH: i32 = 18;
const BAR_POINT: i32 = 12;
/// Width of the y-axis label area inside the left margin, px.
const Y_LABELS: u32 = 58;

fn draw_err<E: std::error::Error + Send + Sync>(e: DrawingAreaErrorKind<E>) -> FieldMapError {
    FieldMapError::Draw(e.to_string())
}

/// The picture as PNG bytes.
pub(super) fn png(scene: &Scene) -> Result<Vec<u8>, FieldMapError> {
    let (w, h) = (scene.layout.width, scene.layout.height);
    let mut buf = vec![255u8; w as usize * h as usize * 3];
    {
        let root = BitMapBackend::with_buffer(&mut buf, (w, h)).into_drawing_area();
        draw(&root, scene, true)?;
        root.present().map_err(draw_err)?;
    }
    encode_png(&buf, w, h, &scene.caption.title)
}

/// The picture as an SVG document.
pub(super) fn svg(scene: &Scene) -> Result<String, FieldMapError> {
    let (w, h) = (scene.layout.width, scene.layout.height);
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (w, h)).into_drawing_area();
        draw(&root, scene, false)?;
        root.present().map_err(draw_err)?;
    }
    let (pw, ph) = scene.layout.plot;
    let image = encode_png(&scene.raster_rgb, pw, ph, "")?;
    let lines = overlay::svg(
        &scene.strokes,
        scene.layout.left as f64,
        scene.layout.top as f64,
    );
    embed_raster(&svg, &image, &lines)
}

/// 8-bit RGB rows → PNG, with the title as a text chunk.
fn encode_png(rgb: &[u8], w: u32, h: u32, title: &str) -> Result<Vec<u8>, FieldMapError> {
    let err = |e: png::EncodingError| FieldMapError::Draw(format!("PNG encoding: {e}"));
    let mut out = Vec::new();
    {
        let mut enc = png::Encoder::new(&mut out, w, h);
        enc.set_color(png::ColorType::Rgb);
        enc.set_depth(png::BitDepth::Eight);
        if !title.is_empty() {
            enc.add_itxt_chunk("Title".to_string(), title.to_string())
                .map_err(err)?;
        }
        let mut writer = enc.write_header().map_err(err)?;
        writer.write_image_data(rgb).map_err(err)?;
    }
    Ok(out)
}

/// Replaces the placeholder rectangle of the SVG by the PNG `image` at the same place,
/// followed by the `lines` drawn over it.
fn embed_raster(svg: &str, image: &[u8], lines: &str) -> Result<String, FieldMapError> {
    let missing = || FieldMapError::Draw("the SVG lost its plotting-area placeholder".into());
    let at = svg.find(PLACEHOLDER_FILL).ok_or_else(missing)?;
    let start = svg[..at].rfind("<rect").ok_or_else(missing)?;
    let end = at + svg[at..].find("/>").ok_or_else(missing)? + 2;
    let tag = &svg[start..end];
    let attr = |name: &str| {
        let key = format!(" {name}=\"");
        let i = tag.find(&key)? + key.len();
        Some(tag[i..i + tag[i..].find('"')?].to_string())
    };
    let (x, y, w, h) = (
        attr("x").ok_or_else(missing)?,
        attr("y").ok_or_else(missing)?,
        attr("width").ok_or_else(missing)?,
        attr("height").ok_or_else(missing)?,
    );
    let data = base64::engine::general_purpose::STANDARD.encode(image);
    let img = format!(
        "<image x=\"{x}\" y=\"{y}\" width=\"{w}\" height=\"{h}\" preserveAspectRatio=\"none\" \
         style=\"image-rendering:pixelated\" href=\"data:image/png;base64,{data}\"/>\n{lines}"
    );
    Ok(format!("{}{}{}", &svg[..start], img, &svg[end..]))
}

/// A value with an SI prefix and three significant digits, e.g. "1.23 µWb".
pub(super) fn si(v: f64, unit: &str) -> String {
    if v == 0.0 || !v.is_finite() {
        return format!("{v} {unit}");
    }
    let prefixes = [
        (1e-12, "p"),
        (1e-9, "n"),
        (1e-6, "µ"),
        (1e-3, "m"),
        (1.0, ""),
        (1e3, "k"),
    ];
    let (scale, p) = prefixes
        .iter()
        .rev()
        .find(|(s, _)| v.abs() >= *s)
        .copied()
        .unwrap_or(prefixes[0]);
    let x = v / scale;
    let decimals = (2 - x.abs().log10().floor() as i32).clamp(0, 2) as usize;
    let digits = format!("{x:.decimals$}");
    let digits = if digits.contains('.') {
        digits.trim_end_matches('0').trim_end_matches('.')
    } else {
        &digits
    };
    format!("{digits} {p}{unit}")
}

/// Tick text in mm with as many decimals as the tick spacing `step` (mm) needs.
fn mm_label(v: f64, step: f64) -> String {
    let decimals = (-(step.log10().floor()) as i32).clamp(0, 4) as usize;
    let s = format!("{v:.decimals$}");
    if s.trim_start_matches('-')
        .chars()
        .all(|c| c == '0' || c == '.')
    {
        "0".to_string()
    } else {
        s
    }
}

/// Tick text for a field value in T: plain decimals down to 1 mT, powers of ten below.
fn tesla_label(v: f64) -> String {
    if v >= 1e-3 {
        let decimals = (3 - v.log10().floor() as i32).clamp(0, 6) as usize;
        let s = format!("{v:.decimals$}");
        let s = if s.contains('.') {
            s.trim_end_matches('0').trim_end_matches('.').to_string()
        } else {
            s
        };
        s
    } else {
        let e = v.log10().floor();
        let m = v / 10f64.powf(e);
        if (m - m.round()).abs() < 1e-6 && m.round() == 1.0 {
            format!("1e{}", e as i32)
        } else {
            format!("{}e{}", (m * 10.0).round() / 10.0, e as i32)
        }
    }
}

/// Values to mark on the colour bar.
fn bar_ticks(scale: &ColourScale) -> Vec<f64> {
    match *scale {
        ColourScale::Log { lo, hi } => {
            let decades = (hi / lo).log10();
            let mantissas: &[f64] = if decades <= 1.5 {
                &[1.0, 2.0, 3.0, 5.0]
            } else if decades <= 3.5 {
                &[1.0, 2.0, 5.0]
            } else {
                &[1.0]
            };
            let mut out = Vec::new();
            for d in (lo.log10().floor() as i32)..=(hi.log10().ceil() as i32) {
                for m in mantissas {
                    let v = m * 10f64.powi(d);
                    if v >= lo * (1.0 - 1e-9) && v <= hi * (1.0 + 1e-9) {
                        out.push(v);
                    }
                }
            }
            out
        }
        ColourScale::Linear { lo, hi } => {
            let raw = (hi - lo) / 5.0;
            let p = 10f64.powf(raw.log10().floor());
            let step = [1.0, 2.0, 5.0, 10.0]
                .iter()
                .map(|m| m * p)
                .find(|s| *s >= raw)
                .unwrap_or(10.0 * p);
            let mut out = Vec::new();
            let mut k = (lo / step).ceil();
            while k * step <= hi * (1.0 + 1e-9) {
                out.push(k * step);
                k += 1.0;
            }
            out
        }
    }
}

/// Draws the whole picture on `root`; `bitmap` blits the colour map, else leaves the
/// placeholder for [`embed_raster`].
fn draw<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    scene: &Scene,
    bitmap: bool,
) -> Result<(), FieldMapError>
where
    DB::ErrorType: 'static,
{
    let l = &scene.layout;
    let view = &scene.view;
    let (pw, ph) = l.plot;
    root.fill(&WHITE).map_err(draw_err)?;

    // Title and operating point.
    let title_size = (17.0f64)
        .min((l.width as f64 - 20.0) / (0.56 * scene.caption.title.chars().count().max(1) as f64));
    let title = (FAMILY, title_size).into_font().color(&TEXT);
    root.draw_text(&scene.caption.title, &title, (12, 10))
        .map_err(draw_err)?;
    let mut second = scene.caption.operating.clone();
    if scene.flux_step > 0.0 {
        if !second.is_empty() {
            second.push_str("    ");
        }
        second.push_str(&format!("flux lines every {}", si(scene.flux_step, "Wb")));
    }
    let small = (FAMILY, 13.5).into_font().color(&TEXT);
    root.draw_text(&second, &small, (12, 36))
        .map_err(draw_err)?;

    // Axes in mm around the plotting area.
    let ((h0, h1), (v0, v1)) = view.ranges();
    let mm = |(a, b): (f64, f64)| (a * 1e3)..(b * 1e3);
    let (hr, vr) = (mm((h0, h1)), mm((v0, v1)));
    let mut chart = ChartBuilder::on(root)
        .margin_top(l.top)
        .margin_left(l.left - Y_LABELS)
        .margin_right(l.width - l.left - pw)
        .x_label_area_size(l.height - l.top - ph)
        .y_label_area_size(Y_LABELS)
        .build_cartesian_2d(hr.clone(), vr.clone())
        .map_err(draw_err)?;
    let (xs, ys) = chart.plotting_area().get_pixel_range();
    if (xs.end - xs.start, ys.end - ys.start) != (pw as i32, ph as i32) {
        return Err(FieldMapError::Draw(format!(
            "plotting area {}×{} px, expected {pw}×{ph}",
            xs.end - xs.start,
            ys.end - ys.start
        )));
    }
    let plot = chart.plotting_area().strip_coord_spec();
    if bitmap {
        let mut rgb = scene.raster_rgb.clone();
        overlay::paint(&mut rgb, pw, ph, &scene.strokes);
        let image = BitMapElement::with_owned_buffer((0, 0), (pw, ph), rgb)
            .ok_or_else(|| FieldMapError::Draw("raster size mismatch".into()))?;
        plot.draw(&image).map_err(draw_err)?;
    } else {
        plot.draw(&Rectangle::new(
            [(0, 0), (pw as i32, ph as i32)],
            PLACEHOLDER.filled(),
        ))
        .map_err(draw_err)?;
    }
    let (h_name, v_name) = if view.z_horizontal {
        ("z / mm", "r / mm")
    } else {
        ("r / mm", "z / mm")
    };
    let step = |r: &std::ops::Range<f64>, n: f64| {
        let raw = (r.end - r.start) / n;
        let p = 10f64.powf(raw.log10().floor());
        [1.0, 2.0, 5.0, 10.0]
            .iter()
            .map(|m| m * p)
            .find(|s| *s >= raw)
            .unwrap_or(10.0 * p)
    };
    let (hs, vs) = (
        step(&hr, 8.0),
        step(&vr, (8.0 * ph as f64 / pw as f64).max(3.0)),
    );
    let h_fmt = move |v: &f64| mm_label(*v, hs);
    let v_fmt = move |v: &f64| mm_label(*v, vs);
    chart
        .configure_mesh()
        .disable_mesh()
        .x_desc(h_name)
        .y_desc(v_name)
        .x_labels(((hr.end - hr.start) / hs) as usize + 2)
        .y_labels(((vr.end - vr.start) / vs) as usize + 2)
        .x_label_formatter(&h_fmt)
        .y_label_formatter(&v_fmt)
        .label_style((FAMILY, 13).into_font().color(&TEXT))
        .axis_desc_style((FAMILY, 14).into_font().color(&TEXT))
        .draw()
        .map_err(draw_err)?;

    root.draw(&Rectangle::new(
        [
            (l.left as i32, l.top as i32),
            ((l.left + pw) as i32, (l.top + ph) as i32),
        ],
        TEXT.stroke_width(1),
    ))
    .map_err(draw_err)?;
    colour_bar(root, scene)
}

/// The colour bar right of the plotting area: the map, pointed ends where the field is clipped,
/// ticks in T and the quantity.
fn colour_bar<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    scene: &Scene,
) -> Result<(), FieldMapError>
where
    DB::ErrorType: 'static,
{
    let l = &scene.layout;
    let x0 = (l.left + l.plot.0) as i32 + BAR_GAP;
    let x1 = x0 + BAR_WIDTH;
    let top = l.top as i32 + BAR_POINT;
    let bottom = (l.top + l.plot.1) as i32 - BAR_POINT;
    let span = (bottom - top).max(1) as f64;
    for y in top..bottom {
        let t = 1.0 - (y - top) as f64 / span;
        let [r, g, b] = viridis(t);
        root.draw(&Rectangle::new(
            [(x0, y), (x1, y + 1)],
            RGBColor(r, g, b).filled(),
        ))
        .map_err(draw_err)?;
    }
    let frame = TEXT.stroke_width(1);
    let (above, below) = scene.clipped;
    let ends = [
        (above, top, top - BAR_POINT, 1.0),
        (below, bottom, bottom + BAR_POINT, 0.0),
    ];
    for (clipped, base, tip, t) in ends {
        if clipped {
            let [r, g, b] = viridis(t);
            let tri = vec![(x0, base), (x1, base), ((x0 + x1) / 2, tip)];
            root.draw(&Polygon::new(tri.clone(), RGBColor(r, g, b).filled()))
                .map_err(draw_err)?;
            let mut outline = tri;
            outline.push(outline[0]);
            root.draw(&PathElement::new(outline, frame))
                .map_err(draw_err)?;
        }
    }
    root.draw(&Rectangle::new([(x0, top), (x1, bottom)], frame))
        .map_err(draw_err)?;
    let label = (FAMILY, 13).into_font().color(&TEXT);
    for v in bar_ticks(&scene.scale) {
        let y = bottom - (scene.scale.position(v) * span).round() as i32;
        root.draw(&PathElement::new(vec![(x1, y), (x1 + 5, y)], frame))
            .map_err(draw_err)?;
        let text = tesla_label(v);
        root.draw_text(&text, &label, (x1 + 8, y - 7))
            .map_err(draw_err)?;
    }
    let head = (FAMILY, 14).into_font().color(&TEXT);
    root.draw_text("|B| / T", &head, (x0 - 6, l.top as i32 - 20))
        .map_err(draw_err)?;
    let note = match scene.scale {
        ColourScale::Log { lo, hi } => format!("log, {:.1} decades", (hi / lo).log10()),
        ColourScale::Linear { .. } => "linear".to_string(),
    };
    let small = (FAMILY, 12).into_font().color(&TEXT);
    root.draw_text(&note, &small, (x0 - 6, (l.top + l.plot.1) as i32 + 8))
        .map_err(draw_err)?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn labels_are_short_and_name_their_unit() {
        assert_eq!(si(1.234e-6, "Wb"), "1.23 µWb");
        assert_eq!(si(4.5e-3, "Wb"), "4.5 mWb");
        assert_eq!(si(0.04, "A"), "40 mA");
        assert_eq!(mm_label(12.0, 5.0), "12");
        assert_eq!(mm_label(-0.0000001, 0.5), "0");
        assert_eq!(mm_label(2.5, 0.5), "2.5");
        assert_eq!(tesla_label(0.5), "0.5");
        assert_eq!(tesla_label(1e-4), "1e-4");
        assert_eq!(tesla_label(2e-5), "2e-5");
    }

    #[test]
    fn log_ticks_fall_inside_the_scale() {
        let s = ColourScale::Log { lo: 7e-4, hi: 0.7 };
        let t = bar_ticks(&s);
        assert!(t.contains(&1e-3) && t.contains(&0.1) && t.contains(&0.5));
        assert!(t.iter().all(|&v| (7e-4..=0.7).contains(&v)));
    }
}
