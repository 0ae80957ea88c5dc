//! Sparse symmetric positive-definite solve with faer's Cholesky (LLᵀ).
//!
//! The symbolic analysis (AMD fill-reducing ordering, elimination tree) depends only on the
//! pattern and is done once per mesh; each numeric factorisation reuses it. faer runs
//! sequentially here: on two cores its threaded factorisation was slower than the sequential
//! one (see the README's dependency notes), and sequential keeps results bitwise reproducible.

use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::cholesky::llt::factor::LltRegularization;
use faer::sparse::linalg::cholesky::{
    factorize_symbolic_cholesky, CholeskySymbolicParams, LltRef, SymbolicCholesky,
};
use faer::sparse::linalg::SupernodalThreshold;
use faer::sparse::{SparseColMatRef, SymbolicSparseColMatRef};
use faer::{Conj, MatMut, Par, Side};

use crate::error::SolverError;
use crate::pattern::Pattern;

/// Symbolic Cholesky analysis of a lower-triangular pattern.
#[derive(Debug)]
pub struct SymbolicSpd {
    n: usize,
    col_ptr: Vec<usize>,
    row_idx: Vec<usize>,
    symbolic: SymbolicCholesky<usize>,
}

/// A numeric Cholesky factor ready to solve.
#[derive(Debug)]
pub struct SpdFactor<'s> {
    symbolic: &'s SymbolicSpd,
    l_values: Vec<f64>,
}

impl SymbolicSpd {
    /// Analyses the pattern (ordering and symbolic factorisation).
    pub fn analyse(pattern: &Pattern) -> Result<Self, SolverError> {
        if pattern.n == 0 {
            return Err(SolverError::NoUnknowns);
        }
        let col_ptr = pattern.col_ptr.clone();
        let row_idx = pattern.row_idx.clone();
        let sym =
            SymbolicSparseColMatRef::new_checked(pattern.n, pattern.n, &col_ptr, None, &row_idx);
        // Supernodal always: faer's automatic choice keeps the simplicial kernel for our 2D
        // patterns up to ~20k unknowns, where supernodal was measured as fast or faster (the
        // example at second order, 19k unknowns: Newton solve 0.18 s → 0.13–0.15 s; 7k: equal).
        let params = CholeskySymbolicParams {
            supernodal_flop_ratio_threshold: SupernodalThreshold::FORCE_SUPERNODAL,
            ..Default::default()
        };
        let symbolic = factorize_symbolic_cholesky(sym, Side::Lower, Default::default(), params)
            .map_err(|e| SolverError::Factorization(format!("{e:?}")))?;
        Ok(Self {
            n: pattern.n,
            col_ptr,
            row_idx,
            symbolic,
        })
    }

    /// Numeric factorisation of the matrix with this pattern and `values` (lower triangle).
    pub fn factorize(&self, values: &[f64]) -> Result<SpdFactor<'_>, SolverError> {
        let par = Par::Seq;
        let sym = SymbolicSparseColMatRef::new_checked(
            self.n,
            self.n,
            &self.col_ptr,
            None,
            &self.row_idx,
        );
        let a = SparseColMatRef::new(sym, values);
        let mut l_values = vec![0.0f64; self.symbolic.len_val()];
        let mut mem = MemBuffer::try_new(
            self.symbolic
                .factorize_numeric_llt_scratch::<f64>(par, Default::default()),
        )
        .map_err(|e| SolverError::Factorization(format!("{e:?}")))?;
        self.symbolic
            .factorize_numeric_llt::<f64>(
                &mut l_values,
                a,
                Side::Lower,
                LltRegularization::default(),
                par,
                MemStack::new(&mut mem),
                Default::default(),
            )
            .map_err(|e| SolverError::NotPositiveDefinite(format!("{e:?}")))?;
        Ok(SpdFactor {
            symbolic: self,
            l_values,
        })
    }

    /// Number of unknowns.
    pub fn n(&self) -> usize {
        self.n
    }
}

impl SpdFactor<'_> {
    /// Solves A x = b, overwriting `rhs` (length n) with x.
    pub fn solve_in_place(&self, rhs: &mut [f64]) {
        let par = Par::Seq;
        let sym = &self.symbolic.symbolic;
        let llt = LltRef::<'_, usize, f64>::new(sym, &self.l_values);
        let mut mem = MemBuffer::new(sym.solve_in_place_scratch::<f64>(1, par));
        let n = rhs.len();
        let rhs_mat: MatMut<'_, f64> = MatMut::from_column_major_slice_mut(rhs, n, 1);
        llt.solve_in_place_with_conj(Conj::No, rhs_mat, par, MemStack::new(&mut mem));
    }
}
