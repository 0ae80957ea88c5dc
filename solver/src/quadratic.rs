//! From a first-order mesh to a second-order one: a node on every edge, moved onto the curved
//! outline the edge approximates (sphere, spheroid, the outer air sphere), so that the
//! isoparametric elements follow the true boundary instead of its polygon.

use std::collections::HashMap;

use crate::element::ElementGeometry;
use crate::mesh::{FeMesh, Point};

/// A curved outline of the geometry in the (r, z) half-plane.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Outline {
    /// (r/a)² + ((z − c)/b)² = 1: a sphere (a = b) or a spheroid centred on the axis.
    Ellipse {
        /// Axial position c of the centre, m.
        centre_z: f64,
        /// Radial semi-axis a, m.
        semi_r: f64,
        /// Axial semi-axis b, m.
        semi_z: f64,
    },
}

impl Outline {
    /// (r/a)² + ((z − c)/b)² − 1 at `p` (0 on the outline).
    fn level(&self, p: Point) -> f64 {
        let Outline::Ellipse {
            centre_z,
            semi_r,
            semi_z,
        } = *self;
        (p[0] / semi_r).powi(2) + ((p[1] - centre_z) / semi_z).powi(2) - 1.0
    }

    /// The point of the outline at the same elliptic angle as `p`.
    fn project(&self, p: Point) -> Point {
        let Outline::Ellipse {
            centre_z,
            semi_r,
            semi_z,
        } = *self;
        let t = ((p[1] - centre_z) / semi_z).atan2(p[0] / semi_r);
        [semi_r * t.cos(), centre_z + semi_z * t.sin()]
    }
}

/// A node added on an edge.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct MidNode {
    /// The edge's corner nodes.
    pub parents: [u32; 2],
    /// Whether the edge lies on the boundary of the meshed domain (one triangle).
    pub on_boundary: bool,
}

/// Polygon vertices within this relative distance of an outline count as on it (the
/// mesher's chord sagitta is 1e-4 of the semi-axis by default; points it adds on boundary
/// segments lie on chords).
const ON_OUTLINE: f64 = 1e-2;

/// The second-order version of the first-order `mesh`: nodes numbered after the corners in
/// order of first appearance (triangle order, edges 0–1, 1–2, 2–0), so the numbering is
/// deterministic. Mid-edge nodes of boundary and interface edges whose corners lie on an
/// outline are moved onto it, unless that would fold an element.
pub fn elevate(mesh: &FeMesh, outlines: &[Outline]) -> (FeMesh, Vec<MidNode>) {
    let nv = mesh.nodes.len() as u32;
    let mut index: HashMap<(u32, u32), (u32, usize, u32)> = HashMap::new();
    let mut added: Vec<MidNode> = Vec::new();
    let mut mid = Vec::with_capacity(mesh.triangles.len());
    for (t, tri) in mesh.triangles.iter().enumerate() {
        let mut m = [0u32; 3];
        for k in 0..3 {
            let (u, v) = (tri[k], tri[(k + 1) % 3]);
            let key = (u.min(v), u.max(v));
            let entry = index.entry(key).or_insert_with(|| {
                added.push(MidNode {
                    parents: [key.0, key.1],
                    on_boundary: true,
                });
                (nv + added.len() as u32 - 1, 0, mesh.tags[t])
            });
            entry.1 += 1;
            m[k] = entry.0;
            if entry.1 == 2 {
                added[(entry.0 - nv) as usize].on_boundary = false;
            }
        }
        mid.push(m);
    }
    // Interface edges: the two triangles carry different tags.
    let mut interface = vec![false; added.len()];
    for (t, m) in mid.iter().enumerate() {
        for &n in m {
            let (_, count, first_tag) = index[&{
                let p = added[(n - nv) as usize].parents;
                (p[0], p[1])
            }];
            if count == 2 && first_tag != mesh.tags[t] {
                interface[(n - nv) as usize] = true;
            }
        }
    }
    let mut nodes = mesh.nodes.clone();
    let mut moved = vec![false; added.len()];
    for (k, a) in added.iter().enumerate() {
        let (p, q) = (
            mesh.nodes[a.parents[0] as usize],
            mesh.nodes[a.parents[1] as usize],
        );
        let mut x = [0.5 * (p[0] + q[0]), 0.5 * (p[1] + q[1])];
        if (a.on_boundary || interface[k]) && x[0] > 0.0 {
            if let Some(o) = outlines
                .iter()
                .find(|o| o.level(p).abs() < ON_OUTLINE && o.level(q).abs() < ON_OUTLINE)
            {
                x = o.project(x);
                moved[k] = true;
            }
        }
        nodes.push(x);
    }
    let mut out = FeMesh {
        nodes,
        triangles: mesh.triangles.clone(),
        tags: mesh.tags.clone(),
        mid,
    };
    // Undo moves that fold an element (possible only where the mesh is coarse against the
    // curvature), then re-check: an element is valid once all its mid nodes are straight.
    for t in 0..out.triangles.len() {
        let has_moved = out.mid[t].iter().any(|&n| moved[(n - nv) as usize]);
        if has_moved && ElementGeometry::quadratic(out.element_points(t)).is_none() {
            for &n in &out.mid[t] {
                let k = (n - nv) as usize;
                if moved[k] {
                    let [u, v] = added[k].parents;
                    let (p, q) = (out.nodes[u as usize], out.nodes[v as usize]);
                    out.nodes[n as usize] = [0.5 * (p[0] + q[0]), 0.5 * (p[1] + q[1])];
                    moved[k] = false;
                }
            }
        }
    }
    (out, added)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A fan of triangles filling the half disc of radius 1 in (r, z), tip at the origin.
    fn half_disc(n: usize) -> FeMesh {
        let mut nodes = vec![[0.0, 0.0]];
        for k in 0..=n {
            let th = std::f64::consts::PI * k as f64 / n as f64;
            nodes.push([th.sin().abs(), th.cos()]);
        }
        nodes[1][0] = 0.0;
        nodes[n + 1][0] = 0.0;
        let triangles = (0..n as u32).map(|k| [0, k + 2, k + 1]).collect::<Vec<_>>();
        FeMesh {
            tags: vec![0; triangles.len()],
            nodes,
            triangles,
            mid: Vec::new(),
        }
    }

    #[test]
    fn curved_elements_recover_the_disc_volume_the_polygon_misses() {
        // Volume of the unit ball, 4π/3: the polygon of 16 chords misses O(h²), the
        // isoparametric edges O(h⁴).
        let m = half_disc(16);
        let (q, added) = elevate(
            &m,
            &[Outline::Ellipse {
                centre_z: 0.0,
                semi_r: 1.0,
                semi_z: 1.0,
            }],
        );
        assert_eq!(added.len(), 2 * 16 + 1); // 17 spokes, 16 chords
        assert_eq!(q.nodes.len(), m.nodes.len() + added.len());
        let exact = 4.0 / 3.0 * std::f64::consts::PI;
        let volume = |mesh: &FeMesh, second: bool| -> f64 {
            (0..mesh.triangles.len())
                .map(|t| {
                    if second {
                        ElementGeometry::quadratic(mesh.element_points(t))
                            .unwrap()
                            .volume()
                    } else {
                        ElementGeometry::new(mesh.corners(t)).volume()
                    }
                })
                .sum()
        };
        let straight = (volume(&m, false) - exact).abs() / exact;
        let curved = (volume(&q, true) - exact).abs() / exact;
        assert!(straight > 5e-3, "{straight}");
        assert!(curved < 2e-5, "{curved}");
        // Interior (spoke) edges stay straight: their mid nodes sit at half radius.
        for (k, a) in added.iter().enumerate() {
            let x = q.nodes[m.nodes.len() + k];
            let rho = x[0].hypot(x[1]);
            if a.parents.contains(&0) {
                assert!((rho - 0.5).abs() < 1e-12);
                assert!(!a.on_boundary || x[0] == 0.0);
            } else {
                assert!((rho - 1.0).abs() < 1e-12);
            }
        }
    }
}
