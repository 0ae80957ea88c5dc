//! Element integrals of the weak form (see the crate documentation):
//!
//! ```text
//!   K_ab = ∫_e ν  B(φ_a)·B(φ_b) dV          f_a = ∫_e J_φ φ_a dV  +  ∫_e ν J0 B_z(φ_a) dV
//! ```
//! with B(φ) = (−∂φ/∂z, ∂φ/∂r + φ/r) and dV = 2π r dr dz (inside the quadrature measure); the
//! basis φ_a is N_a or N_a·r_a/r (see [`crate::element::tri3`]). The two parts of f are
//! [`load`] (currents) and [`magnetization_load`] (a magnet's polarization J0).
//!
//! For a saturating law the discrete equations are the residual R(a) = 0 with
//!
//! ```text
//!   R_a = ∫_e [ν(|B'|) B' − ν0 B0 e_z]·B(φ_a) dV − ∫_e J_φ φ_a dV,      B' = B − J0 e_z
//!   T_ab = ∂R_a/∂a_b = ∫_e [ ν B(φ_a)·B(φ_b) + (ν_d − ν)(b̂·B(φ_a))(b̂·B(φ_b)) ] dV
//! ```
//! where B is the total field (reaction plus background B0 e_z), b̂ = B'/|B'| and ν_d = dH/dB
//! at |B'|. For J0 = 0 (every saturating region: Problem validation refuses a polarized one)
//! B' = B; where J0 ≠ 0 the law is linear and R_a = K a − f_a as in the linear problem.
//! The ν0 B0 term integrates to zero in the continuum (B0 is curl-free in vacuum); keeping it
//! makes the residual vanish identically in empty air and reproduces the linear right-hand side.
//! T is the Hessian of the convex magnetic energy, hence symmetric positive definite.

use crate::element::{ElementGeometry, Local, LocalMatrix, MAX_NODES};
use crate::material::Material;

/// Mirrors the upper triangle of an `n`×`n` element matrix into the lower one.
#[inline]
fn symmetrise(k: &mut LocalMatrix, n: usize) {
    for a in 0..n {
        for b in 0..a {
            k[a][b] = k[b][a];
        }
    }
}

/// Element stiffness for a reluctivity given per quadrature point by `nu(q)` (m/H).
#[inline]
pub fn stiffness(g: &ElementGeometry, nu: impl Fn(usize) -> f64) -> LocalMatrix {
    let n = g.nodes;
    let mut k = [[0.0; MAX_NODES]; MAX_NODES];
    for (iq, q) in g.qp.iter().enumerate() {
        let w = nu(iq) * q.dv; // ν(x_q) dV
        let c = g.curls(q); // B(φ_a)
        for a in 0..n {
            for b in a..n {
                k[a][b] += w * (c[a][0] * c[b][0] + c[a][1] * c[b][1]);
            }
        }
    }
    symmetrise(&mut k, n);
    k
}

/// Element load for a uniform azimuthal current density `j` (A/m²).
#[inline]
pub fn load(g: &ElementGeometry, j: f64) -> Local {
    let mut f = [0.0; MAX_NODES];
    if j == 0.0 {
        return f;
    }
    for q in &g.qp {
        let phi = g.phis(q);
        for a in 0..g.nodes {
            f[a] += j * phi[a] * q.dv; // J φ_a dV
        }
    }
    f
}

/// Element load of a prescribed polarization `j0` (T, along +z) in a region of reluctivity
/// `nu(q)` (m/H) per quadrature point: f_a = ∫_e ν J0 B_z(φ_a) dV, the magnet's term of the
/// weak form (see the crate documentation).
#[inline]
pub fn magnetization_load(g: &ElementGeometry, nu: impl Fn(usize) -> f64, j0: f64) -> Local {
    let mut f = [0.0; MAX_NODES];
    if j0 == 0.0 {
        return f;
    }
    for (iq, q) in g.qp.iter().enumerate() {
        let w = nu(iq) * j0 * q.dv; // ν J0 dV
        let c = g.curls(q);
        for a in 0..g.nodes {
            f[a] += w * c[a][1]; // ν J0 B_z(φ_a) dV
        }
    }
    f
}

/// Which matrix to build with the residual.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Tangent {
    /// The residual only.
    None,
    /// The consistent tangent ν I + (ν_d − ν) b̂b̂ᵀ (Newton).
    Newton,
    /// The secant operator ν I (a fixed-point step): stiffer than the tangent where the law
    /// is about to stiffen, so a safe direction where Newton's model fails (see
    /// [`crate::nonlinear`]).
    Secant,
}

/// Element residual R_a and, unless `tangent` is [`Tangent::None`], the matrix T_ab at reaction
/// coefficients `a` (Wb/m), background `b0` (T), current density `j` (A/m²), polarization
/// `j0` (T) and material `mat`.
#[inline]
#[allow(clippy::too_many_arguments)]
pub fn residual_and_tangent(
    g: &ElementGeometry,
    a: &Local,
    b0: f64,
    j: f64,
    j0: f64,
    mat: &Material,
    tangent: Tangent,
) -> (Local, LocalMatrix) {
    let with_tangent = tangent != Tangent::None;
    let n = g.nodes;
    let nu0 = 1.0 / crate::constants::MU0;
    let mut r = [0.0; MAX_NODES];
    let mut t = [[0.0; MAX_NODES]; MAX_NODES];
    for q in &g.qp {
        let c = g.curls(q); // B(φ_a)
                            // B' = B − J0 e_z, the part of the total field B the law answers for.
        let mut bx = [0.0, b0 - j0];
        for k in 0..n {
            bx[0] += a[k] * c[k][0];
            bx[1] += a[k] * c[k][1];
        }
        // sqrt, not hypot: |B| never nears overflow, and hypot was 6 % of a saturated solve.
        let bm = (bx[0] * bx[0] + bx[1] * bx[1]).sqrt();
        let (nu, nu_d) = if with_tangent {
            mat.reluctivities(bm)
        } else {
            (mat.nu(bm), 0.0)
        };
        let hx = [nu * bx[0], nu * bx[1] - nu0 * b0]; // ν B' − ν0 B0 e_z
        let phi = if j != 0.0 {
            g.phis(q)
        } else {
            [0.0; MAX_NODES]
        };
        for k in 0..n {
            r[k] += (hx[0] * c[k][0] + hx[1] * c[k][1] - j * phi[k]) * q.dv;
        }
        if with_tangent {
            let extra = if bm > 0.0 && tangent == Tangent::Newton {
                nu_d - nu
            } else {
                0.0
            };
            let bh = if bm > 0.0 {
                [bx[0] / bm, bx[1] / bm]
            } else {
                [0.0, 0.0]
            };
            let mut p = [0.0; MAX_NODES];
            for k in 0..n {
                p[k] = bh[0] * c[k][0] + bh[1] * c[k][1]; // b̂·B(φ_a)
            }
            for k in 0..n {
                for l in k..n {
                    t[k][l] +=
                        (nu * (c[k][0] * c[l][0] + c[k][1] * c[l][1]) + extra * p[k] * p[l]) * q.dv;
                }
            }
        }
    }
    if with_tangent {
        symmetrise(&mut t, n);
    }
    (r, t)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn stiffness_annihilates_the_uniform_field_potential_only_through_energy() {
        // A = B0 r/2 carries energy density B0²/(2μ0): aᵀ K a = ν B0² V exactly.
        let p = [[0.2, 0.0], [0.6, 0.1], [0.3, 0.5]];
        let g = ElementGeometry::new(p);
        let b0 = 0.3;
        let nu = 2.0;
        let mut a = [0.0; MAX_NODES];
        for (ai, q) in a.iter_mut().zip(p) {
            *ai = 0.5 * b0 * q[0];
        }
        let k = stiffness(&g, |_| nu);
        let mut e = 0.0;
        for i in 0..3 {
            for j in 0..3 {
                e += a[i] * k[i][j] * a[j];
            }
        }
        let exact = nu * b0 * b0 * g.volume();
        assert!((e - exact).abs() < 1e-12 * exact);
    }

    #[test]
    fn tangent_is_the_derivative_of_the_residual_for_both_orders() {
        // Central differences of R along a direction δ against T δ, on a saturating law at a
        // field well into its knee, for a first-order and a curved second-order element (with
        // a polarization: the shifted law B' = B − J0 e_z must keep T the derivative of R).
        let mat = Material::Saturable(std::sync::Arc::new(
            crate::material::SaturationLaw::Arctan {
                js: 1.5,
                mu_ri: 1000.0,
            },
        ));
        let p3 = [[0.2, 0.0], [0.6, 0.1], [0.3, 0.5]];
        let mut p6 = [p3[0], p3[1], p3[2], [0.4, 0.05], [0.45, 0.3], [0.25, 0.25]];
        p6[4][0] += 0.03;
        let geoms = [
            ElementGeometry::new(p3),
            ElementGeometry::quadratic(p6).unwrap(),
        ];
        for g in &geoms {
            let n = g.nodes;
            let mut a = [0.0; MAX_NODES];
            let mut d = [0.0; MAX_NODES];
            for k in 0..n {
                a[k] = 0.4 * g.points[k][0] * (1.0 + 0.3 * k as f64);
                d[k] = 0.01 * (1.0 + ((k * 7) % 5) as f64);
            }
            let (_, t) = residual_and_tangent(g, &a, 0.05, 1e5, 0.3, &mat, Tangent::Newton);
            let eps = 1e-6;
            let shifted = |s: f64| {
                let mut x = a;
                for k in 0..n {
                    x[k] += s * d[k];
                }
                residual_and_tangent(g, &x, 0.05, 1e5, 0.3, &mat, Tangent::None).0
            };
            let (rp, rm) = (shifted(eps), shifted(-eps));
            for k in 0..n {
                let fd = (rp[k] - rm[k]) / (2.0 * eps);
                let td: f64 = (0..n).map(|l| t[k][l] * d[l]).sum();
                assert!(
                    (fd - td).abs() <= 1e-6 * td.abs().max(1e-3),
                    "{k}: {fd} vs {td}"
                );
            }
        }
    }

    #[test]
    fn magnetization_load_on_the_uniform_field_potential_is_nu_j0_times_volume() {
        // v = r/2 has B_z(v) = 1 everywhere and is exact in the plain basis of both orders
        // (nodal values r_a/2), so Σ_a f_a r_a/2 = ∫ ν J0 B_z(v) dV = ν J0 V (the weak form of
        // the crate documentation), for a straight and a curved element.
        let p3 = [[0.2, 0.0], [0.6, 0.1], [0.3, 0.5]];
        let mut p6 = [p3[0], p3[1], p3[2], [0.4, 0.05], [0.45, 0.3], [0.25, 0.25]];
        p6[4][0] += 0.03;
        let (nu, j0) = (1.0 / (1.05 * crate::constants::MU0), -1.2);
        for g in [
            ElementGeometry::new(p3),
            ElementGeometry::quadratic(p6).unwrap(),
        ] {
            let f = magnetization_load(&g, |_| nu, j0);
            let s: f64 = (0..g.nodes).map(|a| f[a] * 0.5 * g.points[a][0]).sum();
            let exact = nu * j0 * g.volume();
            assert!((s - exact).abs() < 1e-12 * exact.abs(), "{s} vs {exact}");
        }
    }

    #[test]
    fn residual_of_a_linear_magnet_is_stiffness_times_a_minus_its_load() {
        // The Newton residual's shifted law B' = B − J0 e_z against the linear system's
        // K a − f: the two paths must pose the same equations.
        let p3 = [[0.2, 0.0], [0.6, 0.1], [0.3, 0.5]];
        let g = ElementGeometry::new(p3);
        let mat = Material::Linear { mu_r: 3.0 };
        let nu = mat.nu(0.0);
        let a = [0.01, -0.02, 0.03, 0.0, 0.0, 0.0];
        let j0 = 0.9;
        let (r, t) = residual_and_tangent(&g, &a, 0.0, 0.0, j0, &mat, Tangent::Newton);
        let k = stiffness(&g, |_| nu);
        let f = magnetization_load(&g, |_| nu, j0);
        for i in 0..3 {
            let ka: f64 = (0..3).map(|l| k[i][l] * a[l]).sum();
            assert!((r[i] - (ka - f[i])).abs() < 1e-12 * f[i].abs().max(ka.abs()));
            for l in 0..3 {
                assert!((t[i][l] - k[i][l]).abs() < 1e-12 * k[i][i].abs());
            }
        }
    }

    #[test]
    fn load_sums_to_current_times_ring_volume() {
        // Σ_a f_a = ∫ J dV because Σ N_a = 1.
        let g = ElementGeometry::new([[1.0, 0.0], [2.0, 0.0], [1.0, 1.0]]);
        let f = load(&g, 3.0);
        let s: f64 = f.iter().sum();
        assert!((s - 3.0 * g.volume()).abs() < 1e-12 * s);
    }
}
