//! Triangle meshes of the axisymmetric half-plane r ≥ 0 inside an outer half-disc, with tagged
//! regions, graded element sizes and a minimum-angle target.
//!
//! The mesher knows nothing of physics: regions are shapes with a tag and a size. Pipeline:
//! check the numbers (`validate.rs`), polygonise shapes (`shape.rs`) and build a crossing-free planar
//! graph (`pslg.rs`), triangulate with spade's constrained Delaunay triangulation and refine for angles
//! and sizes (`refine.rs`, sizes from `sizing.rs`), then tag each triangle by the region holding its
//! centroid (`mesh.rs` holds the result). Graded bands (`band.rs`) along slender bodies are
//! triangulated as stretched rectangles and spliced in after refinement; their triangles are exempt
//! from the angle floor.
//!
//! Geometry conventions: r is the first coordinate, z the second, metres throughout. Curved outlines
//! are polygons whose vertices lie on the exact curve, with relative chord sagitta (sagitta divided by
//! the largest radius of curvature along the chord's arc) at most `arc_tolerance`; the outer arc uses
//! `max(arc_tolerance, 1e-3)`. The same spec always gives the bitwise same mesh.

#![forbid(unsafe_code)]
#![warn(missing_docs)]

mod band;
mod corner_split;
mod error;
mod mesh;
mod pslg;
mod refine;
mod shape;
mod sizing;
mod spec;
mod validate;

pub use corner_split::MAX_SPLIT_LAYERS;
pub use error::MeshError;
pub use mesh::{aspect_ratio, signed_area, triangle_angles, Mesh, MeshStats, NodeKind};
pub use pslg::MIN_INPUT_ANGLE_DEG;
pub use refine::MAX_SIZE_PASSES;
pub use spec::{Band, MeshSpec, Point, Refinement, Region, Shape};
pub use validate::{
    MAX_ANGLE_FLOOR_DEG, MAX_GRADED_LAYERS, MIN_GRADED_RELATIVE_SIZE, OUTER_ARC_TOLERANCE,
};

/// Builds the mesh described by `spec`, or says which input is wrong.
///
/// ```
/// use axicore_mesher::{build_mesh, MeshSpec, Refinement, Region, Shape};
///
/// // A demo rod core, 5 mm radius and 70 mm long, in a 1 m half-disc of air (tag 0).
/// let mut spec = MeshSpec::new(1.0, 0);
/// spec.regions.push(Region {
///     tag: 1,
///     shape: Shape::Rect { r_min: 0.0, r_max: 5e-3, z_min: -35e-3, z_max: 35e-3 },
///     size: 1e-3,
/// });
/// spec.refinements.push(Refinement::Point { at: [5e-3, 35e-3], size: 2e-4 });
/// let mesh = build_mesh(&spec)?;
/// assert!(mesh.stats().min_angle_deg >= 25.0);
/// assert!((mesh.region_area(1) - 5e-3 * 70e-3).abs() < 1e-12);
/// # Ok::<(), axicore_mesher::MeshError>(())
/// ```
pub fn build_mesh(spec: &MeshSpec) -> Result<Mesh, MeshError> {
    validate::check_numbers(spec)?;
    let snapped = band::prepared(spec);
    let spec = snapped.as_ref().unwrap_or(spec);
    validate::check_numbers(spec)?;
    let graph = pslg::build(spec)?;
    refine::mesh_graph(spec, &graph)
}

/// Area (m²) of the outer half-disc polygon that `build_mesh` meshes for `spec`, and the polygonised
/// area of each region, in order; for checking a mesh against its input.
pub fn polygon_areas(spec: &MeshSpec) -> Result<(f64, Vec<f64>), MeshError> {
    validate::check_numbers(spec)?;
    let snapped = band::prepared(spec);
    let spec = snapped.as_ref().unwrap_or(spec);
    let graph = pslg::build(spec)?;
    Ok((
        graph.domain_area,
        graph.outlines.iter().map(|o| o.area()).collect(),
    ))
}

/// The axial extent (z_min, z_max) in m that each band of `spec` takes in the mesh: a band that
/// follows a surface has its ends moved to vertices of that surface's polygon.
pub fn band_extents(spec: &MeshSpec) -> Vec<(f64, f64)> {
    band::prepared(spec)
        .as_ref()
        .unwrap_or(spec)
        .bands
        .iter()
        .map(|b| (b.z_min, b.z_max))
        .collect()
}
