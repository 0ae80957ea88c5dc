//! The solved field read through its model: B, H and μr anywhere in the mesh (the layer above
//! the model; the data of a solution live in [`crate::solution`]).

use crate::element::{ElementGeometry, Local, MAX_NODES};
use crate::error::SolverError;
use crate::locate::Locator;
use crate::mesh::Point;
use crate::solution::{PointField, Solution};
use crate::solve::Model;

/// Barycentric tolerance for a point on an element's boundary.
const INSIDE: f64 = 1e-9;

/// The element holding `p` and its reference (barycentric) coordinates. First order: the
/// straight triangle. Second order: the curved element, found by inverting the map of the
/// straight triangle's candidate and, where the point lies in the bulge of a curved edge
/// (inside a neighbour's curved element but not its straight triangle, or outside every
/// straight triangle), of the elements near it.
fn locate_curved(model: &Model, locator: &Locator, p: Point) -> Option<(usize, [f64; 3])> {
    let mesh = model.mesh();
    let found = locator.find(mesh, p);
    if mesh.order() == 1 {
        return found;
    }
    let inside = |e: usize, l0: [f64; 3]| {
        let l = model.geometry()[e].invert(p, l0);
        l.iter().all(|&x| x >= -INSIDE).then_some((e, l))
    };
    if let Some((e, l0)) = found {
        if let Some(hit) = inside(e, l0) {
            return Some(hit);
        }
    }
    locator
        .near(p)
        .into_iter()
        .find_map(|e| inside(e, crate::locate::barycentric(mesh.corners(e), p)))
        .or(found)
}

impl Solution {
    /// The nodal coefficients (reaction part) of element `e` (3 or 6; the rest zero).
    #[inline]
    pub fn element_values(&self, model: &Model, e: usize) -> Local {
        let mut v = [0.0; MAX_NODES];
        for (k, &n) in model.mesh().element_nodes(e).iter().enumerate() {
            v[k] = self.a[n as usize];
        }
        v
    }

    /// Total A_φ at every node, Wb/m.
    pub fn nodal_a(&self, model: &Model) -> Vec<f64> {
        model
            .mesh()
            .nodes
            .iter()
            .zip(&self.a)
            .map(|(p, a)| a + 0.5 * self.b0 * p[0])
            .collect()
    }

    /// Total B at quadrature point `q` of element `e`, T.
    #[inline]
    pub fn b_q(&self, model: &Model, e: usize, q: &crate::element::QuadPoint) -> [f64; 2] {
        let b = model.geometry()[e].b_at(&self.element_values(model, e), q);
        [b[0], b[1] + self.b0]
    }

    /// Total A_φ at quadrature point `q` of element `e`, Wb/m.
    #[inline]
    pub fn a_q(&self, model: &Model, e: usize, q: &crate::element::QuadPoint) -> f64 {
        let g = &model.geometry()[e];
        g.a_at(&self.element_values(model, e), q.n, q.r) + 0.5 * self.b0 * q.r
    }

    /// Volume-mean total B of element `e`, T.
    pub fn b_mean(&self, model: &Model, e: usize) -> [f64; 2] {
        let b = model.geometry()[e].b_mean(&self.element_values(model, e));
        [b[0], b[1] + self.b0]
    }

    /// B at point `p` (r, z) in T, with A and the evaluating element.
    pub fn b_at_point(
        &self,
        model: &Model,
        locator: &Locator,
        p: Point,
    ) -> Result<(usize, f64, [f64; 2]), SolverError> {
        let (e, l) = locate_curved(model, locator, p)
            .ok_or(SolverError::OutsideMesh { r: p[0], z: p[1] })?;
        let g: &ElementGeometry = &model.geometry()[e];
        let av = self.element_values(model, e);
        if p[0] > 0.0 {
            let a = g.a_at(&av, l, p[0]);
            let b = g.b_at_bary(&av, l, p[0]);
            return Ok((e, a + 0.5 * self.b0 * p[0], [b[0], b[1] + self.b0]));
        }
        // On the axis (elements there use the plain basis) A/r → ∂A/∂r, so B_z = 2 ∂A/∂r.
        let [da_dr, da_dz] = g.plain_gradient(&av, l);
        Ok((e, 0.0, [-da_dz, 2.0 * da_dr + self.b0]))
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
        let props = model.element_props(e);
        Ok(PointField {
            at: p,
            a,
            b,
            h: props.h(b),
            mu_r: props.secant_mu_r(b),
            tag: model.mesh().tags[e],
        })
    }

    /// Volume-averaged (B_r, B_z) of every element, in T.
    pub fn element_b(&self, model: &Model) -> Vec<[f64; 2]> {
        use rayon::prelude::*;
        (0..model.mesh().triangles.len())
            .into_par_iter()
            .map(|e| self.b_mean(model, e))
            .collect()
    }
}
