//! What the hp model needs beside the corner mesh: the exact curves its edges follow.
//!
//! The outlines are the ones second-order elements follow (the outer sphere, a sphere or
//! spheroid core, see [`crate::pipeline::outlines`]); an edge follows one when both its ends
//! lie on it and it separates two regions or bounds the mesh (an interior chord between two
//! outline vertices does not follow the outline).

use std::collections::HashMap;

use axicore_solver::hp::curve::{Curve, ON_CURVE_TOLERANCE};
use axicore_solver::hp::curved_edges::CurvedEdge;
use axicore_solver::mesh::FeMesh;
use axicore_solver::quadratic::Outline;

use axicore_solver::problem::Problem;

use crate::case::Case;
use crate::geometry;
use crate::pipeline::{mesh_of, outlines, pose, RunError};

/// Size ratio of successive layers of the corner splitting (0.15–0.2 is common practice
/// for hp grading; measured on the torquer rod, 0.15 needed the fewest unknowns for 1e-8).
pub const SPLIT_FACTOR: f64 = 0.15;

/// Lowest degree solved.
pub const P_MIN: u32 = 2;

/// The first degree to solve for a tolerance: two below the degree expected to meet it, so
/// that the estimate (which needs three degrees) exists there. Measured on the torquer rod
/// with the grading of [`layers_for`]: 1e-3 is met at p = 4, 1e-6 at 5, 1e-8 at 6; the
/// relation p = 2 + ⌈−log10(tol)/2⌉ matches. A case that converges more slowly simply goes on
/// raising the degree; one that converges faster wastes one degree at most.
pub fn first_degree(tolerance: f64) -> u32 {
    let expected = 2 + ((-tolerance.log10()) / 2.0).ceil().max(0.0) as u32;
    expected.saturating_sub(2).max(P_MIN)
}
/// Layers of geometric corner grading for a tolerance when the case sets none: one layer per
/// decade plus one (measured on the torquer rod, 8 × 70 mm, μr 5000, fineness 0.25: with these
/// layers 1e-3 … 1e-9 are met at p = 4 … 10 with true/estimate 0.1–0.7).
pub fn layers_for(tolerance: f64) -> u32 {
    ((-tolerance.log10()).ceil() as i64 + 1).clamp(3, 12) as u32
}

/// The hp problem of `case`: its corner mesh, graded toward the core's corners by
/// `mesh.corner_layers` layers of splitting ([`axicore_mesher::Mesh::split_toward`]; a few
/// triangles per layer, where the mesher's size-field grading adds about 110), with the
/// vertices the second-order pipeline moves onto curved outlines (points the mesher adds on a
/// curved boundary lie on chords), and the edges that follow each outline exactly.
pub fn discretise_hp(case: &Case) -> Result<(Problem, Vec<CurvedEdge>), RunError> {
    let layers = case.mesh.corner_layers;
    let mut second = case.clone();
    second.mesh.order = 2;
    second.mesh.corner_layers = 0;
    // The mesher's point refinement at the corners stays: with it the split layers start
    // from small elements, and the moment converged faster per degree than from the coarse
    // mesh alone (torquer rod, fineness 0.25: 1e-8 at p = 7 with 12k equations, against a
    // stall near 3e-8 at p = 8); splitting the winding's corners as well bought nothing.
    let corners = geometry::singular_points(case);
    let spec = geometry::mesh_spec(&second);
    let mut mesh = mesh_of(&second, &spec)?;
    let tol = 1e-9 * spec.outer_radius;
    for c in &corners {
        let nearest = (0..mesh.nodes.len()).min_by(|&a, &b| {
            let d = |i: usize| (mesh.nodes[i][0] - c[0]).hypot(mesh.nodes[i][1] - c[1]);
            d(a).total_cmp(&d(b))
        });
        if let Some(v) =
            nearest.filter(|&v| (mesh.nodes[v][0] - c[0]).hypot(mesh.nodes[v][1] - c[1]) <= tol)
        {
            mesh.split_toward(v as u32, SPLIT_FACTOR, layers)?;
        }
    }
    let mut problem = pose(&second, mesh)?.problem;
    // The mid nodes stay in the node list (the hp space gives them no unknowns) so the node
    // numbers of the Dirichlet data and the exterior remain valid.
    problem.mesh.mid.clear();
    let curved = curved_edges(case, &problem.mesh);
    Ok((problem, curved))
}

/// The exact curve of an outline (a circle when its semi-axes are equal).
fn curve_of(outline: &Outline) -> Curve {
    let Outline::Ellipse {
        centre_z,
        semi_r,
        semi_z,
    } = *outline;
    if semi_r == semi_z {
        Curve::Circle {
            centre: [0.0, centre_z],
            radius: semi_r,
        }
    } else {
        Curve::Ellipse {
            centre: [0.0, centre_z],
            semi_r,
            semi_z,
        }
    }
}

/// Every element edge of `mesh` (the corner mesh of `case`) that follows one of the case's
/// curved outlines, declared on both of its sides.
pub fn curved_edges(case: &Case, mesh: &FeMesh) -> Vec<CurvedEdge> {
    let curves: Vec<Curve> = outlines(case, case.effective_surroundings_radius())
        .iter()
        .map(curve_of)
        .collect();
    let mut sides: HashMap<(u32, u32), Vec<(usize, usize)>> = HashMap::new();
    for (t, tri) in mesh.triangles.iter().enumerate() {
        for k in 0..3 {
            let (a, b) = (tri[k], tri[(k + 1) % 3]);
            sides.entry((a.min(b), a.max(b))).or_default().push((t, k));
        }
    }
    let mut out = Vec::new();
    for ((a, b), held) in &sides {
        let separates = match held.as_slice() {
            [_] => true,
            [(t, _), (u, _)] => mesh.tags[*t] != mesh.tags[*u],
            _ => false,
        };
        if !separates {
            continue;
        }
        let (pa, pb) = (mesh.nodes[*a as usize], mesh.nodes[*b as usize]);
        // The axis is straight: an edge along it never follows an outline.
        if pa[0] == 0.0 && pb[0] == 0.0 {
            continue;
        }
        if let Some(curve) = curves.iter().find(|c| {
            c.level(pa).abs() <= ON_CURVE_TOLERANCE && c.level(pb).abs() <= ON_CURVE_TOLERANCE
        }) {
            for &(element, local_edge) in held {
                out.push(CurvedEdge {
                    element,
                    local_edge,
                    curve: *curve,
                });
            }
        }
    }
    out.sort_by_key(|c| (c.element, c.local_edge));
    out
}
