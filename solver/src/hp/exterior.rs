//! The exact exterior (see [`crate::exterior`] for the multipole expansion and its energy) for
//! an hp space: the weights w_n = ∫ φ P_n^1(cos θ) sin θ dθ of every function with a trace on
//! the outer arc, integrated along the arc edges with a Gauss rule of the edge's degree.
//! With exact (blended) arc edges the trace is a polynomial in the reference coordinate but
//! θ(t) is not, so the rule is taken well above the degree (2p + 12 points' degree).

use super::basis::{Mode, TriangleBasis};
use super::dofs::HpDofs;
use super::map::ElementMap;
use crate::constants::MU0;
use crate::error::SolverError;
use crate::quadrature::line_rule;

/// One edge of the outer arc: element and local edge.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ArcEdge {
    /// Triangle index.
    pub element: usize,
    /// Local edge 0, 1 or 2.
    pub local_edge: usize,
}

/// The exterior operator over the equations of the arc's functions.
#[derive(Debug, Clone)]
pub struct HpExterior {
    /// Radius R0 of the outer sphere, m.
    pub radius: f64,
    /// Equation numbers carrying the operator.
    pub eqs: Vec<usize>,
    /// D = Σ_n κ_n w_n w_nᵀ, row-major over `eqs`, m/H.
    pub d: Vec<f64>,
    /// w_1 over `eqs`: g_1 = w_1·u gives the dipole moment m = 3π R0² g_1/μ0.
    pub w1: Vec<f64>,
}

/// Reference point and direction of the point at parameter t on local edge k (from local
/// vertex k to vertex k + 1).
pub fn edge_reference(k: usize, t: f64) -> ([f64; 2], [f64; 2]) {
    match k {
        0 => ([t, 0.0], [1.0, 0.0]),
        1 => ([1.0 - t, t], [-1.0, 1.0]),
        _ => ([0.0, 1.0 - t], [0.0, -1.0]),
    }
}

/// P_n^1(x) for n = 0..=n_max (Abramowitz & Stegun 8.5.3, no Condon–Shortley sign).
fn legendre_p1(x: f64, n_max: usize, out: &mut Vec<f64>) {
    out.clear();
    out.push(0.0);
    out.push((1.0 - x * x).max(0.0).sqrt());
    for n in 1..n_max {
        let nf = n as f64;
        let next = ((2.0 * nf + 1.0) * x * out[n] - (nf + 1.0) * out[n - 1]) / nf;
        out.push(next);
    }
}

/// Builds the exterior operator of radius `radius` with `modes` multipoles over the arc
/// edges `arc`; `eq[d]` is the equation of global dof d (`u32::MAX` when it has none).
pub fn exterior_operator(
    dofs: &HpDofs,
    maps: &[ElementMap],
    arc: &[ArcEdge],
    eq: &[u32],
    radius: f64,
    modes: usize,
) -> Result<HpExterior, SolverError> {
    if !(radius.is_finite() && radius > 0.0) || modes == 0 {
        return Err(SolverError::BadMaterial(format!(
            "exact exterior needs a positive radius and at least one mode (radius {radius}, \
             modes {modes})"
        )));
    }
    // Equations in first-seen order over the sorted arc: deterministic.
    let mut eqs: Vec<usize> = Vec::new();
    let mut slot = std::collections::HashMap::new();
    let mut w: Vec<Vec<f64>> = vec![Vec::new(); modes + 1];
    let mut p1 = Vec::with_capacity(modes + 1);
    for edge in arc {
        let ed = dofs.element(edge.element);
        let basis = TriangleBasis::new(ed.degree as usize)?;
        let k = edge.local_edge;
        // The functions with a trace on edge k: its two vertices and its own edge functions.
        let mut on_edge: Vec<(usize, usize)> = vec![(k, k), ((k + 1) % 3, (k + 1) % 3)];
        for (pos, degree) in ed.edge_range(k).zip(2..) {
            let b = basis
                .index(Mode::Edge { edge: k, degree })
                .expect("edge degree within the element degree");
            on_edge.push((pos, b));
        }
        let l2g = dofs.local_to_global(edge.element);
        let rule = line_rule(2 * ed.degree as usize + 12)?;
        let mut values = vec![0.0; basis.len()];
        let mut grads = vec![[0.0; 2]; basis.len()];
        for (x, wt) in rule.nodes.iter().zip(&rule.weights) {
            let t = 0.5 * (1.0 + x);
            let (xi, dxi) = edge_reference(k, t);
            basis.eval(xi[0], xi[1], ed.reversed, &mut values, &mut grads);
            let map = &maps[edge.element];
            let q = map.position(xi[0], xi[1]);
            let m = map.jacobian(xi[0], xi[1]).m;
            let dq = [
                m[0][0] * dxi[0] + m[0][1] * dxi[1],
                m[1][0] * dxi[0] + m[1][1] * dxi[1],
            ];
            let th = q[0].atan2(q[1]);
            let dth = ((q[1] * dq[0] - q[0] * dq[1]) / (q[0] * q[0] + q[1] * q[1])).abs();
            legendre_p1(th.cos(), modes, &mut p1);
            // dt = dx/2 on [−1, 1].
            let common = 0.5 * wt * th.sin() * dth;
            for &(pos, b) in &on_edge {
                let e = eq[l2g[pos] as usize];
                if e == u32::MAX || values[b] == 0.0 {
                    continue;
                }
                let s = *slot.entry(e as usize).or_insert_with(|| {
                    eqs.push(e as usize);
                    for row in w.iter_mut() {
                        row.push(0.0);
                    }
                    eqs.len() - 1
                });
                for n in 1..=modes {
                    w[n][s] += common * p1[n] * values[b];
                }
            }
        }
    }
    let nb = eqs.len();
    let nu0 = 1.0 / MU0;
    let mut d = vec![0.0; nb * nb];
    for (n, wn) in w.iter().enumerate().skip(1) {
        let nf = n as f64;
        let kappa = std::f64::consts::PI * nu0 * radius * (2.0 * nf + 1.0) / (nf + 1.0);
        for i in 0..nb {
            if wn[i] == 0.0 {
                continue;
            }
            for j in 0..nb {
                d[i * nb + j] += kappa * wn[i] * wn[j];
            }
        }
    }
    Ok(HpExterior {
        radius,
        eqs,
        d,
        w1: w[1].clone(),
    })
}
