//! Node → elements adjacency of a mesh: the patches that recovery fits over.

use crate::mesh::FeMesh;

/// Node → elements adjacency for patch assembly.
#[derive(Debug, Clone)]
pub struct Patches {
    start: Vec<u32>,
    elems: Vec<u32>,
}

impl Patches {
    /// Builds the adjacency of `mesh`.
    pub fn new(mesh: &FeMesh) -> Self {
        let mut start = vec![0u32; mesh.nodes.len() + 1];
        for t in &mesh.triangles {
            for &v in t {
                start[v as usize + 1] += 1;
            }
        }
        for i in 1..start.len() {
            start[i] += start[i - 1];
        }
        let mut fill = start.clone();
        let mut elems = vec![0u32; start[mesh.nodes.len()] as usize];
        for (e, t) in mesh.triangles.iter().enumerate() {
            for &v in t {
                elems[fill[v as usize] as usize] = e as u32;
                fill[v as usize] += 1;
            }
        }
        Self { start, elems }
    }

    /// Elements holding `node` as a corner.
    pub(crate) fn around(&self, node: u32) -> &[u32] {
        &self.elems[self.start[node as usize] as usize..self.start[node as usize + 1] as usize]
    }
}
