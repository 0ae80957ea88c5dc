//! Per-element geometry: quadrature points with their measures, and the basis functions and
//! B-operators of first- and second-order triangles behind one interface.

use crate::mesh::Point;
use crate::quadrature::{RulePoint, DUNAVANT_5, DUNAVANT_6};

use super::{tri3, tri6};

/// Most nodes an element has (the 6-node triangle).
pub const MAX_NODES: usize = 6;
/// Element vector (one value per local node; entries past the node count are unused).
pub type Local = [f64; MAX_NODES];
/// Element matrix (rows and columns past the node count are unused).
pub type LocalMatrix = [[f64; MAX_NODES]; MAX_NODES];

/// A quadrature point in physical coordinates with its measure.
#[derive(Debug, Clone, Copy)]
pub struct QuadPoint {
    /// Radius r in m (always > 0: points lie strictly inside the triangle).
    pub r: f64,
    /// Axial position z in m.
    pub z: f64,
    /// Barycentric coordinates of the point in the reference triangle.
    pub n: [f64; 3],
    /// Volume measure dV = 2π r · |det J| · weight in m³ (full revolution).
    pub dv: f64,
    /// ∂(ξ, η)/∂(r, z) of a second-order element at this point (unused for first order).
    pub jinv: [[f64; 2]; 2],
}

/// Geometry of one triangle: quadrature points and what its basis functions need.
#[derive(Debug, Clone)]
pub struct ElementGeometry {
    /// Nodes of the element: 3 (first order) or 6 (second order).
    pub nodes: usize,
    /// Area in the (r, z) plane in m² (of the curved element for second order).
    pub area: f64,
    /// ∂N_i/∂r of the straight first-order triangle through the corners, 1/m.
    pub dn_dr: [f64; 3],
    /// ∂N_i/∂z of the same, 1/m.
    pub dn_dz: [f64; 3],
    /// Quadrature points with 2πr-weighted measures.
    pub qp: Vec<QuadPoint>,
    /// Per node: r_i for a flux node (basis N_i·r_i/r, blended), 0 for a plain node (N_i).
    pub flux_radius: [f64; MAX_NODES],
    /// Blend length ℓ of flux nodes in m (0: pure flux basis).
    pub blend: f64,
    /// Node coordinates (corners, then mid-edge nodes for second order).
    pub points: [Point; MAX_NODES],
}

/// r_i of each node flagged in `flux` (its flux-basis radius), 0 for plain nodes.
fn flux_radii(p: &[Point], flux: &[bool]) -> [f64; MAX_NODES] {
    let mut out = [0.0; MAX_NODES];
    for ((o, q), &f) in out.iter_mut().zip(p).zip(flux) {
        if f {
            *o = q[0];
        }
    }
    out
}

fn straight_gradients(p: [Point; 3]) -> (f64, [f64; 3], [f64; 3]) {
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
    (0.5 * twice_area, dn_dr, dn_dz)
}

impl ElementGeometry {
    /// First-order geometry of a counter-clockwise triangle with corners `p`, plain basis.
    pub fn new(p: [Point; 3]) -> Self {
        Self::with_basis(p, [false; 3])
    }

    /// First order with node i a flux node where `flux[i]` (see [`super::tri3`]).
    pub fn with_basis(p: [Point; 3], flux: [bool; 3]) -> Self {
        Self::with_blend(p, flux, 0.0)
    }

    /// First order, flux nodes blended towards the plain basis near the axis:
    /// φ_i = N_i·g_i(r), g_i = 1 + w(r)(r_i/r − 1), w = r²/(r² + ℓ²). A global function of r, so
    /// the space stays conforming; w → 1 (flux basis) for r ≫ ℓ, w → 0 (plain) for r ≪ ℓ.
    pub fn with_blend(p: [Point; 3], flux: [bool; 3], blend: f64) -> Self {
        let (area, dn_dr, dn_dz) = straight_gradients(p);
        let qp = DUNAVANT_5
            .iter()
            .map(|rp| {
                let [l0, l1, l2] = rp.bary;
                let r = l0 * p[0][0] + l1 * p[1][0] + l2 * p[2][0];
                let z = l0 * p[0][1] + l1 * p[1][1] + l2 * p[2][1];
                QuadPoint {
                    r,
                    z,
                    n: rp.bary,
                    dv: 2.0 * std::f64::consts::PI * r * area * rp.weight,
                    jinv: [[0.0; 2]; 2],
                }
            })
            .collect();
        let flux_radius = flux_radii(&p, &flux);
        let mut points = [[0.0; 2]; MAX_NODES];
        points[..3].copy_from_slice(&p);
        Self {
            nodes: 3,
            area,
            dn_dr,
            dn_dz,
            qp,
            flux_radius,
            blend,
            points,
        }
    }

    /// Second-order isoparametric geometry through six nodes `p` (corners counter-clockwise,
    /// then the nodes of edges 0–1, 1–2, 2–0), plain basis, or None when the map folds
    /// (det J ≤ 0 at a quadrature point or a node).
    pub fn quadratic(p: [Point; 6]) -> Option<Self> {
        Self::quadratic_with_blend(p, [false; 6], 0.0)
    }

    /// As [`Self::quadratic`], with node i a flux node where `flux[i]`, blended towards the
    /// plain basis below the blend length as in [`Self::with_blend`]: the flux function rA is
    /// then interpolated quadratically, which holds both the uniform field (rA = B r²/2) and
    /// the 1/r potential beside a slender core (rA = const) exactly.
    pub fn quadratic_with_blend(p: [Point; 6], flux: [bool; 6], blend: f64) -> Option<Self> {
        let (_, dn_dr, dn_dz) = straight_gradients([p[0], p[1], p[2]]);
        let rule: &[RulePoint] = &DUNAVANT_6;
        let mut qp = Vec::with_capacity(rule.len());
        let mut area = 0.0;
        for rp in rule {
            let (jinv, det) = tri6::inverse_jacobian(&p, rp.bary);
            if det.is_nan() || det <= 0.0 {
                return None;
            }
            let x = tri6::position(&p, rp.bary);
            let da = 0.5 * det * rp.weight;
            area += da;
            qp.push(QuadPoint {
                r: x[0],
                z: x[1],
                n: rp.bary,
                dv: 2.0 * std::f64::consts::PI * x[0] * da,
                jinv,
            });
        }
        if tri6::NODES
            .iter()
            .any(|&l| tri6::inverse_jacobian(&p, l).1 <= 0.0)
        {
            return None;
        }
        let flux_radius = flux_radii(&p, &flux);
        Some(Self {
            nodes: 6,
            area,
            dn_dr,
            dn_dz,
            qp,
            flux_radius,
            blend,
            points: p,
        })
    }

    /// Whether this is a second-order element.
    #[inline]
    pub fn is_quadratic(&self) -> bool {
        self.nodes == 6
    }

    fn six(&self) -> &[Point; 6] {
        &self.points
    }

    /// Basis function i at barycentric coordinates `l` and radius `r`.
    #[inline]
    pub fn basis(&self, i: usize, l: [f64; 3], r: f64) -> f64 {
        let n = if self.is_quadratic() {
            tri6::values(l)[i]
        } else {
            l[i]
        };
        let ri = self.flux_radius[i];
        if ri > 0.0 {
            n * tri3::flux_factor(self.blend, ri, r).0
        } else {
            n
        }
    }

    /// (B_r, B_z) of basis function i at barycentric coordinates `l` and radius `r` (> 0).
    pub fn curl_at(&self, i: usize, l: [f64; 3], r: f64) -> [f64; 2] {
        if self.is_quadratic() {
            let (jinv, _) = tri6::inverse_jacobian(self.six(), l);
            let n = tri6::values(l)[i];
            let d = tri6::physical_gradient(tri6::reference_gradients(l)[i], &jinv);
            return self.curl_from(i, n, d, r);
        }
        self.curl_linear(i, l[i], r)
    }

    #[inline]
    fn curl_linear(&self, i: usize, n_i: f64, r: f64) -> [f64; 2] {
        self.curl_from(i, n_i, [self.dn_dr[i], self.dn_dz[i]], r)
    }

    /// B-operator of node i's basis from its shape value `n`, shape gradient `d` = (∂N/∂r,
    /// ∂N/∂z) and the radius: plain (−∂N/∂z, ∂N/∂r + N/r), or for φ = N·g(r) of a flux node
    /// (−g ∂N/∂z, g ∂N/∂r + N (g' + g/r)).
    #[inline]
    fn curl_from(&self, i: usize, n: f64, d: [f64; 2], r: f64) -> [f64; 2] {
        let ri = self.flux_radius[i];
        if ri > 0.0 {
            let (g, h) = tri3::flux_factor(self.blend, ri, r);
            [-g * d[1], g * d[0] + n * h]
        } else {
            [-d[1], d[0] + n / r]
        }
    }

    /// The B-operators (B_r, B_z) = (−∂φ_i/∂z, ∂φ_i/∂r + φ_i/r) of every basis function at
    /// quadrature point `q` (entries past the node count are zero).
    #[inline]
    pub fn curls(&self, q: &QuadPoint) -> [[f64; 2]; MAX_NODES] {
        let mut c = [[0.0; 2]; MAX_NODES];
        if self.is_quadratic() {
            let n = tri6::values(q.n);
            let g = tri6::reference_gradients(q.n);
            for i in 0..6 {
                let d = tri6::physical_gradient(g[i], &q.jinv);
                c[i] = self.curl_from(i, n[i], d, q.r);
            }
        } else {
            for (i, ci) in c.iter_mut().enumerate().take(3) {
                *ci = self.curl_linear(i, q.n[i], q.r);
            }
        }
        c
    }

    /// The B-operator of basis function `i` at quadrature point `q`.
    #[inline]
    pub fn curl(&self, i: usize, q: &QuadPoint) -> [f64; 2] {
        if self.is_quadratic() {
            let n = tri6::values(q.n)[i];
            let d = tri6::physical_gradient(tri6::reference_gradients(q.n)[i], &q.jinv);
            self.curl_from(i, n, d, q.r)
        } else {
            self.curl_linear(i, q.n[i], q.r)
        }
    }

    /// Every basis function's value at quadrature point `q`.
    #[inline]
    pub fn phis(&self, q: &QuadPoint) -> Local {
        let mut v = [0.0; MAX_NODES];
        if self.is_quadratic() {
            v = tri6::values(q.n);
            for (i, vi) in v.iter_mut().enumerate() {
                let ri = self.flux_radius[i];
                if ri > 0.0 {
                    *vi *= tri3::flux_factor(self.blend, ri, q.r).0;
                }
            }
        } else {
            for (i, vi) in v.iter_mut().enumerate().take(3) {
                *vi = self.basis(i, q.n, q.r);
            }
        }
        v
    }

    /// Basis function i at quadrature point `q`.
    #[inline]
    pub fn phi(&self, i: usize, q: &QuadPoint) -> f64 {
        self.basis(i, q.n, q.r)
    }

    /// A_φ at barycentric coordinates `l` and radius `r` for nodal values `a`.
    pub fn a_at(&self, a: &Local, l: [f64; 3], r: f64) -> f64 {
        (0..self.nodes).map(|i| a[i] * self.basis(i, l, r)).sum()
    }

    /// B at barycentric `l` and radius `r` (> 0) for nodal values `a`, T.
    pub fn b_at_bary(&self, a: &Local, l: [f64; 3], r: f64) -> [f64; 2] {
        let mut b = [0.0; 2];
        for (i, ai) in a.iter().enumerate().take(self.nodes) {
            let c = self.curl_at(i, l, r);
            b[0] += ai * c[0];
            b[1] += ai * c[1];
        }
        b
    }

    /// (∂A/∂r, ∂A/∂z) at barycentric `l` of the plain-basis interpolant of nodal values `a`
    /// (for values on the axis, where B_z = 2 ∂A/∂r).
    pub fn plain_gradient(&self, a: &Local, l: [f64; 3]) -> [f64; 2] {
        if self.is_quadratic() {
            let (jinv, _) = tri6::inverse_jacobian(self.six(), l);
            let g = tri6::reference_gradients(l);
            let mut d = [0.0; 2];
            for i in 0..6 {
                let gi = tri6::physical_gradient(g[i], &jinv);
                d[0] += a[i] * gi[0];
                d[1] += a[i] * gi[1];
            }
            return d;
        }
        [
            (0..3).map(|i| a[i] * self.dn_dr[i]).sum(),
            (0..3).map(|i| a[i] * self.dn_dz[i]).sum(),
        ]
    }

    /// Physical point of barycentric coordinates `l`.
    pub fn position(&self, l: [f64; 3]) -> Point {
        if self.is_quadratic() {
            return tri6::position(self.six(), l);
        }
        let p = &self.points;
        [
            l[0] * p[0][0] + l[1] * p[1][0] + l[2] * p[2][0],
            l[0] * p[0][1] + l[1] * p[1][1] + l[2] * p[2][1],
        ]
    }

    /// Barycentric coordinates of physical point `x`, starting from `l0` (those of the straight
    /// triangle): exact for first order, by Newton's method on the curved map for second.
    pub fn invert(&self, x: Point, l0: [f64; 3]) -> [f64; 3] {
        if !self.is_quadratic() {
            return l0;
        }
        let mut l = l0;
        for _ in 0..8 {
            let y = self.position(l);
            let (jinv, _) = tri6::inverse_jacobian(self.six(), l);
            let d = [x[0] - y[0], x[1] - y[1]];
            let dxi = jinv[0][0] * d[0] + jinv[0][1] * d[1];
            let deta = jinv[1][0] * d[0] + jinv[1][1] * d[1];
            l = [l[0] - dxi - deta, l[1] + dxi, l[2] + deta];
            if dxi.abs() + deta.abs() < 1e-14 {
                break;
            }
        }
        l
    }

    /// Volume of the ring swept by this triangle in m³.
    pub fn volume(&self) -> f64 {
        self.qp.iter().map(|q| q.dv).sum()
    }

    /// B = curl(A e_φ) at quadrature point `q` for nodal values `a` (Wb/m) → (B_r, B_z) in T.
    #[inline]
    pub fn b_at(&self, a: &Local, q: &QuadPoint) -> [f64; 2] {
        let c = self.curls(q);
        let mut b = [0.0; 2];
        for i in 0..self.nodes {
            b[0] += a[i] * c[i][0];
            b[1] += a[i] * c[i][1];
        }
        b
    }

    /// Volume average of B over the element for nodal values `a`, in T.
    pub fn b_mean(&self, a: &Local) -> [f64; 2] {
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

    fn local(v: &[f64]) -> Local {
        let mut a = [0.0; MAX_NODES];
        a[..v.len()].copy_from_slice(v);
        a
    }

    fn midpoints(p: [Point; 3]) -> [Point; 6] {
        let m = |a: Point, b: Point| [0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1])];
        [
            p[0],
            p[1],
            p[2],
            m(p[0], p[1]),
            m(p[1], p[2]),
            m(p[2], p[0]),
        ]
    }

    #[test]
    fn gradients_reproduce_a_linear_function() {
        let g = ElementGeometry::new([[1.0, 0.0], [2.0, 0.5], [1.2, 1.5]]);
        // f = 3 + 2r − 5z at the corners
        let f = |p: Point| 3.0 + 2.0 * p[0] - 5.0 * p[1];
        let v = local(&[f([1.0, 0.0]), f([2.0, 0.5]), f([1.2, 1.5])]);
        let d = g.plain_gradient(&v, [0.3, 0.3, 0.4]);
        assert!((d[0] - 2.0).abs() < 1e-13 && (d[1] + 5.0).abs() < 1e-13);
    }

    #[test]
    fn ring_volume_matches_pappus_theorem_for_both_orders() {
        // Pappus: volume of revolution = 2π · (centroid radius) · area.
        let p = [[1.0, 0.0], [3.0, 0.0], [2.0, 2.0]];
        let exact = 2.0 * std::f64::consts::PI * 2.0 * 2.0;
        let g = ElementGeometry::new(p);
        assert!((g.volume() - exact).abs() < 1e-12 * exact);
        let g2 = ElementGeometry::quadratic(midpoints(p)).unwrap();
        assert!((g2.volume() - exact).abs() < 1e-12 * exact);
    }

    #[test]
    fn flux_basis_holds_a_pure_flux_function_exactly() {
        // rA = const (no B_z, no B_r) is exact with flux nodes: A = c/r.
        let p = [[1.0, 0.0], [1.5, 0.2], [1.1, 0.6]];
        let g = ElementGeometry::with_basis(p, [true; 3]);
        let a = local(&p.map(|q| 2.0 / q[0]));
        for q in &g.qp {
            let b = g.b_at(&a, q);
            assert!(b[0].abs() < 1e-12 && b[1].abs() < 1e-12, "{b:?}");
            assert!((g.a_at(&a, q.n, q.r) - 2.0 / q.r).abs() < 1e-12);
        }
    }

    #[test]
    fn uniform_axial_field_is_exact_in_elements_touching_the_axis() {
        // A = B0 r / 2 is linear, so both orders hold it exactly: B = (0, B0).
        let p = [[0.0, 0.0], [0.5, 0.1], [0.0, 1.0]];
        let b0 = 1.7;
        let g = ElementGeometry::new(p);
        let a = local(&p.map(|q| 0.5 * b0 * q[0]));
        let six = midpoints(p);
        let g2 = ElementGeometry::quadratic(six).unwrap();
        let a2 = local(&six.map(|q| 0.5 * b0 * q[0]));
        for (g, a) in [(&g, &a), (&g2, &a2)] {
            for q in &g.qp {
                let b = g.b_at(a, q);
                assert!(b[0].abs() < 1e-13 && (b[1] - b0).abs() < 1e-13, "{b:?}");
            }
        }
    }

    #[test]
    fn second_order_holds_a_quadratic_potential_exactly() {
        // A = r z (B_r = −r, B_z = z + z = 2z) lies in the quadratic space.
        let six = midpoints([[0.3, 0.1], [0.9, 0.2], [0.5, 0.8]]);
        let g = ElementGeometry::quadratic(six).unwrap();
        let a = local(&six.map(|q| q[0] * q[1]));
        for q in &g.qp {
            let b = g.b_at(&a, q);
            assert!((b[0] + q.r).abs() < 1e-13 && (b[1] - 2.0 * q.z).abs() < 1e-13);
        }
    }

    #[test]
    fn second_order_flux_basis_holds_both_the_uniform_field_and_a_flux_function() {
        // rA quadratic: A = c/r (no field) and A = B r/2 (uniform B) are both exact.
        let six = midpoints([[1.0, 0.0], [1.5, 0.2], [1.1, 0.6]]);
        let g = ElementGeometry::quadratic_with_blend(six, [true; 6], 0.0).unwrap();
        let a = local(&six.map(|q| 2.0 / q[0]));
        let u = local(&six.map(|q| 0.5 * 0.7 * q[0]));
        for q in &g.qp {
            let b = g.b_at(&a, q);
            assert!(b[0].abs() < 1e-12 && b[1].abs() < 1e-12, "{b:?}");
            let b = g.b_at(&u, q);
            assert!(b[0].abs() < 1e-12 && (b[1] - 0.7).abs() < 1e-12, "{b:?}");
        }
    }

    #[test]
    fn inversion_finds_the_point_on_a_curved_element() {
        let mut six = midpoints([[1.0, 0.0], [2.0, 0.2], [1.2, 1.1]]);
        six[4][0] += 0.08;
        let g = ElementGeometry::quadratic(six).unwrap();
        let l = [0.2, 0.5, 0.3];
        let x = g.position(l);
        let back = g.invert(x, [1.0 / 3.0; 3]);
        for k in 0..3 {
            assert!((back[k] - l[k]).abs() < 1e-12);
        }
    }
}
