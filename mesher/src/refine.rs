//! Constrained Delaunay triangulation of the graph, then quality and size refinement.
//!
//! spade has no sizing function, so sizes are reached in passes: refine for angles, find the triangles
//! whose longest edge exceeds h at their centroid, insert those centroids, repeat. The longest edge is
//! the measure (not an area-equivalent length) so that a finished mesh guarantees: no triangle edge is
//! longer than h evaluated at that triangle's centroid.
//!
//! Points spade adds on constraint edges lie on the chords of the initial polygon: curved outlines
//! stay the polygon built from `arc_tolerance`, they are not re-projected onto the curve.

use spade::{
    AngleLimit, ConstrainedDelaunayTriangulation, Point2, PositionInTriangulation,
    RefinementParameters, Triangulation,
};

use crate::error::MeshError;
use crate::mesh::{Mesh, NodeKind};
use crate::pslg::Pslg;
use crate::sizing::SizeField;
use crate::spec::{MeshSpec, Point, Refinement};

/// Size passes allowed before giving up; each pass shrinks the too-large triangles by about √3, so
/// this covers a size range far beyond 10⁹.
pub const MAX_SIZE_PASSES: usize = 60;

type Cdt = ConstrainedDelaunayTriangulation<Point2<f64>>;

fn triangulation_error(e: impl std::fmt::Debug) -> MeshError {
    MeshError::Triangulation {
        reason: format!("{e:?}"),
    }
}

/// Triangulates the checked graph and refines until every triangle meets the angle and size targets.
///
/// spade panics where it cannot go on (constraint conflicts, a circumcentre it cannot place for loss
/// of precision); the graph is checked so that this should not happen, and should it still, the panic
/// becomes a [`MeshError::Triangulation`] instead of taking the caller down.
pub(crate) fn mesh_graph(spec: &MeshSpec, pslg: &Pslg) -> Result<Mesh, MeshError> {
    std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
        triangulate_and_refine(spec, pslg)
    }))
    .unwrap_or_else(|payload| {
        let reason = payload
            .downcast_ref::<&str>()
            .map(|s| s.to_string())
            .or_else(|| payload.downcast_ref::<String>().cloned())
            .unwrap_or_else(|| "the triangulator panicked".into());
        Err(MeshError::Triangulation { reason })
    })
}

fn triangulate_and_refine(spec: &MeshSpec, pslg: &Pslg) -> Result<Mesh, MeshError> {
    // Node indices are u32 in the mesh.
    let limit = spec.max_nodes.min(u32::MAX as usize);
    let vertices: Vec<Point2<f64>> = pslg
        .vertices
        .iter()
        .map(|p| Point2::new(p[0], p[1]))
        .collect();
    let mut conflicts = Vec::new();
    let mut cdt = Cdt::try_bulk_load_cdt(vertices, pslg.edges.clone(), |e| conflicts.push(e))
        .map_err(triangulation_error)?;
    if let Some(e) = conflicts.first() {
        return Err(MeshError::Triangulation {
            reason: format!("constraint edge {e:?} conflicts with another"),
        });
    }
    if cdt.num_vertices() != pslg.vertices.len() {
        return Err(MeshError::Triangulation {
            reason: "the triangulator merged input vertices".into(),
        });
    }

    insert_graded_points(&mut cdt, spec)?;

    let field = SizeField::new(spec, &pslg.outlines);
    let angle = AngleLimit::from_deg(spec.angle_floor_deg);
    let mut passes = 0;
    loop {
        let budget = limit.saturating_sub(cdt.num_vertices());
        let result = cdt.refine(
            RefinementParameters::new()
                .with_angle_limit(angle)
                .with_max_additional_vertices(budget),
        );
        if !result.refinement_complete {
            return Err(MeshError::TooManyNodes {
                limit: spec.max_nodes,
                reached: cdt.num_vertices(),
            });
        }
        let oversized = oversized_centroids(&cdt, &field, &spec.bands);
        if oversized.is_empty() {
            break;
        }
        if passes == MAX_SIZE_PASSES {
            return Err(MeshError::RefinementIncomplete {
                passes,
                oversized: oversized.len(),
            });
        }
        if cdt.num_vertices() + oversized.len() > limit {
            return Err(MeshError::TooManyNodes {
                limit: spec.max_nodes,
                reached: cdt.num_vertices() + oversized.len(),
            });
        }
        for (c, hint) in oversized {
            cdt.insert_with_hint(c, hint).map_err(triangulation_error)?;
        }
        passes += 1;
    }
    let mesh = extract(&cdt, &field, spec.background_tag, &spec.regions);
    if spec.bands.is_empty() {
        return Ok(mesh);
    }
    let mesh = splice_bands(mesh, spec, &field)?;
    if mesh.nodes.len() > limit {
        return Err(MeshError::TooManyNodes {
            limit: spec.max_nodes,
            reached: mesh.nodes.len(),
        });
    }
    Ok(mesh)
}

/// Makes every graded point inside the domain a vertex, so that its layers are centred on a node
/// (a region's corner already is one; a point on a constraint edge splits it).
fn insert_graded_points(cdt: &mut Cdt, spec: &MeshSpec) -> Result<(), MeshError> {
    for refinement in &spec.refinements {
        if let Refinement::Graded { at, .. } = *refinement {
            let p = Point2::new(at[0], at[1]);
            if let PositionInTriangulation::OnFace(_)
            | PositionInTriangulation::OnEdge(_)
            | PositionInTriangulation::OnVertex(_) = cdt.locate(p)
            {
                cdt.insert(p).map_err(triangulation_error)?;
            }
        }
    }
    Ok(())
}

/// Replaces the throw-away triangles inside the graded bands by their grids.
fn splice_bands(mesh: Mesh, spec: &MeshSpec, field: &SizeField) -> Result<Mesh, MeshError> {
    let inside = |p: Point| spec.bands.iter().any(|b| b.holds(p) || b.on_inner_axis(p));
    let mut index = vec![u32::MAX; mesh.nodes.len()];
    let mut nodes = Vec::with_capacity(mesh.nodes.len());
    let mut node_kinds = Vec::with_capacity(mesh.nodes.len());
    for (k, &p) in mesh.nodes.iter().enumerate() {
        if !inside(p) {
            index[k] = nodes.len() as u32;
            nodes.push(p);
            node_kinds.push(mesh.node_kinds[k]);
        }
    }
    let mut triangles = Vec::with_capacity(mesh.triangles.len());
    for (t, tri) in mesh.triangles.iter().enumerate() {
        let c = mesh.corners(t);
        let centre = [
            (c[0][0] + c[1][0] + c[2][0]) / 3.0,
            (c[0][1] + c[1][1] + c[2][1]) / 3.0,
        ];
        if spec.bands.iter().any(|b| b.holds(centre)) {
            continue;
        }
        let mapped = tri.map(|k| index[k as usize]);
        if mapped.contains(&u32::MAX) {
            return Err(MeshError::Triangulation {
                reason: "a triangle outside a graded band uses a point inside it".into(),
            });
        }
        triangles.push(mapped);
    }
    for band in &spec.bands {
        let t = band.tol();
        let edge_nodes: Vec<(u32, Point)> = nodes
            .iter()
            .enumerate()
            .filter(|(_, p)| {
                let on_end = (p[1] - band.z_min).abs() <= t || (p[1] - band.z_max).abs() <= t;
                let on_outer = (p[0] - band.r_max).abs() <= t;
                (on_end && p[0] >= -t && p[0] <= band.r_max + t)
                    || (on_outer && p[1] >= band.z_min - t && p[1] <= band.z_max + t)
            })
            .map(|(k, p)| (k as u32, *p))
            .collect();
        band.tile(&edge_nodes, &mut nodes, &mut triangles)?;
    }
    node_kinds.resize(nodes.len(), NodeKind::Interior);
    for (kind, p) in node_kinds.iter_mut().zip(&nodes) {
        if p[0] == 0.0 {
            *kind = NodeKind::Axis;
        }
    }
    let tags = triangles
        .iter()
        .map(|tri| {
            let c = tri.map(|k| nodes[k as usize]);
            let centre = [
                (c[0][0] + c[1][0] + c[2][0]) / 3.0,
                (c[0][1] + c[1][1] + c[2][1]) / 3.0,
            ];
            field
                .region_at(centre)
                .map_or(spec.background_tag, |i| spec.regions[i].tag)
        })
        .collect();
    Ok(Mesh {
        nodes,
        triangles,
        tags,
        node_kinds,
    })
}

fn centroid(p: [Point2<f64>; 3]) -> Point2<f64> {
    Point2::new(
        (p[0].x + p[1].x + p[2].x) / 3.0,
        (p[0].y + p[1].y + p[2].y) / 3.0,
    )
}

/// Centroids of triangles whose longest edge exceeds the target there, each with a nearby vertex
/// as a location hint for the insertion.
fn oversized_centroids(
    cdt: &Cdt,
    field: &SizeField,
    bands: &[crate::Band],
) -> Vec<(Point2<f64>, spade::handles::FixedVertexHandle)> {
    let floor2 = field.floor() * field.floor();
    let mut out = Vec::new();
    for face in cdt.inner_faces() {
        let p = face.positions();
        let longest2 = (0..3)
            .map(|i| p[i].distance_2(p[(i + 1) % 3]))
            .fold(0.0, f64::max);
        if longest2 <= floor2 {
            continue;
        }
        let c = centroid(p);
        let at = [c.x, c.y];
        // Inside a band the triangles are thrown away: their size does not matter.
        if bands.iter().any(|b| b.holds(at)) {
            continue;
        }
        if field.exceeded_by(longest2.sqrt(), at, field.region_at(at)) {
            out.push((c, face.vertices()[0].fix()));
        }
    }
    out
}

/// Copies the triangulation into a [`Mesh`], tagging triangles by the region holding their centroid.
fn extract(cdt: &Cdt, field: &SizeField, background: u32, regions: &[crate::Region]) -> Mesh {
    let nodes: Vec<Point> = cdt
        .vertices()
        .map(|v| {
            let p = v.position();
            [p.x, p.y]
        })
        .collect();
    let mut triangles = Vec::with_capacity(cdt.num_inner_faces());
    let mut tags = Vec::with_capacity(cdt.num_inner_faces());
    for face in cdt.inner_faces() {
        triangles.push(face.vertices().map(|v| v.fix().index() as u32));
        let c = centroid(face.positions());
        tags.push(
            field
                .region_at([c.x, c.y])
                .map_or(background, |i| regions[i].tag),
        );
    }
    let mut node_kinds = vec![NodeKind::Interior; nodes.len()];
    for edge in cdt.convex_hull() {
        for v in edge.vertices() {
            node_kinds[v.fix().index()] = NodeKind::Outer;
        }
    }
    for (kind, p) in node_kinds.iter_mut().zip(&nodes) {
        if p[0] == 0.0 {
            *kind = NodeKind::Axis;
        }
    }
    Mesh {
        nodes,
        triangles,
        tags,
        node_kinds,
    }
}
