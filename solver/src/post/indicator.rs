//! Where the discretisation error lives: per-element indicators for adaptive refinement.
//!
//! * **Energy**: the element's own flux density against the patch-recovered one at its
//!   centroid, η_e² = ν |B_rec − B_h|² V_e, the energy of the difference (the recovery-based
//!   estimator of Zienkiewicz & Zhu, Int. J. Numer. Meth. Eng. 24, 337, 1987, evaluated at one
//!   point per element).
//! * **Goal (dipole moment)**: the same recovery error weighted by that of the dual solution z
//!   of the moment functional, η_e = |ν (B_rec − B_h)·(Z_rec − Z_h)| V_e — the dual-weighted
//!   residual idea of Becker & Rannacher (Acta Numerica 10, 1, 2001) with recovered fields in
//!   place of the residuals. The dual solves T z = ∂m/∂a with the tangent T at the solution,
//!   where ∂m/∂a_i = ∫ [ν0 B_z(φ_i) − (T B(φ_i))_z] dV over magnetic elements (the moment of
//!   the currents does not depend on the field). It ranks elements by their share of the
//!   moment's error; for a case without magnetic material it is zero.
//!
//! Both rank elements; neither is itself the error of the moment (see `tools/src/accuracy.rs`).

use rayon::prelude::*;

use crate::constants::MU0;
use crate::error::SolverError;
use crate::locate::Locator;
use crate::mesh::Point;
use crate::solution::Solution;
use crate::solve::Model;

/// Indicator of one element.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ElementIndicator {
    /// Centroid (r, z) in m.
    pub centroid: Point,
    /// Longest edge in m.
    pub size: f64,
    /// The element's share: η_e² in J (energy) or η_e in A·m² (goal).
    pub weight: f64,
}

/// The element's own field to compare with the recovered one at its centroid `c`: the volume
/// mean for first order (a constant field up to the flux basis), the value at `c` for second.
fn element_b(model: &Model, sol: &Solution, e: usize, c: Point) -> [f64; 2] {
    let g = &model.geometry()[e];
    if g.is_quadratic() {
        let l = g.invert(c, [1.0 / 3.0; 3]);
        let b = g.b_at_bary(&sol.element_values(model, e), l, c[0]);
        [b[0], b[1] + sol.b0]
    } else {
        sol.b_mean(model, e)
    }
}

/// Energy indicators of every element, in element order.
pub fn energy_indicators(
    model: &Model,
    sol: &Solution,
    locator: &Locator,
) -> Vec<ElementIndicator> {
    let mesh = model.mesh();
    (0..mesh.triangles.len())
        .into_par_iter()
        .map(|e| {
            let (centroid, size) = (mesh.centroid(e), mesh.longest_edge(e));
            let bh = element_b(model, sol, e, centroid);
            let weight = match locator.patches().b_at(model, sol, e, centroid) {
                Some(br) => {
                    let d2 = (br[0] - bh[0]).powi(2) + (br[1] - bh[1]).powi(2);
                    let nu = model.material(e).nu(bh[0].hypot(bh[1]));
                    nu * d2 * model.geometry()[e].volume()
                }
                None => 0.0,
            };
            ElementIndicator {
                centroid,
                size,
                weight,
            }
        })
        .collect()
}

/// The dual solution of the dipole functional at `sol` (reaction coefficients, no background),
/// or None when the moment does not depend on the field (no magnetic material).
pub fn dipole_dual(model: &Model, sol: &Solution) -> Result<Option<Solution>, SolverError> {
    let nu0 = 1.0 / MU0;
    let dofs = model.dofs();
    let mut g = vec![0.0; dofs.n_free];
    let mut any = false;
    for (e, geom) in model.geometry().iter().enumerate() {
        let mat = model.material(e);
        if !mat.is_magnetic() {
            continue;
        }
        any = true;
        let tri = model.mesh().element_nodes(e);
        for q in &geom.qp {
            let b = sol.b_q(model, e, q);
            let bm = b[0].hypot(b[1]);
            let (nu, nu_d) = mat.reluctivities(bm);
            let bh = if bm > 0.0 {
                [b[0] / bm, b[1] / bm]
            } else {
                [0.0, 0.0]
            };
            let curls = geom.curls(q);
            for (k, &v) in tri.iter().enumerate() {
                if let Some(i) = dofs.free(v) {
                    let c = curls[k];
                    // (T B(φ))_z = ν B_z(φ) + (ν_d − ν)(b̂·B(φ)) b̂_z
                    let t_z = nu * c[1] + (nu_d - nu) * (bh[0] * c[0] + bh[1] * c[1]) * bh[1];
                    g[i] += (nu0 * c[1] - t_z) * q.dv;
                }
            }
        }
    }
    if !any {
        return Ok(None);
    }
    let factor = model.tangent_at(sol, &model.fixed_values())?;
    factor.solve_in_place(&mut g);
    let mut a = vec![0.0; model.mesh().nodes.len()];
    for (i, &n) in dofs.free_nodes.iter().enumerate() {
        a[n as usize] = g[i];
    }
    Ok(Some(Solution { a, b0: 0.0 }))
}

/// Goal-oriented indicators for the dipole moment (see the module documentation); falls back
/// to the energy indicators when the moment does not depend on the field.
pub fn goal_indicators(
    model: &Model,
    sol: &Solution,
    locator: &Locator,
) -> Result<Vec<ElementIndicator>, SolverError> {
    let Some(dual) = dipole_dual(model, sol)? else {
        return Ok(energy_indicators(model, sol, locator));
    };
    Ok((0..model.mesh().triangles.len())
        .into_par_iter()
        .map(|e| {
            let (centroid, size) = (model.mesh().centroid(e), model.mesh().longest_edge(e));
            let patches = locator.patches();
            let weight = match (
                patches.b_at(model, sol, e, centroid),
                patches.b_at(model, &dual, e, centroid),
            ) {
                (Some(br), Some(zr)) => {
                    let bh = element_b(model, sol, e, centroid);
                    let zh = element_b(model, &dual, e, centroid);
                    let nu = model.material(e).nu(bh[0].hypot(bh[1]));
                    let dot = (br[0] - bh[0]) * (zr[0] - zh[0]) + (br[1] - bh[1]) * (zr[1] - zh[1]);
                    (nu * dot * model.geometry()[e].volume()).abs()
                }
                _ => 0.0,
            };
            ElementIndicator {
                centroid,
                size,
                weight,
            }
        })
        .collect())
}
