//! Element residuals and tangents of the nonlinear problem.

use rayon::prelude::*;

use crate::element::{Local, LocalMatrix, MAX_NODES};
use crate::weak_form::{self, Tangent};

use super::system::MagnetostaticSystem;

impl MagnetostaticSystem<'_, '_> {
    /// Residual and matrix of every element at `a`, in element order.
    pub(super) fn element_terms(&self, a: &[f64], tangent: Tangent) -> Vec<(Local, LocalMatrix)> {
        (0..self.model.geom.len())
            .into_par_iter()
            .map(|e| self.element_term(e, a, tangent))
            .collect()
    }

    /// Residual and matrix of element `e` at `a`.
    pub(super) fn element_term(
        &self,
        e: usize,
        a: &[f64],
        tangent: Tangent,
    ) -> (Local, LocalMatrix) {
        let m = self.model;
        let exc = self.exc;
        let g = &m.geom[e];
        let mut ae = [0.0; MAX_NODES];
        for (k, &v) in m.mesh.element_nodes(e).iter().enumerate() {
            ae[k] = a[v as usize];
        }
        match &self.linear[e] {
            Some(lin) => {
                let f = weak_form::load(g, exc.currents[e]);
                let shift = lin.dnu * exc.b0 - lin.nu * exc.polarizations[e];
                let mut r = [0.0; MAX_NODES];
                for k in 0..g.nodes {
                    let mut s = 0.0;
                    for l in 0..g.nodes {
                        s += lin.k[k][l] * ae[l];
                    }
                    r[k] = s + shift * lin.curl_z[k] - f[k];
                }
                (r, lin.k)
            }
            None => weak_form::residual_and_tangent(
                g,
                &ae,
                exc.b0,
                exc.currents[e],
                exc.polarizations[e],
                m.material(e),
                tangent,
            ),
        }
    }
}
