//! Saturating materials: Newton–Raphson on R(a) = 0 with the consistent tangent and a line
//! search on the convex magnetic energy (see [`crate::weak_form`] for R and T).
//!
//! Why this is robust: R is the gradient of the energy Π(a) = ∫ w(|B|) − ν0 B0·B dV − ∫ J A dV,
//! which is strictly convex for every monotone law, and T is its Hessian (SPD, so one sparse
//! Cholesky pattern serves every iteration). A full Newton step is taken when it lowers ‖R‖;
//! otherwise the step length minimises Π along the Newton direction, found as the root of the
//! increasing function g(α) = R(a + α δ)·δ. Either way Π decreases, so the iteration cannot
//! diverge, and near the solution full steps give quadratic convergence.

//!
//! Files: this one holds the settings, the report and the strategy (which start, which
//! budget); [`newton`] the iteration and its line search; [`local`] the knee elimination
//! between its steps; [`guess`] the first guesses; [`terms`] the element residuals and
//! tangents and their assembly.

mod guess;
mod local;
mod newton;
mod terms;

pub(crate) use terms::LinearElement;

pub use crate::problem::Excitation;

use crate::cholesky::SpdFactor;
use crate::dofs::FIXED;
use crate::field::Solution;
use crate::solve::Model;
use crate::{assembly, SolverError};

/// Iterations a second-order solve spends from the linear guess before it restarts from the
/// first-order field (see `first_order_guess`); mild cases converge well within it (the
/// built-in example at 40 mA: 3).
const DIRECT_BUDGET: usize = 12;

/// Iterations a second-order solve from a given start (continuation, warm start) spends
/// before it falls back to the cold strategy.
const WARM_BUDGET: usize = 25;

/// Stopping rules of the Newton iteration.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NewtonSettings {
    /// Stop when ‖R‖ ≤ this × ‖R(0)‖ (the residual with no reaction field) …
    pub residual_tol: f64,
    /// … and the last update ‖Δa‖ ≤ this × ‖a‖.
    pub update_tol: f64,
    /// Give up after this many iterations.
    pub max_iterations: usize,
}

impl Default for NewtonSettings {
    fn default() -> Self {
        Self {
            residual_tol: 1e-8,
            update_tol: 1e-10,
            max_iterations: 50,
        }
    }
}

/// How a converged Newton solve went.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct NewtonReport {
    /// Newton iterations (corrections applied) done.
    pub iterations: usize,
    /// Tangent factorisations done (the last correction may reuse the previous tangent).
    pub factorizations: usize,
    /// Iterations of abandoned attempts, included in `iterations` (second order: from a given
    /// start, or from the linear guess, that did not converge within their budgets).
    pub abandoned_iterations: usize,
    /// Iterations of the first-order solve a second-order one started from (not included in
    /// `iterations`; each costs about a quarter of a second-order one).
    pub start_iterations: usize,
    /// Local Newton iterations of the knee elimination (see `local`), the first-order start's
    /// included; each factorises only the knee elements' patch.
    pub local_iterations: usize,
    /// Relative residual ‖R‖/‖R(0)‖ at the start and after each iteration.
    pub residual_history: Vec<f64>,
    /// Relative update ‖Δa‖/‖a‖ of each iteration.
    pub update_history: Vec<f64>,
    /// Step length α of each iteration (1 for a full Newton step).
    pub step_lengths: Vec<f64>,
}

impl Model {
    /// Solves a problem with saturating (or linear) materials by Newton's method, starting from
    /// `start` (continuation) or, if `None`, from the linear solve with every material at its
    /// initial permeability; second-order models fall back to (or, past saturation, begin
    /// with) the first-order field on the same mesh, see `solve_nonlinear_with_tangent`.
    /// Fails with [`SolverError::NotConverged`] rather than returning an unconverged field.
    pub fn solve_nonlinear(
        &self,
        exc: Excitation<'_>,
        start: Option<&Solution>,
        settings: &NewtonSettings,
    ) -> Result<(Solution, NewtonReport), SolverError> {
        self.solve_nonlinear_with_tangent(exc, start, settings)
            .map(|(s, r, _)| (s, r))
    }

    /// As [`Self::solve_nonlinear`], also returning the last factorised tangent (at the last
    /// iterate but one; the final correction is below the update tolerance, so it serves as
    /// the tangent at the solution to that accuracy), or None when no iteration was needed.
    pub fn solve_nonlinear_with_tangent(
        &self,
        exc: Excitation<'_>,
        start: Option<&Solution>,
        settings: &NewtonSettings,
    ) -> Result<(Solution, NewtonReport, Option<SpdFactor<'_>>), SolverError> {
        let second_order = self.mesh.order() == 2 && !self.is_linear();
        let mut warm_spent = 0;
        if let Some(s) = start {
            let a = self.with_fixed(&s.a, exc.a_fixed);
            if !second_order {
                return self.newton_from(a, exc, settings);
            }
            // A continuation or warm start that does not converge within its budget falls back
            // to the cold strategy below (`ramp` at second order: 1 A and 2 A in two steps
            // from zero failed in 50 iterations, cold solves converge).
            let budget = NewtonSettings {
                max_iterations: settings.max_iterations.min(WARM_BUDGET),
                ..*settings
            };
            match self.newton_from(a, exc, &budget) {
                Err(SolverError::NotConverged { iterations, .. }) => warm_spent = iterations,
                other => return other,
            }
        }
        if !second_order {
            let a = self.initial_guess(exc)?;
            return self.newton_from(a, exc, settings);
        }
        // Second order, cold: Newton from the linear guess on a budget, then, if that does not
        // converge, from the first-order field on the same mesh (see `first_order_guess`);
        // straight from the latter when the linear field already exceeds saturation (built-in
        // rod, knee law, 68 A, with knee elimination and the plain secant start: 5 iterations
        // after 7 first-order ones in 0.23 s, against 10 from the linear guess in 0.36 s;
        // without knee elimination 1 A and 30 A failed from the linear guess).
        let budget = NewtonSettings {
            max_iterations: settings.max_iterations.min(DIRECT_BUDGET),
            ..*settings
        };
        // The saturation test runs on the first-order model (a quarter of the unknowns), which
        // a saturated case needs anyway.
        let first = self.corner_model()?;
        let corners_exc = Excitation {
            currents: exc.currents,
            polarizations: exc.polarizations,
            a_fixed: &exc.a_fixed[..first.mesh.nodes.len()],
            b0: exc.b0,
        };
        let first_linear = first.linear_field(corners_exc)?;
        let saturated = first.saturates(&first_linear, exc.b0);
        let spent = match (!saturated).then(|| self.initial_guess(exc)).transpose()? {
            None => 0,
            Some(guess) => match self.newton_from(guess, exc, &budget) {
                Ok((sol, mut rep, t)) => {
                    rep.iterations += warm_spent;
                    rep.abandoned_iterations = warm_spent;
                    return Ok((sol, rep, t));
                }
                Err(SolverError::NotConverged { iterations, .. }) => iterations,
                Err(e) => return Err(e),
            },
        };
        let (guess, start) = self.first_order_guess(&first, first_linear, exc, settings)?;
        let mut rest = *settings;
        rest.max_iterations = settings.max_iterations.saturating_sub(spent).max(1);
        let (sol, mut rep, t) = self.newton_from(guess, exc, &rest).map_err(|e| match e {
            // Report the whole count against the user's limit, not the budget left.
            SolverError::NotConverged {
                iterations,
                residual,
                reason,
                history,
            } if reason.starts_with("iteration limit") => SolverError::NotConverged {
                iterations: iterations + spent + warm_spent,
                residual,
                reason: format!(
                    "iteration limit {} reached (counting {} before the restart from the \
                         first-order field)",
                    settings.max_iterations,
                    spent + warm_spent
                ),
                history,
            },
            other => other,
        })?;
        rep.iterations += spent + warm_spent;
        rep.abandoned_iterations = spent + warm_spent;
        rep.start_iterations = start.iterations;
        rep.local_iterations += start.local_iterations;
        Ok((sol, rep, t))
    }

    /// Factorised tangent T(a) at a solution: its inverse maps load changes to potential
    /// changes (incremental, i.e. differential, response).
    pub fn tangent_at(
        &self,
        sol: &Solution,
        a_fixed: &[f64],
    ) -> Result<SpdFactor<'_>, SolverError> {
        let zero = vec![0.0; self.mesh.triangles.len()];
        let exc = Excitation {
            currents: &zero,
            polarizations: &zero,
            a_fixed,
            b0: sol.b0,
        };
        self.tangent(&sol.a, exc)
    }

    /// The response δa = T⁻¹ f(δJ) of the linearised problem to current densities `currents`
    /// (A/m² per element), with zero Dirichlet data and no background: the incremental field.
    pub fn tangent_response(&self, factor: &SpdFactor<'_>, currents: &[f64]) -> Solution {
        let zero = vec![0.0; self.mesh.nodes.len()];
        let no_magnets = vec![0.0; self.mesh.triangles.len()];
        let mut x = assembly::rhs(
            &self.mesh,
            &self.geom,
            &self.dofs,
            currents,
            &no_magnets,
            &zero,
            0.0,
            |_, _| 0.0,
        );
        factor.solve_in_place(&mut x);
        let mut a = zero;
        for (i, &n) in self.dofs.free_nodes.iter().enumerate() {
            a[n as usize] = x[i];
        }
        Solution { a, b0: 0.0 }
    }

    /// Reaction coefficients `a` with the Dirichlet values of `a_fixed` imposed.
    pub(super) fn with_fixed(&self, a: &[f64], a_fixed: &[f64]) -> Vec<f64> {
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
    pub(super) fn free_norm(&self, a: &[f64]) -> f64 {
        self.dofs
            .free_nodes
            .iter()
            .map(|&n| a[n as usize] * a[n as usize])
            .sum::<f64>()
            .sqrt()
    }
}

pub(super) fn dot(x: &[f64], y: &[f64]) -> f64 {
    x.iter().zip(y).map(|(a, b)| a * b).sum()
}

pub(super) fn norm(x: &[f64]) -> f64 {
    dot(x, x).sqrt()
}
