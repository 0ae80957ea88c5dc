//! Element integrals of the weak form (crate documentation) for an element of any degree:
//!
//! ```text
//!   K_ab = ∫_e ν B(φ_a)·B(φ_b) dV        f_a = ∫_e J φ_a dV + ∫_e [ν J0 − (ν − ν0) B0] B_z(φ_a) dV
//! ```
//! with B(φ) = (−∂φ/∂z, ∂φ/∂r + φ/r) and dV = 2π r dA. The basis is tabulated once per
//! (degree, edge orientation, rule); per element only the map's Jacobian and the 2πr weight
//! change. Buffers are sized at run time by the element's number of functions.

use nalgebra::{DMatrix, DVector};

use super::map::ElementMap;
use super::tabulation::Tabulation;

/// The basis of an element at one quadrature point.
pub struct PointBasis<'b> {
    /// Physical (r, z), m.
    pub x: [f64; 2],
    /// Volume measure dV = 2π r |det J| w/2, m³.
    pub dv: f64,
    /// (B_r, B_z)(φ_a) of each active function.
    pub curl: &'b [[f64; 2]],
    /// φ_a of each active function.
    pub phi: &'b [f64],
}

/// Calls `visit` at every quadrature point of `tab` with the values and B-operators of the
/// functions `active` of the element with map `map`: the one loop every element integral of
/// the hp model runs (J⁻ᵀ once per point; the Jacobian once per element when it is affine).
pub fn for_each_point(
    map: &ElementMap,
    tab: &Tabulation,
    active: &[usize],
    mut visit: impl FnMut(usize, &PointBasis),
) {
    let n = active.len();
    let mut curl = vec![[0.0; 2]; n];
    let mut phi = vec![0.0; n];
    let affine = map.is_affine().then(|| map.jacobian(0.0, 0.0));
    for q in 0..tab.points() {
        let [xi, eta] = tab.point(q);
        let x = map.position(xi, eta);
        let jac = affine.unwrap_or_else(|| map.jacobian(xi, eta));
        // Reference weights are fractions of the reference area ½.
        let dv = 2.0 * std::f64::consts::PI * x[0] * jac.det().abs() * 0.5 * tab.weight(q);
        let inv = jac.inverse();
        let inv_r = 1.0 / x[0];
        let values = tab.values(q);
        let grads = tab.grads(q);
        for (a, &i) in active.iter().enumerate() {
            let v = values[i];
            let g = grads[i];
            let dr = inv[0][0] * g[0] + inv[1][0] * g[1];
            let dz = inv[0][1] * g[0] + inv[1][1] * g[1];
            curl[a] = [-dz, dr + v * inv_r];
            phi[a] = v;
        }
        visit(
            q,
            &PointBasis {
                x,
                dv,
                curl: &curl,
                phi: &phi,
            },
        );
    }
}

/// The B-operators and values of an element's active functions at its quadrature points.
#[derive(Debug, Clone)]
pub struct ElementPoints {
    /// Number of active functions.
    pub n: usize,
    /// Physical (r, z) of each point, m.
    pub x: Vec<[f64; 2]>,
    /// Volume measure dV = 2π r |det J| w/2 of each point, m³.
    pub dv: Vec<f64>,
    /// φ_a at each point, point-major (`n` per point).
    pub phi: Vec<f64>,
    /// (B_r, B_z)(φ_a) at each point, point-major, 1/m · (unit of φ).
    pub curl: Vec<[f64; 2]>,
}

impl ElementPoints {
    /// Evaluates the functions `active` (indices into the tabulated basis, in local order) of
    /// the element with map `map` at the points of `tab`.
    pub fn new(map: &ElementMap, tab: &Tabulation, active: &[usize]) -> Self {
        let n = active.len();
        let nq = tab.points();
        let mut x = Vec::with_capacity(nq);
        let mut dv = Vec::with_capacity(nq);
        let mut phi = Vec::with_capacity(nq * n);
        let mut curl = Vec::with_capacity(nq * n);
        for_each_point(map, tab, active, |_, p| {
            x.push(p.x);
            dv.push(p.dv);
            phi.extend_from_slice(p.phi);
            curl.extend_from_slice(p.curl);
        });
        Self {
            n,
            x,
            dv,
            phi,
            curl,
        }
    }

    /// Number of quadrature points.
    pub fn points(&self) -> usize {
        self.dv.len()
    }

    /// Volume of the element's ring, m³.
    pub fn volume(&self) -> f64 {
        self.dv.iter().sum()
    }

    /// K_ab = ∫ ν B(φ_a)·B(φ_b) dV for a reluctivity `nu(q)` per point (m/H).
    pub fn stiffness(&self, nu: impl Fn(usize) -> f64) -> DMatrix<f64> {
        // K = G Gᵀ with G_a,(q,c) = B_c(φ_a)(x_q) √(ν dV_q): one matrix product.
        let n = self.n;
        let nq = self.points();
        let mut g = DMatrix::zeros(n, 2 * nq);
        for q in 0..nq {
            let s = (nu(q) * self.dv[q]).sqrt();
            for a in 0..n {
                let c = self.curl[q * n + a];
                g[(a, 2 * q)] = s * c[0];
                g[(a, 2 * q + 1)] = s * c[1];
            }
        }
        &g * g.transpose()
    }

    /// f_a = ∫ J φ_a dV + ∫ s B_z(φ_a) dV for a uniform current density `j` (A/m²) and a
    /// uniform source field `s` = ν J0 − (ν − ν0) B0 (A/m: a magnet's polarization and the
    /// magnetisation of a material by the background).
    pub fn load(&self, j: f64, s: f64) -> DVector<f64> {
        let n = self.n;
        let mut f = DVector::zeros(n);
        if j == 0.0 && s == 0.0 {
            return f;
        }
        for q in 0..self.points() {
            let dv = self.dv[q];
            for a in 0..n {
                f[a] += (j * self.phi[q * n + a] + s * self.curl[q * n + a][1]) * dv;
            }
        }
        f
    }
}

/// One element's linear system and the integrals its moment needs, computed in one pass over
/// the quadrature points without storing the basis at them.
#[derive(Debug, Clone)]
pub struct ElementSystem {
    /// K_ab = ∫ ν B(φ_a)·B(φ_b) dV.
    pub k: DMatrix<f64>,
    /// f_a = ∫ J φ_a dV + ∫ s B_z(φ_a) dV.
    pub f: DVector<f64>,
    /// ∫ B_z(φ_a) dV (the mean field of a solution: ∫ B_z dV = u·this + B0 V).
    pub bz: DVector<f64>,
    /// Volume of the element's ring, m³.
    pub volume: f64,
    /// ∫ (r/2) dV, m⁴ (times J: the moment of the element's current).
    pub half_r: f64,
}

/// The system of the element with map `map`, functions `active` of the tabulation `tab`, a
/// uniform reluctivity `nu` (m/H), current density `j` (A/m²) and source field `s` (A/m), as
/// [`ElementPoints::stiffness`] and [`ElementPoints::load`] with `j`, `s` would give it.
pub fn element_system(
    map: &ElementMap,
    tab: &Tabulation,
    active: &[usize],
    nu: f64,
    j: f64,
    s: f64,
) -> ElementSystem {
    let n = active.len();
    let nq = tab.points();
    let mut g = DMatrix::zeros(n, 2 * nq);
    let mut f = DVector::zeros(n);
    let mut bz = DVector::zeros(n);
    let (mut volume, mut half_r) = (0.0, 0.0);
    for_each_point(map, tab, active, |q, p| {
        let dv = p.dv;
        volume += dv;
        half_r += 0.5 * p.x[0] * dv;
        let w = (nu * dv).sqrt();
        for a in 0..n {
            let [cr, cz] = p.curl[a];
            g[(a, 2 * q)] = w * cr;
            g[(a, 2 * q + 1)] = w * cz;
            bz[a] += cz * dv;
            f[a] += j * p.phi[a] * dv;
        }
    });
    if s != 0.0 {
        f.axpy(s, &bz, 1.0);
    }
    ElementSystem {
        k: &g * g.transpose(),
        f,
        bz,
        volume,
        half_r,
    }
}

#[cfg(test)]
#[path = "kernel_tests.rs"]
mod tests;
