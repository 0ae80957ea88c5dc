//! The field-map picture (PNG or SVG): |B| as a colour map, flux lines, region outlines and
//! the axis over the (r, z) half-plane or the full meridian section, axes in mm.
//!
//! * |B| is sampled at every pixel centre ([`super::raster`]) and coloured on viridis
//!   ([`super::colormap`]), on a log scale spanning `decades` below the top of the scale, or
//!   linear from 0. The top of the scale is the largest pixel value once the brightest
//!   [`TOP_CLIP_FRACTION`] of the pixels inside the mesh are set aside, so the field
//!   singularity at a sharp core corner does not wash out the rest; values outside the scale
//!   are clipped, and the colour bar says so with pointed ends.
//! * Flux lines are contours of ψ = 2π r A_φ (the flux through the circle of radius r at
//!   height z) at equal steps Δψ, halfway between multiples of Δψ = max |ψ| / n in the window:
//!   between neighbouring lines the same flux Δψ flows, so their density shows |B|.
//! * Same input, same bytes: the raster runs on rayon but is collected in order, and nothing
//!   depends on hash-map iteration order or the clock.

use std::path::Path;

use axicore_solver::FeMesh;

use super::colormap::ColourScale;
use super::contour;
pub use super::field_map_scene::{Caption, FieldMapError};
use super::field_map_scene::{Layout, Scene};
use super::field_source::FieldSource;
use super::outline;
use super::overlay::{self, Stroke};
use super::raster::{self, Raster};
use super::view::{View, Window};

/// Share of the pixels inside the mesh whose |B| may lie above the top of the scale.
pub const TOP_CLIP_FRACTION: f64 = 5e-4;
/// Narrowest picture accepted, px.
pub const MIN_WIDTH: u32 = 320;
/// Widest picture accepted, px (a 4000 × 4000 raster is 48 MB of RGB).
pub const MAX_WIDTH: u32 = 4000;
/// Most flux lines accepted.
pub const MAX_FLUX_LINES: usize = 200;
/// Smallest height/width ratio of the plotting area; a flatter window is widened.
const MIN_ASPECT: f64 = 0.3;
/// Sub-triangles per element edge for contouring.
const SUBDIVISIONS: usize = 4;
/// Colour of pixels outside the mesh.
const NO_FIELD: [u8; 3] = [236, 236, 236];

/// Picture file format.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum PictureFormat {
    /// Portable Network Graphics, 8-bit RGB.
    #[default]
    Png,
    /// Scalable Vector Graphics with the colour map embedded as a PNG image.
    Svg,
}

impl PictureFormat {
    /// The format named by a file's extension (`.png` or `.svg`, any case).
    pub fn from_path(path: &Path) -> Result<Self, FieldMapError> {
        let ext = path
            .extension()
            .and_then(|e| e.to_str())
            .map(str::to_ascii_lowercase);
        match ext.as_deref() {
            Some("png") => Ok(Self::Png),
            Some("svg") => Ok(Self::Svg),
            _ => Err(FieldMapError::Format(path.display().to_string())),
        }
    }
}

/// How |B| maps onto colour.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum MapScale {
    /// Equal colour steps per decade (fields across core and air differ by decades).
    #[default]
    Log,
    /// Equal colour steps per tesla, from 0.
    Linear,
}

/// What the picture shows and how large it is.
#[derive(Debug, Clone, PartialEq)]
pub struct FieldMapOptions {
    /// PNG or SVG.
    pub format: PictureFormat,
    /// Picture width in px (default 800); the height follows from the window at 1:1.
    pub width_px: u32,
    /// Part of the half-plane shown, m; None: the core and windings with a margin.
    pub window: Option<Window>,
    /// Show the full section (−r mirrored), not only r ≥ 0.
    pub mirror: bool,
    /// Log or linear colour scale.
    pub scale: MapScale,
    /// Most decades below the top that a log scale spans (default 3).
    pub decades: f64,
    /// Top of the colour scale in T; None: from the field (see the module doc).
    pub b_max_t: Option<f64>,
    /// Number of flux-line steps from 0 to the largest |ψ| in the window (default 20).
    pub flux_lines: usize,
}

impl Default for FieldMapOptions {
    fn default() -> Self {
        Self {
            format: PictureFormat::Png,
            width_px: 800,
            window: None,
            mirror: false,
            scale: MapScale::Log,
            decades: 3.0,
            b_max_t: None,
            flux_lines: 20,
        }
    }
}

fn bad(option: &'static str, fault: impl Into<String>) -> FieldMapError {
    FieldMapError::Option {
        option,
        fault: fault.into(),
    }
}

impl FieldMapOptions {
    /// Checks every option (before any solve, so a bad option costs nothing).
    pub fn validate(&self) -> Result<(), FieldMapError> {
        if !(MIN_WIDTH..=MAX_WIDTH).contains(&self.width_px) {
            return Err(bad(
                "width",
                format!("{} px is outside {MIN_WIDTH}…{MAX_WIDTH} px", self.width_px),
            ));
        }
        if !(self.decades.is_finite() && (0.5..=12.0).contains(&self.decades)) {
            return Err(bad(
                "decades",
                format!("{} is outside 0.5…12", self.decades),
            ));
        }
        if let Some(b) = self.b_max_t {
            if !(b.is_finite() && b > 0.0) {
                return Err(bad(
                    "top of the colour scale",
                    format!("{b} T must be positive"),
                ));
            }
        }
        if !(1..=MAX_FLUX_LINES).contains(&self.flux_lines) {
            return Err(bad(
                "flux lines",
                format!("{} is outside 1…{MAX_FLUX_LINES}", self.flux_lines),
            ));
        }
        if let Some(w) = &self.window {
            let finite = [w.r0, w.r1, w.z0, w.z1].iter().all(|v| v.is_finite());
            if !finite || w.r0 < 0.0 || w.r1 <= w.r0 || w.z1 <= w.z0 {
                return Err(bad("window", "needs 0 ≤ r0 < r1 and z0 < z1, finite, in m"));
            }
        }
        Ok(())
    }
}

/// Bounding box (r, z) of the triangles with `keep(tag)`, m.
fn tagged_box(mesh: &FeMesh, keep: impl Fn(u32) -> bool) -> Option<Window> {
    let mut b: Option<Window> = None;
    for (t, tri) in mesh.triangles.iter().enumerate() {
        if !keep(mesh.tags[t]) {
            continue;
        }
        for &n in tri {
            let p = mesh.nodes[n as usize];
            let w = b.get_or_insert(Window {
                r0: p[0],
                r1: p[0],
                z0: p[1],
                z1: p[1],
            });
            w.r0 = w.r0.min(p[0]);
            w.r1 = w.r1.max(p[0]);
            w.z0 = w.z0.min(p[1]);
            w.z1 = w.z1.max(p[1]);
        }
    }
    b
}

/// The default window: every non-air region (tag ≠ 0) with a margin of 35 % of its larger
/// side all round (r from 0), within the mesh; the whole mesh when it has no such region.
pub fn default_window(mesh: &FeMesh) -> Window {
    let all = tagged_box(mesh, |_| true).unwrap_or(Window {
        r0: 0.0,
        r1: 1.0,
        z0: -1.0,
        z1: 1.0,
    });
    let Some(b) = tagged_box(mesh, |t| t != 0) else {
        return all;
    };
    let m = 0.35 * b.size();
    Window {
        r0: 0.0,
        r1: (b.r1 + m).min(all.r1),
        z0: (b.z0 - m).max(all.z0),
        z1: (b.z1 + m).min(all.z1),
    }
}

const TOP: u32 = 64;
const BOTTOM: u32 = 52;
const LEFT: u32 = 66;
const RIGHT: u32 = 124;

/// The view and layout for `window`: orientation by the longer side, the window widened (never
/// narrowed) to at least [`MIN_ASPECT`].
fn plan(window: Window, mirror: bool, width: u32) -> (View, Layout) {
    let mut w = window;
    let r_shown = |w: &Window| if mirror { 2.0 * w.r1 } else { w.r1 - w.r0 };
    let z_horizontal = w.z1 - w.z0 >= r_shown(&w);
    let pw = width.saturating_sub(LEFT + RIGHT).max(100);
    let (h, v) = if z_horizontal {
        (w.z1 - w.z0, r_shown(&w))
    } else {
        (r_shown(&w), w.z1 - w.z0)
    };
    if v < MIN_ASPECT * h {
        let grow = MIN_ASPECT * h - v;
        if z_horizontal {
            w.r1 += if mirror { 0.5 * grow } else { grow };
        } else {
            w.z0 -= 0.5 * grow;
            w.z1 += 0.5 * grow;
        }
    }
    let (h, v) = if z_horizontal {
        (w.z1 - w.z0, r_shown(&w))
    } else {
        (r_shown(&w), w.z1 - w.z0)
    };
    let ph = ((pw as f64) * v / h).round().max(60.0) as u32;
    let view = View {
        window: w,
        z_horizontal,
        mirror,
        pixels: (pw, ph),
    };
    let layout = Layout {
        width,
        height: TOP + ph + BOTTOM,
        left: LEFT,
        top: TOP,
        plot: (pw, ph),
    };
    (view, layout)
}

/// Share of the pixels inside the mesh whose |B| may lie below the bottom of a log scale.
pub const BOTTOM_CLIP_FRACTION: f64 = 0.01;

/// The colour scale for the sampled field: the top as in the module doc; a log scale spans
/// `decades` below it, or less where nearly all the field is stronger (a core in a uniform
/// field spans less than a decade), down to the [`BOTTOM_CLIP_FRACTION`] quantile.
fn colour_scale(raster: &Raster, opts: &FieldMapOptions) -> ColourScale {
    let mut v: Vec<f64> = raster.inside().collect();
    v.sort_by(f64::total_cmp);
    let quantile = |q: f64| {
        let k = ((v.len() as f64) * q).floor() as usize;
        v.get(k.min(v.len().saturating_sub(1))).copied()
    };
    let top = opts
        .b_max_t
        .or_else(|| quantile(1.0 - TOP_CLIP_FRACTION))
        .unwrap_or(1.0);
    let top = if top > 0.0 && top.is_finite() {
        top
    } else {
        1.0
    };
    match opts.scale {
        MapScale::Log => {
            let floor = top * 10f64.powf(-opts.decades);
            // Keep at least a fifth of a decade so a nearly uniform field still reads.
            let low = quantile(BOTTOM_CLIP_FRACTION)
                .unwrap_or(floor)
                .min(top * 10f64.powf(-0.2));
            ColourScale::Log {
                lo: floor.max(low),
                hi: top,
            }
        }
        MapScale::Linear => ColourScale::Linear { lo: 0.0, hi: top },
    }
}

/// Flux-line levels: (k − ½)·Δψ of either sign within the window's range, and Δψ.
fn flux_levels(range: (f64, f64), n: usize) -> (Vec<f64>, f64) {
    let ext = range.0.abs().max(range.1.abs());
    if ext == 0.0 || !ext.is_finite() {
        return (Vec::new(), 0.0);
    }
    let step = ext / n as f64;
    let mut levels = Vec::new();
    for k in 0..n {
        let c = (k as f64 + 0.5) * step;
        if c < range.1 {
            levels.push(c);
        }
        if -c > range.0 {
            levels.push(-c);
        }
    }
    (levels, step)
}

/// Lines over light colours (upper part of viridis) are drawn dark, the others white.
const LIGHT_ABOVE: f64 = 0.6;
const LINE_ON_DARK: [u8; 3] = [255, 255, 255];
const LINE_ON_LIGHT: [u8; 3] = [24, 24, 24];
/// Region outlines: a red that viridis never takes.
const OUTLINE: [u8; 3] = [232, 64, 48];

/// Splits a pixel-space polyline into runs over light and over dark background, coloured to
/// stand out from it.
fn contrasting(points: &[(f64, f64)], light: &dyn Fn(f64, f64) -> bool, width: f64) -> Vec<Stroke> {
    let mut out: Vec<Stroke> = Vec::new();
    let mut last: Option<bool> = None;
    for pair in points.windows(2) {
        let (a, b) = (pair[0], pair[1]);
        let l = light(0.5 * (a.0 + b.0), 0.5 * (a.1 + b.1));
        match out.last_mut() {
            Some(s) if last == Some(l) => s.points.push(b),
            _ => out.push(Stroke {
                points: vec![a, b],
                colour: if l { LINE_ON_LIGHT } else { LINE_ON_DARK },
                width,
            }),
        }
        last = Some(l);
    }
    out
}

/// Computes the picture's content.
fn scene(
    src: &dyn FieldSource,
    caption: &Caption,
    opts: &FieldMapOptions,
) -> Result<Scene, FieldMapError> {
    let window = opts.window.unwrap_or_else(|| default_window(src.mesh()));
    let (view, layout) = plan(window, opts.mirror, opts.width_px);
    let half = view.half_plane();
    let raster = raster::sample_b(src, &view);
    if raster.inside().next().is_none() {
        return Err(FieldMapError::OutsideMesh);
    }
    let scale = colour_scale(&raster, opts);
    let (lo, hi) = scale.range();
    let clipped = (
        opts.scale == MapScale::Log && raster.inside().any(|v| v < lo),
        raster.inside().any(|v| v > hi),
    );
    let raster_rgb = raster
        .values
        .iter()
        .flat_map(|&v| {
            if v.is_finite() {
                scale.colour(v)
            } else {
                NO_FIELD
            }
        })
        .collect();
    let (pw, ph) = layout.plot;
    let light = |x: f64, y: f64| {
        let i = (x.floor().max(0.0) as usize).min(pw as usize - 1);
        let j = (y.floor().max(0.0) as usize).min(ph as usize - 1);
        let v = raster.values[j * pw as usize + i];
        !v.is_finite() || scale.position(v) > LIGHT_ABOVE
    };
    // Lines keep their width in proportion to the picture, at least 1 px.
    let unit = (opts.width_px as f64 / 800.0).max(1.0);
    let shown = |line: &[[f64; 2]]| -> Vec<Vec<(f64, f64)>> {
        let signs: &[f64] = if opts.mirror { &[1.0, -1.0] } else { &[1.0] };
        signs
            .iter()
            .map(|s| {
                let px: Vec<(f64, f64)> =
                    line.iter().map(|p| view.pixel([s * p[0], p[1]])).collect();
                overlay::thin(&px, 0.5)
            })
            .collect()
    };

    let mut strokes = Vec::new();
    let sampled = contour::sample_flux(src, &half, SUBDIVISIONS);
    let (levels, flux_step) = sampled
        .range_in(&half)
        .map_or((Vec::new(), 0.0), |r| flux_levels(r, opts.flux_lines));
    for set in contour::contours(&sampled, &levels, &half) {
        for line in set {
            for px in shown(&line) {
                strokes.extend(contrasting(&px, &light, unit));
            }
        }
    }
    for edge in outline::region_edges(src) {
        for line in contour::clip(vec![edge.points], &half) {
            for points in shown(&line) {
                strokes.push(Stroke {
                    points,
                    colour: OUTLINE,
                    width: 1.6 * unit,
                });
            }
        }
    }
    if view.r_range().0 <= 0.0 {
        let w = view.window;
        // Inset by a pixel so an axis along the plotting area's edge is not hidden by the frame.
        let inset = |p: (f64, f64)| {
            (
                p.0.clamp(1.0, pw as f64 - 1.0),
                p.1.clamp(1.0, ph as f64 - 1.0),
            )
        };
        let (a, b) = (
            inset(view.pixel([0.0, w.z0])),
            inset(view.pixel([0.0, w.z1])),
        );
        for [p, q] in overlay::dash_dot(a, b, 14.0 * unit, 2.0 * unit, 4.0 * unit) {
            strokes.extend(contrasting(&[p, q], &light, 1.5 * unit));
        }
    }
    Ok(Scene {
        view,
        layout,
        raster_rgb,
        scale,
        clipped,
        strokes,
        flux_step,
        caption: caption.clone(),
    })
}

/// Draws the field map of `src` and returns the file's bytes (PNG or SVG per `opts.format`).
pub fn render(
    src: &dyn FieldSource,
    caption: &Caption,
    opts: &FieldMapOptions,
) -> Result<Vec<u8>, FieldMapError> {
    opts.validate()?;
    super::ensure_font().map_err(|_| FieldMapError::Font)?;
    let scene = scene(src, caption, opts)?;
    match opts.format {
        PictureFormat::Png => super::field_map_draw::png(&scene),
        PictureFormat::Svg => super::field_map_draw::svg(&scene).map(String::into_bytes),
    }
}
