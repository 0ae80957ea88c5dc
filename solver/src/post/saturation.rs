//! How much of a region is saturated.

use crate::solution::Solution;
use crate::solve::Model;

/// Volume fraction of region `tag` where |B| exceeds `threshold` (T), integrated with the
/// element quadrature (0 for an empty region).
pub fn fraction_above(model: &Model, sol: &Solution, tag: u32, threshold: f64) -> f64 {
    let (mut above, mut total) = (0.0, 0.0);
    for (e, g) in model.geometry().iter().enumerate() {
        if model.mesh().tags[e] != tag {
            continue;
        }
        for q in &g.qp {
            let b = sol.b_q(model, e, q);
            total += q.dv;
            if b[0].hypot(b[1]) > threshold {
                above += q.dv;
            }
        }
    }
    if total > 0.0 {
        above / total
    } else {
        0.0
    }
}
