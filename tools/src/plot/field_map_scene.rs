//! What a field-map picture is made of, shared by its assembly (`field_map.rs`) and its
//! drawing (`field_map_draw.rs`): the caption, the layout, the scene, and the error.

use thiserror::Error;

use super::colormap::ColourScale;
use super::overlay::Stroke;
use super::view::View;

/// Text written above the map.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Caption {
    /// The case title.
    pub title: String,
    /// The operating point, e.g. "winding main: 1200 turns at 40 mA".
    pub operating: String,
}

/// Why a picture could not be made.
#[derive(Debug, Error, Clone, PartialEq)]
pub enum FieldMapError {
    /// The file name has no `.png` or `.svg` extension.
    #[error("{0}: the picture format follows the file extension, .png or .svg")]
    Format(String),
    /// An option is out of range.
    #[error("{option}: {fault}")]
    Option {
        /// The option at fault.
        option: &'static str,
        /// What is wrong with it.
        fault: String,
    },
    /// The window does not overlap the meshed region.
    #[error("the picture window lies outside the meshed region")]
    OutsideMesh,
    /// The embedded font could not be registered.
    #[error("the embedded font could not be registered")]
    Font,
    /// Drawing or encoding failed.
    #[error("drawing the picture failed: {0}")]
    Draw(String),
}

/// Picture layout in px.
pub(super) struct Layout {
    pub(super) width: u32,
    pub(super) height: u32,
    /// Left edge of the plotting area.
    pub(super) left: u32,
    /// Top edge of the plotting area.
    pub(super) top: u32,
    /// Plotting area (width, height).
    pub(super) plot: (u32, u32),
}

/// Everything drawn; geometry in pixels of the plotting area.
pub(super) struct Scene {
    pub(super) view: View,
    pub(super) layout: Layout,
    /// The colour map, RGB rows from the top, the plotting area's size.
    pub(super) raster_rgb: Vec<u8>,
    pub(super) scale: ColourScale,
    /// Field below / above the colour scale somewhere in the window.
    pub(super) clipped: (bool, bool),
    /// Flux lines, region outlines and the axis, in drawing order.
    pub(super) strokes: Vec<Stroke>,
    /// Flux between neighbouring lines, Wb.
    pub(super) flux_step: f64,
    pub(super) caption: Caption,
}
