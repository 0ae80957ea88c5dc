//! Lines drawn over the colour map (flux lines, region outlines, the axis) at sub-pixel
//! precision: painted anti-aliased into the raster for a PNG, written as SVG polylines.
//!
//! Plotters' back ends take integer pixel coordinates and draw 1 px lines with a per-segment
//! anti-aliasing that dims nearly horizontal runs to dashes; a line painted by its distance
//! from each pixel centre keeps one brightness along its length.

use std::fmt::Write as _;

/// One polyline in pixel coordinates of the plotting area (x right, y down).
#[derive(Debug, Clone, PartialEq)]
pub struct Stroke {
    /// Vertices, px.
    pub points: Vec<(f64, f64)>,
    /// Colour, 8-bit RGB.
    pub colour: [u8; 3],
    /// Line width, px.
    pub width: f64,
}

/// Distance from `p` to segment a–b.
fn distance(p: (f64, f64), a: (f64, f64), b: (f64, f64)) -> f64 {
    let (dx, dy) = (b.0 - a.0, b.1 - a.1);
    let len2 = dx * dx + dy * dy;
    let t = if len2 > 0.0 {
        (((p.0 - a.0) * dx + (p.1 - a.1) * dy) / len2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    (p.0 - a.0 - t * dx).hypot(p.1 - a.1 - t * dy)
}

/// Paints `strokes` into the RGB image `rgb` (`w` × `h`, rows from the top), in order. Each
/// pixel takes the stroke's coverage, 1 within half the width of the line and falling linearly
/// to 0 over the next pixel, as the largest over the stroke's segments (joints are not drawn
/// twice).
pub fn paint(rgb: &mut [u8], w: u32, h: u32, strokes: &[Stroke]) {
    let mut cover = vec![0f32; w as usize * h as usize];
    let mut touched: Vec<usize> = Vec::new();
    for s in strokes {
        let reach = 0.5 * s.width + 0.5;
        for pair in s.points.windows(2) {
            let (a, b) = (pair[0], pair[1]);
            let x0 = (a.0.min(b.0) - reach).floor().max(0.0) as i64;
            let x1 = ((a.0.max(b.0) + reach).ceil() as i64).min(w as i64 - 1);
            let y0 = (a.1.min(b.1) - reach).floor().max(0.0) as i64;
            let y1 = ((a.1.max(b.1) + reach).ceil() as i64).min(h as i64 - 1);
            for y in y0..=y1 {
                for x in x0..=x1 {
                    let d = distance((x as f64 + 0.5, y as f64 + 0.5), a, b);
                    let c = (reach - d).clamp(0.0, 1.0) as f32;
                    let k = y as usize * w as usize + x as usize;
                    if c > cover[k] {
                        if cover[k] == 0.0 {
                            touched.push(k);
                        }
                        cover[k] = c;
                    }
                }
            }
        }
        for &k in &touched {
            let c = cover[k];
            for i in 0..3 {
                let old = rgb[3 * k + i] as f32;
                rgb[3 * k + i] = (old + c * (s.colour[i] as f32 - old)).round() as u8;
            }
            cover[k] = 0.0;
        }
        touched.clear();
    }
}

/// The strokes as SVG polylines, shifted by the plotting area's origin `(x0, y0)` in px.
pub fn svg(strokes: &[Stroke], x0: f64, y0: f64) -> String {
    let mut out = String::new();
    for s in strokes {
        if s.points.len() < 2 {
            continue;
        }
        let [r, g, b] = s.colour;
        let _ = write!(
            out,
            "<polyline fill=\"none\" stroke=\"#{r:02x}{g:02x}{b:02x}\" stroke-width=\"{}\" \
             stroke-linejoin=\"round\" points=\"",
            s.width
        );
        for (i, p) in s.points.iter().enumerate() {
            let sep = if i == 0 { "" } else { " " };
            let _ = write!(out, "{sep}{:.1},{:.1}", p.0 + x0, p.1 + y0);
        }
        out.push_str("\"/>\n");
    }
    out
}

/// Drops vertices closer than `min` px to the last one kept (the last vertex stays), so a
/// polyline sampled finer than the pixels does not bloat an SVG.
pub fn thin(points: &[(f64, f64)], min: f64) -> Vec<(f64, f64)> {
    let mut out: Vec<(f64, f64)> = Vec::with_capacity(points.len());
    for (i, &p) in points.iter().enumerate() {
        let last = i + 1 == points.len();
        match out.last() {
            Some(&q) if !last && (p.0 - q.0).hypot(p.1 - q.1) < min => {}
            _ => out.push(p),
        }
    }
    out
}

/// Dash-dot pieces of the segment a–b (px): `dash` on, `gap` off, a dot of `dot`, `gap` off.
pub fn dash_dot(
    a: (f64, f64),
    b: (f64, f64),
    dash: f64,
    dot: f64,
    gap: f64,
) -> Vec<[(f64, f64); 2]> {
    let len = (b.0 - a.0).hypot(b.1 - a.1);
    if len == 0.0 {
        return Vec::new();
    }
    let at = |s: f64| {
        let t = s.min(len) / len;
        (a.0 + t * (b.0 - a.0), a.1 + t * (b.1 - a.1))
    };
    let mut out = Vec::new();
    let mut s = 0.0;
    while s < len {
        out.push([at(s), at(s + dash)]);
        let d = s + dash + gap;
        if d < len {
            out.push([at(d), at(d + dot)]);
        }
        s = d + dot + gap;
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_horizontal_line_between_pixel_rows_keeps_one_brightness_along_its_length() {
        // A line at y = 5.25 over a black image: every column gets the same total coverage.
        let (w, h) = (40u32, 10u32);
        let mut rgb = vec![0u8; (w * h * 3) as usize];
        let s = Stroke {
            points: vec![(0.0, 5.25), (13.3, 5.26), (40.0, 5.25)],
            colour: [255, 255, 255],
            width: 1.0,
        };
        paint(&mut rgb, w, h, &[s]);
        let column = |x: usize| {
            (0..h as usize)
                .map(|y| rgb[3 * (y * w as usize + x)] as i32)
                .sum::<i32>()
        };
        let first = column(5);
        assert!(first >= 250, "column coverage {first}");
        for x in 2..38 {
            assert!(
                (column(x) - first).abs() <= 6,
                "column {x}: {} against {first}",
                column(x)
            );
        }
    }

    #[test]
    fn svg_polylines_carry_colour_width_and_shifted_points() {
        let s = Stroke {
            points: vec![(0.0, 0.0), (1.25, 2.0)],
            colour: [255, 0, 16],
            width: 1.5,
        };
        let out = svg(&[s], 10.0, 20.0);
        assert!(out.contains("stroke=\"#ff0010\""));
        assert!(out.contains("stroke-width=\"1.5\""));
        assert!(
            out.contains("points=\"10.0,20.0 11.2,22.0\"")
                || out.contains("points=\"10.0,20.0 11.3,22.0\"")
        );
    }

    #[test]
    fn thinning_keeps_the_ends_and_dash_dot_alternates() {
        let p: Vec<(f64, f64)> = (0..=100).map(|i| (i as f64 * 0.1, 0.0)).collect();
        let t = thin(&p, 0.75);
        assert_eq!(t.first(), p.first());
        assert_eq!(t.last(), p.last());
        assert!(t.len() < 20);
        let d = dash_dot((0.0, 0.0), (100.0, 0.0), 14.0, 2.0, 4.0);
        let close = |a: [(f64, f64); 2], b: [(f64, f64); 2]| {
            (0..2).all(|k| (a[k].0 - b[k].0).abs() < 1e-9 && (a[k].1 - b[k].1).abs() < 1e-9)
        };
        assert!(close(d[0], [(0.0, 0.0), (14.0, 0.0)]), "{:?}", d[0]);
        assert!(close(d[1], [(18.0, 0.0), (20.0, 0.0)]), "{:?}", d[1]);
        assert!(close(d[2], [(24.0, 0.0), (38.0, 0.0)]), "{:?}", d[2]);
    }
}
