//! The triangle mesh as the solver sees it: no knowledge of how it was made.

use crate::error::SolverError;

/// A point (r, z) in metres.
pub type Point = [f64; 2];

/// Triangles in the (r, z) half-plane with a region tag per triangle: first order (corner
/// nodes only) or second order (plus a node on every edge, see [`crate::quadratic`]).
#[derive(Debug, Clone, Default)]
pub struct FeMesh {
    /// Node coordinates (r, z) in m.
    pub nodes: Vec<Point>,
    /// Triangles as corner node indices, counter-clockwise in (r, z).
    pub triangles: Vec<[u32; 3]>,
    /// Region tag of each triangle.
    pub tags: Vec<u32>,
    /// Second order: per triangle the nodes of its edges 0–1, 1–2, 2–0; empty for first order.
    pub mid: Vec<[u32; 3]>,
}

/// The nodes of one element (3 or 6), as a slice.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ElementNodes {
    ids: [u32; 6],
    len: usize,
}

impl std::ops::Deref for ElementNodes {
    type Target = [u32];
    fn deref(&self) -> &[u32] {
        &self.ids[..self.len]
    }
}

impl FeMesh {
    /// Checks indices, orientation and r ≥ 0, so later stages can index without panicking.
    pub fn validate(&self) -> Result<(), SolverError> {
        for (i, p) in self.nodes.iter().enumerate() {
            if p[0].is_nan() || p[0] < 0.0 || !p[1].is_finite() || !p[0].is_finite() {
                return Err(SolverError::NegativeRadius { node: i, r: p[0] });
            }
        }
        if !self.mid.is_empty() && self.mid.len() != self.triangles.len() {
            return Err(SolverError::BadMaterial(format!(
                "second-order mesh with {} mid-edge node triples for {} triangles",
                self.mid.len(),
                self.triangles.len()
            )));
        }
        for (t, tri) in self.triangles.iter().enumerate() {
            for &n in tri {
                if n as usize >= self.nodes.len() {
                    return Err(SolverError::BadNodeIndex {
                        triangle: t,
                        node: n,
                        nodes: self.nodes.len(),
                    });
                }
            }
            if let Some(m) = self.mid.get(t) {
                if let Some(&n) = m.iter().find(|&&n| n as usize >= self.nodes.len()) {
                    return Err(SolverError::BadNodeIndex {
                        triangle: t,
                        node: n,
                        nodes: self.nodes.len(),
                    });
                }
            }
            let area = self.signed_area(t);
            if area.is_nan() || area <= 0.0 {
                return Err(SolverError::BadTriangle { triangle: t, area });
            }
        }
        Ok(())
    }

    /// Element order: 1 (3-node) or 2 (6-node triangles).
    pub fn order(&self) -> usize {
        if self.mid.is_empty() {
            1
        } else {
            2
        }
    }

    /// Nodes of element `t`: corners, then (second order) the mid-edge nodes.
    #[inline]
    pub fn element_nodes(&self, t: usize) -> ElementNodes {
        let c = self.triangles[t];
        match self.mid.get(t) {
            Some(m) => ElementNodes {
                ids: [c[0], c[1], c[2], m[0], m[1], m[2]],
                len: 6,
            },
            None => ElementNodes {
                ids: [c[0], c[1], c[2], 0, 0, 0],
                len: 3,
            },
        }
    }

    /// Node coordinates of element `t` (corners, then mid-edge nodes; unused entries zero).
    pub fn element_points(&self, t: usize) -> [Point; 6] {
        let mut p = [[0.0; 2]; 6];
        for (k, &n) in self.element_nodes(t).iter().enumerate() {
            p[k] = self.nodes[n as usize];
        }
        p
    }

    /// Signed area of triangle `t` in m² (positive when counter-clockwise).
    pub fn signed_area(&self, t: usize) -> f64 {
        let [a, b, c] = self.corners(t);
        0.5 * ((b[0] - a[0]) * (c[1] - a[1]) - (c[0] - a[0]) * (b[1] - a[1]))
    }

    /// The three corner points of triangle `t`.
    pub fn corners(&self, t: usize) -> [Point; 3] {
        let tri = self.triangles[t];
        [
            self.nodes[tri[0] as usize],
            self.nodes[tri[1] as usize],
            self.nodes[tri[2] as usize],
        ]
    }

    /// Centroid of triangle `t`.
    pub fn centroid(&self, t: usize) -> Point {
        let [a, b, c] = self.corners(t);
        [(a[0] + b[0] + c[0]) / 3.0, (a[1] + b[1] + c[1]) / 3.0]
    }

    /// Longest edge of triangle `t` in m.
    pub fn longest_edge(&self, t: usize) -> f64 {
        let p = self.corners(t);
        (0..3)
            .map(|k| (p[k][0] - p[(k + 1) % 3][0]).hypot(p[k][1] - p[(k + 1) % 3][1]))
            .fold(0.0, f64::max)
    }

    /// Largest region tag plus one (length of a per-tag table).
    pub fn tag_count(&self) -> usize {
        self.tags.iter().map(|&t| t as usize + 1).max().unwrap_or(0)
    }
}
