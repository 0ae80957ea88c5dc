//! The magnetostatic problem of one model under one excitation, as Newton's loop sees it.
//!
//! The state is the per-node vector of reaction coefficients with the Dirichlet values
//! imposed; residual, update and matrices live on the free unknowns. The system owns its
//! element caches (the constant stiffness of every linear element), built eagerly when it is
//! made, so the model stays free of solver state and can be shared across threads as is.

use crate::assembly;
use crate::cholesky::SpdFactor;
use crate::dofs::FIXED;
use crate::error::SolverError;
use crate::problem::Excitation;
use crate::solve::Model;
use crate::weak_form::Tangent;

use crate::solution::Solution;

use super::cache::{linear_elements, LinearElement};
use super::newton::{self, Direction, NewtonReport, NewtonSettings, NonlinearSystem};

/// One model driven by one excitation, with its element caches.
pub(crate) struct MagnetostaticSystem<'m, 'e> {
    pub(super) model: &'m Model,
    pub(super) exc: Excitation<'e>,
    /// Per element: its constant stiffness when its material is linear.
    pub(super) linear: Vec<Option<LinearElement>>,
}

impl<'m, 'e> MagnetostaticSystem<'m, 'e> {
    /// The system of `model` under `exc`, its caches built now.
    pub(crate) fn new(model: &'m Model, exc: Excitation<'e>) -> Self {
        Self {
            model,
            exc,
            linear: linear_elements(model),
        }
    }

    /// Reaction coefficients `a` with the excitation's Dirichlet values imposed.
    pub(crate) fn with_fixed(&self, a: &[f64]) -> Vec<f64> {
        self.model.with_fixed(a, self.exc.a_fixed)
    }

    /// The residual and, unless `tangent` is [`Tangent::None`], the matrix values at `a`.
    pub(crate) fn assemble(&self, a: &[f64], tangent: Tangent) -> (Vec<f64>, Vec<f64>) {
        let m = self.model;
        let terms = self.element_terms(a, tangent);
        let mut out = vec![0.0; m.dofs.n_free];
        for (e, (r, _)) in terms.iter().enumerate() {
            assembly::scatter_vector(&m.mesh, &m.dofs, e, r, &mut out);
        }
        m.add_exterior_residual(a, &mut out);
        let mut values = Vec::new();
        if tangent != Tangent::None {
            values = vec![0.0; m.pattern.nnz()];
            for (e, (_, t)) in terms.iter().enumerate() {
                assembly::scatter_matrix(&m.pattern, e, t, &mut values);
            }
            m.add_exterior_matrix(&mut values);
        }
        (out, values)
    }

    /// Newton's iteration from the coefficients `a` (Dirichlet values imposed).
    pub(crate) fn newton(
        &self,
        a: Vec<f64>,
        settings: &NewtonSettings,
    ) -> Result<(Solution, NewtonReport, Option<SpdFactor<'m>>), SolverError> {
        let (a, report, factor) = newton::iterate(self, a, settings)?;
        Ok((Solution { a, b0: self.exc.b0 }, report, factor))
    }
}

impl<'m> NonlinearSystem for MagnetostaticSystem<'m, '_> {
    type Factor = SpdFactor<'m>;
    type Matrix = Vec<f64>;

    fn reference_state(&self) -> Vec<f64> {
        self.with_fixed(&vec![0.0; self.model.mesh.nodes.len()])
    }

    fn residual(&self, a: &[f64]) -> Vec<f64> {
        self.assemble(a, Tangent::None).0
    }

    fn residual_and_matrix(&self, a: &[f64], direction: Direction) -> (Vec<f64>, Vec<f64>) {
        self.assemble(
            a,
            match direction {
                Direction::Newton => Tangent::Newton,
                Direction::Secant => Tangent::Secant,
            },
        )
    }

    fn factorize(&self, values: &Vec<f64>) -> Result<SpdFactor<'m>, SolverError> {
        self.model.symbolic.factorize(values)
    }

    fn step(&self, a: &mut [f64], delta: &[f64], alpha: f64) {
        for (d, &n) in delta.iter().zip(&self.model.dofs.free_nodes) {
            a[n as usize] += alpha * d;
        }
    }

    fn state_norm(&self, a: &[f64]) -> f64 {
        self.model.free_norm(a)
    }

    fn relax(&self, a: &mut [f64], r: &[f64], floor: f64) -> usize {
        self.relax_knee(a, r, floor)
    }
}

impl Model {
    /// Reaction coefficients `a` with the Dirichlet values of `a_fixed` imposed.
    pub(crate) fn with_fixed(&self, a: &[f64], a_fixed: &[f64]) -> Vec<f64> {
        (0..self.mesh.nodes.len())
            .map(|n| {
                if self.dofs.index[n] == FIXED {
                    a_fixed[n]
                } else {
                    a[n]
                }
            })
            .collect()
    }

    /// ‖a‖ over the free nodes.
    pub(crate) fn free_norm(&self, a: &[f64]) -> f64 {
        self.dofs
            .free_nodes
            .iter()
            .map(|&n| a[n as usize] * a[n as usize])
            .sum::<f64>()
            .sqrt()
    }
}
