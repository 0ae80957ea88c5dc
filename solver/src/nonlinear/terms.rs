//! Element residuals and tangents of the nonlinear problem and their assembly.

use rayon::prelude::*;

use crate::cholesky::SpdFactor;
use crate::element::{Local, LocalMatrix, MAX_NODES};
use crate::solve::Model;
use crate::weak_form::Tangent;
use crate::{assembly, weak_form, SolverError};

use super::Excitation;

impl Model {
    /// Element residuals (and tangents) in element order, computed in parallel.
    pub(super) fn element_terms(
        &self,
        a: &[f64],
        exc: Excitation<'_>,
        tangent: Tangent,
    ) -> Vec<(Local, LocalMatrix)> {
        self.init_linear_parts();
        self.geom
            .par_iter()
            .enumerate()
            .map(|(e, _)| self.element_term(e, a, exc, tangent))
            .collect()
    }

    /// Residual (and tangent) of element `e` at the coefficients `a`.
    pub(super) fn element_term(
        &self,
        e: usize,
        a: &[f64],
        exc: Excitation<'_>,
        tangent: Tangent,
    ) -> (Local, LocalMatrix) {
        let g = &self.geom[e];
        let mut ae = [0.0; MAX_NODES];
        for (k, &v) in self.mesh.element_nodes(e).iter().enumerate() {
            ae[k] = a[v as usize];
        }
        match &self.linear_parts()[e] {
            // Linear elements (most of the air, and magnets):
            // R = K a + [(ν − ν0) B0 − ν J0] ∫B_z(φ) − f, T = K, with K precomputed — the same
            // integrals, evaluated once.
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
                self.material(e),
                tangent,
            ),
        }
    }

    /// Builds [`Self::linear_parts`] if not yet built. Call it before a parallel loop that
    /// reaches `linear_parts`: built there, its own parallel build runs inside a worker whose
    /// siblings all wait on the same lazy cell, and the pool deadlocks (seen with 8–1024
    /// threads, and with 64 from `RAYON_NUM_THREADS`).
    pub(super) fn init_linear_parts(&self) {
        let _ = self.linear_parts();
    }

    /// Per element, the constant stiffness of a linear material (None for saturating ones),
    /// built on first use (see [`Self::init_linear_parts`]).
    pub(super) fn linear_parts(&self) -> &[Option<LinearElement>] {
        self.linear_elements.get_or_init(|| {
            self.geom
                .par_iter()
                .enumerate()
                .map(|(e, g)| {
                    let mat = self.material(e);
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
                        dnu: nu - 1.0 / crate::MU0,
                    })
                })
                .collect()
        })
    }

    /// Global residual over the free unknowns (scattered in element order: deterministic).
    pub(super) fn residual(&self, a: &[f64], exc: Excitation<'_>) -> Vec<f64> {
        self.assemble(a, exc, Tangent::None).0
    }

    /// Residual over the free unknowns and, unless `tangent` is [`Tangent::None`], the
    /// matrix's values on the pattern (empty otherwise), from one pass over the elements.
    pub(super) fn assemble(
        &self,
        a: &[f64],
        exc: Excitation<'_>,
        tangent: Tangent,
    ) -> (Vec<f64>, Vec<f64>) {
        let with_tangent = tangent != Tangent::None;
        let terms = self.element_terms(a, exc, tangent);
        let mut out = vec![0.0; self.dofs.n_free];
        for (e, (r, _)) in terms.iter().enumerate() {
            assembly::scatter_vector(&self.mesh, &self.dofs, e, r, &mut out);
        }
        self.add_exterior_residual(a, &mut out);
        let mut values = Vec::new();
        if with_tangent {
            values = vec![0.0; self.pattern.nnz()];
            for (e, (_, t)) in terms.iter().enumerate() {
                assembly::scatter_matrix(&self.pattern, e, t, &mut values);
            }
            self.add_exterior_matrix(&mut values);
        }
        (out, values)
    }

    /// Assembles and factorises the tangent at `a`.
    pub(super) fn tangent(
        &self,
        a: &[f64],
        exc: Excitation<'_>,
    ) -> Result<SpdFactor<'_>, SolverError> {
        self.symbolic
            .factorize(&self.assemble(a, exc, Tangent::Newton).1)
    }
}

/// The constant part of a linear element in the Newton residual.
#[derive(Debug, Clone)]
pub(crate) struct LinearElement {
    /// Element stiffness ∫ ν B(φ_a)·B(φ_b) dV.
    k: LocalMatrix,
    /// ∫ B_z(φ_a) dV.
    curl_z: Local,
    /// ν.
    nu: f64,
    /// ν − ν0.
    dnu: f64,
}
