//! Saturating materials: Newton–Raphson on R(a) = 0 with the consistent tangent and a line
//! search on the convex magnetic energy (see [`crate::weak_form`] for R and T).
//!
//! Why this is robust: R is the gradient of the energy Π(a) = ∫ w(|B|) − ν0 B0·B dV − ∫ J A dV,
//! which is strictly convex for every monotone law, and T is its Hessian (SPD, so one sparse
//! Cholesky pattern serves every iteration). A full Newton step is taken when it lowers ‖R‖;
//! otherwise the step length minimises Π along the Newton direction, found as the root of the
//! increasing function g(α) = R(a + α δ)·δ. Either way Π decreases, so the iteration cannot
//! diverge, and near the solution full steps give quadratic convergence.

use rayon::prelude::*;

use crate::cholesky::SpdFactor;
use crate::dofs::FIXED;
use crate::element::{Local, LocalMatrix, MAX_NODES};
use crate::field::Solution;
use crate::solve::Model;
use crate::weak_form::Tangent;
use crate::{assembly, weak_form, SolverError};

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

/// Iterations a second-order solve spends from the linear guess before it restarts from the
/// first-order field (see `first_order_guess`); mild cases converge well within it (the
/// built-in example at 40 mA: 3).
const DIRECT_BUDGET: usize = 12;

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
    /// Iterations of an abandoned first attempt, included in `iterations` (second order:
    /// the direct attempt from the linear guess that did not converge within its budget).
    pub abandoned_iterations: usize,
    /// Iterations of the first-order solve a second-order one started from (not included in
    /// `iterations`; each costs about a quarter of a second-order one).
    pub start_iterations: usize,
    /// Relative residual ‖R‖/‖R(0)‖ at the start and after each iteration.
    pub residual_history: Vec<f64>,
    /// Relative update ‖Δa‖/‖a‖ of each iteration.
    pub update_history: Vec<f64>,
    /// Step length α of each iteration (1 for a full Newton step).
    pub step_lengths: Vec<f64>,
}

/// What drives the field: per-element current densities (A/m²), per-node Dirichlet values of
/// the reaction part (Wb/m, read at fixed nodes) and the uniform background B_z (T).
#[derive(Debug, Clone, Copy)]
pub struct Excitation<'a> {
    /// Current density per element, A/m².
    pub currents: &'a [f64],
    /// Dirichlet values per node, Wb/m.
    pub a_fixed: &'a [f64],
    /// Uniform background B_z, T.
    pub b0: f64,
}

impl Model {
    /// Solves a problem with saturating (or linear) materials by Newton's method, starting from
    /// `start` (continuation) or, if `None`, from the linear solve with every material at its
    /// initial permeability. Fails with [`SolverError::NotConverged`] rather than returning an
    /// unconverged field.
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
        if start.is_none() && self.mesh.order() == 2 && !self.is_linear() {
            // Second order: Newton from the linear guess on a budget, then, if that does not
            // converge, from the first-order field on the same mesh (see `first_order_guess`);
            // straight from the latter when the linear field already exceeds saturation
            // (built-in rod, knee law, 1–68 A: 17–26 iterations in all against 29–38; the
            // arctangent rod at 1.5–150 A: 4–8 against 5–10).
            let budget = NewtonSettings {
                max_iterations: settings.max_iterations.min(DIRECT_BUDGET),
                ..*settings
            };
            let (guess, saturated) = self.initial_guess_checked(exc)?;
            let spent = if saturated {
                0
            } else {
                match self.newton_from(guess, exc, &budget) {
                    Ok(done) => return Ok(done),
                    Err(SolverError::NotConverged { iterations, .. }) => iterations,
                    Err(e) => return Err(e),
                }
            };
            let (guess, start_iterations) = self.first_order_guess(exc, settings)?;
            let mut rest = *settings;
            rest.max_iterations = settings.max_iterations.saturating_sub(spent).max(1);
            let (sol, mut rep, t) = self.newton_from(guess, exc, &rest)?;
            rep.iterations += spent;
            rep.abandoned_iterations = spent;
            rep.start_iterations = start_iterations;
            return Ok((sol, rep, t));
        }
        let a = match start {
            Some(s) => self.with_fixed(&s.a, exc.a_fixed),
            None => self.initial_guess(exc)?,
        };
        self.newton_from(a, exc, settings)
    }

    /// Newton's iteration from the coefficients `a` (Dirichlet values imposed).
    fn newton_from(
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
                        for (i, d) in delta.iter().enumerate() {
                            a[self.dofs.free_nodes[i] as usize] += d;
                        }
                        report.iterations += 1;
                        report.update_history.push(step);
                        report.step_lengths.push(1.0);
                        return Ok((Solution { a, b0: exc.b0 }, report, Some(old)));
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
                for (i, d) in delta.iter().enumerate() {
                    a[self.dofs.free_nodes[i] as usize] += d;
                }
                report.iterations += 1;
                report.update_history.push(full_step);
                report.step_lengths.push(1.0);
                return Ok((Solution { a, b0: exc.b0 }, report, Some(factor)));
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
            previous = Some(factor);
            secant_next = alpha < SHORT_STEP;

            report.iterations += 1;
            report.residual_history.push(norm(&r) / scale);
            report.update_history.push(update);
            report.step_lengths.push(alpha);
        }
    }

    /// Factorised tangent T(a) at a solution: its inverse maps load changes to potential
    /// changes (incremental, i.e. differential, response).
    pub fn tangent_at(
        &self,
        sol: &Solution,
        a_fixed: &[f64],
    ) -> Result<SpdFactor<'_>, SolverError> {
        let currents = vec![0.0; self.mesh.triangles.len()];
        let exc = Excitation {
            currents: &currents,
            a_fixed,
            b0: sol.b0,
        };
        self.tangent(&sol.a, exc)
    }

    /// The response δa = T⁻¹ f(δJ) of the linearised problem to current densities `currents`
    /// (A/m² per element), with zero Dirichlet data and no background: the incremental field.
    pub fn tangent_response(&self, factor: &SpdFactor<'_>, currents: &[f64]) -> Solution {
        let zero = vec![0.0; self.mesh.nodes.len()];
        let mut x = assembly::rhs(
            &self.mesh,
            &self.geom,
            &self.dofs,
            currents,
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
    fn with_fixed(&self, a: &[f64], a_fixed: &[f64]) -> Vec<f64> {
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
    fn free_norm(&self, a: &[f64]) -> f64 {
        self.dofs
            .free_nodes
            .iter()
            .map(|&n| a[n as usize] * a[n as usize])
            .sum::<f64>()
            .sqrt()
    }

    /// Whether the field `a` reaches the saturation flux density of its law anywhere.
    fn saturates(&self, a: &[f64], b0: f64) -> bool {
        let field = Solution { a: a.to_vec(), b0 };
        (0..self.geom.len()).into_par_iter().any(|e| {
            let mat = self.material(e);
            match mat.saturation_b() {
                Some(bs) => self.geom[e].qp.iter().any(|q| {
                    let b = field.b_q(self, e, q);
                    b[0].hypot(b[1]) > bs
                }),
                None => false,
            }
        })
    }

    /// The first guess of a second-order model: the converged first-order field on the same
    /// mesh (its corners), evaluated at the mid-edge nodes. A sharp knee makes Newton move the
    /// saturation front a little per iteration around the core's corners; the first-order
    /// problem on the same corners has a quarter of the unknowns and puts the front nearly in
    /// place. Measured on the built-in rod (80 % Ni-Fe knee law), second order at fineness 1:
    /// from the linear guess 1 A and 30 A did not converge in 50 iterations (3 A, 10 A and 68 A:
    /// 34, 38, 35); see the README for the figures with this start.
    fn first_order_guess(
        &self,
        exc: Excitation<'_>,
        settings: &NewtonSettings,
    ) -> Result<(Vec<f64>, usize), SolverError> {
        let nv = 1 + self
            .mesh
            .triangles
            .iter()
            .flat_map(|t| t.iter())
            .copied()
            .max()
            .unwrap_or(0) as usize;
        let corners = crate::mesh::FeMesh {
            nodes: self.mesh.nodes[..nv].to_vec(),
            triangles: self.mesh.triangles.clone(),
            tags: self.mesh.tags.clone(),
            mid: Vec::new(),
        };
        let problem = crate::problem::Problem {
            mesh: corners,
            regions: self.regions.clone(),
            fixed: self
                .fixed
                .iter()
                .copied()
                .filter(|&(n, _)| (n as usize) < nv)
                .collect(),
            background_b: self.background,
            open_boundary: self
                .open_boundary
                .as_ref()
                .map(|ob| crate::exterior::OpenBoundary {
                    nodes: ob
                        .nodes
                        .iter()
                        .copied()
                        .filter(|&n| (n as usize) < nv)
                        .collect(),
                    ..ob.clone()
                }),
        };
        let first = Model::new(problem)?;
        let sub = Excitation {
            currents: exc.currents,
            a_fixed: &exc.a_fixed[..nv],
            b0: exc.b0,
        };
        let (sol, first_report) = first.solve_nonlinear(sub, None, settings)?;
        let mut a = vec![0.0; self.mesh.nodes.len()];
        a[..nv].copy_from_slice(&sol.a);
        // Mid-edge nodes: the first-order field at the edge's midpoint.
        for (t, mid) in self.mesh.mid.iter().enumerate() {
            let g = &first.geom[t];
            let av = sol.element_values(&first, t);
            for (k, &n) in mid.iter().enumerate() {
                let mut l = [0.0; 3];
                l[k] = 0.5;
                l[(k + 1) % 3] = 0.5;
                let r = g.position(l)[0];
                a[n as usize] = if r > 0.0 { g.a_at(&av, l, r) } else { 0.0 };
            }
        }
        Ok((self.with_fixed(&a, exc.a_fixed), first_report.iterations))
    }

    /// The first guess: the linear solve with every material at its initial reluctivity ν(0),
    /// then one secant (fixed-point) update with ν(|B|) of that field.
    ///
    /// Why the secant update: above the knee the linear field is far too strong, and Newton
    /// started there approaches a steep law H(B) from its saturated side, where each iteration
    /// only halves the distance to the knee. The secant update lands below the knee instead.
    /// Measured on the built-in torquer rod (80 % Ni-Fe knee law) at 3 A: 52 Newton iterations
    /// without it, 13 with it; 11 against 18 for an arctangent law.
    fn initial_guess(&self, exc: Excitation<'_>) -> Result<Vec<f64>, SolverError> {
        self.initial_guess_checked(exc).map(|(a, _)| a)
    }

    /// [`Self::initial_guess`], and whether the linear solve's field reaches the saturation
    /// flux density of its law somewhere (the case is past the knee).
    fn initial_guess_checked(&self, exc: Excitation<'_>) -> Result<(Vec<f64>, bool), SolverError> {
        let initial: Vec<Vec<f64>> = self.geom.iter().map(|g| vec![0.0; g.qp.len()]).collect();
        let guess = self.secant_solve(exc, &initial)?;
        if self.is_linear() {
            return Ok((guess, false));
        }
        let saturated = self.saturates(&guess, exc.b0);
        let field = Solution {
            a: guess,
            b0: exc.b0,
        };
        let secant: Vec<Vec<f64>> = (0..self.geom.len())
            .into_par_iter()
            .map(|e| {
                let mat = self.material(e);
                self.geom[e]
                    .qp
                    .iter()
                    .map(|q| {
                        let b = field.b_q(self, e, q);
                        mat.nu(b[0].hypot(b[1]))
                    })
                    .collect()
            })
            .collect();
        Ok((self.secant_solve(exc, &secant)?, saturated))
    }

    /// The linear solve with reluctivity `nu[e][q]` per quadrature point (0 stands for ν(0)).
    fn secant_solve(&self, exc: Excitation<'_>, nu: &[Vec<f64>]) -> Result<Vec<f64>, SolverError> {
        let nu = |e: usize, q: usize| {
            if nu[e][q] > 0.0 {
                nu[e][q]
            } else {
                self.material(e).nu(0.0)
            }
        };
        let mut values = assembly::matrix(&self.geom, &self.pattern, nu);
        self.add_exterior_matrix(&mut values);
        let factor = self.symbolic.factorize(&values)?;
        let mut x = assembly::rhs(
            &self.mesh,
            &self.geom,
            &self.dofs,
            exc.currents,
            exc.a_fixed,
            exc.b0,
            nu,
        );
        factor.solve_in_place(&mut x);
        let mut a = exc.a_fixed.to_vec();
        for (i, &n) in self.dofs.free_nodes.iter().enumerate() {
            a[n as usize] = x[i];
        }
        Ok(self.with_fixed(&a, exc.a_fixed))
    }

    /// Element residuals (and tangents) in element order, computed in parallel.
    fn element_terms(
        &self,
        a: &[f64],
        exc: Excitation<'_>,
        tangent: Tangent,
    ) -> Vec<(Local, LocalMatrix)> {
        let fixed = self.linear_parts();
        self.geom
            .par_iter()
            .enumerate()
            .map(|(e, g)| {
                let mut ae = [0.0; MAX_NODES];
                for (k, &v) in self.mesh.element_nodes(e).iter().enumerate() {
                    ae[k] = a[v as usize];
                }
                match &fixed[e] {
                    // Linear elements (most of the air): R = K a + (ν − ν0) B0 ∫B_z(φ) − f,
                    // T = K, with K precomputed — the same integrals, evaluated once.
                    Some(lin) => {
                        let f = weak_form::load(g, exc.currents[e]);
                        let mut r = [0.0; MAX_NODES];
                        for k in 0..g.nodes {
                            let mut s = 0.0;
                            for l in 0..g.nodes {
                                s += lin.k[k][l] * ae[l];
                            }
                            r[k] = s + lin.dnu * exc.b0 * lin.curl_z[k] - f[k];
                        }
                        (r, lin.k)
                    }
                    None => weak_form::residual_and_tangent(
                        g,
                        &ae,
                        exc.b0,
                        exc.currents[e],
                        self.material(e),
                        tangent,
                    ),
                }
            })
            .collect()
    }

    /// Per element, the constant stiffness of a linear material (None for saturating ones),
    /// built on first use.
    fn linear_parts(&self) -> &[Option<LinearElement>] {
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
                        dnu: nu - 1.0 / crate::MU0,
                    })
                })
                .collect()
        })
    }

    /// Global residual over the free unknowns (scattered in element order: deterministic).
    fn residual(&self, a: &[f64], exc: Excitation<'_>) -> Vec<f64> {
        self.assemble(a, exc, Tangent::None).0
    }

    /// Residual over the free unknowns and, unless `tangent` is [`Tangent::None`], the
    /// matrix's values on the pattern (empty otherwise), from one pass over the elements.
    fn assemble(&self, a: &[f64], exc: Excitation<'_>, tangent: Tangent) -> (Vec<f64>, Vec<f64>) {
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
    fn tangent(&self, a: &[f64], exc: Excitation<'_>) -> Result<SpdFactor<'_>, SolverError> {
        self.symbolic
            .factorize(&self.assemble(a, exc, Tangent::Newton).1)
    }

    /// Step length along `delta` from `a` (residual `r0` there), the residual at the new point
    /// and, for a full step, the tangent there (assembled in the same pass, as full steps are
    /// the rule): 1 if the full step lowers ‖R‖, else the minimiser of the energy on the line.
    fn line_search(
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
        // g(0) = −δᵀTδ < 0 < g(1) and g increases: Illinois regula falsi for its root,
        // safeguarded by bisection when the secant point crowds an end of the bracket (a law
        // that stiffens abruptly makes g(1) ≫ |g(0)|, and plain false position then creeps
        // up from α ≈ 0). The root is accepted when |g| is small against |g(0)|: against the
        // larger bracket value, a first trial at α ≈ |g(0)|/g(1) passed at once and the
        // iteration stalled (built-in rod, knee law, second order, 1 A).
        let g0 = dot(r0, delta);
        let (mut lo, mut glo) = (0.0, g0);
        let (mut hi, mut ghi) = (1.0, g1);
        let mut best = (1.0, r1);
        let mut side = 0;
        for _ in 0..LINE_SEARCH_STEPS {
            let mut alpha = (lo * ghi - hi * glo) / (ghi - glo);
            let width = hi - lo;
            if !(alpha > lo + 0.01 * width && alpha < hi - 0.01 * width) {
                alpha = 0.5 * (lo + hi);
            }
            let r = at(alpha);
            let g = dot(&r, delta);
            best = (alpha, r);
            if g.abs() <= LINE_SEARCH_TOL * g0.abs() || hi - lo < 1e-6 {
                break;
            }
            if g < 0.0 {
                lo = alpha;
                glo = g;
                if side == -1 {
                    ghi *= 0.5;
                }
                side = -1;
            } else {
                hi = alpha;
                ghi = g;
                if side == 1 {
                    glo *= 0.5;
                }
                side = 1;
            }
        }
        (best.0, best.1, None)
    }
}

/// The constant part of a linear element in the Newton residual.
#[derive(Debug, Clone)]
pub(crate) struct LinearElement {
    /// Element stiffness ∫ ν B(φ_a)·B(φ_b) dV.
    k: LocalMatrix,
    /// ∫ B_z(φ_a) dV.
    curl_z: Local,
    /// ν − ν0.
    dnu: f64,
}

fn dot(x: &[f64], y: &[f64]) -> f64 {
    x.iter().zip(y).map(|(a, b)| a * b).sum()
}

fn norm(x: &[f64]) -> f64 {
    dot(x, x).sqrt()
}
