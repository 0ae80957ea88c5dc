//! Where the discretisation error lives: a per-element indicator for adaptive refinement.
//!
//! The indicator compares the element's own flux density with the patch-recovered one at its
//! centroid, η_e² = ν |B_rec − B_h|² V_e, the energy of the difference (the recovery-based
//! estimator of Zienkiewicz & Zhu, Int. J. Numer. Meth. Eng. 24, 337, 1987, evaluated at one
//! point per element). It ranks elements; it is not itself the error of the dipole moment.

use rayon::prelude::*;

use crate::field::Solution;
use crate::locate::Locator;
use crate::mesh::Point;
use crate::solve::Model;

/// Indicator of one element.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ElementIndicator {
    /// Centroid (r, z) in m.
    pub centroid: Point,
    /// Longest edge in m.
    pub size: f64,
    /// η_e² in J.
    pub eta2: f64,
}

/// Indicators of every element, in element order.
pub fn energy_indicators(
    model: &Model,
    sol: &Solution,
    locator: &Locator,
) -> Vec<ElementIndicator> {
    let mesh = model.mesh();
    (0..mesh.triangles.len())
        .into_par_iter()
        .map(|e| {
            let p = mesh.corners(e);
            let centroid = [
                (p[0][0] + p[1][0] + p[2][0]) / 3.0,
                (p[0][1] + p[1][1] + p[2][1]) / 3.0,
            ];
            let size = (0..3)
                .map(|k| {
                    let (a, b) = (p[k], p[(k + 1) % 3]);
                    (a[0] - b[0]).hypot(a[1] - b[1])
                })
                .fold(0.0, f64::max);
            let bh = sol.b_mean(model, e);
            let eta2 = match locator.patches().b_at(model, sol, e, centroid) {
                Some(br) => {
                    let d2 = (br[0] - bh[0]).powi(2) + (br[1] - bh[1]).powi(2);
                    let nu = model.material(e).nu(bh[0].hypot(bh[1]));
                    nu * d2 * model.geometry()[e].volume()
                }
                None => 0.0,
            };
            ElementIndicator {
                centroid,
                size,
                eta2,
            }
        })
        .collect()
}
