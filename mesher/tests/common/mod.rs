//! Shared specs and mesh invariant checks for the integration tests.
//!
//! The torquer-rod geometry is an invented demo scenario (a small-satellite magnetorquer), not a
//! published case; its numbers only drive the mesher.

#![allow(dead_code)]

use std::collections::HashMap;

use axicore_mesher::{Mesh, MeshSpec, NodeKind, Point, Refinement, Region, Shape};

/// Tag of the air.
pub const AIR: u32 = 0;
/// Tag of the rod core.
pub const CORE: u32 = 1;
/// Tag of the winding.
pub const WINDING: u32 = 2;

/// A rectangle region.
pub fn rect(tag: u32, r: [f64; 2], z: [f64; 2], size: f64) -> Region {
    Region {
        tag,
        shape: Shape::Rect {
            r_min: r[0],
            r_max: r[1],
            z_min: z[0],
            z_max: z[1],
        },
        size,
    }
}

/// Longest edge of triangle `t`.
pub fn longest_edge(mesh: &Mesh, t: usize) -> f64 {
    let p = mesh.corners(t);
    (0..3)
        .map(|i| (p[i][0] - p[(i + 1) % 3][0]).hypot(p[i][1] - p[(i + 1) % 3][1]))
        .fold(0.0, f64::max)
}

/// Centroid of triangle `t`.
pub fn centroid(mesh: &Mesh, t: usize) -> Point {
    let p = mesh.corners(t);
    [
        (p[0][0] + p[1][0] + p[2][0]) / 3.0,
        (p[0][1] + p[1][1] + p[2][1]) / 3.0,
    ]
}

/// Demo torquer rod: core r ≤ 5 mm, |z| ≤ 35 mm; winding 5–8 mm, |z| ≤ 30 mm; 0.2 mm at the corners.
pub fn torquer_spec() -> MeshSpec {
    let mut spec = MeshSpec::new(1.0, AIR);
    spec.far_size = 0.1;
    spec.grading = 0.25;
    spec.angle_floor_deg = 25.0;
    spec.regions = vec![
        Region {
            tag: CORE,
            shape: Shape::Rect {
                r_min: 0.0,
                r_max: 5e-3,
                z_min: -35e-3,
                z_max: 35e-3,
            },
            size: 1e-3,
        },
        Region {
            tag: WINDING,
            shape: Shape::Rect {
                r_min: 5e-3,
                r_max: 8e-3,
                z_min: -30e-3,
                z_max: 30e-3,
            },
            size: 1e-3,
        },
    ];
    spec.interior_arcs = vec![0.2];
    let corners = [
        [5e-3, 35e-3],
        [5e-3, -35e-3],
        [8e-3, 30e-3],
        [8e-3, -30e-3],
        [5e-3, 30e-3],
        [5e-3, -30e-3],
    ];
    spec.refinements = corners
        .iter()
        .map(|&at| Refinement::Point { at, size: 2e-4 })
        .collect();
    spec.refinements.push(Refinement::Boundary {
        region: 0,
        size: 5e-4,
    });
    spec
}

/// Checks the invariants every mesh must hold, panicking with a message on the first failure:
/// positive orientation, each edge in one (boundary) or two (interior) triangles, boundary edges only
/// on the axis or the outer polygon, axis edges joining `Axis` nodes, node kinds consistent with r.
pub fn check_invariants(mesh: &Mesh, spec: &MeshSpec) {
    let outer_radius = spec.outer_radius;
    let outer_tol = spec.arc_tolerance.max(axicore_mesher::OUTER_ARC_TOLERANCE);
    assert_eq!(mesh.tags.len(), mesh.triangles.len());
    assert_eq!(mesh.node_kinds.len(), mesh.nodes.len());
    let mut edge_count: HashMap<(u32, u32), usize> = HashMap::new();
    for (t, tri) in mesh.triangles.iter().enumerate() {
        assert!(
            mesh.triangle_area(t) > 0.0,
            "triangle {t} is not counter-clockwise"
        );
        for i in 0..3 {
            let (a, b) = (tri[i], tri[(i + 1) % 3]);
            *edge_count.entry((a.min(b), a.max(b))).or_default() += 1;
        }
    }
    for (&(a, b), &n) in &edge_count {
        let (pa, pb) = (mesh.nodes[a as usize], mesh.nodes[b as usize]);
        assert!(n == 1 || n == 2, "edge {a}-{b} is in {n} triangles");
        let on_axis = pa[0] == 0.0 && pb[0] == 0.0;
        if on_axis {
            assert_eq!(n, 1, "axis edge {a}-{b} must be a boundary edge");
            assert_eq!(mesh.node_kinds[a as usize], NodeKind::Axis);
            assert_eq!(mesh.node_kinds[b as usize], NodeKind::Axis);
        }
        if n == 1 && !on_axis {
            // Outer boundary: both ends on the outer polygon, which lies within R(1 − tol) .. R.
            for (k, p) in [(a, pa), (b, pb)] {
                assert_ne!(
                    mesh.node_kinds[k as usize],
                    NodeKind::Interior,
                    "hanging boundary node {k}"
                );
                let rho = p[0].hypot(p[1]);
                assert!(
                    rho >= outer_radius * (1.0 - outer_tol) && rho <= outer_radius * (1.0 + 1e-12)
                );
            }
        }
    }
    for (p, kind) in mesh.nodes.iter().zip(&mesh.node_kinds) {
        assert!(p[0] >= 0.0);
        assert_eq!(
            *kind == NodeKind::Axis,
            p[0] == 0.0,
            "node kind vs r at {p:?}"
        );
    }
    // Euler characteristic of a triangulated disc: V − E + F = 1.
    let v = mesh.nodes.len() as i64;
    let e = edge_count.len() as i64;
    let f = mesh.triangles.len() as i64;
    assert_eq!(
        v - e + f,
        1,
        "mesh is not a single disc, or has unused nodes"
    );
}
