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
use crate::pipeline::{discretise, outlines, RunError};

/// The hp problem of `case`: its corner mesh with the vertices the second-order pipeline
/// moves onto curved outlines (points the mesher adds on a curved boundary lie on chords),
/// and the edges that follow each outline exactly.
pub fn discretise_hp(case: &Case) -> Result<(Problem, Vec<CurvedEdge>), RunError> {
    let mut second = case.clone();
    second.mesh.order = 2;
    let mut problem = discretise(&second)?.problem;
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
