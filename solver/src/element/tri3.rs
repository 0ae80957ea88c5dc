//! The 3-node (first-order) triangle.
//!
//! ```text
//!   z
//!   ^     2
//!   |     | \
//!   |     |   \
//!   |     0 --- 1
//!   +-----------------> r
//! ```
//! Shape functions are the barycentric coordinates: N_i = λ_i, with constant gradients.
//!
//! # Two kinds of nodal basis
//!
//! Node i carries either the plain basis φ_i = N_i ("potential" node) or the flux basis
//! φ_i = N_i·r_i/r ("flux" node: r·A, the flux function, is interpolated linearly). Both equal 1
//! at node i and 0 at the others, so nodal values are A_φ in either case and the space stays
//! conforming. Why: outside a slender permeable core A ≈ ψ(z)/r. Interpolating that linearly in
//! A leaves a spurious B_z of relative size h/r next to the core, whose energy is magnified by
//! μr (the core's own reluctance is ∝ 1/μr) and throttles the flux: a μr = 300 spheroid of axis
//! ratio 50 came out 30 % low on 25k nodes. Interpolating rA removes that error (rA ≈ const is
//! exact). Near the axis rA ∝ r² cannot be interpolated linearly without locking, so nodes of
//! elements touching the axis keep the plain basis, and magnetic elements use the plain basis
//! at all their nodes, as the field inside them is nearly uniform (A = B r/2 is exact in the
//! plain basis). The choice is made per element (see [`crate::solve::flux_nodes`]). For a flux node
//! B(φ_i) = (r_i/r)·(−∂N_i/∂z, ∂N_i/∂r), since ∂(r_i/r)/∂r + (r_i/r)/r = 0.

use crate::mesh::{FeMesh, Point};
use crate::quadrature::DUNAVANT_5;

/// A quadrature point in physical coordinates with its measure.
#[derive(Debug, Clone, Copy)]
pub struct QuadPoint {
    /// Radius r in m (always > 0: points lie strictly inside the triangle).
    pub r: f64,
    /// Axial position z in m.
    pub z: f64,
    /// Shape function values N_i at this point.
    pub n: [f64; 3],
    /// Volume measure dV = 2π r · area · weight in m³ (full revolution).
    pub dv: f64,
}

/// Geometry of one triangle: area, constant shape-function gradients and quadrature points.
#[derive(Debug, Clone)]
pub struct ElementGeometry {
    /// Area in the (r, z) plane in m².
    pub area: f64,
    /// ∂N_i/∂r in 1/m.
    pub dn_dr: [f64; 3],
    /// ∂N_i/∂z in 1/m.
    pub dn_dz: [f64; 3],
    /// Quadrature points with 2πr-weighted measures.
    pub qp: [QuadPoint; 7],
    /// Per node: r_i for a flux node (basis N_i·r_i/r), 0 for a potential node (basis N_i).
    pub flux_radius: [f64; 3],
    /// Blend length ℓ of flux nodes in m (0: pure flux basis; see `with_blend`).
    pub blend: f64,
}

impl ElementGeometry {
    /// Geometry of a counter-clockwise triangle with corners `p`, all nodes potential nodes.
    pub fn new(p: [Point; 3]) -> Self {
        Self::with_basis(p, [false; 3])
    }

    /// Geometry with node i a flux node where `flux[i]` (see the module documentation).
    pub fn with_basis(p: [Point; 3], flux: [bool; 3]) -> Self {
        Self::with_blend(p, flux, 0.0)
    }

    /// As [`Self::with_basis`], with flux nodes blended towards the plain basis near the axis:
    /// φ_i = N_i·g_i(r), g_i = 1 + w(r)(r_i/r − 1), w = r²/(r² + ℓ²). A global function of r, so
    /// the space stays conforming; w → 1 (flux basis) for r ≫ ℓ, w → 0 (plain) for r ≪ ℓ.
    pub fn with_blend(p: [Point; 3], flux: [bool; 3], blend: f64) -> Self {
        let twice_area =
            (p[1][0] - p[0][0]) * (p[2][1] - p[0][1]) - (p[2][0] - p[0][0]) * (p[1][1] - p[0][1]);
        let mut dn_dr = [0.0; 3];
        let mut dn_dz = [0.0; 3];
        for i in 0..3 {
            let j = (i + 1) % 3;
            let k = (i + 2) % 3;
            dn_dr[i] = (p[j][1] - p[k][1]) / twice_area;
            dn_dz[i] = (p[k][0] - p[j][0]) / twice_area;
        }
        let area = 0.5 * twice_area;
        let qp = DUNAVANT_5.map(|rp| {
            let [l0, l1, l2] = rp.bary;
            let r = l0 * p[0][0] + l1 * p[1][0] + l2 * p[2][0];
            let z = l0 * p[0][1] + l1 * p[1][1] + l2 * p[2][1];
            QuadPoint {
                r,
                z,
                n: rp.bary,
                dv: 2.0 * std::f64::consts::PI * r * area * rp.weight,
            }
        });
        let flux_radius = [0, 1, 2].map(|i| if flux[i] { p[i][0] } else { 0.0 });
        Self {
            area,
            dn_dr,
            dn_dz,
            qp,
            flux_radius,
            blend,
        }
    }

    /// g_i(r) and g_i'(r) + g_i(r)/r of flux node `i` (see [`Self::with_blend`]).
    #[inline]
    fn flux_factor(&self, ri: f64, r: f64) -> (f64, f64) {
        if self.blend == 0.0 {
            return (ri / r, 0.0);
        }
        let l2 = self.blend * self.blend;
        let d = r * r + l2;
        let w = r * r / d;
        let dw = 2.0 * r * l2 / (d * d);
        let g = 1.0 + w * (ri / r - 1.0);
        (g, dw * (ri / r - 1.0) + (1.0 - w) / r)
    }

    /// Geometry of every triangle of `mesh`, in triangle order; `flux_node[v]` selects the
    /// flux basis for node v.
    pub fn all(mesh: &FeMesh, flux_node: &[bool]) -> Vec<ElementGeometry> {
        use rayon::prelude::*;
        (0..mesh.triangles.len())
            .into_par_iter()
            .map(|t| {
                let tri = mesh.triangles[t];
                Self::with_basis(mesh.corners(t), tri.map(|v| flux_node[v as usize]))
            })
            .collect()
    }

    /// Basis function i at barycentric value `n_i` and radius `r`.
    #[inline]
    pub fn basis(&self, i: usize, n_i: f64, r: f64) -> f64 {
        let ri = self.flux_radius[i];
        if ri > 0.0 {
            n_i * self.flux_factor(ri, r).0
        } else {
            n_i
        }
    }

    /// (B_r, B_z) of basis function i at barycentric value `n_i` and radius `r` (> 0).
    #[inline]
    pub fn curl_at(&self, i: usize, n_i: f64, r: f64) -> [f64; 2] {
        let ri = self.flux_radius[i];
        if ri > 0.0 {
            let (g, h) = self.flux_factor(ri, r);
            [-g * self.dn_dz[i], g * self.dn_dr[i] + n_i * h]
        } else {
            [-self.dn_dz[i], self.dn_dr[i] + n_i / r]
        }
    }

    /// A_φ at barycentric coordinates `l` and radius `r` for nodal values `a`.
    pub fn a_at(&self, a: [f64; 3], l: [f64; 3], r: f64) -> f64 {
        (0..3).map(|i| a[i] * self.basis(i, l[i], r)).sum()
    }

    /// Volume of the ring swept by this triangle in m³.
    pub fn volume(&self) -> f64 {
        self.qp.iter().map(|q| q.dv).sum()
    }

    /// The two B-operators of basis function `i` at quadrature point `q`:
    /// (B_r, B_z) = (−∂φ_i/∂z, ∂φ_i/∂r + φ_i/r).
    #[inline]
    pub fn curl(&self, i: usize, q: &QuadPoint) -> [f64; 2] {
        self.curl_at(i, q.n[i], q.r)
    }

    /// Basis function i at quadrature point `q`.
    #[inline]
    pub fn phi(&self, i: usize, q: &QuadPoint) -> f64 {
        self.basis(i, q.n[i], q.r)
    }

    /// B = curl(A e_φ) at quadrature point `q` for nodal values `a` (Wb/m) → (B_r, B_z) in T.
    #[inline]
    pub fn b_at(&self, a: [f64; 3], q: &QuadPoint) -> [f64; 2] {
        let mut b = [0.0; 2];
        for (i, ai) in a.iter().enumerate() {
            let c = self.curl(i, q);
            b[0] += ai * c[0];
            b[1] += ai * c[1];
        }
        b
    }

    /// Volume average of B over the element for nodal values `a`, in T.
    pub fn b_mean(&self, a: [f64; 3]) -> [f64; 2] {
        let mut acc = [0.0; 2];
        let mut v = 0.0;
        for q in &self.qp {
            let b = self.b_at(a, q);
            acc[0] += b[0] * q.dv;
            acc[1] += b[1] * q.dv;
            v += q.dv;
        }
        [acc[0] / v, acc[1] / v]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn gradients_reproduce_a_linear_function() {
        let g = ElementGeometry::new([[1.0, 0.0], [2.0, 0.5], [1.2, 1.5]]);
        // f = 3 + 2r − 5z at the corners
        let f = |p: Point| 3.0 + 2.0 * p[0] - 5.0 * p[1];
        let v = [f([1.0, 0.0]), f([2.0, 0.5]), f([1.2, 1.5])];
        let dr: f64 = (0..3).map(|i| v[i] * g.dn_dr[i]).sum();
        let dz: f64 = (0..3).map(|i| v[i] * g.dn_dz[i]).sum();
        assert!((dr - 2.0).abs() < 1e-13 && (dz + 5.0).abs() < 1e-13);
    }

    #[test]
    fn ring_volume_matches_pappus_theorem() {
        // Pappus: volume of revolution = 2π · (centroid radius) · area.
        let p = [[1.0, 0.0], [3.0, 0.0], [2.0, 2.0]];
        let g = ElementGeometry::new(p);
        let exact = 2.0 * std::f64::consts::PI * 2.0 * 2.0;
        assert!((g.volume() - exact).abs() < 1e-12 * exact);
    }

    #[test]
    fn flux_basis_holds_a_pure_flux_function_exactly() {
        // rA = const (no B_z, no B_r) is exact with flux nodes: A = c/r.
        let p = [[1.0, 0.0], [1.5, 0.2], [1.1, 0.6]];
        let g = ElementGeometry::with_basis(p, [true; 3]);
        let a = p.map(|q| 2.0 / q[0]);
        for q in &g.qp {
            let b = g.b_at(a, q);
            assert!(b[0].abs() < 1e-12 && b[1].abs() < 1e-12, "{b:?}");
            assert!((g.a_at(a, q.n, q.r) - 2.0 / q.r).abs() < 1e-12);
        }
    }

    #[test]
    fn uniform_axial_field_is_exact_in_an_element_touching_the_axis() {
        // A = B0 r / 2 is linear, so a first-order element holds it exactly: B = (0, B0).
        let p = [[0.0, 0.0], [0.5, 0.1], [0.0, 1.0]];
        let g = ElementGeometry::new(p);
        let b0 = 1.7;
        let a = p.map(|q| 0.5 * b0 * q[0]);
        for q in &g.qp {
            let b = g.b_at(a, q);
            assert!(b[0].abs() < 1e-14 && (b[1] - b0).abs() < 1e-13);
        }
    }
}
