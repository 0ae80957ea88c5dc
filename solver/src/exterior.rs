//! The exact exterior: the energy of the field outside the meshed sphere, as a quadratic
//! form in the potential on its surface (a Dirichlet-to-Neumann map).
//!
//! Outside a sphere of radius R0 enclosing every source and every magnetic body, the reaction
//! potential is a sum of decaying axisymmetric multipoles (Jackson, *Classical
//! Electrodynamics*, 3rd ed., §5.12; Smythe, *Static and Dynamic Electricity*, §7.10):
//!
//! ```text
//!   A_φ(R, θ) = Σ_{n≥1} a_n (R0/R)^{n+1} P_n^1(cos θ)
//! ```
//! With ∫_{−1}^{1} (P_n^1)² dx = 2n(n+1)/(2n+1) and g_n = ∫_0^π A_φ(R0, θ) P_n^1(cos θ) sin θ dθ,
//! the exterior field energy ½∫ν0|B|² dV = ½ ν0 ∮ A_φ B_θ dS works out to
//!
//! ```text
//!   W_ext = ½ Σ_n κ_n g_n²,   κ_n = π ν0 R0 (2n + 1)/(n + 1)
//! ```
//! (n = 1 gives μ0 m²/(12π R0³), the energy outside R0 of a dipole m.) Adding W_ext to the
//! energy of the meshed region and leaving the surface potential free makes the discrete
//! problem that of the unbounded space, up to the modes beyond the highest one kept, which
//! decay like (r_sources/R0)^(2n). The uniform background B0 r/2 is a growing mode and is not
//! part of the reaction potential, so it needs nothing here.
//!
//! In matrix form D = Σ_n κ_n w_n w_nᵀ over the surface nodes, with w_{n,i} = g_n(φ_i); D is
//! dense among the surface nodes only (a few hundred), so it joins the sparse pattern.

use crate::constants::MU0;
use crate::element::ElementGeometry;
use crate::error::SolverError;
use crate::mesh::FeMesh;

/// The exact exterior of a problem: the radius of the meshed sphere and its surface nodes.
#[derive(Debug, Clone, PartialEq)]
pub struct ExactExterior {
    /// Radius R0 of the outer sphere in m (the mesh's outer arc approximates it).
    pub radius: f64,
    /// Nodes on the outer arc (free unknowns; the two on the axis stay fixed at zero).
    pub nodes: Vec<u32>,
    /// Number of multipole modes kept.
    pub modes: usize,
}

/// The assembled exterior operator: D restricted to the free surface nodes.
#[derive(Debug, Clone)]
pub struct ExteriorOperator {
    /// Surface nodes carrying D (mesh node numbers).
    pub nodes: Vec<u32>,
    /// D, row-major, `nodes.len()`² entries, in m/H (energy = ½ aᵀ D a).
    pub d: Vec<f64>,
}

/// P_n^1(x) for n = 0..=n_max by the three-term recurrence (Abramowitz & Stegun 8.5.3),
/// without the Condon–Shortley sign (only products of two appear).
fn legendre_p1(x: f64, n_max: usize, out: &mut Vec<f64>) {
    out.clear();
    out.push(0.0);
    let s = (1.0 - x * x).max(0.0).sqrt();
    out.push(s);
    for n in 1..n_max {
        let nf = n as f64;
        let next = ((2.0 * nf + 1.0) * x * out[n] - (nf + 1.0) * out[n - 1]) / nf;
        out.push(next);
    }
}

/// The point at barycentric `l` on the edge from local corner `la` to `lb` of element `g`,
/// and its derivative along the edge parameter t (l_la = 1 − t, l_lb = t).
fn edge_point(g: &ElementGeometry, l: [f64; 3], la: usize, lb: usize) -> ([f64; 2], [f64; 2]) {
    let x = g.position(l);
    let mut dl = [0.0; 3];
    dl[la] = -1.0;
    dl[lb] = 1.0;
    if g.is_quadratic() {
        let grads = crate::element::tri6::reference_gradients(l);
        let mut d = [0.0; 2];
        for (p, gr) in g.points.iter().zip(grads) {
            let dn = gr[0] * dl[1] + gr[1] * dl[2];
            d[0] += p[0] * dn;
            d[1] += p[1] * dn;
        }
        (x, d)
    } else {
        let p = &g.points;
        let mut d = [0.0; 2];
        for k in 0..3 {
            d[0] += p[k][0] * dl[k];
            d[1] += p[k][1] * dl[k];
        }
        (x, d)
    }
}

/// Builds D for `ext` on `mesh`, whose element geometries are `geom` (their basis decides
/// the trace of each nodal function on the arc).
pub fn exterior_operator(
    mesh: &FeMesh,
    geom: &[ElementGeometry],
    ext: &ExactExterior,
) -> Result<ExteriorOperator, SolverError> {
    if !(ext.radius.is_finite() && ext.radius > 0.0) || ext.modes == 0 {
        return Err(SolverError::BadMaterial(format!(
            "exact exterior needs a positive radius and at least one mode (radius {}, modes {})",
            ext.radius, ext.modes
        )));
    }
    let mut index = vec![usize::MAX; mesh.nodes.len()];
    for (k, &n) in ext.nodes.iter().enumerate() {
        if n as usize >= mesh.nodes.len() {
            return Err(SolverError::BadNodeIndex {
                triangle: usize::MAX,
                node: n,
                nodes: mesh.nodes.len(),
            });
        }
        index[n as usize] = k;
    }
    // The arc's nodes: the operator's own and the two where the arc meets the axis, which are
    // held at zero but end the first and last arc edges. Without them those two edges' traces
    // were missing from the multipole integrals: measured with the hp model, a p-independent
    // error of the moment from the exterior's dipole coefficient of −1.8e-5 on a 32-edge arc
    // (−9e-7 on 64 edges), growing with the number of modes kept.
    let on_arc = |n: u32| {
        let p = mesh.nodes[n as usize];
        index[n as usize] != usize::MAX
            || (p[0] == 0.0 && (p[1].abs() - ext.radius).abs() <= 1e-9 * ext.radius)
    };
    // Surface edges: both ends on the arc and the edge on the boundary (one triangle).
    let mut edges: Vec<([u32; 2], usize, [usize; 2])> = Vec::new();
    let mut seen = std::collections::HashMap::new();
    for (e, tri) in mesh.triangles.iter().enumerate() {
        for a in 0..3 {
            let (u, v) = (tri[a], tri[(a + 1) % 3]);
            if on_arc(u) && on_arc(v) {
                let key = (u.min(v), u.max(v));
                *seen.entry(key).or_insert(0) += 1;
                edges.push(([u, v], e, [a, (a + 1) % 3]));
            }
        }
    }
    edges.retain(|([u, v], _, _)| seen[&((*u).min(*v), (*u).max(*v))] == 1);

    let nb = ext.nodes.len();
    let nm = ext.modes;
    // w[n][k] = ∫ φ_k P_n^1(cos θ) sin θ dθ along the arc.
    let mut w = vec![vec![0.0; nb]; nm + 1];
    // 8-point Gauss–Legendre on each edge: the trace is smooth on an edge.
    const GL: [(f64, f64); 4] = [
        (0.183_434_642_495_649_8, 0.362_683_783_378_362),
        (0.525_532_409_916_329, 0.313_706_645_877_887_3),
        (0.796_666_477_413_626_7, 0.222_381_034_453_374_5),
        (0.960_289_856_497_536_3, 0.101_228_536_290_376_3),
    ];
    let mut p = Vec::with_capacity(nm + 1);
    for (_, e, [la, lb]) in &edges {
        let g = &geom[*e];
        let nodes = mesh.element_nodes(*e);
        for (x, wt) in GL.iter().flat_map(|&(x, w)| [(x, w), (-x, w)]) {
            let t = 0.5 * (1.0 + x);
            let mut l = [0.0; 3];
            l[*la] = 1.0 - t;
            l[*lb] = t;
            let (q, dq) = edge_point(g, l, *la, *lb);
            let th = q[0].atan2(q[1]);
            // dθ/dt along the (possibly curved) edge.
            let r2 = q[0] * q[0] + q[1] * q[1];
            let dth = (q[1] * dq[0] - q[0] * dq[1]) / r2;
            legendre_p1(th.cos(), nm, &mut p);
            let common = 0.5 * wt * th.sin() * dth;
            for (i, &v) in nodes.iter().enumerate() {
                let k = index[v as usize];
                if k == usize::MAX {
                    continue;
                }
                let phi = g.basis(i, l, q[0]);
                if phi == 0.0 {
                    continue;
                }
                for n in 1..=nm {
                    w[n][k] += common * p[n] * phi;
                }
            }
        }
    }
    // Boundary edges of counter-clockwise triangles all run the same way round the arc, so
    // dθ has one sign throughout: fix it so that ∫ sin θ P_1^1 sin θ dθ comes out positive.
    let test: f64 = (0..nb)
        .map(|k| {
            let q = mesh.nodes[ext.nodes[k] as usize];
            w[1][k] * q[0].atan2(q[1]).sin()
        })
        .sum();
    if test < 0.0 {
        for row in &mut w {
            for x in row.iter_mut() {
                *x = -*x;
            }
        }
    }
    let nu0 = 1.0 / MU0;
    let mut d = vec![0.0; nb * nb];
    for (n, wn) in w.iter().enumerate().skip(1) {
        let nf = n as f64;
        let kappa = std::f64::consts::PI * nu0 * ext.radius * (2.0 * nf + 1.0) / (nf + 1.0);
        for i in 0..nb {
            if wn[i] == 0.0 {
                continue;
            }
            for j in 0..nb {
                d[i * nb + j] += kappa * wn[i] * wn[j];
            }
        }
    }
    Ok(ExteriorOperator {
        nodes: ext.nodes.clone(),
        d,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A ring of triangles between radii 0.9 R and R over θ ∈ [0, π], `n` segments.
    fn ring(radius: f64, n: usize) -> (FeMesh, Vec<u32>) {
        let mut nodes = Vec::new();
        for k in 0..=n {
            let th = std::f64::consts::PI * k as f64 / n as f64;
            nodes.push([radius * th.sin().abs(), radius * th.cos()]);
            nodes.push([0.9 * radius * th.sin().abs(), 0.9 * radius * th.cos()]);
        }
        let mut triangles = Vec::new();
        for k in 0..n as u32 {
            let (o0, i0, o1, i1) = (2 * k, 2 * k + 1, 2 * k + 2, 2 * k + 3);
            // Counter-clockwise in (r, z): θ grows from +z towards −z on the right half.
            triangles.push([o0, i0, o1]);
            triangles.push([i0, i1, o1]);
        }
        let tags = vec![0; triangles.len()];
        let outer = (0..=n as u32).map(|k| 2 * k).collect();
        (
            FeMesh {
                nodes,
                triangles,
                tags,
                mid: Vec::new(),
            },
            outer,
        )
    }

    #[test]
    fn exterior_energy_of_a_dipole_potential_is_mu0_m2_over_12_pi_r3() {
        // Energy outside R0 of a point dipole m (closed form of ½∫ν0|B|² with the dipole field,
        // Jackson §5.6 eq. 5.56 for the field): μ0 m²/(12π R0³).
        let (r0, m) = (0.5, 2.0);
        let (mesh, outer) = ring(r0, 400);
        let mut mesh = mesh;
        // Orientation: fix clockwise triangles so the geometry is valid either way.
        for t in &mut mesh.triangles {
            let [a, b, c] = t.map(|v| mesh.nodes[v as usize]);
            if (b[0] - a[0]) * (c[1] - a[1]) - (c[0] - a[0]) * (b[1] - a[1]) < 0.0 {
                t.swap(1, 2);
            }
        }
        let geom: Vec<ElementGeometry> = (0..mesh.triangles.len())
            .map(|e| ElementGeometry::new(mesh.corners(e)))
            .collect();
        let op = exterior_operator(
            &mesh,
            &geom,
            &ExactExterior {
                radius: r0,
                nodes: outer.clone(),
                modes: 8,
            },
        )
        .unwrap();
        let c = MU0 * m / (4.0 * std::f64::consts::PI);
        let a: Vec<f64> = outer
            .iter()
            .map(|&n| {
                let p = mesh.nodes[n as usize];
                c * p[0] / (r0 * r0 * r0) // C sin θ / R² at R = R0
            })
            .collect();
        let nb = a.len();
        let mut w = 0.0;
        for i in 0..nb {
            for j in 0..nb {
                w += 0.5 * a[i] * op.d[i * nb + j] * a[j];
            }
        }
        let want = MU0 * m * m / (12.0 * std::f64::consts::PI * r0.powi(3));
        assert!((w - want).abs() < 1e-4 * want, "{w} vs {want}");
    }

    #[test]
    fn associated_legendre_p1_is_orthogonal_with_the_known_norm() {
        // ∫_{−1}^{1} P_n^1 P_m^1 dx = δ_nm 2n(n+1)/(2n+1) (Abramowitz & Stegun 8.14.13).
        let nm = 12;
        let mut p = Vec::new();
        let steps = 20000;
        let mut gram = vec![vec![0.0; nm + 1]; nm + 1];
        for k in 0..steps {
            // Midpoint rule in θ: x = cos θ, dx = sin θ dθ.
            let th = std::f64::consts::PI * (k as f64 + 0.5) / steps as f64;
            legendre_p1(th.cos(), nm, &mut p);
            let w = th.sin() * std::f64::consts::PI / steps as f64;
            for a in 1..=nm {
                for b in 1..=nm {
                    gram[a][b] += p[a] * p[b] * w;
                }
            }
        }
        for (a, row) in gram.iter().enumerate().skip(1) {
            for (b, &g) in row.iter().enumerate().skip(1) {
                let want = if a == b {
                    let n = a as f64;
                    2.0 * n * (n + 1.0) / (2.0 * n + 1.0)
                } else {
                    0.0
                };
                assert!((g - want).abs() < 1e-6, "{a} {b} {g}");
            }
        }
    }
}
