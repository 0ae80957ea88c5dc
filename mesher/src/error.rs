//! Everything that can go wrong while meshing, with what the caller needs to fix it.

/// Why a mesh could not be built.
#[derive(thiserror::Error, Debug, Clone, PartialEq)]
pub enum MeshError {
    /// A number is not finite, or out of its allowed range.
    #[error("bad value for {what}: {value}")]
    BadSize {
        /// Which input field.
        what: &'static str,
        /// The offending value.
        value: f64,
    },
    /// A region's shape is degenerate (e.g. r_max <= r_min, r_min < 0).
    #[error("region {region} has a bad shape: {reason}")]
    BadShape {
        /// Index into `MeshSpec::regions`.
        region: usize,
        /// What is wrong.
        reason: &'static str,
    },
    /// Two regions share interior area.
    #[error("regions {a} and {b} overlap")]
    Overlap {
        /// Index of the first region.
        a: usize,
        /// Index of the second region.
        b: usize,
    },
    /// A region is not strictly inside the outer half-disc polygon.
    #[error("region {region} is not inside the outer half-disc")]
    OutsideDomain {
        /// Index into `MeshSpec::regions`.
        region: usize,
    },
    /// An interior arc passes from the inside of a region to its outside.
    #[error("interior arc {arc} crosses region {region}")]
    ArcCrossesRegion {
        /// Index into `MeshSpec::interior_arcs`.
        arc: usize,
        /// Index into `MeshSpec::regions`.
        region: usize,
    },
    /// Two outline segments meet at a vertex at an angle below `MIN_INPUT_ANGLE_DEG` (a cusp, such as
    /// a rectangle resting on the tip of a half-ellipse with a fine arc tolerance).
    #[error("outlines meet at ({}, {}) m at {angle_deg:.2e}°, below the smallest input angle", at[0], at[1])]
    SmallInputAngle {
        /// The vertex (r, z) in m.
        at: [f64; 2],
        /// The angle between the two segments (degrees).
        angle_deg: f64,
    },
    /// A boundary refinement names a region that does not exist.
    #[error("refinement {refinement} names region {region}, but there are only {regions} regions")]
    NoSuchRegion {
        /// Index into `MeshSpec::refinements`.
        refinement: usize,
        /// The region index asked for.
        region: usize,
        /// Number of regions.
        regions: usize,
    },
    /// The node cap was reached.
    #[error("mesh needs more than {limit} nodes (reached {reached})")]
    TooManyNodes {
        /// `MeshSpec::max_nodes`.
        limit: usize,
        /// Nodes present (or about to be) when the cap was hit.
        reached: usize,
    },
    /// The size loop stopped with triangles still larger than their target size.
    #[error(
        "size refinement stopped after {passes} passes with {oversized} triangles still too large"
    )]
    RefinementIncomplete {
        /// Passes done.
        passes: usize,
        /// Triangles larger than their local target.
        oversized: usize,
    },
    /// The triangulation library rejected the input; validation should have caught this first.
    #[error("triangulation failed: {reason}")]
    Triangulation {
        /// The library's message or the conflicting constraint.
        reason: String,
    },
}
