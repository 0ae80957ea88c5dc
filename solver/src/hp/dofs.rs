//! Degrees of freedom of the hp space: one per vertex, p_e − 1 per edge, (p − 1)(p − 2)/2 per
//! cell, with a polynomial degree p per element.
//!
//! * Edge degree, the minimum rule: an edge carries the functions of degree 2..p_e with p_e the
//!   smallest degree of the elements sharing it, so the space is conforming (continuous)
//!   without constraints. An element of degree p may therefore have an edge with fewer than
//!   p − 1 functions; its local list holds only the edge's functions (see [`ElementDofs`]).
//! * Global edge orientation: from the lower global vertex number to the higher. Local edge k
//!   of an element joins its local vertices k and (k + 1) % 3 and is *reversed* when the
//!   global vertex at local k is the higher one; the element kernel then flips the sign of
//!   the odd-degree edge functions so both neighbours see the same trace.
//! * Local order in an element: 3 vertex functions, then per edge 0, 1, 2 its functions of
//!   degree 2..p_e, then the cell (bubble) functions.
//! * Global order: vertex dofs in node order, then edge dofs edge by edge (edges sorted by
//!   their vertex pair, degrees ascending), then cell dofs element by element. The cell dofs
//!   are therefore one contiguous range at the end, and each element's its own sub-range,
//!   which is what static condensation needs. Everything is sorted, never hashed, so the same
//!   mesh and degrees always give the same numbers.

use std::ops::Range;

use crate::error::SolverError;
use crate::mesh::FeMesh;

/// Largest degree accepted: a bound against typos (p = 1000 would allocate half a million
/// functions per cell), far above the degrees the hp plan uses (up to 8, or 10).
pub const MAX_DEGREE: u32 = 24;

/// Number of cell (bubble) functions of a degree-p triangle.
pub fn cell_count(p: u32) -> usize {
    if p < 3 {
        0
    } else {
        ((p - 1) * (p - 2) / 2) as usize
    }
}

/// The degrees of freedom of one element, in the local order of the module doc.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ElementDofs {
    /// The element's degree p.
    pub degree: u32,
    /// Global edge id of each local edge k.
    pub edges: [u32; 3],
    /// Degree p_e of each local edge (≤ `degree`, by the minimum rule).
    pub edge_degree: [u32; 3],
    /// Whether local edge k runs against its global orientation.
    pub reversed: [bool; 3],
}

impl ElementDofs {
    /// Local positions of the functions of local edge k (degrees 2..p_e in ascending order).
    pub fn edge_range(&self, k: usize) -> Range<usize> {
        let start = 3
            + (0..k)
                .map(|m| self.edge_degree[m] as usize - 1)
                .sum::<usize>();
        start..start + self.edge_degree[k] as usize - 1
    }

    /// Local positions of the cell functions (last in the local list; condensed first).
    pub fn cell_range(&self) -> Range<usize> {
        let start = self.edge_range(2).end;
        start..start + cell_count(self.degree)
    }

    /// Number of local functions.
    pub fn len(&self) -> usize {
        self.cell_range().end
    }

    /// Always false: an element has at least its three vertex functions.
    pub fn is_empty(&self) -> bool {
        false
    }
}

/// The global numbering of the degrees of freedom of an hp space on a triangle mesh.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct HpDofs {
    elements: Vec<ElementDofs>,
    /// Global edges as (lower, higher) vertex, sorted.
    edges: Vec<[u32; 2]>,
    edge_degree: Vec<u32>,
    /// Per mesh node its vertex dof, or `u32::MAX` for nodes that are no triangle corner (the
    /// mid-edge nodes of a second-order mesh, which this space ignores).
    vertex_dof: Vec<u32>,
    n_vertex: usize,
    edge_first: Vec<u32>,
    cell_first: Vec<u32>,
    n_dofs: usize,
    local_offsets: Vec<usize>,
    local_dofs: Vec<u32>,
}

impl HpDofs {
    /// Numbers the dofs of `mesh` (corner triangles; mid nodes ignored) with degree
    /// `degrees[t]` on element t.
    pub fn new(mesh: &FeMesh, degrees: &[u32]) -> Result<Self, SolverError> {
        mesh.validate()?;
        let nt = mesh.triangles.len();
        for t in 0..nt {
            let p = degrees.get(t).copied().unwrap_or(0);
            if !(1..=MAX_DEGREE).contains(&p) {
                return Err(SolverError::BadDegree {
                    element: t,
                    degree: p,
                    max: MAX_DEGREE,
                });
            }
        }
        if degrees.len() > nt {
            return Err(SolverError::BadDegree {
                element: nt,
                degree: degrees[nt],
                max: MAX_DEGREE,
            });
        }

        // Vertices: the triangle corners, in node order.
        let mut vertex_dof = vec![u32::MAX; mesh.nodes.len()];
        for tri in &mesh.triangles {
            for &v in tri {
                vertex_dof[v as usize] = 0;
            }
        }
        let mut n_vertex = 0u32;
        for d in vertex_dof.iter_mut().filter(|d| **d == 0) {
            *d = n_vertex;
            n_vertex += 1;
        }

        // Edges: every (element, local edge) keyed by its sorted vertex pair; sorting groups
        // the sides of an edge and fixes the edge ids.
        let mut sides: Vec<([u32; 2], usize, usize)> = Vec::with_capacity(3 * nt);
        for (t, tri) in mesh.triangles.iter().enumerate() {
            for k in 0..3 {
                let (u, v) = (tri[k], tri[(k + 1) % 3]);
                sides.push(([u.min(v), u.max(v)], t, k));
            }
        }
        sides.sort_unstable();
        let mut edges: Vec<[u32; 2]> = Vec::new();
        let mut edge_degree: Vec<u32> = Vec::new();
        let mut element_edges = vec![[0u32; 3]; nt];
        let mut start = 0;
        while start < sides.len() {
            let key = sides[start].0;
            let end = start + sides[start..].iter().take_while(|s| s.0 == key).count();
            if end - start > 2 {
                return Err(SolverError::NonManifoldEdge {
                    a: key[0],
                    b: key[1],
                    count: end - start,
                });
            }
            let id = edges.len() as u32;
            edges.push(key);
            edge_degree.push(
                sides[start..end]
                    .iter()
                    .map(|s| degrees[s.1])
                    .min()
                    .unwrap_or(1),
            );
            for s in &sides[start..end] {
                element_edges[s.1][s.2] = id;
            }
            start = end;
        }

        // Global numbers: vertices, edges, cells.
        let mut next = n_vertex;
        let edge_first: Vec<u32> = edge_degree
            .iter()
            .map(|&p| {
                let first = next;
                next += p - 1;
                first
            })
            .collect();
        let cell_first: Vec<u32> = degrees[..nt]
            .iter()
            .map(|&p| {
                let first = next;
                next += cell_count(p) as u32;
                first
            })
            .collect();

        let mut elements = Vec::with_capacity(nt);
        let mut local_offsets = Vec::with_capacity(nt + 1);
        let mut local_dofs = Vec::new();
        local_offsets.push(0);
        for (t, tri) in mesh.triangles.iter().enumerate() {
            let e = ElementDofs {
                degree: degrees[t],
                edges: element_edges[t],
                edge_degree: element_edges[t].map(|id| edge_degree[id as usize]),
                reversed: [0, 1, 2].map(|k| tri[k] > tri[(k + 1) % 3]),
            };
            local_dofs.extend(tri.iter().map(|&v| vertex_dof[v as usize]));
            for id in e.edges {
                let first = edge_first[id as usize];
                local_dofs.extend(first..first + edge_degree[id as usize] - 1);
            }
            local_dofs.extend(cell_first[t]..cell_first[t] + cell_count(e.degree) as u32);
            local_offsets.push(local_dofs.len());
            elements.push(e);
        }
        Ok(Self {
            elements,
            edges,
            edge_degree,
            vertex_dof,
            n_vertex: n_vertex as usize,
            edge_first,
            cell_first,
            n_dofs: next as usize,
            local_offsets,
            local_dofs,
        })
    }

    /// Total number of degrees of freedom (fixed ones included).
    pub fn n_dofs(&self) -> usize {
        self.n_dofs
    }

    /// Number of vertex dofs (the mesh's triangle corners).
    pub fn n_vertex_dofs(&self) -> usize {
        self.n_vertex
    }

    /// Global range of all cell dofs (the last ones): what static condensation removes.
    pub fn cell_dof_range(&self) -> Range<usize> {
        let first = self.cell_first.first().map_or(self.n_dofs, |&f| f as usize);
        first..self.n_dofs
    }

    /// The element's degrees, edges and orientations.
    pub fn element(&self, t: usize) -> ElementDofs {
        self.elements[t]
    }

    /// Global dof of each local function of element t, in the local order.
    pub fn local_to_global(&self, t: usize) -> &[u32] {
        &self.local_dofs[self.local_offsets[t]..self.local_offsets[t + 1]]
    }

    /// Global dofs of the cell functions of element t (a sub-range of [`Self::cell_dof_range`]).
    pub fn cell_dofs(&self, t: usize) -> Range<u32> {
        let first = self.cell_first[t];
        first..first + cell_count(self.elements[t].degree) as u32
    }

    /// The global edges as (lower, higher) vertex, sorted; an edge's id is its index here.
    pub fn edges(&self) -> &[[u32; 2]] {
        &self.edges
    }

    /// Id of the edge joining vertices `a` and `b` (either order), if it exists.
    pub fn edge_id(&self, a: u32, b: u32) -> Option<usize> {
        self.edges.binary_search(&[a.min(b), a.max(b)]).ok()
    }

    /// Degree p_e of edge `e` (the minimum over the elements sharing it).
    pub fn edge_degree(&self, e: usize) -> u32 {
        self.edge_degree[e]
    }

    /// Global dofs of edge `e`, degrees 2..p_e in ascending order.
    pub fn edge_dofs(&self, e: usize) -> Range<u32> {
        let first = self.edge_first[e];
        first..first + self.edge_degree[e] - 1
    }

    /// The vertex dof of mesh node `node`, or `None` when it is no triangle corner.
    pub fn vertex_dof(&self, node: u32) -> Option<u32> {
        self.vertex_dof
            .get(node as usize)
            .copied()
            .filter(|&d| d != u32::MAX)
    }

    /// Per global dof whether it is fixed, given fixed `vertices` (mesh nodes) and `edges`
    /// (edge ids). Fixing an edge fixes its end vertices too: a value prescribed along an edge
    /// (A = 0 on the axis) holds at its ends. Unknown nodes or edges are refused.
    pub fn fixed_mask(&self, vertices: &[u32], edges: &[usize]) -> Result<Vec<bool>, SolverError> {
        let mut fixed = vec![false; self.n_dofs];
        let fix_vertex = |v: u32, fixed: &mut Vec<bool>| match self.vertex_dof(v) {
            Some(d) => {
                fixed[d as usize] = true;
                Ok(())
            }
            None => Err(SolverError::NotInSpace {
                what: "vertex",
                index: v as usize,
            }),
        };
        for &v in vertices {
            fix_vertex(v, &mut fixed)?;
        }
        for &e in edges {
            let Some(&[a, b]) = self.edges.get(e) else {
                return Err(SolverError::NotInSpace {
                    what: "edge",
                    index: e,
                });
            };
            fix_vertex(a, &mut fixed)?;
            fix_vertex(b, &mut fixed)?;
            for d in self.edge_dofs(e) {
                fixed[d as usize] = true;
            }
        }
        Ok(fixed)
    }

    /// Ids of the edges lying on the axis r = 0 (both end vertices at r exactly 0: the mesher
    /// puts axis nodes there exactly, and the existing pipeline tests `r == 0.0` too).
    pub fn axis_edges(&self, mesh: &FeMesh) -> Vec<usize> {
        (0..self.edges.len())
            .filter(|&e| {
                self.edges[e]
                    .iter()
                    .all(|&v| mesh.nodes[v as usize][0] == 0.0)
            })
            .collect()
    }

    /// Triangle corners at r = 0 (including those touching the axis only at a vertex, which
    /// need A = 0 as well).
    pub fn axis_vertices(&self, mesh: &FeMesh) -> Vec<u32> {
        (0..mesh.nodes.len() as u32)
            .filter(|&v| self.vertex_dof(v).is_some() && mesh.nodes[v as usize][0] == 0.0)
            .collect()
    }
}

#[cfg(test)]
#[path = "dofs_tests.rs"]
mod tests;
