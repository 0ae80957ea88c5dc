//! Newton's iteration with an energy line search, for any system that offers a residual and a
//! symmetric positive-definite tangent: no physics in this file.
//!
//! The system's state is a vector `a` (for the magnetostatic problem: per-node coefficients
//! with the Dirichlet values imposed); the residual, the update and every matrix live on its
//! free unknowns. The iteration relies on the residual being the gradient of a convex energy
//! (so the tangent is SPD and g(α) = R(a + αδ)·δ increases along any descent direction), which
//! is what makes the line search below safe.

use crate::error::{SolverError, StopReason};

/// The line search stops when the directional derivative R·δ has fallen to this fraction of
/// its bracket … (a looser 0.1 with 10 steps was measured to cost the arctangent rod at 3 A
/// 20 Newton iterations instead of 8: the minimiser is worth finding accurately)
const LINE_SEARCH_TOL: f64 = 1e-3;
/// … or after this many trial residuals.
const LINE_SEARCH_STEPS: usize = 30;

/// A line-search step shorter than this means Newton's quadratic model failed along its
/// direction (a law that stiffens abruptly just past the current field, e.g. a sharp knee:
/// the tangent sees the soft side only); the next direction then comes from the secant
/// operator, which is stiffer there, and Newton resumes after it. Measured on the built-in
/// torquer rod (80 % Ni-Fe knee law), second order, at 1 A and 30 A: without it the step
/// length fell to 1e-4 and the iteration stalled for 40 iterations.
const SHORT_STEP: f64 = 0.1;

/// The local relaxation stops once its residual is this fraction of the global tolerance.
const LOCAL_FLOOR: f64 = 0.1;

/// Which matrix a direction is computed with.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Direction {
    /// The consistent tangent ∂R/∂a.
    Newton,
    /// A secant (fixed-point) operator: stiffer than the tangent where the law is about to
    /// stiffen, so a safe direction where Newton's model fails.
    Secant,
}

/// A factorised matrix that solves in place.
pub trait Factor {
    /// Overwrites `rhs` with the solution of the factorised system.
    fn solve_in_place(&self, rhs: &mut [f64]);
}

impl Factor for crate::cholesky::SpdFactor<'_> {
    fn solve_in_place(&self, rhs: &mut [f64]) {
        crate::cholesky::SpdFactor::solve_in_place(self, rhs)
    }
}

/// What the iteration needs of a discrete nonlinear system.
pub trait NonlinearSystem {
    /// The factorised matrix type.
    type Factor: Factor;
    /// The assembled (not yet factorised) matrix: sparse values for a plain system; the hp
    /// system adds its elements' cell blocks (static condensation, `hp/nonlinear.rs`).
    type Matrix;
    /// The state at which the system is undriven (its residual there scales the tolerances).
    fn reference_state(&self) -> Vec<f64>;
    /// The residual R(a) over the free unknowns.
    fn residual(&self, a: &[f64]) -> Vec<f64>;
    /// The residual and the matrix of `direction` at `a`.
    fn residual_and_matrix(&self, a: &[f64], direction: Direction) -> (Vec<f64>, Self::Matrix);
    /// Factorises a matrix from [`Self::residual_and_matrix`].
    fn factorize(&self, matrix: &Self::Matrix) -> Result<Self::Factor, SolverError>;
    /// a ← a + α δ on the free unknowns.
    fn step(&self, a: &mut [f64], delta: &[f64], alpha: f64);
    /// The Euclidean norm of the state over the free unknowns.
    fn state_norm(&self, a: &[f64]) -> f64;
    /// An optional local relaxation between global steps (nonlinear elimination): improves
    /// `a` given its residual `r`, stopping at residual norm `floor`; returns the local
    /// iterations done (0: nothing done, the residual is unchanged).
    fn relax(&self, _a: &mut [f64], _r: &[f64], _floor: f64) -> usize {
        0
    }
}

/// Stopping rules and budget of the Newton iteration.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NewtonSettings {
    /// Stop when ‖R‖ ≤ this × ‖R(reference state)‖ …
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
    /// Local iterations of the relaxation between global steps (the knee elimination), the
    /// first-order start's included.
    pub local_iterations: usize,
    /// Relative residual ‖R‖/‖R(reference)‖ at the start and after each iteration.
    pub residual_history: Vec<f64>,
    /// Relative update ‖Δa‖/‖a‖ of each iteration.
    pub update_history: Vec<f64>,
    /// Step length α of each iteration (1 for a full Newton step).
    pub step_lengths: Vec<f64>,
}

/// The converged state, the report and the last factorised tangent (at the last iterate but
/// one: the final correction is below the update tolerance, so it serves as the tangent at
/// the solution to that accuracy), or None when no iteration was needed.
pub type Converged<F> = (Vec<f64>, NewtonReport, Option<F>);

fn dot(x: &[f64], y: &[f64]) -> f64 {
    x.iter().zip(y).map(|(a, b)| a * b).sum()
}

fn norm(x: &[f64]) -> f64 {
    dot(x, x).sqrt()
}

fn negated(r: &[f64]) -> Vec<f64> {
    r.iter().map(|v| -v).collect()
}

/// Newton's iteration on `sys` from the state `a`. Fails with
/// [`SolverError::NotConverged`] (and a typed [`StopReason`]) rather than returning an
/// unconverged state.
pub fn iterate<S: NonlinearSystem>(
    sys: &S,
    mut a: Vec<f64>,
    settings: &NewtonSettings,
) -> Result<Converged<S::Factor>, SolverError> {
    let reference = sys.reference_state();
    let scale = norm(&sys.residual(&reference));
    let mut report = NewtonReport::default();
    if scale == 0.0 {
        // Nothing drives the system: the reference state solves it.
        report.residual_history.push(0.0);
        return Ok((reference, report, None));
    }
    let relative = |a: &[f64], delta: &[f64]| {
        let a_norm = sys.state_norm(a);
        norm(delta) / if a_norm > 0.0 { a_norm } else { 1.0 }
    };
    let mut r = sys.residual(&a);
    report.residual_history.push(norm(&r) / scale);
    // The tangent at the current point when the line search already assembled it.
    let mut tangent: Option<S::Matrix> = None;
    // The last factorised tangent (one iterate back).
    let mut previous: Option<S::Factor> = None;
    // After a short step the next direction comes from the secant operator.
    let mut secant_next = false;
    loop {
        let rel = *report.residual_history.last().unwrap_or(&f64::INFINITY);
        if !rel.is_finite() || report.iterations >= settings.max_iterations {
            return Err(SolverError::NotConverged {
                iterations: report.iterations,
                residual: rel,
                reason: if rel.is_finite() {
                    StopReason::IterationLimit {
                        limit: settings.max_iterations,
                        before_restart: 0,
                    }
                } else {
                    StopReason::NonFiniteResidual
                },
                history: report.residual_history,
            });
        }
        if rel <= settings.residual_tol {
            if let Some(old) = previous.take() {
                // The residual is already small: measure the last correction with the
                // previous tangent (a chord step). Near the solution T changes by O(‖Δa‖),
                // so the chord step is the Newton step to first order and saves a
                // factorisation; when it is not yet below the update tolerance, the
                // regular Newton step follows.
                let mut delta = negated(&r);
                old.solve_in_place(&mut delta);
                let step = relative(&a, &delta);
                if step <= settings.update_tol {
                    apply_last(sys, &mut a, &delta, step, &mut report);
                    return Ok((a, report, Some(old)));
                }
            }
        }
        let values = match (secant_next, tangent.take()) {
            (false, Some(v)) => v,
            (false, None) => sys.residual_and_matrix(&a, Direction::Newton).1,
            (true, _) => sys.residual_and_matrix(&a, Direction::Secant).1,
        };
        let factor = sys.factorize(&values)?;
        report.factorizations += 1;
        let mut delta = negated(&r);
        factor.solve_in_place(&mut delta);
        let full_step = relative(&a, &delta);
        if rel <= settings.residual_tol && full_step <= settings.update_tol {
            // Converged: the residual is small and so is the last Newton correction, which
            // is applied (its effect on the residual is quadratically small).
            apply_last(sys, &mut a, &delta, full_step, &mut report);
            return Ok((a, report, Some(factor)));
        }
        let (alpha, r_new, t_new) = line_search(sys, &a, &delta, &r);
        sys.step(&mut a, &delta, alpha);
        let a_norm = sys.state_norm(&a);
        let moved = alpha.abs() * norm(&delta);
        let update = if a_norm > 0.0 { moved / a_norm } else { moved };
        r = r_new;
        tangent = t_new;
        // Local relaxation before the next global step; the residual and tangent are then
        // recomputed. Below the floor there is nothing to gain.
        let floor = LOCAL_FLOOR * settings.residual_tol * scale;
        let local = if norm(&r) > floor {
            sys.relax(&mut a, &r, floor)
        } else {
            0
        };
        if local > 0 {
            report.local_iterations += local;
            r = sys.residual(&a);
            tangent = None;
        }
        previous = Some(factor);
        secant_next = alpha < SHORT_STEP;

        report.iterations += 1;
        report.residual_history.push(norm(&r) / scale);
        report.update_history.push(update);
        report.step_lengths.push(alpha);
    }
}

/// Applies the final full correction `delta` (relative size `step`) and records it.
fn apply_last<S: NonlinearSystem>(
    sys: &S,
    a: &mut [f64],
    delta: &[f64],
    step: f64,
    report: &mut NewtonReport,
) {
    sys.step(a, delta, 1.0);
    report.iterations += 1;
    report.update_history.push(step);
    report.step_lengths.push(1.0);
}

/// Step length along `delta` from `a` (residual `r0` there), the residual at the new point
/// and, for a full step, the tangent there (assembled in the same pass, as full steps are the
/// rule): 1 if the full step lowers ‖R‖, else the minimiser of the energy on the line.
fn line_search<S: NonlinearSystem>(
    sys: &S,
    a: &[f64],
    delta: &[f64],
    r0: &[f64],
) -> (f64, Vec<f64>, Option<S::Matrix>) {
    let trial = |alpha: f64| {
        let mut t = a.to_vec();
        sys.step(&mut t, delta, alpha);
        t
    };
    let (r1, t1) = sys.residual_and_matrix(&trial(1.0), Direction::Newton);
    let g1 = dot(&r1, delta);
    if norm(&r1) < norm(r0) || g1 <= 0.0 {
        // Full step: it lowers the residual, or the energy still decreases at α = 1.
        return (1.0, r1, Some(t1));
    }
    // g(0) = −δᵀTδ < 0 < g(1) and g increases: its root minimises the energy on the line.
    let g0 = dot(r0, delta);
    let mut last = r1;
    let alpha = root_of_slope(g0, g1, |alpha| {
        last = sys.residual(&trial(alpha));
        dot(&last, delta)
    });
    (alpha, last, None)
}

/// One damped Newton step of a local relaxation: from `a` with residual `r` and factorised
/// tangent `factor`, the step length by the global acceptance rule (full step if it lowers
/// ‖R‖ or the energy still decreases, else the energy minimiser on the line). `residual_at`
/// gives the residual (and matrix, when asked) at a trial state.
pub(crate) fn damped_length(
    r: &[f64],
    delta: &[f64],
    r1: &[f64],
    mut residual_at: impl FnMut(f64) -> Vec<f64>,
) -> f64 {
    let g1 = dot(r1, delta);
    if norm(r1) < norm(r) || g1 <= 0.0 {
        return 1.0;
    }
    let g0 = dot(r, delta);
    root_of_slope(g0, g1, |alpha| dot(&residual_at(alpha), delta))
}

/// The root in (0, 1) of an increasing slope g(α) = R(a + α δ)·δ with g(0) = `g0` < 0 <
/// `g1` = g(1), evaluated by `g`, whose last evaluation is at the returned α.
///
/// Illinois regula falsi, safeguarded by bisection when the secant point crowds an end of
/// the bracket (a law that stiffens abruptly makes g(1) ≫ |g(0)|, and plain false position
/// then creeps up from α ≈ 0). The root is accepted when |g| is small against |g(0)|: against
/// the larger bracket value, a first trial at α ≈ |g(0)|/g(1) passed at once and the
/// iteration stalled (built-in rod, knee law, second order, 1 A).
fn root_of_slope(g0: f64, g1: f64, mut g: impl FnMut(f64) -> f64) -> f64 {
    let (mut lo, mut glo) = (0.0, g0);
    let (mut hi, mut ghi) = (1.0, g1);
    let mut alpha = 1.0;
    let mut side = 0;
    for _ in 0..LINE_SEARCH_STEPS {
        alpha = (lo * ghi - hi * glo) / (ghi - glo);
        let width = hi - lo;
        if !(alpha > lo + 0.01 * width && alpha < hi - 0.01 * width) {
            alpha = 0.5 * (lo + hi);
        }
        let ga = g(alpha);
        if ga.abs() <= LINE_SEARCH_TOL * g0.abs() || hi - lo < 1e-6 {
            break;
        }
        if ga < 0.0 {
            lo = alpha;
            glo = ga;
            if side == -1 {
                ghi *= 0.5;
            }
            side = -1;
        } else {
            hi = alpha;
            ghi = ga;
            if side == 1 {
                glo *= 0.5;
            }
            side = 1;
        }
    }
    alpha
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A diagonal convex system R_i(a) = a_i³ + a_i − b_i (energy Σ a⁴/4 + a²/2 − b a): the
    /// iteration must reach the root of each component, quadratically at the end.
    struct Cubic {
        b: Vec<f64>,
    }

    #[derive(Debug)]
    struct Diagonal(Vec<f64>);

    impl Factor for Diagonal {
        fn solve_in_place(&self, rhs: &mut [f64]) {
            for (x, d) in rhs.iter_mut().zip(&self.0) {
                *x /= d;
            }
        }
    }

    impl NonlinearSystem for Cubic {
        type Factor = Diagonal;
        type Matrix = Vec<f64>;
        fn reference_state(&self) -> Vec<f64> {
            vec![0.0; self.b.len()]
        }
        fn residual(&self, a: &[f64]) -> Vec<f64> {
            a.iter()
                .zip(&self.b)
                .map(|(x, b)| x * x * x + x - b)
                .collect()
        }
        fn residual_and_matrix(&self, a: &[f64], d: Direction) -> (Vec<f64>, Vec<f64>) {
            let m = a
                .iter()
                .map(|x| match d {
                    Direction::Newton => 3.0 * x * x + 1.0,
                    Direction::Secant => x * x + 1.0,
                })
                .collect();
            (self.residual(a), m)
        }
        fn factorize(&self, values: &Vec<f64>) -> Result<Diagonal, SolverError> {
            Ok(Diagonal(values.to_vec()))
        }
        fn step(&self, a: &mut [f64], delta: &[f64], alpha: f64) {
            for (x, d) in a.iter_mut().zip(delta) {
                *x += alpha * d;
            }
        }
        fn state_norm(&self, a: &[f64]) -> f64 {
            norm(a)
        }
    }

    #[test]
    fn the_loop_finds_the_root_of_a_convex_system_from_far_away() {
        // Roots of a³ + a = b: a = 1 for b = 2, a = 2 for b = 10, a = −3 for b = −30.
        let sys = Cubic {
            b: vec![2.0, 10.0, -30.0],
        };
        let (a, rep, f) =
            iterate(&sys, vec![50.0, -40.0, 0.0], &NewtonSettings::default()).expect("converges");
        for (x, want) in a.iter().zip([1.0, 2.0, -3.0]) {
            assert!((x - want).abs() < 1e-12, "{x} vs {want}");
        }
        assert!(f.is_some() && rep.iterations < 30, "{rep:?}");
        // Quadratic convergence at the end: each residual at most ~ the square of the last.
        let h = &rep.residual_history;
        let n = h.len();
        assert!(h[n - 1] < 1e-8 && h[n - 2] < 1e-3, "{h:?}");
    }

    #[test]
    fn an_exhausted_budget_is_a_typed_iteration_limit_not_a_result() {
        let sys = Cubic { b: vec![10.0] };
        let settings = NewtonSettings {
            max_iterations: 2,
            ..NewtonSettings::default()
        };
        match iterate(&sys, vec![100.0], &settings) {
            Err(SolverError::NotConverged {
                iterations,
                reason: StopReason::IterationLimit { limit: 2, .. },
                ..
            }) => assert_eq!(iterations, 2),
            other => panic!("expected the iteration limit, got {other:?}"),
        }
    }

    #[test]
    fn an_undriven_system_returns_its_reference_state_without_iterating() {
        let sys = Cubic { b: vec![0.0, 0.0] };
        let (a, rep, f) = iterate(&sys, vec![1.0, 2.0], &NewtonSettings::default()).unwrap();
        assert_eq!(a, vec![0.0, 0.0]);
        assert_eq!(rep.iterations, 0);
        assert!(f.is_none());
    }

    #[test]
    fn the_slope_root_is_found_inside_its_bracket() {
        // g(α) = α³ + α − 0.5 has its root at α ≈ 0.4239 (Cardano; checked by substitution).
        let g = |x: f64| x * x * x + x - 0.5;
        let alpha = root_of_slope(g(0.0), g(1.0), g);
        assert!(g(alpha).abs() <= LINE_SEARCH_TOL * 0.5 + 1e-12, "{alpha}");
    }
}
