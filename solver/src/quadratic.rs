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

    /// A point of the outline near `p`, reached along the level set's gradient (Newton steps
    /// on the level): nearly the orthogonal projection. (Moving at a fixed elliptic angle
    /// instead shifts points of a slender spheroid along its axis by far more than their
    /// distance to it, and folds elements.)
    fn project(&self, p: Point) -> Point {
        let Outline::Ellipse {
            centre_z,
            semi_r,
            semi_z,
        } = *self;
        let mut x = p;
        for _ in 0..6 {
            let f = self.level(x);
            let g = [
                2.0 * x[0] / (semi_r * semi_r),
                2.0 * (x[1] - centre_z) / (semi_z * semi_z),
            ];
            let g2 = g[0] * g[0] + g[1] * g[1];
            if g2 == 0.0 {
                break;
            }
            x = [x[0] - f * g[0] / g2, x[1] - f * g[1] / g2];
            if f.abs() < 1e-15 {
                break;
            }
        }
        x
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

/// Polygon vertices whose level (r/a)² + ((z − c)/b)² − 1 is below this count as on an
/// outline: about 7 % of the semi-axis, above the largest chord sagitta the mesher is allowed
/// (5 %; points it adds on boundary segments lie on chords). Only boundary and interface edges
/// are considered, and both corners must be near the same outline.
const ON_OUTLINE: f64 = 0.15;

/// The second-order version of the first-order `mesh`: nodes numbered after the corners in
/// order of first appearance (triangle order, edges 0–1, 1–2, 2–0), so the numbering is
/// deterministic. Boundary and interface edges whose corners lie near an outline are moved
/// onto it, corners and mid node, unless that would fold an element.
pub fn elevate(mesh: &FeMesh, outlines: &[Outline], min_angle_deg: f64) -> (FeMesh, Vec<MidNode>) {
    // A move may not take a triangle's smallest angle below half the mesher's minimum (nor
    // below its own before the move). A tighter floor (0.9×) reverted enough moves on an
    // axis-ratio-10 spheroid to cost it 4e-5 of its moment.
    let floor = 0.5 * min_angle_deg.to_radians();
    let original_angle: Vec<f64> = (0..mesh.triangles.len())
        .map(|t| smallest_angle(mesh.corners(t)))
        .collect();
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
    // Corners of edges on an outline move onto it first (points the mesher added on boundary
    // segments lie on chords), then every mid node is placed: the edge's midpoint, projected
    // onto the outline for outline edges.
    let nv = nv as usize;
    let mut outline_of: Vec<Option<usize>> = vec![None; added.len()];
    for (k, a) in added.iter().enumerate() {
        let (p, q) = (
            mesh.nodes[a.parents[0] as usize],
            mesh.nodes[a.parents[1] as usize],
        );
        if (a.on_boundary || interface[k]) && p[0] + q[0] > 0.0 {
            outline_of[k] = outlines
                .iter()
                .position(|o| o.level(p).abs() < ON_OUTLINE && o.level(q).abs() < ON_OUTLINE);
        }
    }
    let original = mesh.nodes.clone();
    let mut nodes = mesh.nodes.clone();
    let mut vertex_outline: Vec<Option<usize>> = vec![None; nv];
    for (k, a) in added.iter().enumerate() {
        if let Some(o) = outline_of[k] {
            for &v in &a.parents {
                // A vertex on the axis stays there (the projection keeps r = 0 only for the
                // poles, and they are already on the outline).
                if original[v as usize][0] > 0.0 {
                    vertex_outline[v as usize] = Some(o);
                }
            }
        }
    }
    for (v, o) in vertex_outline.iter().enumerate() {
        if let Some(o) = o {
            nodes[v] = outlines[*o].project(original[v]);
        }
    }
    let place = |nodes: &mut Vec<Point>, k: usize, outline: Option<usize>| {
        let [u, v] = added[k].parents;
        let (p, q) = (nodes[u as usize], nodes[v as usize]);
        let mut x = [0.5 * (p[0] + q[0]), 0.5 * (p[1] + q[1])];
        if let Some(o) = outline {
            x = outlines[o].project(x);
        }
        if nodes.len() == nv + k {
            nodes.push(x);
        } else {
            nodes[nv + k] = x;
        }
    };
    for k in 0..added.len() {
        place(&mut nodes, k, outline_of[k]);
    }
    let mut out = FeMesh {
        nodes,
        triangles: mesh.triangles.clone(),
        tags: mesh.tags.clone(),
        mid,
    };
    // Undo moves that fold an element (possible only where the mesh is coarse against the
    // curvature): its corners go back to the mesher's positions and its edges straighten,
    // with the edges of neighbours re-placed; repeated until every element is valid.
    for _pass in 0..8 {
        let bad: Vec<usize> = (0..out.triangles.len())
            .filter(|&t| {
                out.signed_area(t) <= 0.0
                    || smallest_angle(out.corners(t)) < floor.min(original_angle[t])
                    || ElementGeometry::quadratic(out.element_points(t)).is_none()
            })
            .collect();
        if bad.is_empty() {
            break;
        }
        for t in bad {
            for &v in &out.triangles[t] {
                out.nodes[v as usize] = original[v as usize];
                vertex_outline[v as usize] = None;
            }
            for &n in &out.mid[t] {
                outline_of[n as usize - nv] = None;
            }
        }
        for k in 0..added.len() {
            place(&mut out.nodes, k, outline_of[k]);
        }
    }
    (out, added)
}

/// The smallest interior angle of the triangle `c`, radians.
fn smallest_angle(c: [Point; 3]) -> f64 {
    let d = |a: Point, b: Point| (a[0] - b[0]).hypot(a[1] - b[1]);
    let (la, lb, lc) = (d(c[1], c[2]), d(c[2], c[0]), d(c[0], c[1]));
    let angle = |opp: f64, s1: f64, s2: f64| {
        ((s1 * s1 + s2 * s2 - opp * opp) / (2.0 * s1 * s2))
            .clamp(-1.0, 1.0)
            .acos()
    };
    angle(la, lb, lc)
        .min(angle(lb, lc, la))
        .min(angle(lc, la, lb))
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
            5.0,
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
