//! Geometric refinement toward a vertex by splitting the triangles around it: the grading
//! high-order elements want at a singular corner, with a few triangles per layer.
//!
//! Each layer cuts every triangle (v, a, b) that has the vertex v as a corner at the points
//! p_a = v + σ (a − v) and p_b = v + σ (b − v): the small triangle (v, p_a, p_b), similar to
//! the original, stays at the vertex, and the trapezoid (p_a, a, b, p_b) becomes two triangles
//! split along its shorter diagonal. Edges from v are cut at the same point from both sides,
//! so the mesh stays conforming; n layers leave triangles σⁿ the original size at v and add
//! 2k triangles per layer for k triangles around it (against about 110 per layer for the size
//! field of [`crate::Refinement::Graded`], which suits low-order elements that need small
//! elements all around the corner). The cut points of boundary and interface edges lie on those
//! edges, so straight outlines stay exact.

use crate::error::MeshError;
use crate::mesh::{Mesh, NodeKind};
use crate::spec::Point;

/// Most layers one split may add (σ^40 is below any length the solver can resolve).
pub const MAX_SPLIT_LAYERS: u32 = 40;

fn lerp(a: Point, b: Point, t: f64) -> Point {
    [a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])]
}

fn dist2(a: Point, b: Point) -> f64 {
    (a[0] - b[0]).powi(2) + (a[1] - b[1]).powi(2)
}

impl Mesh {
    /// Splits the triangles around node `vertex` `layers` times at the fraction `factor` of
    /// their edges from the vertex (see the module documentation).
    pub fn split_toward(&mut self, vertex: u32, factor: f64, layers: u32) -> Result<(), MeshError> {
        if vertex as usize >= self.nodes.len() {
            return Err(MeshError::BadSize {
                what: "split vertex (node index)",
                value: vertex as f64,
            });
        }
        if !(factor > 0.0 && factor < 1.0) {
            return Err(MeshError::BadSize {
                what: "split factor (must be in (0, 1))",
                value: factor,
            });
        }
        if layers > MAX_SPLIT_LAYERS {
            return Err(MeshError::BadSize {
                what: "split layers (at most 40)",
                value: layers as f64,
            });
        }
        for _ in 0..layers {
            self.split_once(vertex, factor);
        }
        Ok(())
    }

    fn split_once(&mut self, v: u32, factor: f64) {
        let pv = self.nodes[v as usize];
        let around: Vec<usize> = (0..self.triangles.len())
            .filter(|&t| self.triangles[t].contains(&v))
            .collect();
        // One cut point per edge from v, shared by the two triangles on that edge.
        let mut cut: Vec<(u32, u32)> = Vec::new();
        let mut cut_of = |mesh: &mut Mesh, a: u32| -> u32 {
            if let Some(&(_, p)) = cut.iter().find(|(x, _)| *x == a) {
                return p;
            }
            let pa = mesh.nodes[a as usize];
            let x = lerp(pv, pa, factor);
            let kind = match (mesh.node_kinds[v as usize], mesh.node_kinds[a as usize]) {
                (NodeKind::Axis, NodeKind::Axis) => NodeKind::Axis,
                (NodeKind::Outer, NodeKind::Outer) => NodeKind::Outer,
                _ => NodeKind::Interior,
            };
            let id = mesh.nodes.len() as u32;
            mesh.nodes.push(x);
            mesh.node_kinds.push(kind);
            cut.push((a, id));
            id
        };
        for t in around {
            let tri = self.triangles[t];
            let k = tri.iter().position(|&x| x == v).expect("holds v");
            let (a, b) = (tri[(k + 1) % 3], tri[(k + 2) % 3]);
            let (pa, pb) = (cut_of(self, a), cut_of(self, b));
            let tag = self.tags[t];
            self.triangles[t] = [v, pa, pb];
            let (xa, xb) = (self.nodes[a as usize], self.nodes[b as usize]);
            let (ya, yb) = (self.nodes[pa as usize], self.nodes[pb as usize]);
            // The trapezoid (pa, a, b, pb), counter-clockwise like (v, a, b), split along its
            // shorter diagonal.
            if dist2(ya, xb) <= dist2(xa, yb) {
                self.triangles.push([pa, a, b]);
                self.triangles.push([pa, b, pb]);
            } else {
                self.triangles.push([pa, a, pb]);
                self.triangles.push([a, b, pb]);
            }
            self.tags.push(tag);
            self.tags.push(tag);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::mesh::signed_area;
    use std::collections::HashMap;

    /// A fan of four triangles around the node (1, 1) of the square [0, 2]², two tags.
    fn fan() -> Mesh {
        Mesh {
            nodes: vec![[1.0, 1.0], [0.0, 0.0], [2.0, 0.0], [2.0, 2.0], [0.0, 2.0]],
            triangles: vec![[0, 1, 2], [0, 2, 3], [0, 3, 4], [0, 4, 1]],
            tags: vec![1, 1, 2, 2],
            node_kinds: vec![NodeKind::Interior; 5],
        }
    }

    #[test]
    fn splitting_keeps_the_area_orientation_tags_and_conformity() {
        let mut m = fan();
        m.split_toward(0, 0.2, 5).unwrap();
        // Each layer adds two triangles per triangle at the vertex (4): 4 + 5·8.
        assert_eq!(m.triangles.len(), 44);
        let area: f64 = m
            .triangles
            .iter()
            .map(|t| {
                signed_area(
                    m.nodes[t[0] as usize],
                    m.nodes[t[1] as usize],
                    m.nodes[t[2] as usize],
                )
            })
            .inspect(|&a| assert!(a > 0.0))
            .sum();
        assert!((area - 4.0).abs() < 1e-12, "{area}");
        let tag_area = |tag: u32| -> f64 {
            m.triangles
                .iter()
                .zip(&m.tags)
                .filter(|(_, &g)| g == tag)
                .map(|(t, _)| {
                    signed_area(
                        m.nodes[t[0] as usize],
                        m.nodes[t[1] as usize],
                        m.nodes[t[2] as usize],
                    )
                })
                .sum()
        };
        assert!((tag_area(1) - 2.0).abs() < 1e-12 && (tag_area(2) - 2.0).abs() < 1e-12);
        // Conforming: every edge is held by one (boundary) or two triangles in opposite
        // directions, and no node lies inside another triangle's edge.
        let mut edges: HashMap<(u32, u32), i32> = HashMap::new();
        for t in &m.triangles {
            for k in 0..3 {
                *edges.entry((t[k], t[(k + 1) % 3])).or_default() += 1;
            }
        }
        for (&(a, b), &n) in &edges {
            assert_eq!(n, 1);
            let boundary = !edges.contains_key(&(b, a));
            if boundary {
                // Boundary edges lie on the square's sides.
                let (p, q) = (m.nodes[a as usize], m.nodes[b as usize]);
                let on_side = |i: usize| (p[i] == q[i]) && (p[i] == 0.0 || p[i] == 2.0);
                assert!(on_side(0) || on_side(1), "{p:?} {q:?}");
            }
        }
    }

    #[test]
    fn the_triangles_at_the_vertex_shrink_geometrically() {
        let mut m = fan();
        m.split_toward(0, 0.15, 6).unwrap();
        let longest_at_vertex = m
            .triangles
            .iter()
            .filter(|t| t.contains(&0))
            .flat_map(|t| (0..3).map(move |k| (t[k], t[(k + 1) % 3])))
            .map(|(a, b)| dist2(m.nodes[a as usize], m.nodes[b as usize]).sqrt())
            .fold(0.0, f64::max);
        // Originally the longest edge at the vertex is the square's side, 2.
        let want = 2.0 * 0.15f64.powi(6);
        assert!(
            (longest_at_vertex - want).abs() < 1e-12 * want.max(1e-300) + 1e-15,
            "{longest_at_vertex} vs {want}"
        );
    }

    #[test]
    fn bad_split_requests_are_refused() {
        let mut m = fan();
        assert!(m.split_toward(9, 0.2, 1).is_err());
        assert!(m.split_toward(0, 1.0, 1).is_err());
        assert!(m.split_toward(0, 0.0, 1).is_err());
        assert!(m.split_toward(0, f64::NAN, 1).is_err());
        assert!(m.split_toward(0, 0.2, 41).is_err());
        assert_eq!(m, fan());
    }
}
