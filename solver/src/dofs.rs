//! Numbering of the unknowns: every node not held by a Dirichlet condition is free.

/// Marks a fixed node in [`DofMap::index`].
pub const FIXED: u32 = u32::MAX;

/// Map from node to unknown (equation) number.
#[derive(Debug, Clone)]
pub struct DofMap {
    /// For each node its equation number, or [`FIXED`].
    pub index: Vec<u32>,
    /// Number of free unknowns.
    pub n_free: usize,
    /// For each equation its node (the inverse of `index` on free nodes).
    pub free_nodes: Vec<u32>,
}

impl DofMap {
    /// Numbers the free nodes in node order (deterministic; the solver reorders for fill itself).
    pub fn new(n_nodes: usize, fixed_nodes: &[u32]) -> Self {
        let mut is_fixed = vec![false; n_nodes];
        for &n in fixed_nodes {
            if let Some(f) = is_fixed.get_mut(n as usize) {
                *f = true;
            }
        }
        let mut index = vec![FIXED; n_nodes];
        let mut free_nodes = Vec::with_capacity(n_nodes);
        for (i, f) in is_fixed.iter().enumerate() {
            if !f {
                index[i] = free_nodes.len() as u32;
                free_nodes.push(i as u32);
            }
        }
        Self {
            index,
            n_free: free_nodes.len(),
            free_nodes,
        }
    }

    /// Equation number of `node`, or `None` when it is fixed.
    #[inline]
    pub fn free(&self, node: u32) -> Option<usize> {
        let i = self.index[node as usize];
        (i != FIXED).then_some(i as usize)
    }
}
