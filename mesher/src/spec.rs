//! What the caller asks for: shapes, tags, sizes and quality targets. Plain data, no physics.

/// A point (r, z) in metres.
pub type Point = [f64; 2];

/// A closed shape in the half-plane r >= 0, all lengths in metres.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Shape {
    /// Axis-aligned rectangle r in [r_min, r_max], z in [z_min, z_max]; r_min may be 0 (touches the axis).
    Rect {
        /// Inner radius (m), >= 0.
        r_min: f64,
        /// Outer radius (m), > r_min.
        r_max: f64,
        /// Lower axial bound (m).
        z_min: f64,
        /// Upper axial bound (m), > z_min.
        z_max: f64,
    },
    /// Right half of an ellipse centred on the axis at z = z_centre: semi-axis `radial` along r, `axial` along z (sphere when equal).
    HalfEllipse {
        /// Axial position of the centre (m).
        z_centre: f64,
        /// Semi-axis along r (m), > 0.
        radial: f64,
        /// Semi-axis along z (m), > 0.
        axial: f64,
    },
}

impl Shape {
    /// Exact area of the shape in the (r, z) plane (m²), before polygonisation.
    pub fn exact_area(&self) -> f64 {
        match *self {
            Shape::Rect {
                r_min,
                r_max,
                z_min,
                z_max,
            } => (r_max - r_min) * (z_max - z_min),
            Shape::HalfEllipse { radial, axial, .. } => 0.5 * std::f64::consts::PI * radial * axial,
        }
    }
}

/// One tagged region: a shape, its tag, and the target element size inside it (m).
#[derive(Debug, Clone, PartialEq)]
pub struct Region {
    /// Tag copied onto every triangle of the region; several regions may share a tag.
    pub tag: u32,
    /// The region's outline.
    pub shape: Shape,
    /// Target element size inside the region (m).
    pub size: f64,
}

/// Where the mesh must be fine: a point (sharp corner) or the boundary of a region, with a size there (m).
#[derive(Debug, Clone, PartialEq)]
pub enum Refinement {
    /// Fine around one point, e.g. a corner where the field is singular.
    Point {
        /// Location (r, z) in m.
        at: Point,
        /// Element size at the point (m).
        size: f64,
    },
    /// Fine along the boundary of `regions[region]`, leaving out the parts that lie on the axis r = 0
    /// (in the body of revolution those are not surfaces).
    Boundary {
        /// Index into [`MeshSpec::regions`].
        region: usize,
        /// Element size on the boundary (m).
        size: f64,
    },
    /// Geometric grading toward one point, e.g. a corner where the field is singular and
    /// high-order elements need layers shrinking by a fixed factor: the target size at distance d
    /// is `max(size · factor^layers, min(d, size + grading · d))`, so the elements touching the
    /// point are about `size · factor^layers`, the ones at distance about `size · factor^k` about
    /// that distance (k = 0 … layers, the outermost about `size`), and beyond `size` the sizes
    /// grow as around a [`Refinement::Point`] of that size. The element count grows linearly in
    /// `layers`.
    Graded {
        /// Location (r, z) in m.
        at: Point,
        /// Element size at the outer edge of the graded zone, which reaches about this far (m).
        size: f64,
        /// Ratio of the sizes of successive layers toward the point, in (0, 1); 0.15–0.2 is
        /// common practice for hp elements.
        factor: f64,
        /// Number of layers, at most [`crate::MAX_GRADED_LAYERS`].
        layers: u32,
    },
    /// Many points with their sizes, e.g. from an error indicator (adaptive refinement); looked
    /// up through a bucket grid, so thousands cost little.
    Cloud {
        /// (location (r, z), element size there), in m.
        points: Vec<(Point, f64)>,
    },
}

/// A graded band: the middle of a slender body of revolution, r in [0, r_max], z in [z_min, z_max],
/// meshed as a grid of rectangles (each cut into two right triangles) instead of Delaunay triangles.
/// Rows are `end_size` apart at both band ends and grow by `growth` per unit distance from the
/// nearer end up to `max_size`, so a band of any length costs a number of rows that grows like the
/// logarithm of its length. Its elements are stretched along z and exempt from the angle floor;
/// use it only where the field varies slowly along z (away from ends and corners).
#[derive(Debug, Clone, PartialEq)]
pub struct Band {
    /// Lower axial end (m).
    pub z_min: f64,
    /// Upper axial end (m), > z_min.
    pub z_max: f64,
    /// Outer radius (m); the Delaunay part of the mesh joins the band along r = r_max and its ends.
    pub r_max: f64,
    /// Radii of the grid's column lines strictly between 0 and r_max (m), increasing. Every region
    /// side that runs through the band must lie on one of them; no other region or arc may enter it.
    pub columns: Vec<f64>,
    /// Axial spacing of the rows at both band ends (m).
    pub end_size: f64,
    /// Growth of the axial spacing per unit distance from the nearer band end (dimensionless).
    pub growth: f64,
    /// Largest axial spacing (m).
    pub max_size: f64,
    /// `None`: straight columns. `Some(shape)`, a half-ellipse that is also a region: the column at
    /// its equatorial radius follows its outline (the band's ends snap to vertices of the region's
    /// polygon), the columns up to three equatorial radii scale with its radius ρ(z), and those
    /// beyond blend linearly to r_max.
    pub surface: Option<Shape>,
}

/// Everything [`crate::build_mesh`] needs.
#[derive(Debug, Clone, PartialEq)]
pub struct MeshSpec {
    /// Radius of the outer half-disc, centred at (0, 0) (m).
    pub outer_radius: f64,
    /// Tag of the air region (everything not in a region).
    pub background_tag: u32,
    /// Tagged regions, strictly inside the outer half-disc polygon; they must not overlap, but may
    /// touch along edges or at corners. Triangles take the tag of the first region holding their centroid.
    pub regions: Vec<Region>,
    /// Radii (m) of extra half-circle constraint arcs centred at (0, 0); an arc may run inside or
    /// outside a region, or along its outline, but not pass from its inside to its outside.
    pub interior_arcs: Vec<f64>,
    /// Places where the mesh must be fine.
    pub refinements: Vec<Refinement>,
    /// Largest element size anywhere (m). Sizes are longest-edge lengths: no triangle edge ends up
    /// longer than the target h evaluated at that triangle's centroid.
    pub far_size: f64,
    /// Size growth per unit distance away from a refinement feature (dimensionless).
    pub grading: f64,
    /// Smallest triangle angle to reach (degrees), 0 to 30. Not reachable where two input boundaries
    /// meet at a smaller angle (e.g. a rectangle resting on the tip of a half-ellipse):
    /// [`crate::Mesh::stats`] reports what was reached.
    pub angle_floor_deg: f64,
    /// Largest relative chord sagitta (sagitta / radius of curvature) of curved region boundaries and
    /// interior arcs; the outer arc uses `max(arc_tolerance, 1e-3)`.
    pub arc_tolerance: f64,
    /// Largest number of nodes allowed; reaching it is an error.
    pub max_nodes: usize,
    /// Graded bands (stretched elements along slender bodies); empty by default.
    pub bands: Vec<Band>,
}

impl MeshSpec {
    /// Default far-field size as a fraction of the outer radius.
    pub const DEFAULT_FAR_FRACTION: f64 = 0.1;
    /// Default size growth per unit distance (common practice for smooth grading).
    pub const DEFAULT_GRADING: f64 = 0.25;
    /// Default quality target (degrees).
    pub const DEFAULT_ANGLE_FLOOR_DEG: f64 = 25.0;
    /// Default relative sagitta of curved region boundaries.
    pub const DEFAULT_ARC_TOLERANCE: f64 = 1e-4;
    /// Default node cap.
    pub const DEFAULT_MAX_NODES: usize = 2_000_000;

    /// An empty domain of radius `outer_radius` with the documented defaults:
    /// far size `0.1 * outer_radius`, grading 0.25, 25°, arc tolerance 1e-4, 2 million nodes.
    pub fn new(outer_radius: f64, background_tag: u32) -> Self {
        Self {
            outer_radius,
            background_tag,
            regions: Vec::new(),
            interior_arcs: Vec::new(),
            refinements: Vec::new(),
            far_size: Self::DEFAULT_FAR_FRACTION * outer_radius,
            grading: Self::DEFAULT_GRADING,
            angle_floor_deg: Self::DEFAULT_ANGLE_FLOOR_DEG,
            arc_tolerance: Self::DEFAULT_ARC_TOLERANCE,
            max_nodes: Self::DEFAULT_MAX_NODES,
            bands: Vec::new(),
        }
    }
}
