//! Global assembly: element integrals computed in parallel, scattered in a fixed order.
//!
//! Element matrices are computed with rayon into a vector in element order and then added
//! sequentially, so the floating-point sums do not depend on the number of threads.

use rayon::prelude::*;

use crate::dofs::DofMap;
use crate::element::ElementGeometry;
use crate::pattern::{Pattern, NO_SLOT};
use crate::weak_form;

/// Lower-triangle values of K for per-element, per-quadrature-point reluctivity `nu(e, q)`.
pub fn matrix(
    geom: &[ElementGeometry],
    pattern: &Pattern,
    nu: impl Fn(usize, usize) -> f64 + Sync,
) -> Vec<f64> {
    let local: Vec<[[f64; 3]; 3]> = geom
        .par_iter()
        .enumerate()
        .map(|(e, g)| weak_form::stiffness(g, |q| nu(e, q)))
        .collect();
    let mut values = vec![0.0; pattern.nnz()];
    for (k, slots) in local.iter().zip(&pattern.slots) {
        for a in 0..3 {
            for b in 0..3 {
                let s = slots[3 * a + b];
                if s != NO_SLOT {
                    values[s as usize] += k[a][b];
                }
            }
        }
    }
    values
}

/// Right-hand side over the free unknowns: loads from current densities `j_elem` (A/m² per
/// element), minus the coupling K_fc·a_c to the fixed nodal values `a_fixed` (per node, Wb/m),
/// minus the magnetisation load of the uniform background `b0` (T):
/// −∫ (ν − ν0) B0 · B(φ_a) dV, non-zero only in magnetic regions.
#[allow(clippy::too_many_arguments)]
pub fn rhs(
    triangles: &[[u32; 3]],
    geom: &[ElementGeometry],
    dofs: &DofMap,
    j_elem: &[f64],
    a_fixed: &[f64],
    b0: f64,
    nu: impl Fn(usize, usize) -> f64 + Sync,
) -> Vec<f64> {
    let local: Vec<[f64; 3]> = (0..geom.len())
        .into_par_iter()
        .map(|e| {
            let g = &geom[e];
            let tri = triangles[e];
            let mut f = weak_form::load(g, j_elem[e]);
            if b0 != 0.0 {
                let nu0 = 1.0 / crate::MU0;
                for (iq, q) in g.qp.iter().enumerate() {
                    let dnu = nu(e, iq) - nu0;
                    if dnu != 0.0 {
                        for (a, fa) in f.iter_mut().enumerate() {
                            *fa -= dnu * b0 * g.curl(a, q)[1] * q.dv; // (ν−ν0) B0 B_z(φ_a) dV
                        }
                    }
                }
            }
            let lifted = tri
                .iter()
                .any(|&v| dofs.free(v).is_none() && a_fixed[v as usize] != 0.0);
            if lifted {
                let k = weak_form::stiffness(g, |q| nu(e, q));
                for (a, fa) in f.iter_mut().enumerate() {
                    for b in 0..3 {
                        if dofs.free(tri[b]).is_none() {
                            *fa -= k[a][b] * a_fixed[tri[b] as usize];
                        }
                    }
                }
            }
            f
        })
        .collect();
    let mut out = vec![0.0; dofs.n_free];
    for (tri, f) in triangles.iter().zip(&local) {
        for a in 0..3 {
            if let Some(i) = dofs.free(tri[a]) {
                out[i] += f[a];
            }
        }
    }
    out
}
