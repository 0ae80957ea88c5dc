//! Newton's iteration from a start, with its energy line search.

use crate::cholesky::SpdFactor;
use crate::field::Solution;
use crate::solve::Model;
use crate::weak_form::Tangent;
use crate::SolverError;

use super::{dot, norm, Excitation, NewtonReport, NewtonSettings};

/// The line search stops when the directional derivative R·δ has fallen to this fraction of
/// its bracket … (a looser 0.1 with 10 steps was measured to cost the arctangent rod at 3 A
/// 20 Newton iterations instead of 8: the minimiser is worth finding accurately)
const LINE_SEARCH_TOL: f64 = 1e-3;
/// … or after this many trial residuals.
const LINE_SEARCH_STEPS: usize = 30;

/// A line-search step shorter than this means Newton's quadratic model failed along its
/// direction (a law that stiffens abruptly just past the current field, e.g. a sharp knee:
/// the tangent sees the soft side only); the next direction then comes from the secant
/// operator ν I, which is stiffer there, and Newton resumes after it. Measured on the
/// built-in torquer rod (80 % Ni-Fe knee law), second order, at 1 A and 30 A: without it the
/// step length fell to 1e-4 and the iteration stalled for 40 iterations.
const SHORT_STEP: f64 = 0.1;

/// The local solve stops once its residual is this fraction of the global tolerance.
const LOCAL_FLOOR: f64 = 0.1;

impl Model {
    /// Newton's iteration from the coefficients `a` (Dirichlet values imposed).
    pub(super) fn newton_from(
        &self,
        mut a: Vec<f64>,
        exc: Excitation<'_>,
        settings: &NewtonSettings,
    ) -> Result<(Solution, NewtonReport, Option<SpdFactor<'_>>), SolverError> {
        let zero = self.with_fixed(&vec![0.0; a.len()], exc.a_fixed);
        let scale = norm(&self.residual(&zero, exc));
        let mut report = NewtonReport::default();
        if scale == 0.0 {
            // Nothing drives the field: the reaction part is zero.
            report.residual_history.push(0.0);
            return Ok((
                Solution {
                    a: zero,
                    b0: exc.b0,
                },
                report,
                None,
            ));
        }
        let mut r = self.residual(&a, exc);
        report.residual_history.push(norm(&r) / scale);
        // The tangent at the current point when the line search already assembled it.
        let mut tangent: Option<Vec<f64>> = None;
        // The last factorised tangent (one iterate back).
        let mut previous: Option<SpdFactor<'_>> = None;
        // After a short step the next direction comes from the secant operator.
        let mut secant_next = false;
        loop {
            let rel = *report.residual_history.last().unwrap_or(&f64::INFINITY);
            if !rel.is_finite() || report.iterations >= settings.max_iterations {
                return Err(SolverError::NotConverged {
                    iterations: report.iterations,
                    residual: rel,
                    reason: if rel.is_finite() {
                        format!("iteration limit {} reached", settings.max_iterations)
                    } else {
                        "the residual is not finite".into()
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
                    let mut delta = r.iter().map(|v| -v).collect::<Vec<_>>();
                    old.solve_in_place(&mut delta);
                    let a_norm = self.free_norm(&a);
                    let step = norm(&delta) / if a_norm > 0.0 { a_norm } else { 1.0 };
                    if step <= settings.update_tol {
                        let sol = self.apply_last(a, &delta, step, exc.b0, &mut report);
                        return Ok((sol, report, Some(old)));
                    }
                }
            }
            let values = match (secant_next, tangent.take()) {
                (false, Some(v)) => v,
                (false, None) => self.assemble(&a, exc, Tangent::Newton).1,
                (true, _) => self.assemble(&a, exc, Tangent::Secant).1,
            };
            let factor = self.symbolic.factorize(&values)?;
            report.factorizations += 1;
            let mut delta = r.iter().map(|v| -v).collect::<Vec<_>>();
            factor.solve_in_place(&mut delta);
            let a_norm = self.free_norm(&a);
            let full_step = norm(&delta) / if a_norm > 0.0 { a_norm } else { 1.0 };
            if rel <= settings.residual_tol && full_step <= settings.update_tol {
                // Converged: the residual is small and so is the last Newton correction,
                // which is applied (its effect on the residual is quadratically small).
                let sol = self.apply_last(a, &delta, full_step, exc.b0, &mut report);
                return Ok((sol, report, Some(factor)));
            }
            let (alpha, r_new, t_new) = self.line_search(&a, &delta, &r, exc);
            let mut step2 = 0.0;
            for (i, d) in delta.iter().enumerate() {
                step2 += (alpha * d) * (alpha * d);
                let node = self.dofs.free_nodes[i] as usize;
                a[node] += alpha * d;
            }
            let a_norm = self.free_norm(&a);
            let update = if a_norm > 0.0 {
                step2.sqrt() / a_norm
            } else {
                step2.sqrt()
            };
            r = r_new;
            tangent = t_new;
            // Nonlinear elimination: settle the knee elements locally before the next global
            // step (see `local`); the residual and tangent there are then recomputed. The
            // patch's residual is part of the global one: below the floor, nothing to do.
            let floor = LOCAL_FLOOR * settings.residual_tol * scale;
            let local = if norm(&r) > floor {
                self.relax_knee(&mut a, &r, exc, floor)
            } else {
                0
            };
            if local > 0 {
                report.local_iterations += local;
                r = self.residual(&a, exc);
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
    fn apply_last(
        &self,
        mut a: Vec<f64>,
        delta: &[f64],
        step: f64,
        b0: f64,
        report: &mut NewtonReport,
    ) -> Solution {
        for (i, d) in delta.iter().enumerate() {
            a[self.dofs.free_nodes[i] as usize] += d;
        }
        report.iterations += 1;
        report.update_history.push(step);
        report.step_lengths.push(1.0);
        Solution { a, b0 }
    }

    /// Step length along `delta` from `a` (residual `r0` there), the residual at the new point
    /// and, for a full step, the tangent there (assembled in the same pass, as full steps are
    /// the rule): 1 if the full step lowers ‖R‖, else the minimiser of the energy on the line.
    pub(super) fn line_search(
        &self,
        a: &[f64],
        delta: &[f64],
        r0: &[f64],
        exc: Excitation<'_>,
    ) -> (f64, Vec<f64>, Option<Vec<f64>>) {
        let trial = |alpha: f64| {
            let mut t = a.to_vec();
            for (i, d) in delta.iter().enumerate() {
                t[self.dofs.free_nodes[i] as usize] += alpha * d;
            }
            t
        };
        let at = |alpha: f64| self.residual(&trial(alpha), exc);
        let (r1, t1) = self.assemble(&trial(1.0), exc, Tangent::Newton);
        let g1 = dot(&r1, delta);
        if norm(&r1) < norm(r0) || g1 <= 0.0 {
            // Full step: it lowers the residual, or the energy still decreases at α = 1.
            return (1.0, r1, Some(t1));
        }
        // g(0) = −δᵀTδ < 0 < g(1) and g increases: its root minimises the energy on the line.
        let g0 = dot(r0, delta);
        let mut last = r1;
        let alpha = root_of_slope(g0, g1, |alpha| {
            last = at(alpha);
            dot(&last, delta)
        });
        (alpha, last, None)
    }
}

/// The root in (0, 1) of an increasing slope g(α) = R(a + α δ)·δ with g(0) = `g0` < 0 <
/// `g1` = g(1), evaluated by `g`, whose last evaluation is at the returned α.
///
/// Illinois regula falsi, safeguarded by bisection when the secant point crowds an end of
/// the bracket (a law that stiffens abruptly makes g(1) ≫ |g(0)|, and plain false position
/// then creeps up from α ≈ 0). The root is accepted when |g| is small against |g(0)|: against
/// the larger bracket value, a first trial at α ≈ |g(0)|/g(1) passed at once and the
/// iteration stalled (built-in rod, knee law, second order, 1 A).
pub(super) fn root_of_slope(g0: f64, g1: f64, mut g: impl FnMut(f64) -> f64) -> f64 {
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
