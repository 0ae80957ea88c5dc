//! Static condensation of an element's cell (bubble) unknowns.
//!
//! Bubbles couple only within their element, so with the element system split into outer
//! (vertex and edge) unknowns u_o and cell unknowns u_c,
//!
//! ```text
//!   [K_oo K_oc] [u_o]   [f_o]        S = K_oo − K_oc K_cc⁻¹ K_co,   g = f_o − K_oc K_cc⁻¹ f_c
//!   [K_co K_cc] [u_c] = [f_c]   ⇒    S u_o = g,   u_c = K_cc⁻¹ (f_c − K_co u_o)
//! ```
//! S is symmetric positive definite when K is (a Schur complement), so the global system
//! stays one sparse Cholesky solve, over the outer unknowns only: at p = 8 a triangle has 24
//! outer and 21 cell functions, and the global matrix loses almost half its rows.

use nalgebra::{Cholesky, DMatrix, DVector, Dyn};

use crate::error::SolverError;

/// One element's condensed system and what recovers its cell unknowns.
#[derive(Debug, Clone)]
pub struct Condensed {
    /// Schur complement S over the outer unknowns.
    pub s: DMatrix<f64>,
    /// Condensed load g over the outer unknowns.
    pub g: DVector<f64>,
    /// K_cc⁻¹ K_co (cells × outer).
    kcc_inv_kco: DMatrix<f64>,
    /// K_cc⁻¹ f_c.
    kcc_inv_fc: DVector<f64>,
}

impl Condensed {
    /// Condenses `k`, `f` whose last `cells` unknowns are the cell unknowns; `element` names
    /// the element in errors (K_cc must be positive definite).
    pub fn new(
        k: &DMatrix<f64>,
        f: &DVector<f64>,
        cells: usize,
        element: usize,
    ) -> Result<Self, SolverError> {
        let no = k.nrows() - cells;
        let (s, chol, kcc_inv_kco) =
            schur(k, cells).ok_or(SolverError::CellCondensation { element })?;
        let Some(chol) = chol else {
            return Ok(Self {
                s,
                g: f.clone(),
                kcc_inv_kco,
                kcc_inv_fc: DVector::zeros(0),
            });
        };
        let kcc_inv_fc = chol.solve(&f.rows(no, cells).clone_owned());
        let g = f.rows(0, no) - k.view((0, no), (no, cells)) * &kcc_inv_fc;
        Ok(Self {
            s,
            g,
            kcc_inv_kco,
            kcc_inv_fc,
        })
    }

    /// The cell unknowns u_c = K_cc⁻¹ (f_c − K_co u_o) from the outer ones.
    pub fn recover(&self, outer: &DVector<f64>) -> DVector<f64> {
        &self.kcc_inv_fc - &self.kcc_inv_kco * outer
    }

    /// The condensed system (S, g) for assembly and what recovers the cells after the solve,
    /// apart: S and g can be dropped once assembled, before the factorisation needs memory.
    pub fn into_parts(self) -> (DMatrix<f64>, DVector<f64>, Recovery) {
        (
            self.s,
            self.g,
            Recovery {
                kcc_inv_kco: self.kcc_inv_kco,
                kcc_inv_fc: self.kcc_inv_fc,
            },
        )
    }
}

/// (S, the Cholesky factor of K_cc if there are cells, X = K_cc⁻¹ K_co).
pub type Schur = (DMatrix<f64>, Option<Cholesky<f64, Dyn>>, DMatrix<f64>);

/// The Schur complement S = K_oo − K_oc K_cc⁻¹ K_co of `k` (its last `cells` unknowns the
/// cell ones), the Cholesky factor of K_cc (None without cells) and X = K_cc⁻¹ K_co; None when
/// K_cc is not positive definite. Shared by the linear solve and the Newton tangent.
pub fn schur(k: &DMatrix<f64>, cells: usize) -> Option<Schur> {
    let no = k.nrows() - cells;
    if cells == 0 {
        return Some((k.clone(), None, DMatrix::zeros(0, no)));
    }
    let chol = Cholesky::new(k.view((no, no), (cells, cells)).clone_owned())?;
    let x = chol.solve(&k.view((no, 0), (cells, no)).clone_owned());
    let s = k.view((0, 0), (no, no)) - k.view((0, no), (no, cells)) * &x;
    Some((s, Some(chol), x))
}

/// What recovers an element's cell unknowns from its outer ones after the global solve.
#[derive(Debug, Clone)]
pub struct Recovery {
    kcc_inv_kco: DMatrix<f64>,
    kcc_inv_fc: DVector<f64>,
}

impl Recovery {
    /// The cell unknowns u_c = K_cc⁻¹ (f_c − K_co u_o) from the outer ones.
    pub fn recover(&self, outer: &DVector<f64>) -> DVector<f64> {
        &self.kcc_inv_fc - &self.kcc_inv_kco * outer
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn condensed_solve_equals_the_full_solve() {
        // A random SPD system: solving S u_o = g and recovering u_c must reproduce the
        // solution of the full system (block Gaussian elimination is exact algebra).
        let n = 9;
        let cells = 4;
        let a = DMatrix::from_fn(n, n, |i, j| ((i * 7 + j * 3) % 11) as f64 / 11.0 - 0.4);
        let k = &a * a.transpose() + DMatrix::identity(n, n) * 0.5;
        let f = DVector::from_fn(n, |i, _| (i as f64).sin());
        let full = k.clone().cholesky().unwrap().solve(&f);
        let c = Condensed::new(&k, &f, cells, 0).unwrap();
        let uo = c.s.clone().cholesky().unwrap().solve(&c.g);
        let uc = c.recover(&uo);
        for i in 0..n - cells {
            assert!((uo[i] - full[i]).abs() < 1e-12, "{i}");
        }
        for i in 0..cells {
            assert!((uc[i] - full[n - cells + i]).abs() < 1e-12, "{i}");
        }
    }
}
