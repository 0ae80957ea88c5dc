//! p-continuation: a solution of one hp model in the numbering of another on the same mesh.
//!
//! The basis is hierarchical (see [`super::basis`]): a vertex function, an edge function of
//! degree k and a bubble B_ij are the same functions at every element degree, so a degree-p
//! field is exactly a degree-(p + 1) field whose new coefficients are zero. The map goes
//! through what each function is attached to (vertex by mesh node, edge by id and degree,
//! cell by its (i, j) mode), never through positions, so it holds for any two degree
//! distributions; functions the target space lacks (a lowered degree) are dropped.

use super::model::{HpModel, HpSolution};
use crate::error::SolverError;

impl HpModel {
    /// The coefficients of `sol`, a solution of `lower` (a model of the same mesh), in this
    /// model's numbering: every function both spaces share keeps its coefficient, the others
    /// start at zero.
    pub fn prolong(&self, lower: &HpModel, sol: &HpSolution) -> Result<Vec<f64>, SolverError> {
        if lower.mesh.nodes != self.mesh.nodes || lower.mesh.triangles != self.mesh.triangles {
            return Err(SolverError::BadStart(
                "the start is a solution on another mesh".to_string(),
            ));
        }
        if sol.u.len() != lower.dofs.n_dofs() {
            return Err(SolverError::BadStart(format!(
                "the start has {} coefficients, its model {} unknowns",
                sol.u.len(),
                lower.dofs.n_dofs()
            )));
        }
        let mut u = vec![0.0; self.dofs.n_dofs()];
        for t in 0..self.mesh.triangles.len() {
            let (low_basis, low_active) = lower.active(t)?;
            let (basis, active) = self.active(t)?;
            let low_l2g = lower.dofs.local_to_global(t);
            let l2g = self.dofs.local_to_global(t);
            for (k, &i) in low_active.iter().enumerate() {
                let mode = low_basis.mode(i);
                // The active lists are ascending basis indices (vertices, edges by degree,
                // cells by total degree then i), hence the binary search.
                let target = basis
                    .index(mode)
                    .and_then(|j| active.binary_search(&j).ok());
                if let Some(pos) = target {
                    u[l2g[pos] as usize] = sol.u[low_l2g[k] as usize];
                }
            }
        }
        Ok(u)
    }
}
