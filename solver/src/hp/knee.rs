//! Nonlinear elimination of the knee for the hp system: between global Newton steps, a local
//! Newton solve on the unknowns of the elements whose field sits on the knee of their law,
//! everything else held — the hp counterpart of [`crate::nonlinear`]'s `local.rs` (Lanzkron,
//! Rose & Wilkes, SIAM J. Sci. Comput. 17, 1996; Cai & Li, SIAM J. Sci. Comput. 33, 2011).
//!
//! Why: with a sharp knee the global iteration stalls on the few elements where the tangent
//! changes by orders of magnitude within one step. Measured on the built-in example (80 %
//! Ni-Fe knee law, 40 mA, fineness 0.25) before this: 15, 42 and 33 Newton iterations at
//! p = 3, 4, 5, the relative residual hovering between 1e-7 and 1e-8 for twenty of them.

use rayon::prelude::*;

use super::model::NO_EQUATION;
use super::nonlinear::HpSystem;
use super::nonlinear_terms::on_knee;
use crate::cholesky::SymbolicSpd;
use crate::nonlinear::newton::damped_length;
use crate::pattern::Pattern;
use crate::weak_form::Tangent;

/// An element is on the knee where ν_d exceeds this multiple of ν at a quadrature point.
const KNEE_RATIO: f64 = 10.0;
/// Above this share of all unknowns the local problem is not local any more: skipped.
const MAX_PATCH_FRACTION: f64 = 0.5;
/// Local Newton iterations per relaxation at most.
const LOCAL_ITERATIONS: usize = 12;
/// The local solve stops once its residual has fallen by this factor.
const LOCAL_REDUCTION: f64 = 1e-4;

fn norm(x: &[f64]) -> f64 {
    x.iter().map(|v| v * v).sum::<f64>().sqrt()
}

impl HpSystem<'_> {
    /// Relaxes the unknowns of the knee elements with the rest of `u` held, until their
    /// residual has fallen by [`LOCAL_REDUCTION`] or below `floor`; `global` is the global
    /// residual at `u`. Returns the local iterations done.
    pub(super) fn relax_knee(&self, u: &mut [f64], global: &[f64], floor: f64) -> usize {
        let m = self.model;
        let nt = m.mesh.triangles.len();
        let n_free = self.free_dofs.len();
        let local_values = |t: usize, u: &[f64]| -> Vec<f64> {
            m.dofs
                .local_to_global(t)
                .iter()
                .map(|&d| u[d as usize])
                .collect()
        };
        let knee: Vec<usize> = (0..nt)
            .into_par_iter()
            .filter(|&t| {
                on_knee(
                    &m.maps[t],
                    self.tab(t),
                    &self.active[t],
                    &local_values(t, u),
                    &self.drive(t),
                    KNEE_RATIO,
                )
            })
            .collect();
        if knee.is_empty() {
            return 0;
        }
        // Local unknowns: the free ones of the knee elements, except those carrying the
        // exterior operator (its coupling is dense and global).
        let mut held = vec![false; n_free];
        if let Some(x) = &m.exterior {
            for &i in &x.eqs {
                held[i] = true;
            }
        }
        let mut local_of = vec![NO_EQUATION; n_free];
        let mut locals: Vec<usize> = Vec::new();
        for &t in &knee {
            for &i in &self.free[t] {
                if i != NO_EQUATION && !held[i as usize] && local_of[i as usize] == NO_EQUATION {
                    local_of[i as usize] = locals.len() as u32;
                    locals.push(i as usize);
                }
            }
        }
        if locals.is_empty() || locals.len() as f64 > MAX_PATCH_FRACTION * n_free as f64 {
            return 0;
        }
        let local = |i: u32| {
            (i != NO_EQUATION)
                .then(|| local_of[i as usize])
                .filter(|&l| l != NO_EQUATION)
        };
        let touching: Vec<usize> = (0..nt)
            .filter(|&t| self.free[t].iter().any(|&i| local(i).is_some()))
            .collect();
        let lists: Vec<Vec<usize>> = touching
            .iter()
            .map(|&t| {
                self.free[t]
                    .iter()
                    .filter_map(|&i| local(i))
                    .map(|l| l as usize)
                    .collect()
            })
            .collect();
        let pattern = Pattern::from_lists(locals.len(), &lists, &[]);
        let Ok(symbolic) = SymbolicSpd::analyse(&pattern) else {
            return 0;
        };
        // The local residual (and, when asked, the local tangent's values) at `u`.
        let terms = |u: &[f64], with_matrix: bool| -> (Vec<f64>, Vec<f64>) {
            let tangent = if with_matrix {
                Tangent::Newton
            } else {
                Tangent::None
            };
            let parts: Vec<_> = touching
                .par_iter()
                .map(|&t| self.element(t, u, tangent))
                .collect();
            let mut r = vec![0.0; locals.len()];
            let mut v = vec![0.0; if with_matrix { pattern.nnz() } else { 0 }];
            for (&t, (re, ke)) in touching.iter().zip(&parts) {
                let free = &self.free[t];
                for (a, &i) in free.iter().enumerate() {
                    let Some(la) = local(i) else { continue };
                    r[la as usize] += re[a];
                    if let Some(k) = ke {
                        for (b, &j) in free.iter().enumerate() {
                            let Some(lb) = local(j) else { continue };
                            if la >= lb {
                                let s = pattern.slot(la as usize, lb as usize).expect("in pattern");
                                v[s as usize] += k[(a, b)];
                            }
                        }
                    }
                }
            }
            (r, v)
        };
        let mut r: Vec<f64> = locals.iter().map(|&i| global[i]).collect();
        let target = (LOCAL_REDUCTION * norm(&r)).max(floor);
        if norm(&r) <= target {
            return 0;
        }
        let moved = |u: &[f64], delta: &[f64], alpha: f64| -> Vec<f64> {
            let mut x = u.to_vec();
            for (k, &i) in locals.iter().enumerate() {
                x[self.free_dofs[i] as usize] += alpha * delta[k];
            }
            x
        };
        let (_, mut t) = terms(u, true);
        let mut done = 0;
        while done < LOCAL_ITERATIONS && norm(&r) > target {
            let Ok(factor) = symbolic.factorize(&t) else {
                break;
            };
            let mut delta: Vec<f64> = r.iter().map(|v| -v).collect();
            factor.solve_in_place(&mut delta);
            let (r1, t1) = terms(&moved(u, &delta, 1.0), true);
            let alpha = damped_length(&r, &delta, &r1, |a| terms(&moved(u, &delta, a), false).0);
            for (k, &i) in locals.iter().enumerate() {
                u[self.free_dofs[i] as usize] += alpha * delta[k];
            }
            done += 1;
            (r, t) = if alpha == 1.0 {
                (r1, t1)
            } else {
                terms(u, true)
            };
        }
        done
    }
}
