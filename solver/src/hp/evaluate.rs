//! The solved hp field where it is asked for: A_φ and B = (B_r, B_z) at a physical point, the
//! flux through a disc on the axis, and volume means of B_z and H_z over a region.
//!
//! Every value is the total field: the reaction part the model solves for plus the uniform
//! background B0 (A += B0 r/2, B_z += B0). B = curl(A e_φ) = (−∂A/∂z, ∂A/∂r + A/r); on the axis
//! A/r is 0/0, and since A vanishes along an axis edge (the axis condition), A/r → ∂A/∂r there:
//! B_z = 2 ∂A/∂r at r = 0.

use rayon::prelude::*;

use super::locate::{HpLocator, Located};
use super::model::{HpModel, HpSolution};
use crate::error::SolverError;
use crate::mesh::Point;

/// The field at one point.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct HpPointValue {
    /// The element that evaluated it and the point's reference coordinates there.
    pub located: Located,
    /// A_φ, background included, Wb/m.
    pub a: f64,
    /// (B_r, B_z), background included, T.
    pub b: [f64; 2],
    /// (H_r, H_z) by the element's region law, A/m.
    pub h: [f64; 2],
}

/// Volume means over one region (volumes of revolution, 2πr dA).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RegionMean {
    /// Volume of the region, m³.
    pub volume: f64,
    /// ⟨B_z⟩, background included, T.
    pub b_z: f64,
    /// ⟨H_z⟩ = ⟨ν (B_z − J0)⟩ (linear laws; each region's own), A/m.
    pub h_z: f64,
}

impl HpModel {
    /// The point locator of this model's elements (curved ones by their exact outline).
    pub fn locator(&self) -> HpLocator {
        HpLocator::new(&self.mesh, &self.maps)
    }

    /// The element holding `p` and the point's reference coordinates (see
    /// [`HpLocator::find`]); `OutsideMesh` when none does.
    pub fn locate(&self, locator: &HpLocator, p: Point) -> Result<Located, SolverError> {
        locator
            .find(&self.mesh, &self.maps, p)
            .ok_or(SolverError::OutsideMesh { r: p[0], z: p[1] })
    }

    /// The field of `sol` at `p` (located by `locator`, built by [`Self::locator`]).
    pub fn value_at(
        &self,
        sol: &HpSolution,
        locator: &HpLocator,
        p: Point,
    ) -> Result<HpPointValue, SolverError> {
        let located = self.locate(locator, p)?;
        self.value_in(sol, located, p[0])
    }

    /// The field of `sol` at reference point `located` of its element, whose radius is `r`
    /// (passed so that a point on the axis is taken as exactly on it).
    pub fn value_in(
        &self,
        sol: &HpSolution,
        located: Located,
        r: f64,
    ) -> Result<HpPointValue, SolverError> {
        let t = located.element;
        let [xi, eta] = located.xi;
        let (basis, active) = self.active(t)?;
        let n = basis.len();
        let (mut values, mut grads) = (vec![0.0; n], vec![[0.0; 2]; n]);
        basis.eval(
            xi,
            eta,
            self.dofs.element(t).reversed,
            &mut values,
            &mut grads,
        );
        let u = self.element_values(sol, t);
        let (mut a, mut g) = (0.0, [0.0; 2]);
        for (k, &i) in active.iter().enumerate() {
            a += u[k] * values[i];
            g[0] += u[k] * grads[i][0];
            g[1] += u[k] * grads[i][1];
        }
        let [dr, dz] = self.maps[t].jacobian(xi, eta).physical_gradient(g);
        let b_z = if r > 0.0 { dr + a / r } else { 2.0 * dr };
        let b = [-dz, b_z + sol.b0];
        Ok(HpPointValue {
            located,
            a: a + 0.5 * sol.b0 * r,
            b,
            h: self.element_props(t).h(b),
        })
    }

    /// The flux of `sol` through the disc r < `radius` of the plane z = `z0`, Wb:
    /// Φ = 2π R A_φ(R, z0) (Stokes), background included.
    pub fn disc_flux(
        &self,
        sol: &HpSolution,
        locator: &HpLocator,
        radius: f64,
        z0: f64,
    ) -> Result<f64, SolverError> {
        let v = self.value_at(sol, locator, [radius, z0])?;
        Ok(2.0 * std::f64::consts::PI * radius * v.a)
    }

    /// Volume means of B_z and H_z of `sol` over the elements tagged `tag` (the model's
    /// quadrature, exact geometry on curved elements); None when no element has the tag.
    pub fn region_mean(
        &self,
        sol: &HpSolution,
        tag: u32,
    ) -> Result<Option<RegionMean>, SolverError> {
        let elements: Vec<usize> = (0..self.mesh.triangles.len())
            .filter(|&t| self.mesh.tags[t] == tag)
            .collect();
        if elements.is_empty() {
            return Ok(None);
        }
        // Per element (volume, ∫B_z dV, ∫H_z dV), summed in element order for reproducibility.
        let parts: Vec<[f64; 3]> = elements
            .par_iter()
            .map(|&t| {
                let pts = self.element_points(t)?;
                let props = self.element_props(t);
                let u = self.element_values(sol, t);
                let mut s = [0.0; 3];
                for q in 0..pts.points() {
                    let mut b = [0.0, sol.b0];
                    for (a, ua) in u.iter().enumerate() {
                        let c = pts.curl[q * pts.n + a];
                        b[0] += ua * c[0];
                        b[1] += ua * c[1];
                    }
                    let dv = pts.dv[q];
                    s[0] += dv;
                    s[1] += b[1] * dv;
                    s[2] += props.h(b)[1] * dv;
                }
                Ok(s)
            })
            .collect::<Result<_, SolverError>>()?;
        let mut total = [0.0; 3];
        for s in &parts {
            for k in 0..3 {
                total[k] += s[k];
            }
        }
        Ok(Some(RegionMean {
            volume: total[0],
            b_z: total[1] / total[0],
            h_z: total[2] / total[0],
        }))
    }
}

#[cfg(test)]
#[path = "evaluate_tests.rs"]
mod tests;
