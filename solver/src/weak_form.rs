//! Element integrals of the weak form (see the crate documentation):
//!
//! ```text
//!   K_ab = ∫_e ν  B(φ_a)·B(φ_b) dV          f_a = ∫_e J_φ φ_a dV
//! ```
//! with B(φ) = (−∂φ/∂z, ∂φ/∂r + φ/r) and dV = 2π r dr dz (inside the quadrature measure); the
//! basis φ_a is N_a or N_a·r_a/r (see [`crate::element::tri3`]).

use crate::element::ElementGeometry;

/// Element stiffness for a reluctivity given per quadrature point by `nu(q)` (m/H).
#[inline]
pub fn stiffness(g: &ElementGeometry, nu: impl Fn(usize) -> f64) -> [[f64; 3]; 3] {
    let mut k = [[0.0; 3]; 3];
    for (iq, q) in g.qp.iter().enumerate() {
        let w = nu(iq) * q.dv; // ν(x_q) dV
        let c = [g.curl(0, q), g.curl(1, q), g.curl(2, q)]; // B(φ_a)
        for a in 0..3 {
            for b in a..3 {
                k[a][b] += w * (c[a][0] * c[b][0] + c[a][1] * c[b][1]);
            }
        }
    }
    // Symmetric: mirror the upper triangle.
    let (k01, k02, k12) = (k[0][1], k[0][2], k[1][2]);
    k[1][0] = k01;
    k[2][0] = k02;
    k[2][1] = k12;
    k
}

/// Element load for a uniform azimuthal current density `j` (A/m²).
#[inline]
pub fn load(g: &ElementGeometry, j: f64) -> [f64; 3] {
    let mut f = [0.0; 3];
    if j == 0.0 {
        return f;
    }
    for q in &g.qp {
        for (a, fa) in f.iter_mut().enumerate() {
            *fa += j * g.phi(a, q) * q.dv; // J φ_a dV
        }
    }
    f
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
        let a = p.map(|q| 0.5 * b0 * q[0]);
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
    fn load_sums_to_current_times_ring_volume() {
        // Σ_a f_a = ∫ J dV because Σ N_a = 1.
        let g = ElementGeometry::new([[1.0, 0.0], [2.0, 0.0], [1.0, 1.0]]);
        let f = load(&g, 3.0);
        let s: f64 = f.iter().sum();
        assert!((s - 3.0 * g.volume()).abs() < 1e-12 * s);
    }
}
