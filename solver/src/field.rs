//! The solved field: nodal vector potential, and B, H and μr anywhere in the mesh.

use crate::element::ElementGeometry;
use crate::locate::Locator;
use crate::mesh::Point;
use crate::solve::Model;
use crate::{SolverError, MU0};

/// Nodal values of A_φ in Wb/m.
#[derive(Debug, Clone, PartialEq)]
pub struct Solution {
    /// A_φ at each node.
    pub a: Vec<f64>,
}

/// The field at one point.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PointField {
    /// The point (r, z) in m.
    pub at: Point,
    /// A_φ in Wb/m.
    pub a: f64,
    /// (B_r, B_z) in T.
    pub b: [f64; 2],
    /// (H_r, H_z) in A/m.
    pub h: [f64; 2],
    /// Relative permeability |B|/(μ0|H|) of the material there.
    pub mu_r: f64,
    /// Region tag of the evaluating triangle.
    pub tag: u32,
}

impl Solution {
    /// The three nodal values of element `e`.
    #[inline]
    pub fn element_values(&self, model: &Model, e: usize) -> [f64; 3] {
        model.mesh().triangles[e].map(|v| self.a[v as usize])
    }

    /// B at point `p` (r, z) in T, with A and the evaluating element.
    pub fn b_at_point(
        &self,
        model: &Model,
        locator: &Locator,
        p: Point,
    ) -> Result<(usize, f64, [f64; 2]), SolverError> {
        let (e, l) = locator
            .find(model.mesh(), p)
            .ok_or(SolverError::OutsideMesh { r: p[0], z: p[1] })?;
        let g: &ElementGeometry = &model.geometry()[e];
        let av = self.element_values(model, e);
        let a: f64 = (0..3).map(|i| av[i] * l[i]).sum();
        let da_dr: f64 = (0..3).map(|i| av[i] * g.dn_dr[i]).sum();
        let da_dz: f64 = (0..3).map(|i| av[i] * g.dn_dz[i]).sum();
        // On the axis A/r → ∂A/∂r (A vanishes there), so B_z = 2 ∂A/∂r.
        let a_over_r = if p[0] > 0.0 { a / p[0] } else { da_dr };
        Ok((e, a, [-da_dz, da_dr + a_over_r]))
    }

    /// Recovered B at point `p` (patch fit, see [`crate::recover`]), falling back to the
    /// element value where the patch is too small; with A and the evaluating element.
    pub fn b_recovered(
        &self,
        model: &Model,
        locator: &Locator,
        p: Point,
    ) -> Result<(usize, f64, [f64; 2]), SolverError> {
        let (e, a, b) = self.b_at_point(model, locator, p)?;
        let b = locator.patches().b_at(model, self, e, p).unwrap_or(b);
        Ok((e, a, b))
    }

    /// A, recovered B, H and μr at point `p`.
    pub fn at_point(
        &self,
        model: &Model,
        locator: &Locator,
        p: Point,
    ) -> Result<PointField, SolverError> {
        let (e, a, b) = self.b_recovered(model, locator, p)?;
        let nu = model.material(e).nu(b[0] * b[0] + b[1] * b[1]);
        Ok(PointField {
            at: p,
            a,
            b,
            h: [nu * b[0], nu * b[1]],
            mu_r: 1.0 / (MU0 * nu),
            tag: model.mesh().tags[e],
        })
    }

    /// Volume-averaged (B_r, B_z) of every element, in T.
    pub fn element_b(&self, model: &Model) -> Vec<[f64; 2]> {
        use rayon::prelude::*;
        (0..model.mesh().triangles.len())
            .into_par_iter()
            .map(|e| model.geometry()[e].b_mean(self.element_values(model, e)))
            .collect()
    }
}
