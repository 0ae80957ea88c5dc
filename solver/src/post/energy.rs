//! Stored magnetic energy.
//!
//! W = ∫ w(B) dV with w(B) = ∫ H·dB from each law's zero-field state: B = 0 in a soft
//! material, B = J0 e_z in a magnet (whose law is B = μ0 μr H + J0 e_z). So
//! w = ν|B − J0 e_z|²/2 = μ0 μr |H|²/2 in a linear magnet, and W is the energy of the field
//! H measured from the magnets' remanent state: for magnets of recoil permeability 1 it is
//! (μ0/2)∫|H|² dV over all space, the magnetostatic self-energy −(μ0/2)∫ M·H dV, which is
//! (μ0/2)·N·M0²·V for a uniformly magnetised ellipsoid with demagnetizing factor N. It is the
//! convex energy whose minimiser the solver finds (see [`crate::nonlinear`]), and without
//! magnets the usual ∫ (∫_0^B H·dB) dV (½ ∫ B·H for linear materials, ½ L I² for one winding).
//! The ½ ∫ B·H of a field with magnets is not used: B·H is not an energy density inside them.

use crate::solution::Solution;
use crate::solve::Model;

/// Field energy W = ∫ w(B) dV in J (see the module documentation): ∫ (∫_0^B H·dB) dV without
/// magnets, ½ ∫ ν |B − J0 e_z|² dV in linear regions with a polarization J0. With the exact
/// exterior the energy of the reaction field outside the meshed sphere is added.
pub fn energy(model: &Model, sol: &Solution) -> f64 {
    let mut w = 0.0;
    for (e, g) in model.geometry().iter().enumerate() {
        let props = model.element_props(e);
        for q in &g.qp {
            w += props.energy_density(sol.b_q(model, e, q)) * q.dv;
        }
    }
    w + model.exterior_energy(&sol.a)
}
