//! The element cache of the nonlinear system: the constant stiffness of every linear element.

use rayon::prelude::*;

use crate::constants::MU0;
use crate::element::{Local, LocalMatrix, MAX_NODES};
use crate::solve::Model;
use crate::weak_form;

/// The constant part of a linear element: R = K a + [(ν − ν0) B0 − ν J0] ∫B_z(φ) − f, T = K.
#[derive(Debug, Clone)]
pub(crate) struct LinearElement {
    pub(super) k: LocalMatrix,
    pub(super) curl_z: Local,
    pub(super) nu: f64,
    pub(super) dnu: f64,
}

/// Per element of `model`, its constant stiffness when its material is linear (most of the
/// air, and magnets): the same integrals as the general kernel, evaluated once.
pub(crate) fn linear_elements(model: &Model) -> Vec<Option<LinearElement>> {
    model
        .geom
        .par_iter()
        .enumerate()
        .map(|(e, g)| {
            let mat = model.material(e);
            if !mat.is_linear() {
                return None;
            }
            let nu = mat.nu(0.0);
            let mut curl_z = [0.0; MAX_NODES];
            for q in &g.qp {
                let c = g.curls(q);
                for k in 0..g.nodes {
                    curl_z[k] += c[k][1] * q.dv;
                }
            }
            Some(LinearElement {
                k: weak_form::stiffness(g, |_| nu),
                curl_z,
                nu,
                dnu: nu - 1.0 / MU0,
            })
        })
        .collect()
}
