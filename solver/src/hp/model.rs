//! The hp model: a degree-p space on a triangle mesh with exact curved edges, its condensed
//! linear system (cell unknowns eliminated element by element) and the solve.
//!
//! The problem is the one the second-order model solves ([`crate::problem::Problem`]: regions,
//! A = 0 on the axis, the exact exterior or A = 0 on the outer arc, a uniform background added
//! exactly); only the corner mesh is read, and curved outlines come as exact curves.

use std::collections::{BTreeMap, HashMap};

use nalgebra::DVector;
use rayon::prelude::*;

use super::basis::{Mode, TriangleBasis};
use super::condense::{Condensed, Recovery};
use super::curved_edges::{CurvedEdge, CurvedEdges};
use super::dofs::HpDofs;
use super::exterior::{exterior_operator, ArcEdge, HpExterior};
use super::kernel::{element_system, ElementPoints};
use super::map::ElementMap;
use super::tabulation::Tabulation;
use crate::cholesky::SymbolicSpd;
use crate::constants::MU0;
use crate::error::SolverError;
use crate::mesh::FeMesh;
use crate::pattern::Pattern;
use crate::problem::{Problem, RegionProps};
use crate::quadrature::{TriangleRule, MAX_TRIANGLE_DEGREE};

/// No equation: a fixed or a condensed (cell) unknown.
pub const NO_EQUATION: u32 = u32::MAX;

/// Quadrature degree of an element of degree p: the polynomial part of r ∇φ·∇φ has degree
/// 2p − 1; the φφ/r term and, on curved elements, the map's Jacobian are not polynomials, so
/// the rule goes above it. Measured on the sphere and the spheroid of
/// `tests/hp_exponential_convergence.rs` at p = 2…6: rules ten degrees higher change the
/// moment by less than 2e-14 relative.
pub(super) fn rule_degree(p: usize, curved: bool) -> usize {
    (2 * p + if curved { 6 } else { 2 }).min(MAX_TRIANGLE_DEGREE)
}

/// An element's condensed system, its moment weights (ν0 − ν)∫B_z(φ_a) dV and its moment
/// without the reaction field.
type ElementPart = (Condensed, DVector<f64>, f64);

/// Key of a tabulation: degree, edge orientations, rule degree.
type TabKey = (usize, [bool; 3], usize);

/// Everything about an hp problem that does not depend on the solution.
#[derive(Debug)]
pub struct HpModel {
    pub(crate) mesh: FeMesh,
    pub(crate) regions: Vec<RegionProps>,
    pub(crate) background: f64,
    pub(crate) dofs: HpDofs,
    pub(crate) maps: Vec<ElementMap>,
    pub(crate) curved: Vec<bool>,
    /// Per global dof its equation, or [`NO_EQUATION`].
    pub(crate) eq: Vec<u32>,
    pub(crate) n_eq: usize,
    pub(crate) pattern: Pattern,
    pub(crate) symbolic: SymbolicSpd,
    pub(crate) exterior: Option<HpExterior>,
    pub(crate) tabs: BTreeMap<TabKey, Tabulation>,
}

/// A solved hp field: every global dof's coefficient (reaction part) and the background.
#[derive(Debug, Clone, PartialEq)]
pub struct HpSolution {
    /// Coefficient of every global dof, Wb/m.
    pub u: Vec<f64>,
    /// Uniform background B_z, T.
    pub b0: f64,
    /// The moment of the sources, ∫ (r/2) J dV + ∫ M_z dV, A·m² (linear materials).
    pub source_moment: f64,
}

impl HpModel {
    /// The model of `problem` (first-order corner mesh read; mid nodes ignored) with degree
    /// `degrees[t]` on element t and the edges in `curved` following their exact curves.
    pub fn new(
        problem: Problem,
        degrees: &[u32],
        curved: Vec<CurvedEdge>,
    ) -> Result<Self, SolverError> {
        problem.validate()?;
        let Problem {
            mesh,
            regions,
            fixed,
            background_b,
            exact_exterior,
        } = problem;
        let dofs = HpDofs::new(&mesh, degrees)?;
        let curved_edges = CurvedEdges::new(&mesh, curved)?;
        let maps: Vec<ElementMap> = (0..mesh.triangles.len())
            .map(|t| curved_edges.element_map(&mesh, t))
            .collect::<Result<_, _>>()?;
        let curved: Vec<bool> = maps.iter().map(|m| !m.is_affine()).collect();
        // Fixed: the problem's fixed vertices (values must be zero: the reaction potential
        // vanishes on the axis and on a fixed outer arc), and every boundary edge whose two
        // ends are fixed.
        if let Some(&(n, v)) = fixed.iter().find(|(_, v)| *v != 0.0) {
            return Err(SolverError::BadMaterial(format!(
                "the hp model takes zero Dirichlet values only (node {n}: {v} Wb/m)"
            )));
        }
        let fixed_vertices: Vec<u32> = fixed
            .iter()
            .map(|&(n, _)| n)
            .filter(|&n| dofs.vertex_dof(n).is_some())
            .collect();
        let boundary = boundary_sides(&dofs, mesh.triangles.len());
        let is_fixed_vertex = {
            let mut f = vec![false; mesh.nodes.len()];
            for &v in &fixed_vertices {
                f[v as usize] = true;
            }
            f
        };
        let fixed_edges: Vec<usize> = boundary
            .iter()
            .map(|&(_, _, id)| id)
            .filter(|&id| {
                dofs.edges()[id]
                    .iter()
                    .all(|&v| is_fixed_vertex[v as usize])
            })
            .collect();
        let fixed_mask = dofs.fixed_mask(&fixed_vertices, &fixed_edges)?;
        // Equations: outer (vertex and edge) unknowns that are not fixed; cells condensed.
        let cells = dofs.cell_dof_range();
        let mut eq = vec![NO_EQUATION; dofs.n_dofs()];
        let mut n_eq = 0u32;
        for (d, slot) in eq.iter_mut().enumerate() {
            if !fixed_mask[d] && !cells.contains(&d) {
                *slot = n_eq;
                n_eq += 1;
            }
        }
        let n_eq = n_eq as usize;
        let exterior = match &exact_exterior {
            Some(ext) => {
                // The arc's nodes: the exterior's (free) ones and the two where it meets the
                // axis, which are fixed but end the first and last arc edges — without them
                // those edges' traces would be missing from the multipole integrals (measured:
                // a p-independent error of the exterior's moment, −1.8e-5 on a 32-edge arc).
                let on_arc = {
                    let mut f = vec![false; mesh.nodes.len()];
                    for &n in &ext.nodes {
                        if let Some(x) = f.get_mut(n as usize) {
                            *x = true;
                        }
                    }
                    for &(n, _) in &fixed {
                        let p = mesh.nodes[n as usize];
                        if (p[0].hypot(p[1]) - ext.radius).abs() <= 1e-9 * ext.radius {
                            f[n as usize] = true;
                        }
                    }
                    f
                };
                let arc: Vec<ArcEdge> = boundary
                    .iter()
                    .filter(|&&(_, _, id)| dofs.edges()[id].iter().all(|&v| on_arc[v as usize]))
                    .map(|&(element, local_edge, _)| ArcEdge {
                        element,
                        local_edge,
                    })
                    .collect();
                Some(exterior_operator(
                    &dofs, &maps, &arc, &eq, ext.radius, ext.modes,
                )?)
            }
            None => None,
        };
        let lists: Vec<Vec<usize>> = (0..mesh.triangles.len())
            .map(|t| equations(&dofs, &eq, t))
            .collect();
        let group = exterior.as_ref().map_or(&[][..], |x| &x.eqs[..]);
        let pattern = Pattern::from_lists(n_eq, &lists, group);
        let symbolic = SymbolicSpd::analyse(&pattern)?;
        let mut tabs = BTreeMap::new();
        for t in 0..mesh.triangles.len() {
            let ed = dofs.element(t);
            let p = ed.degree as usize;
            let key = (p, ed.reversed, rule_degree(p, curved[t]));
            if let std::collections::btree_map::Entry::Vacant(v) = tabs.entry(key) {
                let basis = TriangleBasis::new(p)?;
                let rule = TriangleRule::exact_to(key.2)?;
                v.insert(Tabulation::new(&basis, &rule.points, ed.reversed));
            }
        }
        Ok(Self {
            mesh,
            regions,
            background: background_b,
            dofs,
            maps,
            curved,
            eq,
            n_eq,
            pattern,
            symbolic,
            exterior,
            tabs,
        })
    }

    /// Number of global equations (outer unknowns after condensation).
    pub fn equations(&self) -> usize {
        self.n_eq
    }

    /// Number of degrees of freedom before condensation and constraints.
    pub fn unknowns(&self) -> usize {
        self.dofs.n_dofs()
    }

    /// The degrees of freedom.
    pub fn dofs(&self) -> &HpDofs {
        &self.dofs
    }

    /// The mesh.
    pub fn mesh(&self) -> &FeMesh {
        &self.mesh
    }

    /// Properties of the region of element `t`.
    pub fn element_props(&self, t: usize) -> &RegionProps {
        &self.regions[self.mesh.tags[t] as usize]
    }

    /// The element's functions as basis indices, in the local order of [`HpDofs`].
    pub(crate) fn active(&self, t: usize) -> Result<(TriangleBasis, Vec<usize>), SolverError> {
        let ed = self.dofs.element(t);
        let basis = TriangleBasis::new(ed.degree as usize)?;
        let mut active: Vec<usize> = vec![0, 1, 2];
        for k in 0..3 {
            for degree in 2..=ed.edge_degree[k] as usize {
                active.push(
                    basis
                        .index(Mode::Edge { edge: k, degree })
                        .expect("edge degree within the element degree"),
                );
            }
        }
        active.extend(basis.cell_functions());
        Ok((basis, active))
    }

    /// The element's points: values and B-operators of its functions at its quadrature points.
    pub fn element_points(&self, t: usize) -> Result<ElementPoints, SolverError> {
        let ed = self.dofs.element(t);
        let p = ed.degree as usize;
        let (_, active) = self.active(t)?;
        let tab = &self.tabs[&(p, ed.reversed, rule_degree(p, self.curved[t]))];
        Ok(ElementPoints::new(&self.maps[t], tab, &active))
    }

    /// Condensed element system of element `t` for linear materials, with the integrals of
    /// its moment: (condensed system, ∫ B_z(φ_a) dV, its moment part that does not depend on
    /// the solution).
    fn condensed(&self, t: usize) -> Result<ElementPart, SolverError> {
        let ed = self.dofs.element(t);
        let p = ed.degree as usize;
        let (_, active) = self.active(t)?;
        let tab = &self.tabs[&(p, ed.reversed, rule_degree(p, self.curved[t]))];
        let props = self.element_props(t);
        let nu = props.material.nu(0.0);
        let nu0 = 1.0 / MU0;
        let s = nu * props.polarization - (nu - nu0) * self.background;
        let sys = element_system(&self.maps[t], tab, &active, nu, props.current_density, s);
        let cells = ed.cell_range().len();
        // m_e = ∫ (r/2) J dV + ∫ M_z dV with M_z = (ν0 − ν)(B_z,reaction + B0) + ν J0: the part
        // without the reaction field.
        let fixed_moment = props.current_density * sys.half_r
            + ((nu0 - nu) * self.background + nu * props.polarization) * sys.volume;
        let bz = sys.bz.clone() * (nu0 - nu);
        Ok((Condensed::new(&sys.k, &sys.f, cells, t)?, bz, fixed_moment))
    }

    /// Solves the linear problem (every material linear): assembles the condensed system,
    /// factorises it once and recovers the cell unknowns.
    pub fn solve_linear(&self) -> Result<HpSolution, SolverError> {
        if let Some(r) = self.regions.iter().find(|r| !r.material.is_linear()) {
            return Err(SolverError::BadMaterial(format!(
                "solve_linear takes linear materials only; saturating ones go through \
                 solve_nonlinear ({:?})",
                r.material
            )));
        }
        self.solve_initial_permeability()
    }

    /// The linear solve with every material at its initial reluctivity ν(0): the solution
    /// for linear materials, the first guess of Newton's method for saturating ones.
    pub(super) fn solve_initial_permeability(&self) -> Result<HpSolution, SolverError> {
        let nt = self.mesh.triangles.len();
        // Element systems, condensed, in chunks: each chunk's systems are computed in parallel
        // with the pattern slots of their lower-triangle entries, then added in element order
        // (so the sums do not depend on the number of threads), and only what recovers the
        // cells is kept — the Schur complements would otherwise all be alive at the
        // factorisation (measured: 2.1 GB → see README for a 1M-unknown solve).
        const CHUNK: usize = 4096;
        let mut values = vec![0.0; self.pattern.nnz()];
        let mut rhs = vec![0.0; self.n_eq];
        let mut kept: Vec<(Recovery, DVector<f64>, f64)> = Vec::with_capacity(nt);
        for start in (0..nt).step_by(CHUNK) {
            let chunk: Vec<(ElementPart, Vec<u32>, Vec<u32>)> = (start..(start + CHUNK).min(nt))
                .into_par_iter()
                .map(|t| {
                    let c = self.condensed(t)?;
                    let (eqs, slots) = self.element_slots(t)?;
                    Ok((c, eqs, slots))
                })
                .collect::<Result<_, SolverError>>()?;
            for ((c, bz, fixed_moment), eqs, slots) in chunk {
                let (s, g, recovery) = c.into_parts();
                let n = eqs.len();
                for (a, &i) in eqs.iter().enumerate() {
                    if i == NO_EQUATION {
                        continue;
                    }
                    rhs[i as usize] += g[a];
                    for b in 0..n {
                        let slot = slots[a * n + b];
                        if slot != NO_EQUATION {
                            values[slot as usize] += s[(a, b)];
                        }
                    }
                }
                kept.push((recovery, bz, fixed_moment));
            }
        }
        if let Some(x) = &self.exterior {
            let nb = x.eqs.len();
            for k in 0..nb {
                for l in 0..nb {
                    if x.eqs[k] >= x.eqs[l] {
                        let s = self.pattern.slot(x.eqs[k], x.eqs[l]).expect("in pattern");
                        values[s as usize] += x.d[k * nb + l];
                    }
                }
            }
        }
        let factor = self.symbolic.factorize(&values)?;
        factor.solve_in_place(&mut rhs);
        let mut u = vec![0.0; self.dofs.n_dofs()];
        for (d, &i) in self.eq.iter().enumerate() {
            if i != NO_EQUATION {
                u[d] = rhs[i as usize];
            }
        }
        let mut moment = 0.0;
        for (t, (c, bz, fixed_moment)) in kept.iter().enumerate() {
            let l2g = self.dofs.local_to_global(t);
            let cells = self.dofs.element(t).cell_range();
            let outer = DVector::from_iterator(
                cells.start,
                l2g[..cells.start].iter().map(|&d| u[d as usize]),
            );
            let uc = c.recover(&outer);
            for (k, pos) in cells.enumerate() {
                u[l2g[pos] as usize] = uc[k];
            }
            moment += fixed_moment
                + l2g
                    .iter()
                    .zip(bz.iter())
                    .map(|(&d, b)| u[d as usize] * b)
                    .sum::<f64>();
        }
        Ok(HpSolution {
            u,
            b0: self.background,
            source_moment: moment,
        })
    }

    /// Element `t`'s outer equations and, row-major over them, the pattern slot of each
    /// lower-triangle pair ([`NO_EQUATION`] for fixed unknowns and the upper triangle).
    pub(super) fn element_slots(&self, t: usize) -> Result<(Vec<u32>, Vec<u32>), SolverError> {
        let eqs = self.outer_equations(t);
        let mut slots = Vec::with_capacity(eqs.len() * eqs.len());
        for &i in &eqs {
            for &j in &eqs {
                slots.push(if i == NO_EQUATION || j == NO_EQUATION || j > i {
                    NO_EQUATION
                } else {
                    self.pattern.slot(i as usize, j as usize).ok_or_else(|| {
                        SolverError::Factorization(format!(
                            "element {t}: equations {i}, {j} missing from the pattern"
                        ))
                    })?
                });
            }
        }
        Ok((eqs, slots))
    }

    /// Equation numbers of element `t`'s outer (vertex and edge) functions, in local order.
    pub(super) fn outer_equations(&self, t: usize) -> Vec<u32> {
        let l2g = self.dofs.local_to_global(t);
        let no = self.dofs.element(t).cell_range().start;
        l2g[..no].iter().map(|&d| self.eq[d as usize]).collect()
    }

    /// The coefficients of element `t`'s functions in local order.
    pub fn element_values(&self, sol: &HpSolution, t: usize) -> Vec<f64> {
        self.dofs
            .local_to_global(t)
            .iter()
            .map(|&d| sol.u[d as usize])
            .collect()
    }

    /// The dipole moment from the exterior's n = 1 coefficient, A·m² (None without the exact
    /// exterior): outside the sphere the reaction potential's dipole term is
    /// a_1 (R0/R)² sin θ = μ0 m sin θ/(4π R²), and g_1 = (4/3) a_1, so m = 3π R0² g_1/μ0.
    pub fn exterior_moment(&self, sol: &HpSolution) -> Option<f64> {
        let x = self.exterior.as_ref()?;
        let mut g1 = 0.0;
        let mut by_eq: HashMap<u32, f64> = HashMap::new();
        for (d, &i) in self.eq.iter().enumerate() {
            if i != NO_EQUATION {
                by_eq.insert(i, sol.u[d]);
            }
        }
        for (k, &i) in x.eqs.iter().enumerate() {
            g1 += x.w1[k] * by_eq[&(i as u32)];
        }
        Some(3.0 * std::f64::consts::PI * x.radius * x.radius * g1 / MU0)
    }

    /// The dipole moment from the sources, A·m²: ∫ (r/2) J dV + ∫ M_z dV with
    /// M = B/μ0 − H = (ν0 − ν) B + ν J0 e_z (linear materials), summed during the solve from
    /// each element's ∫ B_z(φ_a) dV.
    pub fn source_moment(&self, sol: &HpSolution) -> Result<f64, SolverError> {
        Ok(sol.source_moment)
    }
}

/// Boundary sides of the mesh: (element, local edge, edge id) of every edge held by one
/// triangle, in element order.
fn boundary_sides(dofs: &HpDofs, triangles: usize) -> Vec<(usize, usize, usize)> {
    let mut count = vec![0u8; dofs.edges().len()];
    for t in 0..triangles {
        for &e in &dofs.element(t).edges {
            count[e as usize] += 1;
        }
    }
    let mut out = Vec::new();
    for t in 0..triangles {
        for (k, &e) in dofs.element(t).edges.iter().enumerate() {
            if count[e as usize] == 1 {
                out.push((t, k, e as usize));
            }
        }
    }
    out
}

/// Free equations of element `t`'s outer functions (for the pattern).
fn equations(dofs: &HpDofs, eq: &[u32], t: usize) -> Vec<usize> {
    let l2g = dofs.local_to_global(t);
    let no = dofs.element(t).cell_range().start;
    l2g[..no]
        .iter()
        .map(|&d| eq[d as usize])
        .filter(|&i| i != NO_EQUATION)
        .map(|i| i as usize)
        .collect()
}
