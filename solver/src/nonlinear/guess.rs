//! First guesses of the Newton iteration: the linear solve with a secant update (on a
//! demagnetizing load line where the linear field saturates), and for second-order models the
//! first-order field on the same mesh.

use rayon::prelude::*;

use crate::assembly;
use crate::constants::MU0;
use crate::error::SolverError;
use crate::material::Material;
use crate::solution::Solution;
use crate::solve::Model;

use super::system::MagnetostaticSystem;
use super::{Excitation, NewtonReport, NewtonSettings};

/// Tolerance (residual and update) of the first-order solve a second-order one starts from.
const START_TOL: f64 = 1e-4;

impl Model {
    /// Whether the field `a` reaches the saturation flux density of its law anywhere.
    pub(super) fn saturates(&self, a: &[f64], b0: f64) -> bool {
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

    /// The first guess of a second-order model: the first-order field on the same mesh (its
    /// corners, `first`, whose linear field is `first_linear`), converged to `START_TOL` and
    /// evaluated at the mid-edge nodes. A sharp knee makes Newton move the saturation front a
    /// little per iteration around the core's corners; the first-order problem on the same
    /// corners has a quarter of the unknowns and puts the front nearly in place. Measured on
    /// the built-in rod (80 % Ni-Fe knee law), second order at fineness 1, with knee
    /// elimination and the plain secant start: 68 A in 5 iterations after 7 first-order ones
    /// (0.23 s) against 10 from the linear guess (0.36 s); before knee elimination 1 A and
    /// 30 A did not converge in 50 iterations from the linear guess. With the load-line start
    /// and `START_TOL`: 6 after 5 (0.21 s).
    pub(super) fn first_order_guess(
        &self,
        first: &Model,
        first_linear: Vec<f64>,
        exc: Excitation<'_>,
        settings: &NewtonSettings,
    ) -> Result<(Vec<f64>, NewtonReport), SolverError> {
        let nv = first.mesh.nodes.len();
        let sub = Excitation {
            currents: exc.currents,
            polarizations: exc.polarizations,
            a_fixed: &exc.a_fixed[..nv],
            b0: exc.b0,
        };
        // The start need not be converged further than the second-order problem's own first
        // residual (3e-3 relative on the search coil at 100× its knee, `tests/`):
        // START_TOL saves 1–2 first-order iterations on every saturating reference case.
        let loose = NewtonSettings {
            residual_tol: settings.residual_tol.max(START_TOL),
            update_tol: settings.update_tol.max(START_TOL),
            ..*settings
        };
        let guess = first.guess_from_linear(first_linear, sub)?;
        let (sol, first_report, _) = MagnetostaticSystem::new(first, sub).newton(guess, &loose)?;
        let mut a = vec![0.0; self.mesh.nodes.len()];
        a[..nv].copy_from_slice(&sol.a);
        // Mid-edge nodes: the first-order field at the edge's midpoint.
        for (t, mid) in self.mesh.mid.iter().enumerate() {
            let g = &first.geom[t];
            let av = sol.element_values(first, t);
            for (k, &n) in mid.iter().enumerate() {
                let mut l = [0.0; 3];
                l[k] = 0.5;
                l[(k + 1) % 3] = 0.5;
                let r = g.position(l)[0];
                a[n as usize] = if r > 0.0 { g.a_at(&av, l, r) } else { 0.0 };
            }
        }
        Ok((self.with_fixed(&a, exc.a_fixed), first_report))
    }

    /// The first-order model on this second-order model's corners (same regions, conditions
    /// and exact exterior).
    pub(super) fn corner_model(&self) -> Result<Model, SolverError> {
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
            exact_exterior: self
                .exact_exterior
                .as_ref()
                .map(|ob| crate::exterior::ExactExterior {
                    nodes: ob
                        .nodes
                        .iter()
                        .copied()
                        .filter(|&n| (n as usize) < nv)
                        .collect(),
                    ..ob.clone()
                }),
        };
        Model::new(problem)
    }

    /// The first guess: the linear solve with every material at its initial reluctivity ν(0),
    /// then one secant (fixed-point) solve with a reluctivity per quadrature point taken from
    /// that field (see [`Self::guess_from_linear`]).
    pub(super) fn initial_guess(&self, exc: Excitation<'_>) -> Result<Vec<f64>, SolverError> {
        let linear = self.linear_field(exc)?;
        self.guess_from_linear(linear, exc)
    }

    /// The secant solve from the linear field `linear`.
    ///
    /// Below saturation the reluctivity is ν(|B|) of the linear field. Why the secant update:
    /// above the knee the linear field is far too strong, and Newton started there approaches
    /// a steep law H(B) from its saturated side, where each iteration only halves the distance
    /// to the knee (built-in rod, 3 A: 52 Newton iterations without it, 13 with it). Where the
    /// linear field exceeds saturation somewhere, ν(|B|) leaves the core nearly air-like, far
    /// below its knee, and Newton then climbs it with short steps; there the reluctivity comes
    /// from the load line instead (see [`load_line_reluctivity`]), which needs the field of the
    /// windings with every saturable material replaced by vacuum. Measured with knee
    /// elimination, cases' own meshes, first-order start + second-order iterations at 10× and
    /// 100× the knee: search coil 11 + 4 and 11 + 7 → 7 + 4 and 5 + 7; hollow tube 9 + 5 and
    /// 8 + 5 → 5 + 5 and 5 + 5 (`START_TOL` included).
    fn guess_from_linear(
        &self,
        linear: Vec<f64>,
        exc: Excitation<'_>,
    ) -> Result<Vec<f64>, SolverError> {
        if self.is_linear() {
            return Ok(linear);
        }
        let air = if self.saturates(&linear, exc.b0) {
            Some(Solution {
                a: self.vacuum_field(exc)?,
                b0: exc.b0,
            })
        } else {
            None
        };
        let field = Solution {
            a: linear,
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
                        let b = b[0].hypot(b[1]);
                        match &air {
                            Some(air) if !mat.is_linear() => {
                                let ba = air.b_q(self, e, q);
                                load_line_reluctivity(mat, b, ba[0].hypot(ba[1]) / MU0)
                            }
                            _ => mat.nu(b),
                        }
                    })
                    .collect()
            })
            .collect();
        self.secant_solve(exc, &secant)
    }

    /// The field of currents `j_elem` and the background `b0` with every material replaced by
    /// vacuum and no magnet: the applied field a core sees (for its apparent permeability).
    /// One numeric factorisation on the model's own pattern.
    pub fn applied_field(&self, j_elem: &[f64], b0: f64) -> Result<Solution, SolverError> {
        let nu: Vec<Vec<f64>> = self
            .geom
            .iter()
            .map(|g| vec![1.0 / MU0; g.qp.len()])
            .collect();
        let a_fixed = self.fixed_values();
        let no_magnets = vec![0.0; self.geom.len()];
        let exc = Excitation {
            currents: j_elem,
            polarizations: &no_magnets,
            a_fixed: &a_fixed,
            b0,
        };
        let a = self.secant_solve(exc, &nu)?;
        Ok(Solution { a, b0 })
    }

    /// The linear solve with every saturable material replaced by vacuum (linear ones, and
    /// their polarizations, kept).
    fn vacuum_field(&self, exc: Excitation<'_>) -> Result<Vec<f64>, SolverError> {
        let nu: Vec<Vec<f64>> = (0..self.geom.len())
            .map(|e| {
                let v = if self.material(e).is_linear() {
                    0.0
                } else {
                    1.0 / MU0
                };
                vec![v; self.geom[e].qp.len()]
            })
            .collect();
        self.secant_solve(exc, &nu)
    }

    /// The linear solve with every material at its initial reluctivity ν(0).
    pub(super) fn linear_field(&self, exc: Excitation<'_>) -> Result<Vec<f64>, SolverError> {
        let initial: Vec<Vec<f64>> = self.geom.iter().map(|g| vec![0.0; g.qp.len()]).collect();
        self.secant_solve(exc, &initial)
    }

    /// The linear solve with reluctivity `nu[e][q]` per quadrature point (0 stands for ν(0)).
    pub(super) fn secant_solve(
        &self,
        exc: Excitation<'_>,
        nu: &[Vec<f64>],
    ) -> Result<Vec<f64>, SolverError> {
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
            exc.polarizations,
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
}

/// Reluctivity H/B in m/H of the point where the law meets the demagnetizing load line
/// through the linear solution (H_lin = ν(0)·B_lin, B_lin) and the vacuum solution
/// (H_air, μ0·H_air): the root of H(B) + s·B = H_lin + s·B_lin with
/// s = (H_air − H_lin)/(B_lin − μ0·H_air).
///
/// Why: inside a uniformly magnetised ellipsoid in a uniform applied field, H = H_a − N·M with
/// M = B/μ0 − H, so H = (H_a − N·B/μ0)/(1 − N) is linear in B for every law, and both linear
/// solutions lie on that line, which they fix. For an ellipsoid the point is then the exact
/// internal field (Jackson, Classical Electrodynamics, 3rd ed., §5.10–5.11 [section numbers
/// from memory], sphere N = 1/3; Osborn, Phys. Rev. 67 (1945), general N), and for a finite
/// rod a local estimate on the right side of the knee. Where the line does not slope down
/// (shielded or return-flux regions, where the core weakens the field) it says nothing, and
/// the plain secant value ν(B_lin) stands in (measured: the same iteration counts on every
/// saturating reference case as the geometric mean of ν(B_lin) and ν at H_lin tried first).
pub(crate) fn load_line_reluctivity(mat: &Material, b_lin: f64, h_air: f64) -> f64 {
    let nu0 = mat.nu(0.0);
    let h_lin = nu0 * b_lin;
    if b_lin <= 0.0 || h_lin <= 0.0 {
        return nu0;
    }
    let slope = (h_air - h_lin) / (b_lin - MU0 * h_air);
    if !(slope > 0.0 && slope.is_finite()) {
        return mat.nu(b_lin);
    }
    let target = h_lin + slope * b_lin;
    let f = |b: f64| (mat.h(b) + slope * b, mat.nu_diff(b) + slope);
    // f(0) = 0 < target; f grows at least with the slope, so target/slope bounds the root.
    let hi = target / slope;
    let b = crate::material::solve_increasing(f, target, 0.0, hi, b_lin.min(hi));
    if b > 0.0 {
        mat.h(b) / b
    } else {
        nu0
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::material::SaturationLaw;

    #[test]
    fn load_line_start_is_the_exact_field_of_a_saturating_sphere_in_a_uniform_field() {
        // A uniformly magnetised sphere in a uniform applied field H0: H + M(H)/3 = H0 inside
        // (Jackson, Classical Electrodynamics, 3rd ed., §5.10–5.11); the linear solution is
        // H0/(1 + χ/3). The load-line point must be that equation's root, found here
        // independently by bisection on H with the law's B(H).
        let mat = Material::Saturable(std::sync::Arc::new(SaturationLaw::Knee {
            js: 0.78,
            mu_i: 5e4,
            mu_max: 2.5e5,
        }));
        let mu_i = mat.initial_mu_r();
        for h0 in [10.0, 1e3, 1e5, 1e6, 1e7] {
            let h_lin = h0 / (1.0 + (mu_i - 1.0) / 3.0);
            let b_lin = MU0 * mu_i * h_lin;
            let nu = load_line_reluctivity(&mat, b_lin, h0);
            let sphere = |h: f64| h + (mat.b_of_h(h) / MU0 - h) / 3.0 - h0;
            let (mut lo, mut hi) = (0.0, h0);
            for _ in 0..200 {
                let mid = 0.5 * (lo + hi);
                if sphere(mid) < 0.0 {
                    lo = mid;
                } else {
                    hi = mid;
                }
            }
            let h = 0.5 * (lo + hi);
            let exact = h / mat.b_of_h(h);
            assert!(
                (nu - exact).abs() <= 1e-9 * exact,
                "H0 = {h0} A/m: ν = {nu}, sphere root gives {exact}"
            );
        }
    }

    #[test]
    fn load_line_start_falls_back_to_the_secant_value_where_the_line_rises() {
        // A vacuum field weaker than the linear one (the line rises): ν(B_lin); no field: ν(0).
        let mat = Material::Saturable(std::sync::Arc::new(SaturationLaw::FrohlichKennelly {
            js: 1.6,
            mu_ri: 2000.0,
        }));
        for (b_lin, h_air) in [(5.0, 0.0), (0.5, 10.0)] {
            assert_eq!(load_line_reluctivity(&mat, b_lin, h_air), mat.nu(b_lin));
        }
        assert_eq!(load_line_reluctivity(&mat, 0.0, 1e3), mat.nu(0.0));
    }
}
