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
//! Files: this one holds the strategy (which start, which budget); [`newton`] the
//! physics-free iteration with its line search, settings, report and the trait it iterates
//! on; [`system`] the magnetostatic problem as that trait (owning its element caches);
//! [`terms`] the element residuals and tangents, [`cache`] the linear elements' constant parts; [`local`] the knee elimination between
//! steps; [`guess`] the first guesses.

mod cache;
mod guess;
mod local;
pub mod newton;
mod system;
mod terms;

pub use crate::problem::Excitation;
pub use newton::{NewtonReport, NewtonSettings};

use crate::assembly;
use crate::cholesky::SpdFactor;
use crate::error::{SolverError, StopReason};
use crate::solution::Solution;
use crate::solve::Model;
use crate::weak_form::Tangent;

use system::MagnetostaticSystem;

/// Iterations a second-order solve spends from the linear guess before it restarts from the
/// first-order field (see `first_order_guess`); mild cases converge well within it (the
/// built-in example at 40 mA: 3).
const DIRECT_BUDGET: usize = 12;

/// Iterations a second-order solve from a given start (continuation, warm start) spends
/// before it falls back to the cold strategy.
const WARM_BUDGET: usize = 25;

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
        let sys = MagnetostaticSystem::new(self, exc);
        let mut warm_spent = 0;
        if let Some(s) = start {
            let a = sys.with_fixed(&s.a);
            if !second_order {
                return sys.newton(a, settings);
            }
            // A continuation or warm start that does not converge within its budget falls back
            // to the cold strategy below (`ramp` at second order: 1 A and 2 A in two steps
            // from zero failed in 50 iterations, cold solves converge).
            let budget = NewtonSettings {
                max_iterations: settings.max_iterations.min(WARM_BUDGET),
                ..*settings
            };
            match sys.newton(a, &budget) {
                Err(SolverError::NotConverged { iterations, .. }) => warm_spent = iterations,
                other => return other,
            }
        }
        if !second_order {
            let a = self.initial_guess(exc)?;
            return sys.newton(a, settings);
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
            Some(guess) => match sys.newton(guess, &budget) {
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
        let (sol, mut rep, t) = sys.newton(guess, &rest).map_err(|e| match e {
            // Report the whole count against the user's limit, not the budget left.
            SolverError::NotConverged {
                iterations,
                residual,
                reason: StopReason::IterationLimit { .. },
                history,
            } => SolverError::NotConverged {
                iterations: iterations + spent + warm_spent,
                residual,
                reason: StopReason::IterationLimit {
                    limit: settings.max_iterations,
                    before_restart: spent + warm_spent,
                },
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
        let sys = MagnetostaticSystem::new(self, exc);
        self.symbolic
            .factorize(&sys.assemble(&sol.a, Tangent::Newton).1)
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
}
