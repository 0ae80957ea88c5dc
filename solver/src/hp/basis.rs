//! The hierarchical H1 basis of degree p on the reference triangle.
//!
//! Reference triangle v0 = (0, 0), v1 = (1, 0), v2 = (0, 1) with barycentrics λ0 = 1 − ξ − η,
//! λ1 = ξ, λ2 = η. Local edge e joins vertices (e, (e + 1) % 3). Local functions, in order:
//! - 3 vertex functions λ0, λ1, λ2;
//! - per edge e = 0, 1, 2 (from a = e to b = e + 1), the functions of degree k = 2..=p
//!   λa λb φ_{k−2}(λb − λa), with the kernel functions φ_j of Szabó & Babuška, Finite Element
//!   Analysis (1991), §6.1 and Table 6.1 (φ_0 = −√6, φ_1 = −√10 x, φ_2 = −(√14/4)(5x² − 1), …).
//!   On the edge λa λb = (1 − x²)/4 with x = λb − λa, so the trace is the integrated Legendre
//!   polynomial L_k(x) = √((2k − 1)/2) ∫_{−1}^{x} P_{k−1} = (P_k − P_{k−2}) / √(2(2k − 1)), whose
//!   derivatives are orthonormal on the edge (the kernel values above are derived in `eval` and
//!   checked against L_k by the trace test);
//! - the cell (bubble) functions of total degree 3..=p, ordered by degree, then by i:
//!   B_ij = λ0 λ1 λ2 · (λ0 + λ1)^i P_i^(2,2)((λ1 − λ0)/(λ0 + λ1)) · P_j^(2i+5,2)(2λ2 − 1),
//!   i + j = degree − 3. This is the Koornwinder–Dubiner construction (M. Dubiner, J. Sci.
//!   Comput. 6 (1991) 345–390; Karniadakis & Sherwin, Spectral/hp Element Methods for CFD, 2005,
//!   ch. 3, section from memory) with the Jacobi weights raised to absorb (λ0 λ1 λ2)²: in the
//!   collapsed coordinates λ2 = t, λ1 = s(1 − t), λ0 = (1 − s)(1 − t) the product B_ij B_kl dξdη
//!   carries the weight s²(1 − s)² in s and (1 − t)^(2i+5) t² in t, so the bubbles are
//!   L2-orthogonal on the reference triangle and their mass block is diagonal (checked by a
//!   test), which keeps it well conditioned.
//!
//! An edge whose global orientation runs from b to a is "reversed": its odd-degree functions change
//! sign (φ_{k−2} has the parity of k), so two elements sharing the edge see the same trace.

use std::ops::Range;

use crate::error::SolverError;
use crate::quadrature::polynomials::ScaledJacobi;

/// Highest element degree provided (and tested at); the triangle rules reach degree 2·P_MAX + 8.
pub const P_MAX: usize = 16;

/// Reference gradients of λ0, λ1, λ2.
const GRAD_LAMBDA: [[f64; 2]; 3] = [[-1.0, -1.0], [1.0, 0.0], [0.0, 1.0]];

/// What a local function is attached to.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Mode {
    /// The vertex function λ_v.
    Vertex(usize),
    /// The function of degree `degree` (2..=p) of local edge `edge`.
    Edge {
        /// Local edge 0, 1 or 2.
        edge: usize,
        /// Polynomial degree k ≥ 2.
        degree: usize,
    },
    /// The bubble B_ij of total degree i + j + 3.
    Cell {
        /// Degree in the direction along edge 0.
        i: usize,
        /// Degree towards vertex 2.
        j: usize,
    },
}

/// The hierarchical basis of one degree p on the reference triangle.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct TriangleBasis {
    degree: usize,
}

impl TriangleBasis {
    /// The basis of degree `degree` (1..=P_MAX).
    pub fn new(degree: usize) -> Result<Self, SolverError> {
        if degree == 0 || degree > P_MAX {
            return Err(SolverError::ElementDegree { degree, max: P_MAX });
        }
        Ok(Self { degree })
    }

    /// The polynomial degree p.
    pub fn degree(&self) -> usize {
        self.degree
    }

    /// Number of local functions, (p + 1)(p + 2)/2.
    pub fn len(&self) -> usize {
        (self.degree + 1) * (self.degree + 2) / 2
    }

    /// Always false: every degree has the three vertex functions.
    pub fn is_empty(&self) -> bool {
        false
    }

    /// Functions per edge, p − 1.
    pub fn per_edge(&self) -> usize {
        self.degree - 1
    }

    /// Bubble functions, (p − 1)(p − 2)/2.
    pub fn per_cell(&self) -> usize {
        (self.degree - 1) * self.degree.saturating_sub(2) / 2
    }

    /// Local indices of the functions of edge `edge`, degrees 2..=p in order.
    pub fn edge_functions(&self, edge: usize) -> Range<usize> {
        let start = 3 + edge * self.per_edge();
        start..start + self.per_edge()
    }

    /// Local indices of the bubble functions.
    pub fn cell_functions(&self) -> Range<usize> {
        let start = 3 + 3 * self.per_edge();
        start..start + self.per_cell()
    }

    /// What local function `index` is attached to (an index ≥ `len()` is a caller's bug: panics).
    pub fn mode(&self, index: usize) -> Mode {
        assert!(
            index < self.len(),
            "local function {index} of {}",
            self.len()
        );
        if index < 3 {
            return Mode::Vertex(index);
        }
        let cell = self.cell_functions().start;
        if index < cell {
            let k = index - 3;
            return Mode::Edge {
                edge: k / self.per_edge(),
                degree: 2 + k % self.per_edge(),
            };
        }
        // Bubbles of total degree m + 3 start at m(m + 1)/2 within the cell block.
        let r = index - cell;
        let mut m = 0;
        while (m + 1) * (m + 2) / 2 <= r {
            m += 1;
        }
        let i = r - m * (m + 1) / 2;
        Mode::Cell { i, j: m - i }
    }

    /// The local index of a function, if this degree has it.
    pub fn index(&self, mode: Mode) -> Option<usize> {
        let p = self.degree;
        match mode {
            Mode::Vertex(v) => (v < 3).then_some(v),
            Mode::Edge { edge, degree } => (edge < 3 && (2..=p).contains(&degree))
                .then(|| self.edge_functions(edge).start + degree - 2),
            Mode::Cell { i, j } => {
                let m = i + j;
                (m + 3 <= p).then(|| self.cell_functions().start + m * (m + 1) / 2 + i)
            }
        }
    }

    /// Values and reference gradients (∂/∂ξ, ∂/∂η) of every local function at (ξ, η);
    /// `reversed[e]` tells whether local edge e runs against its global orientation.
    /// `values` and `grads` must hold exactly [`len`](Self::len) entries (else a caller's bug: panics).
    pub fn eval(
        &self,
        xi: f64,
        eta: f64,
        reversed: [bool; 3],
        values: &mut [f64],
        grads: &mut [[f64; 2]],
    ) {
        let n = self.len();
        assert!(
            values.len() == n && grads.len() == n,
            "buffers must hold {n} functions"
        );
        let p = self.degree;
        let l = [1.0 - xi - eta, xi, eta];
        let dl = GRAD_LAMBDA;
        values[..3].copy_from_slice(&l);
        grads[..3].copy_from_slice(&dl);
        for e in 0..3 {
            let (a, b) = (e, (e + 1) % 3);
            let x = l[b] - l[a];
            let dx = [dl[b][0] - dl[a][0], dl[b][1] - dl[a][1]];
            let w = l[a] * l[b];
            let dw = [
                l[b] * dl[a][0] + l[a] * dl[b][0],
                l[b] * dl[a][1] + l[a] * dl[b][1],
            ];
            // φ_{k−2}(x) = 4 L_k(x)/(1 − x²) = −√(2(2k − 1))/(k − 1) · P^(1,1)_{k−2}(x): from
            // P_k − P_{k−2} = −(2k − 1)/(k(k − 1)) (1 − x²) P'_{k−1} and P'_{k−1} = (k/2) P^(1,1)_{k−2}
            // (derivative of a Jacobi polynomial); no division by 1 − x², which vanishes at the vertices.
            let mut kernel = ScaledJacobi::new(1.0, 1.0, x, 1.0);
            for (slot, k) in self.edge_functions(e).zip(2..=p) {
                let c = -((2 * (2 * k - 1)) as f64).sqrt() / (k - 1) as f64;
                let sign = if reversed[e] && !k.is_multiple_of(2) {
                    -c
                } else {
                    c
                };
                let (phi, dphi) = (sign * kernel.value(), sign * kernel.du());
                values[slot] = w * phi;
                grads[slot] = [
                    dw[0] * phi + w * dphi * dx[0],
                    dw[1] * phi + w * dphi * dx[1],
                ];
                kernel.advance();
            }
        }
        if p < 3 {
            return;
        }
        let cell = self.cell_functions().start;
        let w = l[0] * l[1] * l[2];
        let dw = [0, 1]
            .map(|c| l[1] * l[2] * dl[0][c] + l[0] * l[2] * dl[1][c] + l[0] * l[1] * dl[2][c]);
        // Collapsed-coordinate pieces as polynomials: u = λ1 − λ0, t = λ0 + λ1, y = 2λ2 − 1.
        let (u, t, y) = (l[1] - l[0], l[0] + l[1], 2.0 * l[2] - 1.0);
        let (du, dt, dy) = ([2.0, 1.0], [0.0, -1.0], [0.0, 2.0]);
        let top = p - 3;
        let mut s = ScaledJacobi::new(2.0, 2.0, u, t);
        for i in 0..=top {
            let si = s.value();
            let dsi = [0, 1].map(|c| s.du() * du[c] + s.dt() * dt[c]);
            let mut q = ScaledJacobi::new((2 * i + 5) as f64, 2.0, y, 1.0);
            for j in 0..=(top - i) {
                let m = i + j;
                let slot = cell + m * (m + 1) / 2 + i;
                let (qj, dqj) = (q.value(), q.du());
                values[slot] = w * si * qj;
                grads[slot] =
                    [0, 1].map(|c| dw[c] * si * qj + w * dsi[c] * qj + w * si * dqj * dy[c]);
                q.advance();
            }
            s.advance();
        }
    }
}

#[cfg(test)]
#[path = "basis_tests.rs"]
mod tests;
