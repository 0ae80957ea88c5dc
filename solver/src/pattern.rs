//! The sparsity pattern of the reduced system: built once per mesh, values refilled per solve.
//!
//! Only the lower triangle (row ≥ column) is stored, in compressed-column form, because the
//! Cholesky factorisation reads one side. Each element carries the value-array slot of each of
//! its local (a, b) couplings so assembly is a plain scatter.

use crate::dofs::DofMap;
use crate::mesh::FeMesh;

/// No slot: the coupling involves a fixed node or lies in the upper triangle.
pub const NO_SLOT: u32 = u32::MAX;

/// Lower-triangular compressed-column pattern with an element scatter map.
#[derive(Debug, Clone)]
pub struct Pattern {
    /// Number of rows and columns.
    pub n: usize,
    /// Column pointers (length n + 1).
    pub col_ptr: Vec<usize>,
    /// Row indices, sorted within each column.
    pub row_idx: Vec<usize>,
    /// Nodes per element (3 or 6).
    pub nodes_per_element: usize,
    /// For element e, slot of local coupling (a, b) at index (e·n + a)·n + b (n nodes per
    /// element), or [`NO_SLOT`].
    pub slots: Vec<u32>,
}

impl Pattern {
    /// Builds the pattern of the couplings of the elements of `mesh` among the free unknowns
    /// of `dofs`.
    pub fn new(mesh: &FeMesh, dofs: &DofMap) -> Self {
        Self::with_dense_group(mesh, dofs, &[])
    }

    /// The slots of element `e`'s couplings, row-major (n² entries).
    #[inline]
    pub fn element_slots(&self, e: usize) -> &[u32] {
        let n2 = self.nodes_per_element * self.nodes_per_element;
        &self.slots[e * n2..(e + 1) * n2]
    }

    /// As [`Self::new`], plus every coupling among the free unknowns `group` (a dense block,
    /// e.g. the surface nodes of an exact exterior).
    pub fn with_dense_group(mesh: &FeMesh, dofs: &DofMap, group: &[usize]) -> Self {
        let n = dofs.n_free;
        let ne = if mesh.order() == 2 { 6 } else { 3 };
        let mut cols: Vec<Vec<usize>> = vec![Vec::new(); n];
        for &i in group {
            for &j in group {
                if i >= j {
                    cols[j].push(i);
                }
            }
        }
        for t in 0..mesh.triangles.len() {
            let nodes = mesh.element_nodes(t);
            let g: Vec<Option<usize>> = nodes.iter().map(|&v| dofs.free(v)).collect();
            for a in 0..ne {
                for b in 0..ne {
                    if let (Some(i), Some(j)) = (g[a], g[b]) {
                        if i >= j {
                            cols[j].push(i);
                        }
                    }
                }
            }
        }
        let (col_ptr, row_idx) = compress(cols);
        let mut slots = Vec::with_capacity(mesh.triangles.len() * ne * ne);
        for t in 0..mesh.triangles.len() {
            let nodes = mesh.element_nodes(t);
            let g: Vec<Option<usize>> = nodes.iter().map(|&v| dofs.free(v)).collect();
            for a in 0..ne {
                for b in 0..ne {
                    let mut s = NO_SLOT;
                    if let (Some(i), Some(j)) = (g[a], g[b]) {
                        if i >= j {
                            let col = &row_idx[col_ptr[j]..col_ptr[j + 1]];
                            // present by construction
                            let k = col.binary_search(&i).unwrap_or(0);
                            s = (col_ptr[j] + k) as u32;
                        }
                    }
                    slots.push(s);
                }
            }
        }
        Self {
            n,
            nodes_per_element: ne,
            col_ptr,
            row_idx,
            slots,
        }
    }
    /// The lower-triangle pattern of `n` unknowns coupled within each list of `lists` (one per
    /// element, any length) and densely within `group`; no element scatter map (elements of
    /// varying size look their entries up with [`Self::slot`]).
    pub fn from_lists(n: usize, lists: &[Vec<usize>], group: &[usize]) -> Self {
        let mut cols: Vec<Vec<usize>> = vec![Vec::new(); n];
        for list in lists.iter().map(|l| &l[..]).chain(std::iter::once(group)) {
            for &i in list {
                for &j in list {
                    if i >= j {
                        cols[j].push(i);
                    }
                }
            }
        }
        let (col_ptr, row_idx) = compress(cols);
        Self {
            n,
            nodes_per_element: 0,
            col_ptr,
            row_idx,
            slots: Vec::new(),
        }
    }

    /// Slot of the coupling of unknowns (i, j), either order, if stored.
    pub fn slot(&self, i: usize, j: usize) -> Option<u32> {
        let (row, col) = if i >= j { (i, j) } else { (j, i) };
        let rows = &self.row_idx[self.col_ptr[col]..self.col_ptr[col + 1]];
        rows.binary_search(&row)
            .ok()
            .map(|k| (self.col_ptr[col] + k) as u32)
    }

    /// Number of stored entries.
    pub fn nnz(&self) -> usize {
        self.row_idx.len()
    }
}

/// Column pointers and sorted, deduplicated row indices of lower-triangle columns given as
/// unsorted lists with repeats.
fn compress(mut cols: Vec<Vec<usize>>) -> (Vec<usize>, Vec<usize>) {
    let mut col_ptr = Vec::with_capacity(cols.len() + 1);
    let mut row_idx = Vec::new();
    col_ptr.push(0);
    for c in &mut cols {
        c.sort_unstable();
        c.dedup();
        row_idx.extend_from_slice(c);
        col_ptr.push(row_idx.len());
    }
    (col_ptr, row_idx)
}
