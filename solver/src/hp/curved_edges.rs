//! Which element edges of a mesh follow which exact curve: what the curved maps need beside
//! the corner mesh ([`FeMesh`] itself stays as the existing solver reads it).

use super::curve::Curve;
use super::map::ElementMap;
use crate::error::SolverError;
use crate::mesh::FeMesh;

/// One element edge on an exact curve.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CurvedEdge {
    /// Triangle index in the mesh.
    pub element: usize,
    /// Local edge k (0, 1, 2), joining local vertices k and (k + 1) % 3.
    pub local_edge: usize,
    /// The curve the edge follows.
    pub curve: Curve,
}

/// The curved edges of one mesh, sorted by (element, local edge) for lookup.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct CurvedEdges {
    list: Vec<CurvedEdge>,
}

impl CurvedEdges {
    /// Checks and sorts the declarations for `mesh`: each names an existing element and local
    /// edge once, and an edge shared by two triangles is declared on both with the same curve
    /// (one curved side alone would open a gap or an overlap between them).
    pub fn new(mesh: &FeMesh, mut list: Vec<CurvedEdge>) -> Result<Self, SolverError> {
        for c in &list {
            if c.element >= mesh.triangles.len() || c.local_edge > 2 {
                return Err(SolverError::BadCurvedEdge {
                    element: c.element,
                    edge: c.local_edge,
                    reason: format!(
                        "declared curved, but the mesh has {} triangles of 3 edges",
                        mesh.triangles.len()
                    ),
                });
            }
        }
        list.sort_by_key(|c| (c.element, c.local_edge));
        if let Some(w) = list
            .windows(2)
            .find(|w| (w[0].element, w[0].local_edge) == (w[1].element, w[1].local_edge))
        {
            return Err(SolverError::BadCurvedEdge {
                element: w[0].element,
                edge: w[0].local_edge,
                reason: "declared curved twice".into(),
            });
        }
        let curved = Self { list };
        // Every triangle edge by its sorted vertex pair, so the two sides of a shared edge meet.
        let mut sides: Vec<((u32, u32), usize, usize)> =
            Vec::with_capacity(3 * mesh.triangles.len());
        for (t, tri) in mesh.triangles.iter().enumerate() {
            for k in 0..3 {
                let (u, v) = (tri[k], tri[(k + 1) % 3]);
                sides.push(((u.min(v), u.max(v)), t, k));
            }
        }
        sides.sort_unstable();
        for w in sides.windows(2) {
            if w[0].0 == w[1].0 {
                let (a, b) = (curved.curve(w[0].1, w[0].2), curved.curve(w[1].1, w[1].2));
                if a != b {
                    let (element, edge) = if a.is_some() {
                        (w[0].1, w[0].2)
                    } else {
                        (w[1].1, w[1].2)
                    };
                    return Err(SolverError::BadCurvedEdge {
                        element,
                        edge,
                        reason: "the neighbouring triangle across this edge does not follow the same curve".into(),
                    });
                }
            }
        }
        Ok(curved)
    }

    /// The curve local edge `k` of `element` follows, if any.
    pub fn curve(&self, element: usize, k: usize) -> Option<Curve> {
        self.list
            .binary_search_by_key(&(element, k), |c| (c.element, c.local_edge))
            .ok()
            .map(|i| self.list[i].curve)
    }

    /// The curves of the three local edges of `element`.
    pub fn of_element(&self, element: usize) -> [Option<Curve>; 3] {
        [0, 1, 2].map(|k| self.curve(element, k))
    }

    /// The geometry map of triangle `element` of `mesh` (affine unless an edge is curved).
    pub fn element_map(&self, mesh: &FeMesh, element: usize) -> Result<ElementMap, SolverError> {
        ElementMap::new(mesh.corners(element), self.of_element(element), element)
    }

    /// The declarations, sorted by (element, local edge).
    pub fn iter(&self) -> impl Iterator<Item = &CurvedEdge> {
        self.list.iter()
    }

    /// Number of curved element edges (an edge shared by two triangles counts twice).
    pub fn len(&self) -> usize {
        self.list.len()
    }

    /// Whether no edge is curved (every map affine).
    pub fn is_empty(&self) -> bool {
        self.list.is_empty()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::f64::consts::PI;

    /// Two triangles filling the quarter disc of radius 1 (centre at the origin), both sharing
    /// the spoke at 45°, their outer edges on the circle; and a third, outside, across the arc
    /// of the first.
    fn quarter_disc() -> (FeMesh, Curve) {
        let c = Curve::Circle {
            centre: [0.0, 0.0],
            radius: 1.0,
        };
        let mesh = FeMesh {
            nodes: vec![
                [0.0, 0.0],
                c.point(0.0),
                c.point(0.25 * PI),
                [0.0, 1.0],
                [2.0, 0.0],
            ],
            triangles: vec![[0, 1, 2], [0, 2, 3], [1, 4, 2]],
            tags: vec![0, 0, 1],
            mid: Vec::new(),
        };
        (mesh, c)
    }

    #[test]
    fn declared_edges_are_found_and_give_blended_maps() {
        let (mesh, c) = quarter_disc();
        let list = vec![
            CurvedEdge {
                element: 2,
                local_edge: 2,
                curve: c,
            },
            CurvedEdge {
                element: 1,
                local_edge: 1,
                curve: c,
            },
            CurvedEdge {
                element: 0,
                local_edge: 1,
                curve: c,
            },
        ];
        let curved = CurvedEdges::new(&mesh, list).unwrap();
        assert_eq!(curved.len(), 3);
        assert_eq!(curved.of_element(0), [None, Some(c), None]);
        assert_eq!(curved.of_element(2), [None, None, Some(c)]);
        assert!(!curved.element_map(&mesh, 0).unwrap().is_affine());
        // Sorted, so the order of declaration does not matter.
        let order: Vec<_> = curved.iter().map(|e| e.element).collect();
        assert_eq!(order, [0, 1, 2]);
    }

    #[test]
    fn one_sided_duplicate_and_out_of_range_declarations_are_refused() {
        let (mesh, c) = quarter_disc();
        // Element 0's arc is shared with element 2, which is left straight.
        let one_sided = vec![CurvedEdge {
            element: 0,
            local_edge: 1,
            curve: c,
        }];
        assert!(matches!(
            CurvedEdges::new(&mesh, one_sided),
            Err(SolverError::BadCurvedEdge {
                element: 0,
                edge: 1,
                ..
            })
        ));
        let twice = vec![
            CurvedEdge {
                element: 1,
                local_edge: 1,
                curve: c,
            },
            CurvedEdge {
                element: 1,
                local_edge: 1,
                curve: c,
            },
        ];
        assert!(CurvedEdges::new(&mesh, twice).is_err());
        let outside = vec![CurvedEdge {
            element: 3,
            local_edge: 0,
            curve: c,
        }];
        assert!(CurvedEdges::new(&mesh, outside).is_err());
        let bad_edge = vec![CurvedEdge {
            element: 0,
            local_edge: 3,
            curve: c,
        }];
        assert!(CurvedEdges::new(&mesh, bad_edge).is_err());
    }
}
