//! Element residual and tangent of the saturating problem at any degree: the hp mirror of
//! [`crate::weak_form::residual_and_tangent`] (weak form in the crate documentation),
//!
//! ```text
//!   R_a = ∫_e [ν(|B'|) B' − ν0 B0 e_z]·B(φ_a) dV − ∫_e J φ_a dV,    B' = B − J0 e_z
//!   T_ab = ∫_e B(φ_a)ᵀ [ν I + (ν_d − ν) b̂b̂ᵀ] B(φ_b) dV              b̂ = B'/|B'|
//! ```
//! with B the total field (reaction plus the uniform background B0 e_z), ν the secant and ν_d
//! the differential reluctivity at |B'| (a per-point ν from the current field). The basis comes
//! from the model's tabulations; per element only the map and the field change, in one pass
//! over the quadrature points as in [`super::kernel::element_system`].
//!
//! The tangent is written as T = ν_d (b̂·B_a)(b̂·B_b) + ν (b̂⊥·B_a)(b̂⊥·B_b): both reluctivities
//! are positive for a monotone law (ν_d − ν is not, below the knee of an S-shaped table), so
//! K = G Gᵀ with two columns per point, one matrix product as in the linear kernel.

use nalgebra::{DMatrix, DVector};

use super::kernel;
use super::map::ElementMap;
use super::tabulation::Tabulation;
use crate::constants::MU0;
use crate::material::Material;
use crate::weak_form::Tangent;

/// What drives one element, beside its reaction coefficients.
#[derive(Debug, Clone, Copy)]
pub struct ElementDrive<'a> {
    /// Uniform background B0 along z, T.
    pub b0: f64,
    /// Azimuthal current density, A/m².
    pub j: f64,
    /// Prescribed polarization J0 along z, T (linear regions only).
    pub j0: f64,
    /// The region's law.
    pub material: &'a Material,
}

/// The field of an element at one quadrature point.
struct PointField<'b> {
    /// Radius r, m.
    r: f64,
    /// Volume measure 2π r |det J| w, m³.
    dv: f64,
    /// B' = B − J0 e_z, T.
    b: [f64; 2],
    /// (B_r, B_z)(φ_a) of each active function.
    curl: &'b [[f64; 2]],
    /// φ_a of each active function.
    phi: &'b [f64],
}

/// Calls `visit` at every quadrature point of the element (see [`kernel::for_each_point`])
/// with the field B' = B − J0 e_z of local coefficients `u` (Wb/m), background `b0` and
/// polarization `j0`.
fn for_each_point(
    map: &ElementMap,
    tab: &Tabulation,
    active: &[usize],
    u: &[f64],
    b0: f64,
    j0: f64,
    mut visit: impl FnMut(usize, &PointField),
) {
    kernel::for_each_point(map, tab, active, |q, p| {
        let mut b = [0.0, b0 - j0];
        for (ua, c) in u.iter().zip(p.curl) {
            b[0] += ua * c[0];
            b[1] += ua * c[1];
        }
        visit(
            q,
            &PointField {
                r: p.x[0],
                dv: p.dv,
                b,
                curl: p.curl,
                phi: p.phi,
            },
        );
    });
}

/// Residual R_a and, unless `tangent` is [`Tangent::None`], the matrix (consistent tangent or
/// secant ν I) of the element with map `map`, functions `active` of `tab`, at local
/// coefficients `u` (Wb/m) under `drive`.
pub fn residual_and_tangent(
    map: &ElementMap,
    tab: &Tabulation,
    active: &[usize],
    u: &[f64],
    drive: &ElementDrive,
    tangent: Tangent,
) -> (DVector<f64>, Option<DMatrix<f64>>) {
    let n = active.len();
    let nu0 = 1.0 / MU0;
    let with_tangent = tangent != Tangent::None;
    let mut res = DVector::zeros(n);
    let mut g = DMatrix::zeros(if with_tangent { n } else { 0 }, 2 * tab.points());
    let mat = drive.material;
    for_each_point(map, tab, active, u, drive.b0, drive.j0, |q, p| {
        let [bx, bz] = p.b;
        // sqrt, not hypot: |B| never nears overflow (as in weak_form).
        let bm = (bx * bx + bz * bz).sqrt();
        let (nu, nu_d) = if with_tangent {
            mat.reluctivities(bm)
        } else {
            (mat.nu(bm), 0.0)
        };
        let h = [nu * bx, nu * bz - nu0 * drive.b0];
        for a in 0..n {
            let c = p.curl[a];
            res[a] += (h[0] * c[0] + h[1] * c[1] - drive.j * p.phi[a]) * p.dv;
        }
        if with_tangent {
            let (along, across) = if bm > 0.0 {
                ([bx / bm, bz / bm], [-bz / bm, bx / bm])
            } else {
                ([1.0, 0.0], [0.0, 1.0])
            };
            let nu_along = if tangent == Tangent::Newton && bm > 0.0 {
                nu_d
            } else {
                nu
            };
            let (wa, wc) = ((nu_along * p.dv).sqrt(), (nu * p.dv).sqrt());
            for a in 0..n {
                let c = p.curl[a];
                g[(a, 2 * q)] = wa * (along[0] * c[0] + along[1] * c[1]);
                g[(a, 2 * q + 1)] = wc * (across[0] * c[0] + across[1] * c[1]);
            }
        }
    });
    let k = with_tangent.then(|| &g * g.transpose());
    (res, k)
}

/// The element's share of the sources' dipole moment, A·m²: ∫ (r/2) J dV + ∫ M_z dV with
/// M = B/μ0 − H = ν0 B − ν(|B'|) B' (B the total field), at local coefficients `u`.
pub fn source_moment(
    map: &ElementMap,
    tab: &Tabulation,
    active: &[usize],
    u: &[f64],
    drive: &ElementDrive,
) -> f64 {
    let nu0 = 1.0 / MU0;
    let mut m = 0.0;
    for_each_point(map, tab, active, u, drive.b0, drive.j0, |_, p| {
        let [bx, bz] = p.b;
        let nu = drive.material.nu((bx * bx + bz * bz).sqrt());
        m += (0.5 * p.r * drive.j + nu0 * (bz + drive.j0) - nu * bz) * p.dv;
    });
    m
}

#[cfg(test)]
#[path = "nonlinear_terms_tests.rs"]
mod tests;

/// Whether the element's field sits on the knee of its law at some quadrature point: the
/// differential reluctivity above `ratio` times the secant one (where the tangent changes by
/// orders of magnitude within one Newton step).
pub fn on_knee(
    map: &ElementMap,
    tab: &Tabulation,
    active: &[usize],
    u: &[f64],
    drive: &ElementDrive,
    ratio: f64,
) -> bool {
    if drive.material.is_linear() {
        return false;
    }
    let mut knee = false;
    for_each_point(map, tab, active, u, drive.b0, drive.j0, |_, p| {
        if !knee {
            let bm = (p.b[0] * p.b[0] + p.b[1] * p.b[1]).sqrt();
            let (nu, nu_d) = drive.material.reluctivities(bm);
            knee = nu_d > ratio * nu;
        }
    });
    knee
}
