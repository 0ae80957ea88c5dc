//! The discrete model (mesh, geometry, numbering, pattern, symbolic factorisation) and the
//! linear solve.

use crate::assembly;
use crate::cholesky::{SpdFactor, SymbolicSpd};
use crate::dofs::DofMap;
use crate::element::ElementGeometry;
use crate::error::SolverError;
use crate::exterior::{exterior_operator, ExactExterior, ExteriorOperator};
use crate::material::Material;
use crate::mesh::FeMesh;
use crate::pattern::Pattern;
use crate::pattern::NO_SLOT;
use crate::problem::{Excitation, Problem, RegionProps};
use crate::solution::Solution;

/// Everything about a problem that does not depend on the field values.
#[derive(Debug)]
pub struct Model {
    pub(crate) mesh: FeMesh,
    pub(crate) geom: Vec<ElementGeometry>,
    pub(crate) regions: Vec<RegionProps>,
    pub(crate) dofs: DofMap,
    pub(crate) pattern: Pattern,
    pub(crate) symbolic: SymbolicSpd,
    pub(crate) fixed: Vec<(u32, f64)>,
    pub(crate) background: f64,
    pub(crate) exterior: Option<Exterior>,
    /// The exact exterior as posed (to pose the first-order companion problem).
    pub(crate) exact_exterior: Option<ExactExterior>,
}

/// The exact exterior's operator with its place in the pattern.
#[derive(Debug)]
pub(crate) struct Exterior {
    pub(crate) op: ExteriorOperator,
    /// Equation numbers of `op.nodes`.
    free: Vec<usize>,
    /// Pattern slot of each (k, l) pair of surface nodes, row-major ([`NO_SLOT`] above the
    /// diagonal).
    slots: Vec<u32>,
}

impl Model {
    /// Validates the problem and prepares geometry, numbering, pattern and symbolic factor.
    pub fn new(problem: Problem) -> Result<Self, SolverError> {
        problem.validate()?;
        let Problem {
            mesh,
            regions,
            fixed,
            background_b,
            exact_exterior,
        } = problem;
        let magnetic: Vec<bool> = (0..mesh.triangles.len())
            .map(|e| regions[mesh.tags[e] as usize].is_magnetic())
            .collect();
        // Magnetic elements always use the plain basis, even at surface nodes that are flux
        // nodes for the air around them (see `flux_nodes`). A magnet of recoil permeability 1
        // counts as magnetic: outside a slender one A ≈ ψ/r as outside a permeable core.
        // Measured on uniformly magnetised rods (second order, fineness 1 / 2), the mid-plane
        // factor Nf against its closed form: L/D = 10: 5.4e-4 / 3.8e-5 (9.9e-3 / 8.3e-5 with
        // the plain basis everywhere), L/D = 50: 6.1e-4 / 2.0e-4 (2.4e-2 / 4.1e-3); the
        // volume factor Nm is within 2.5e-4 / 3e-5 either way.
        let flux = flux_nodes(&mesh, &magnetic);
        let r_mag = (0..mesh.triangles.len())
            .filter(|&e| magnetic[e])
            .flat_map(|e| mesh.corners(e))
            .map(|p| p[0])
            .fold(0.0, f64::max);
        let blend = BLEND_FACTOR * r_mag;
        let geom: Vec<ElementGeometry> = if mesh.order() == 2 {
            (0..mesh.triangles.len())
                .map(|e| {
                    let mut flags = [false; 6];
                    if !magnetic[e] {
                        for (k, &v) in mesh.element_nodes(e).iter().enumerate() {
                            flags[k] = flux[v as usize];
                        }
                    }
                    ElementGeometry::quadratic_with_blend(mesh.element_points(e), flags, blend)
                        .ok_or(SolverError::BadTriangle {
                            triangle: e,
                            area: mesh.signed_area(e),
                        })
                })
                .collect::<Result<_, _>>()?
        } else {
            (0..mesh.triangles.len())
                .map(|e| {
                    let tri = mesh.triangles[e];
                    let flags = if magnetic[e] {
                        [false; 3]
                    } else {
                        tri.map(|v| flux[v as usize])
                    };
                    ElementGeometry::with_blend(mesh.corners(e), flags, blend)
                })
                .collect()
        };
        let fixed_nodes: Vec<u32> = fixed.iter().map(|&(n, _)| n).collect();
        if let Some(&bad) = fixed_nodes
            .iter()
            .find(|&&n| n as usize >= mesh.nodes.len())
        {
            return Err(SolverError::BadNodeIndex {
                triangle: usize::MAX,
                node: bad,
                nodes: mesh.nodes.len(),
            });
        }
        let dofs = DofMap::new(mesh.nodes.len(), &fixed_nodes);
        let exterior = match &exact_exterior {
            Some(ob) => {
                // Surface nodes held by a Dirichlet value (the two on the axis) drop out.
                let ob = ExactExterior {
                    nodes: ob
                        .nodes
                        .iter()
                        .copied()
                        .filter(|&n| (n as usize) < mesh.nodes.len() && dofs.free(n).is_some())
                        .collect(),
                    ..ob.clone()
                };
                Some(exterior_operator(&mesh, &geom, &ob)?)
            }
            None => None,
        };
        let group: Vec<usize> = exterior
            .iter()
            .flat_map(|x| x.nodes.iter().filter_map(|&n| dofs.free(n)))
            .collect();
        let pattern = Pattern::with_dense_group(&mesh, &dofs, &group);
        let exterior = exterior.map(|op| {
            let slots = group
                .iter()
                .flat_map(|&i| group.iter().map(move |&j| (i, j)))
                .map(|(i, j)| {
                    if i >= j {
                        pattern.slot(i, j).unwrap_or(NO_SLOT)
                    } else {
                        NO_SLOT
                    }
                })
                .collect();
            Exterior {
                op,
                free: group.clone(),
                slots,
            }
        });
        let symbolic = SymbolicSpd::analyse(&pattern)?;
        Ok(Self {
            mesh,
            geom,
            regions,
            dofs,
            pattern,
            symbolic,
            fixed,
            background: background_b,
            exterior,
            exact_exterior: exact_exterior.clone(),
        })
    }

    /// Whether the problem has the exact exterior.
    pub fn has_exact_exterior(&self) -> bool {
        self.exterior.is_some()
    }

    /// Adds the exterior operator D into matrix values on the pattern (no-op without it).
    pub(crate) fn add_exterior_matrix(&self, values: &mut [f64]) {
        if let Some(x) = &self.exterior {
            for (s, d) in x.slots.iter().zip(&x.op.d) {
                if *s != NO_SLOT {
                    values[*s as usize] += d;
                }
            }
        }
    }

    /// Adds D·a (a: per-node reaction coefficients) into a residual over free unknowns.
    pub(crate) fn add_exterior_residual(&self, a: &[f64], out: &mut [f64]) {
        if let Some(x) = &self.exterior {
            let nb = x.free.len();
            for (k, &i) in x.free.iter().enumerate() {
                let row = &x.op.d[k * nb..(k + 1) * nb];
                out[i] += row
                    .iter()
                    .zip(&x.op.nodes)
                    .map(|(d, &n)| d * a[n as usize])
                    .sum::<f64>();
            }
        }
    }

    /// Energy ½ aᵀ D a of the reaction field outside the meshed sphere, J (0 without it).
    pub fn exterior_energy(&self, a: &[f64]) -> f64 {
        match &self.exterior {
            Some(x) => {
                let nb = x.free.len();
                let mut w = 0.0;
                for k in 0..nb {
                    for l in 0..nb {
                        w += a[x.op.nodes[k] as usize]
                            * x.op.d[k * nb + l]
                            * a[x.op.nodes[l] as usize];
                    }
                }
                0.5 * w
            }
            None => 0.0,
        }
    }

    /// The mesh.
    pub fn mesh(&self) -> &FeMesh {
        &self.mesh
    }

    /// Per-element geometry, in triangle order.
    pub fn geometry(&self) -> &[ElementGeometry] {
        &self.geom
    }

    /// Unknown numbering.
    pub fn dofs(&self) -> &DofMap {
        &self.dofs
    }

    /// Properties of region `tag`.
    pub fn region(&self, tag: u32) -> &RegionProps {
        &self.regions[tag as usize]
    }

    /// Material of element `e`.
    #[inline]
    pub fn material(&self, e: usize) -> &Material {
        &self.regions[self.mesh.tags[e] as usize].material
    }

    /// Properties of the region of element `e`.
    #[inline]
    pub fn element_props(&self, e: usize) -> &RegionProps {
        &self.regions[self.mesh.tags[e] as usize]
    }

    /// Prescribed polarization J0 of element `e` in T under the problem's own excitation.
    #[inline]
    pub fn polarization(&self, e: usize) -> f64 {
        self.regions[self.mesh.tags[e] as usize].polarization
    }

    /// Current density of element `e` in A/m² under the problem's own excitation.
    #[inline]
    pub fn current_density(&self, e: usize) -> f64 {
        self.regions[self.mesh.tags[e] as usize].current_density
    }

    /// Number of free unknowns.
    pub fn unknowns(&self) -> usize {
        self.dofs.n_free
    }

    /// Stored nonzeros of the lower triangle.
    pub fn nonzeros(&self) -> usize {
        self.pattern.nnz()
    }

    /// The problem's Dirichlet values as a per-node vector (0 where free).
    pub fn fixed_values(&self) -> Vec<f64> {
        let mut a = vec![0.0; self.mesh.nodes.len()];
        for &(n, v) in &self.fixed {
            a[n as usize] = v;
        }
        a
    }

    /// Uniform background B_z of the problem, T.
    pub fn background(&self) -> f64 {
        self.background
    }

    /// Per-element current density of the problem's excitation.
    pub fn problem_currents(&self) -> Vec<f64> {
        (0..self.mesh.triangles.len())
            .map(|e| self.current_density(e))
            .collect()
    }

    /// Per-element prescribed polarization of the problem's excitation, T.
    pub fn problem_polarizations(&self) -> Vec<f64> {
        (0..self.mesh.triangles.len())
            .map(|e| self.polarization(e))
            .collect()
    }

    /// Whether any region has a prescribed polarization (a magnet).
    pub fn has_magnets(&self) -> bool {
        self.regions.iter().any(|r| r.polarization != 0.0)
    }

    /// Whether every material is linear (one linear solve gives the field).
    pub fn is_linear(&self) -> bool {
        self.regions.iter().all(|r| r.material.is_linear())
    }

    /// Assembles and factorises the linear operator (materials must all be linear).
    pub fn linear_operator(&self) -> Result<LinearOperator<'_>, SolverError> {
        if let Some(r) = self.regions.iter().find(|r| !r.material.is_linear()) {
            return Err(SolverError::BadMaterial(format!(
                "a linear solve was asked for a nonlinear material {:?}",
                r.material
            )));
        }
        let mut values =
            assembly::matrix(&self.geom, &self.pattern, |e, _| self.material(e).nu(0.0));
        self.add_exterior_matrix(&mut values);
        let factor = self.symbolic.factorize(&values)?;
        Ok(LinearOperator {
            model: self,
            factor,
        })
    }
}

/// A factorised linear operator: solves for any excitation on the same model.
#[derive(Debug)]
pub struct LinearOperator<'m> {
    model: &'m Model,
    factor: SpdFactor<'m>,
}

impl LinearOperator<'_> {
    /// Solves for the excitation `exc`: per-element current densities and polarizations,
    /// per-node Dirichlet values of the reaction part (read at fixed nodes only) and a uniform
    /// background B_z, which is added exactly, not discretised.
    pub fn solve(&self, exc: Excitation<'_>) -> Solution {
        let m = self.model;
        let Excitation {
            currents,
            polarizations,
            a_fixed,
            b0,
        } = exc;
        let mut x = assembly::rhs(
            &m.mesh,
            &m.geom,
            &m.dofs,
            currents,
            polarizations,
            a_fixed,
            b0,
            |e, _| m.material(e).nu(0.0),
        );
        self.factor.solve_in_place(&mut x);
        let a = m
            .dofs
            .index
            .iter()
            .enumerate()
            .map(|(node, &i)| {
                if i == crate::dofs::FIXED {
                    a_fixed[node]
                } else {
                    x[i as usize]
                }
            })
            .collect();
        Solution { a, b0 }
    }

    /// Solves the problem's own excitation (its currents, polarizations, Dirichlet values and
    /// background).
    pub fn solve_problem(&self) -> Solution {
        self.solve(Excitation {
            currents: &self.model.problem_currents(),
            polarizations: &self.model.problem_polarizations(),
            a_fixed: &self.model.fixed_values(),
            b0: self.model.background,
        })
    }

    /// The response to per-element current densities `j_elem` (A/m²) alone: no polarization,
    /// no background, zero Dirichlet values (an inductance or small-signal response).
    pub fn current_response(&self, j_elem: &[f64]) -> Solution {
        let m = self.model;
        self.solve(Excitation {
            currents: j_elem,
            polarizations: &vec![0.0; m.mesh.triangles.len()],
            a_fixed: &vec![0.0; m.mesh.nodes.len()],
            b0: 0.0,
        })
    }
}

/// Blend length of the flux basis as a fraction of the radial extent of the magnetic material
/// (see [`ElementGeometry::with_blend`]): below it the flux nodes turn towards the plain basis,
/// which represents the locally uniform field next to the axis. Measured on the built-in rod,
/// B_z on the axis 5 mm beyond the core's end at fineness 1/4/8: 1.57/1.49/1.62 mT unblended
/// (±z 11 % apart at fineness 1), 1.74/1.80/1.81 mT with 0.2; the moments: sphere −0.18 % →
/// −0.12 %, rod −0.15 % → −0.13 %, slender spheroid (axis ratio 50) −0.02 % → −0.10 % at
/// fineness 1.
pub const BLEND_FACTOR: f64 = 0.2;

/// Nodes that use the flux basis in the air elements around them (see
/// [`crate::element::tri3`] for why): every node except those of elements touching the axis
/// (rA ∝ r² there) and those inside magnetic material.
///
/// Magnetic elements use the plain basis at all their nodes, including surface nodes that are
/// flux nodes on the air side. So no element mixes the two bases at a magnetic surface: a
/// mixed element reproduces neither a uniform field nor a 1/r potential (its B is wrong by a
/// factor of order one), which a saturated core pays for in full — a μ0H0 = 0.1 T saturated
/// spheroid of axis ratio 10 came out 4.8 % low with the mixed layer inside the core, 0.01 %
/// with this choice. The price is a non-conformity at the surface: along an edge from r_i to
/// r_j the two traces differ by t(1−t)(r_j − r_i)(a_j − a_i)/r, zero on faces parallel to the
/// axis and second order in the mesh size elsewhere. Mixed elements remain only in air next
/// to the axis, where the field is smooth.
pub fn flux_nodes(mesh: &FeMesh, magnetic: &[bool]) -> Vec<bool> {
    // Without permeable material there is no A ≈ ψ/r layer to capture, and the plain basis is
    // more accurate for the near-uniform field inside coil bores.
    if !magnetic.iter().any(|&m| m) {
        return vec![false; mesh.nodes.len()];
    }
    let mut flux = vec![true; mesh.nodes.len()];
    let mut all_magnetic = vec![true; mesh.nodes.len()];
    for (e, tri) in mesh.triangles.iter().enumerate() {
        let on_axis = tri.iter().any(|&v| mesh.nodes[v as usize][0] == 0.0);
        for &v in mesh.element_nodes(e).iter() {
            if on_axis {
                flux[v as usize] = false;
            }
            if !magnetic[e] {
                all_magnetic[v as usize] = false;
            }
        }
    }
    for (f, m) in flux.iter_mut().zip(&all_magnetic) {
        if *m {
            *f = false;
        }
    }
    flux
}
