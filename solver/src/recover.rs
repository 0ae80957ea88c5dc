//! Recovered (smoothed) field at a point from a local least-squares fit of A_φ.
//!
//! First-order elements give B piecewise with O(h) error; a quadratic fit of the nodal A over
//! the patch around the evaluating element (cubic for second-order elements, over corner and
//! mid-edge nodes) recovers derivatives to higher order (the idea of
//! Zienkiewicz & Zhu's superconvergent patch recovery, Int. J. Numer. Meth. Eng. 33, 1331,
//! 1992, applied to the potential). Near the axis the fit uses A = r·(c0 + c1 ζ + c2 ζ² + c3 r²)
//! (ζ = z − z_p), because A_φ of an axisymmetric field is odd in r; this makes B_z = 2 ∂A/∂r on
//! the axis second-order accurate. The patch keeps to the evaluating element's region so the
//! fit never straddles a permeability jump.

use nalgebra::{DMatrix, DVector};

use crate::adjacency::Patches;
use crate::mesh::Point;
use crate::solution::Solution;
use crate::solve::Model;

impl Patches {
    /// Recovered (B_r, B_z) in T at `p` inside element `e`, or None when the patch is too small
    /// for a stable fit.
    pub fn b_at(&self, model: &Model, sol: &Solution, e: usize, p: Point) -> Option<[f64; 2]> {
        let fit = self.system(model, sol, e, p)?;
        let c = fit.m.clone().svd(true, true).solve(&fit.rhs, 1e-12).ok()?;
        fit.b(&c)
    }

    /// As [`Self::b_at`], solving the fit by Householder QR (several times cheaper than the
    /// SVD, for maps that recover at every node) and falling back to the SVD where the scaled
    /// fit is poorly conditioned; the two agree to rounding on well-conditioned patches.
    pub fn b_at_qr(&self, model: &Model, sol: &Solution, e: usize, p: Point) -> Option<[f64; 2]> {
        let fit = self.system(model, sol, e, p)?;
        let qr = fit.m.clone().qr();
        let r = qr.r();
        let (lo, hi) = r
            .diagonal()
            .iter()
            .fold((f64::INFINITY, 0.0f64), |(l, h), &x| {
                (l.min(x.abs()), h.max(x.abs()))
            });
        // A spread of |R_ii| beyond 1e6 marks a poorly conditioned patch (a spread that large
        // bounds the condition number from below), where the SVD's truncation is the safer
        // answer.
        let c = if lo > 1e-6 * hi {
            let mut qtb = fit.rhs.clone();
            qr.q_tr_mul(&mut qtb);
            r.solve_upper_triangular(&qtb.rows(0, fit.ncoef).into_owned())?
        } else {
            fit.m.clone().svd(true, true).solve(&fit.rhs, 1e-12).ok()?
        };
        fit.b(&c)
    }

    /// The scaled least-squares system of the patch fit at `p` in element `e`.
    fn system(&self, model: &Model, sol: &Solution, e: usize, p: Point) -> Option<Fit> {
        let mesh = model.mesh();
        let tag = mesh.tags[e];
        // Rings of same-region elements around the evaluating element: two for first order
        // (enough nodes for a stable six-term fit even where the first ring is small), one
        // for second order, whose mid-edge nodes give a ten-term cubic fit enough points.
        let quadratic = mesh.order() == 2;
        let mut corners: Vec<u32> = mesh.triangles[e].to_vec();
        let mut nodes: Vec<u32> = mesh.element_nodes(e).to_vec();
        for _ring in 0..if quadratic { 1 } else { 2 } {
            let mut next = corners.clone();
            for &v in &corners {
                for &f in self.around(v) {
                    if mesh.tags[f as usize] == tag {
                        next.extend_from_slice(&mesh.triangles[f as usize]);
                        nodes.extend_from_slice(&mesh.element_nodes(f as usize));
                    }
                }
            }
            next.sort_unstable();
            next.dedup();
            corners = next;
        }
        nodes.sort_unstable();
        nodes.dedup();
        let h = nodes
            .iter()
            .map(|&n| {
                let q = mesh.nodes[n as usize];
                (q[0] - p[0]).hypot(q[1] - p[1])
            })
            .fold(0.0f64, f64::max);
        if h == 0.0 {
            return None;
        }
        let near_axis = p[0] < h;
        let ncoef = match (near_axis, quadratic) {
            (true, false) => 4,
            (false, false) => 6,
            (true, true) => 6,
            (false, true) => 10,
        };
        if nodes.len() < ncoef + 2 {
            return None;
        }
        // Scaled local coordinates keep the normal matrix well conditioned.
        let mut m = DMatrix::<f64>::zeros(nodes.len(), ncoef);
        let mut rhs = DVector::<f64>::zeros(nodes.len());
        for (i, &n) in nodes.iter().enumerate() {
            let q = mesh.nodes[n as usize];
            let (x, y) = ((q[0] - p[0]) / h, (q[1] - p[1]) / h);
            let s = q[0] / h;
            let row: [f64; 10] = if near_axis {
                [
                    s,
                    s * y,
                    s * y * y,
                    s * s * s,
                    s * y * y * y,
                    s * s * s * y,
                    0.0,
                    0.0,
                    0.0,
                    0.0,
                ]
            } else {
                [
                    1.0,
                    x,
                    y,
                    x * x,
                    x * y,
                    y * y,
                    x * x * x,
                    x * x * y,
                    x * y * y,
                    y * y * y,
                ]
            };
            for (j, v) in row.into_iter().take(ncoef).enumerate() {
                m[(i, j)] = v;
            }
            rhs[i] = sol.a[n as usize] + 0.5 * sol.b0 * mesh.nodes[n as usize][0];
        }
        Some(Fit {
            m,
            rhs,
            near_axis,
            h,
            ncoef,
            p,
        })
    }
}

/// A patch fit's scaled system and what is needed to turn its coefficients into B.
struct Fit {
    m: DMatrix<f64>,
    rhs: DVector<f64>,
    near_axis: bool,
    h: f64,
    ncoef: usize,
    p: Point,
}

impl Fit {
    /// (B_r, B_z) from the fitted coefficients `c`, None if not finite.
    fn b(&self, c: &DVector<f64>) -> Option<[f64; 2]> {
        let (near_axis, h, ncoef, p) = (self.near_axis, self.h, self.ncoef, self.p);
        let b = if near_axis {
            // A = c0 s + c1 s y + c2 s y² + c3 s³ (+ c4 s y³ + c5 s³ y) with s = r/h,
            // y = (z − z_p)/h; at y = 0: ∂A/∂z = (c1 s + c5 s³)/h, ∂A/∂r = (c0 + 3 c3 s²)/h,
            // A/r = (c0 + c3 s²)/h.
            let s = p[0] / h;
            let c5 = if ncoef > 5 { c[5] } else { 0.0 };
            [
                -(c[1] * s + c5 * s * s * s) / h,
                (2.0 * c[0] + 4.0 * c[3] * s * s) / h,
            ]
        } else {
            [-c[2] / h, c[1] / h + c[0] / p[0]]
        };
        b.iter().all(|x| x.is_finite()).then_some(b)
    }
}
