//! Flux linkage of windings with uniform current density.

use crate::solution::Solution;
use crate::solve::Model;

/// ∫ A_φ dV over the elements of region `tag`, in Wb·m.
///
/// A filament loop at (r, z) links Φ = 2π r A_φ; averaging over a winding section S of N
/// turns gives the flux linkage λ = (N/S) ∫_S 2π r A dA = (N/S) ∫ A dV.
pub fn region_integral_of_a(model: &Model, sol: &Solution, tag: u32) -> f64 {
    let mesh = model.mesh();
    let mut s = 0.0;
    for (e, g) in model.geometry().iter().enumerate() {
        if mesh.tags[e] != tag {
            continue;
        }
        for q in &g.qp {
            s += sol.a_q(model, e, q) * q.dv;
        }
    }
    s
}

/// Area of region `tag` in the (r, z) plane, in m².
pub fn region_area(model: &Model, tag: u32) -> f64 {
    let mesh = model.mesh();
    model
        .geometry()
        .iter()
        .zip(&mesh.tags)
        .filter(|(_, &t)| t == tag)
        .map(|(g, _)| g.area)
        .sum()
}

/// Volume of region `tag` (full revolution), in m³.
pub fn region_volume(model: &Model, tag: u32) -> f64 {
    let mesh = model.mesh();
    model
        .geometry()
        .iter()
        .zip(&mesh.tags)
        .filter(|(_, &t)| t == tag)
        .map(|(g, _)| g.volume())
        .sum()
}
