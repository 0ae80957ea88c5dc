//! Global assembly: element integrals computed in parallel, scattered in a fixed order.
//!
//! Element matrices are computed with rayon into a vector in element order and then added
//! sequentially, so the floating-point sums do not depend on the number of threads.

use rayon::prelude::*;

use crate::dofs::DofMap;
use crate::element::{ElementGeometry, Local, LocalMatrix};
use crate::mesh::FeMesh;
use crate::pattern::{Pattern, NO_SLOT};
use crate::weak_form;

/// Adds element matrix `k` of element `e` into `values` through the pattern's scatter map.
#[inline]
pub fn scatter_matrix(pattern: &Pattern, e: usize, k: &LocalMatrix, values: &mut [f64]) {
    let n = pattern.nodes_per_element;
    let slots = pattern.element_slots(e);
    for a in 0..n {
        for b in 0..n {
            let s = slots[n * a + b];
            if s != NO_SLOT {
                values[s as usize] += k[a][b];
            }
        }
    }
}

/// Adds element vector `f` of element `e` into `out` (free unknowns only).
#[inline]
pub fn scatter_vector(mesh: &FeMesh, dofs: &DofMap, e: usize, f: &Local, out: &mut [f64]) {
    for (a, &v) in mesh.element_nodes(e).iter().enumerate() {
        if let Some(i) = dofs.free(v) {
            out[i] += f[a];
        }
    }
}

/// Lower-triangle values of K for per-element, per-quadrature-point reluctivity `nu(e, q)`.
pub fn matrix(
    geom: &[ElementGeometry],
    pattern: &Pattern,
    nu: impl Fn(usize, usize) -> f64 + Sync,
) -> Vec<f64> {
    let local: Vec<LocalMatrix> = geom
        .par_iter()
        .enumerate()
        .map(|(e, g)| weak_form::stiffness(g, |q| nu(e, q)))
        .collect();
    let mut values = vec![0.0; pattern.nnz()];
    for (e, k) in local.iter().enumerate() {
        scatter_matrix(pattern, e, k, &mut values);
    }
    values
}

/// Right-hand side over the free unknowns: loads from current densities `j_elem` (A/m² per
/// element) and prescribed polarizations `j0_elem` (T per element, ∫ ν J0 B_z(φ_a) dV), minus
/// the coupling K_fc·a_c to the fixed nodal values `a_fixed` (per node, Wb/m), minus the
/// magnetisation load of the uniform background `b0` (T): −∫ (ν − ν0) B0 · B(φ_a) dV,
/// non-zero only in magnetic regions.
#[allow(clippy::too_many_arguments)]
pub fn rhs(
    mesh: &FeMesh,
    geom: &[ElementGeometry],
    dofs: &DofMap,
    j_elem: &[f64],
    j0_elem: &[f64],
    a_fixed: &[f64],
    b0: f64,
    nu: impl Fn(usize, usize) -> f64 + Sync,
) -> Vec<f64> {
    let local: Vec<Local> = (0..geom.len())
        .into_par_iter()
        .map(|e| {
            let g = &geom[e];
            let nodes = mesh.element_nodes(e);
            let mut f = weak_form::load(g, j_elem[e]);
            if j0_elem[e] != 0.0 {
                let fm = weak_form::magnetization_load(g, |q| nu(e, q), j0_elem[e]);
                for a in 0..g.nodes {
                    f[a] += fm[a];
                }
            }
            if b0 != 0.0 {
                let nu0 = 1.0 / crate::constants::MU0;
                for (iq, q) in g.qp.iter().enumerate() {
                    let dnu = nu(e, iq) - nu0;
                    if dnu != 0.0 {
                        let c = g.curls(q);
                        for a in 0..g.nodes {
                            f[a] -= dnu * b0 * c[a][1] * q.dv; // (ν−ν0) B0 B_z(φ_a) dV
                        }
                    }
                }
            }
            let lifted = nodes
                .iter()
                .any(|&v| dofs.free(v).is_none() && a_fixed[v as usize] != 0.0);
            if lifted {
                let k = weak_form::stiffness(g, |q| nu(e, q));
                for a in 0..g.nodes {
                    for (b, &v) in nodes.iter().enumerate() {
                        if dofs.free(v).is_none() {
                            f[a] -= k[a][b] * a_fixed[v as usize];
                        }
                    }
                }
            }
            f
        })
        .collect();
    let mut out = vec![0.0; dofs.n_free];
    for (e, f) in local.iter().enumerate() {
        scatter_vector(mesh, dofs, e, f, &mut out);
    }
    out
}
