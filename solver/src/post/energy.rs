//! Stored magnetic energy.

use crate::field::Solution;
use crate::solve::Model;

/// Field energy W = ∫ (∫_0^B H·dB) dV in J; for linear materials ½ ∫ ν |B|² dV. With the
/// exact exterior the energy of the reaction field outside the meshed sphere is added.
pub fn energy(model: &Model, sol: &Solution) -> f64 {
    let mut w = 0.0;
    for (e, g) in model.geometry().iter().enumerate() {
        let mat = model.material(e);
        for q in &g.qp {
            let b = sol.b_q(model, e, q);
            w += mat.energy_density(b[0].hypot(b[1])) * q.dv;
        }
    }
    w + model.exterior_energy(&sol.a)
}
