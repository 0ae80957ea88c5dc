//! Saturating materials on the hp model: the problem as Newton's physics-free loop
//! ([`crate::nonlinear::newton`]) sees it, and [`HpModel::solve_nonlinear`].
//!
//! Static condensation with a nonlinear problem. The state is every dof's coefficient, cell
//! (bubble) unknowns included, and the residual runs over all free unknowns: the outer
//! equations first (as numbered by the model), then the cell dofs in global order. The
//! tangent is never assembled whole: per element its cell block K_cc is factorised and the
//! Schur complement S = K_oo − K_oc K_cc⁻¹ K_co goes into the sparse pattern of the outer
//! equations (the exterior operator added as in the linear solve). The factor then solves the
//! full Newton system T δ = −R exactly by block elimination:
//!
//! ```text
//!   S δ_o = −g,   g = r_o − K_oc K_cc⁻¹ r_c          δ_c = −K_cc⁻¹ (r_c + K_co δ_o)
//! ```
//! Why the full state rather than condensing the residual too: the residual is then the
//! gradient of the convex energy in all unknowns and the direction is the true Newton
//! direction, so the line search, the convergence test (the cell residuals are in ‖R‖) and
//! the quadratic convergence of the loop all hold unchanged; the global solve is as small as
//! the linear one's. (Eliminating the cells exactly, by a local nonlinear solve per element
//! at every residual, would cost local iterations at every line-search trial.)

use std::sync::Arc;

use nalgebra::{Cholesky, DMatrix, DVector, Dyn};
use rayon::prelude::*;

use super::condense::schur;
use super::model::{rule_degree, HpModel, HpSolution, NO_EQUATION};
use super::nonlinear_terms::{residual_and_tangent, source_moment, ElementDrive};
use super::tabulation::Tabulation;
use crate::cholesky::SpdFactor;
use crate::error::SolverError;
use crate::nonlinear::newton::{self, Direction, Factor, NonlinearSystem};
use crate::nonlinear::{NewtonReport, NewtonSettings};
use crate::weak_form::Tangent;

/// One element's factorised cell block, for the block solve.
#[derive(Debug, Clone)]
struct CellBlock {
    /// Cholesky factor of K_cc (None without cell unknowns, p < 3).
    chol: Option<Cholesky<f64, Dyn>>,
    /// X = K_cc⁻¹ K_co (cells × outer).
    x: DMatrix<f64>,
}

/// The condensed matrix of one Newton step: the Schur complements on the sparse pattern and
/// every element's cell block.
#[derive(Debug, Clone)]
pub struct HpTangent {
    values: Vec<f64>,
    cells: Arc<Vec<CellBlock>>,
    /// The first element whose cell block is not positive definite, if any (reported when
    /// the matrix is factorised).
    failed: Option<usize>,
}

/// The factorised matrix: solves the full (outer and cell) Newton system by block elimination.
pub struct HpFactor<'m> {
    model: &'m HpModel,
    global: SpdFactor<'m>,
    cells: Arc<Vec<CellBlock>>,
}

/// The hp model's saturating problem, with its caches built eagerly: each element's active
/// functions, free indices and pattern slots.
pub struct HpSystem<'m> {
    pub(super) model: &'m HpModel,
    /// Per element its functions as basis indices, in local order.
    pub(super) active: Vec<Vec<usize>>,
    /// Per element, per local function, its free index or [`NO_EQUATION`].
    pub(super) free: Vec<Vec<u32>>,
    /// Per element its lower-triangle pattern slots over the outer functions (row-major,
    /// [`NO_EQUATION`] where a pair has no slot).
    slots: Vec<Vec<u32>>,
    /// Global dof of each free index.
    pub(super) free_dofs: Vec<u32>,
}

/// Free index of every local function of element `t`: its outer equation, or n_eq + its
/// offset among the cell dofs, or [`NO_EQUATION`] when fixed.
fn free_indices(model: &HpModel, t: usize) -> Vec<u32> {
    let cells = model.dofs.cell_dof_range();
    model
        .dofs
        .local_to_global(t)
        .iter()
        .map(|&d| {
            let d = d as usize;
            if cells.contains(&d) {
                (model.n_eq + d - cells.start) as u32
            } else {
                model.eq[d]
            }
        })
        .collect()
}

impl<'m> HpSystem<'m> {
    /// The system of `model` (its regions, currents, magnets and background).
    pub fn new(model: &'m HpModel) -> Result<Self, SolverError> {
        let nt = model.mesh.triangles.len();
        let per_element: Vec<(Vec<usize>, Vec<u32>, Vec<u32>)> = (0..nt)
            .into_par_iter()
            .map(|t| {
                let (_, active) = model.active(t)?;
                let (_, slots) = model.element_slots(t)?;
                Ok((active, free_indices(model, t), slots))
            })
            .collect::<Result<_, SolverError>>()?;
        let cells = model.dofs.cell_dof_range();
        let mut free_dofs = vec![0u32; model.n_eq + cells.len()];
        for (d, &i) in model.eq.iter().enumerate() {
            if i != NO_EQUATION {
                free_dofs[i as usize] = d as u32;
            }
        }
        for d in cells.clone() {
            free_dofs[model.n_eq + d - cells.start] = d as u32;
        }
        let (mut active, mut free, mut slots) = (Vec::new(), Vec::new(), Vec::new());
        for (a, f, s) in per_element {
            active.push(a);
            free.push(f);
            slots.push(s);
        }
        Ok(Self {
            model,
            active,
            free,
            slots,
            free_dofs,
        })
    }

    /// The tabulation element `t` is integrated with.
    pub(super) fn tab(&self, t: usize) -> &'m Tabulation {
        let m = self.model;
        let ed = m.dofs.element(t);
        let p = ed.degree as usize;
        &m.tabs[&(p, ed.reversed, rule_degree(p, m.curved[t]))]
    }

    /// What drives element `t`.
    pub(super) fn drive(&self, t: usize) -> ElementDrive<'m> {
        let props = self.model.element_props(t);
        ElementDrive {
            b0: self.model.background,
            j: props.current_density,
            j0: props.polarization,
            material: &props.material,
        }
    }

    /// Element `t`'s residual and matrix at the global coefficients `u`.
    pub(super) fn element(
        &self,
        t: usize,
        u: &[f64],
        tangent: Tangent,
    ) -> (DVector<f64>, Option<DMatrix<f64>>) {
        let local: Vec<f64> = self
            .model
            .dofs
            .local_to_global(t)
            .iter()
            .map(|&d| u[d as usize])
            .collect();
        residual_and_tangent(
            &self.model.maps[t],
            self.tab(t),
            &self.active[t],
            &local,
            &self.drive(t),
            tangent,
        )
    }

    /// Adds the element residuals (in element order) and the exterior's D·u to a residual
    /// over the free unknowns.
    fn scatter_residual<'a>(
        &self,
        u: &[f64],
        rs: impl Iterator<Item = &'a DVector<f64>>,
    ) -> Vec<f64> {
        let m = self.model;
        let mut out = vec![0.0; self.free_dofs.len()];
        for (t, r) in rs.enumerate() {
            for (a, &i) in self.free[t].iter().enumerate() {
                if i != NO_EQUATION {
                    out[i as usize] += r[a];
                }
            }
        }
        if let Some(x) = &m.exterior {
            let nb = x.eqs.len();
            for k in 0..nb {
                let mut s = 0.0;
                for l in 0..nb {
                    s += x.d[k * nb + l] * u[self.free_dofs[x.eqs[l]] as usize];
                }
                out[x.eqs[k]] += s;
            }
        }
        out
    }

    /// The source moment of a solution, A·m² (the saturating form of
    /// [`HpModel::source_moment`]'s integral).
    fn source_moment(&self, u: &[f64]) -> f64 {
        let m = self.model;
        let parts: Vec<f64> = (0..m.mesh.triangles.len())
            .into_par_iter()
            .map(|t| {
                let local: Vec<f64> = m
                    .dofs
                    .local_to_global(t)
                    .iter()
                    .map(|&d| u[d as usize])
                    .collect();
                source_moment(
                    &m.maps[t],
                    self.tab(t),
                    &self.active[t],
                    &local,
                    &self.drive(t),
                )
            })
            .collect();
        parts.iter().sum()
    }
}

impl<'m> NonlinearSystem for HpSystem<'m> {
    type Factor = HpFactor<'m>;
    type Matrix = HpTangent;

    fn reference_state(&self) -> Vec<f64> {
        vec![0.0; self.model.dofs.n_dofs()]
    }

    fn residual(&self, u: &[f64]) -> Vec<f64> {
        let rs: Vec<DVector<f64>> = (0..self.active.len())
            .into_par_iter()
            .map(|t| self.element(t, u, Tangent::None).0)
            .collect();
        self.scatter_residual(u, rs.iter())
    }

    fn residual_and_matrix(&self, u: &[f64], direction: Direction) -> (Vec<f64>, HpTangent) {
        let tangent = match direction {
            Direction::Newton => Tangent::Newton,
            Direction::Secant => Tangent::Secant,
        };
        let m = self.model;
        type Condensed = Option<(DMatrix<f64>, CellBlock)>;
        let parts: Vec<(DVector<f64>, Condensed)> = (0..self.active.len())
            .into_par_iter()
            .map(|t| {
                let (r, k) = self.element(t, u, tangent);
                let k = k.expect("a matrix was asked for");
                (r, condense(&k, m.dofs.element(t).cell_range().len()))
            })
            .collect();
        // The residual does not depend on the condensation: a failed cell block leaves it
        // valid and makes the matrix an error, reported when it is factorised.
        let residual = self.scatter_residual(u, parts.iter().map(|p| &p.0));
        if let Some(t) = parts.iter().position(|p| p.1.is_none()) {
            let failed = HpTangent {
                values: Vec::new(),
                cells: Arc::new(Vec::new()),
                failed: Some(t),
            };
            return (residual, failed);
        }
        let parts = parts.into_iter().filter_map(|p| p.1);
        let mut values = vec![0.0; m.pattern.nnz()];
        let mut cells = Vec::with_capacity(self.active.len());
        for (t, part) in parts.into_iter().enumerate() {
            let (s, block) = part;
            let n = s.nrows();
            let slots = &self.slots[t];
            for a in 0..n {
                for b in 0..n {
                    let slot = slots[a * n + b];
                    if slot != NO_EQUATION {
                        values[slot as usize] += s[(a, b)];
                    }
                }
            }
            cells.push(block);
        }
        if let Some(x) = &m.exterior {
            let nb = x.eqs.len();
            for k in 0..nb {
                for l in 0..nb {
                    if x.eqs[k] >= x.eqs[l] {
                        let s = m.pattern.slot(x.eqs[k], x.eqs[l]).expect("in pattern");
                        values[s as usize] += x.d[k * nb + l];
                    }
                }
            }
        }
        (
            residual,
            HpTangent {
                values,
                cells: Arc::new(cells),
                failed: None,
            },
        )
    }

    fn factorize(&self, tangent: &HpTangent) -> Result<HpFactor<'m>, SolverError> {
        if let Some(element) = tangent.failed {
            return Err(SolverError::CellCondensation { element });
        }
        Ok(HpFactor {
            model: self.model,
            global: self.model.symbolic.factorize(&tangent.values)?,
            cells: Arc::clone(&tangent.cells),
        })
    }

    fn step(&self, u: &mut [f64], delta: &[f64], alpha: f64) {
        for (dv, &d) in delta.iter().zip(&self.free_dofs) {
            u[d as usize] += alpha * dv;
        }
    }

    fn state_norm(&self, u: &[f64]) -> f64 {
        self.free_dofs
            .iter()
            .map(|&d| u[d as usize] * u[d as usize])
            .sum::<f64>()
            .sqrt()
    }

    fn relax(&self, u: &mut [f64], r: &[f64], floor: f64) -> usize {
        self.relax_knee(u, r, floor)
    }
}

/// Splits element matrix `k` (last `cells` unknowns the cell ones) into its Schur complement
/// over the outer unknowns and its factorised cell block (None when K_cc is not positive
/// definite).
fn condense(k: &DMatrix<f64>, cells: usize) -> Option<(DMatrix<f64>, CellBlock)> {
    let (s, chol, x) = schur(k, cells)?;
    Some((s, CellBlock { chol, x }))
}

impl Factor for HpFactor<'_> {
    fn solve_in_place(&self, rhs: &mut [f64]) {
        let m = self.model;
        let nt = m.mesh.triangles.len();
        // Per element: y_c = K_cc⁻¹ b_c and its share Xᵀ b_c = K_oc K_cc⁻¹ b_c of the
        // condensed right-hand side (K symmetric).
        let forward: Vec<(Vec<u32>, DVector<f64>, DVector<f64>)> = (0..nt)
            .into_par_iter()
            .map(|t| {
                let free = free_indices(m, t);
                let block = &self.cells[t];
                let no = block.x.ncols();
                let bc = DVector::from_iterator(
                    free.len() - no,
                    free[no..].iter().map(|&i| rhs[i as usize]),
                );
                let y = match &block.chol {
                    Some(c) => c.solve(&bc),
                    None => DVector::zeros(0),
                };
                let share = block.x.tr_mul(&bc);
                (free, y, share)
            })
            .collect();
        for (free, _, share) in &forward {
            for (a, &i) in free[..share.len()].iter().enumerate() {
                if i != NO_EQUATION {
                    rhs[i as usize] -= share[a];
                }
            }
        }
        self.global.solve_in_place(&mut rhs[..m.n_eq]);
        let outer = &rhs[..m.n_eq];
        let back: Vec<DVector<f64>> = forward
            .par_iter()
            .enumerate()
            .map(|(t, (free, y, share))| {
                let no = share.len();
                let d_o = DVector::from_iterator(
                    no,
                    free[..no].iter().map(|&i| {
                        if i == NO_EQUATION {
                            0.0
                        } else {
                            outer[i as usize]
                        }
                    }),
                );
                y - &self.cells[t].x * d_o
            })
            .collect();
        for ((free, _, share), dc) in forward.iter().zip(&back) {
            for (k, &i) in free[share.len()..].iter().enumerate() {
                rhs[i as usize] = dc[k];
            }
        }
    }
}

impl HpModel {
    /// Solves the problem with saturating (or linear) materials by Newton's method on all
    /// unknowns, cells condensed in every step (see the module doc). `start`: a solution of a
    /// model on the same mesh (p-continuation: the degree below; its coefficients carry over,
    /// the new functions start at zero), else the linear solve with every material at its
    /// initial permeability. Fails with [`SolverError::NotConverged`] rather than returning
    /// an unconverged field.
    pub fn solve_nonlinear(
        &self,
        settings: &NewtonSettings,
        start: Option<(&HpModel, &HpSolution)>,
    ) -> Result<(HpSolution, NewtonReport), SolverError> {
        let u = match start {
            Some((lower, sol)) => self.prolong(lower, sol)?,
            None => self.solve_initial_permeability()?.u,
        };
        let sys = HpSystem::new(self)?;
        let (u, report, _) = newton::iterate(&sys, u, settings)?;
        let source_moment = sys.source_moment(&u);
        Ok((
            HpSolution {
                u,
                b0: self.background,
                source_moment,
            },
            report,
        ))
    }
}
