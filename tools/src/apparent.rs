//! The core's apparent permeability from the field solution, beside the textbook estimate
//! from the demagnetizing factor of the ellipsoid of the same length/diameter.
//!
//! Definition (exact, any shape and drive): μ_app = ⟨B_z⟩_core / (μ0 ⟨H_app,z⟩_core), the
//! volume average of the axial flux density in the core over that of the applied field (the
//! windings and background with the core replaced by vacuum). With ⟨B_z⟩ = μ0(⟨H_z⟩ + m_core/V)
//! and, for a linear core in a uniform field, ⟨H⟩ = H0 − Nm⟨M⟩ (Nm the magnetometric factor;
//! Chen, Brug & Goldfarb, IEEE Trans. Magn. 27(4), 3601, 1991), it equals the textbook
//! μr/(1 + Nm(μr − 1)); for an ellipsoid Nm is Osborn's N and the relation is exact
//! (Osborn, Phys. Rev. 67, 351, 1945).

use axicore_solver::{Model, Solution, MU0};

use crate::case::{Case, CoreShape};
use crate::geometry::CORE_TAG;

/// The apparent-permeability figures of a core.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Apparent {
    /// ⟨B_z⟩ over the core volume, T.
    pub b_avg: f64,
    /// ⟨H_app,z⟩ over the core volume (core replaced by vacuum), A/m.
    pub applied_h_avg: f64,
    /// μ_app = ⟨B_z⟩ / (μ0 ⟨H_app,z⟩); None where the applied field averages to zero and for
    /// a permanent-magnet core.
    pub mu_app: Option<f64>,
    /// Demagnetizing factor of the ellipsoid of the core's length/diameter (Osborn 1945).
    pub ellipsoid_n: f64,
    /// Textbook estimate μi/(1 + N(μi − 1)) with that N and the initial μr.
    pub ellipsoid_mu_app: f64,
    /// The factor N that reproduces μ_app through μr/(1 + N(μr − 1)), linear cores only.
    pub effective_n: Option<f64>,
}

/// Volume average of B_z over the core elements of `model` for `sol`, T.
pub fn core_average_bz(model: &Model, sol: &Solution) -> f64 {
    let (mut sum, mut volume) = (0.0, 0.0);
    for (e, g) in model.geometry().iter().enumerate() {
        if model.mesh().tags[e] != CORE_TAG {
            continue;
        }
        for q in &g.qp {
            sum += sol.b_q(model, e, q)[1] * q.dv;
            volume += q.dv;
        }
    }
    if volume > 0.0 {
        sum / volume
    } else {
        0.0
    }
}

/// The figures for the solved field `sol`, given ⟨H_app,z⟩ over the core in A/m.
pub fn apparent(
    model: &Model,
    case: &Case,
    sol: &Solution,
    applied_h_avg: f64,
) -> Option<Apparent> {
    let core = case.core.as_ref()?;
    let b_avg = core_average_bz(model, sol);
    // A magnet's ⟨B_z⟩ is mostly its own polarization's, not a response to the applied field.
    let responds = applied_h_avg != 0.0 && core.magnetization.is_none();
    let mu_app = responds.then(|| b_avg / (MU0 * applied_h_avg));
    let ellipsoid_n = ellipsoid_factor(aspect_ratio(&core.shape));
    let mu_i = core.material.initial_mu_r();
    let effective_n = match (mu_app, core.material.is_linear() && mu_i > 1.0) {
        (Some(m), true) => Some((mu_i / m - 1.0) / (mu_i - 1.0)),
        _ => None,
    };
    Some(Apparent {
        b_avg,
        applied_h_avg,
        mu_app,
        ellipsoid_n,
        ellipsoid_mu_app: axicore_formulas::apparent_permeability(mu_i, ellipsoid_n),
        effective_n,
    })
}

/// Length over outer diameter of a core shape.
pub fn aspect_ratio(shape: &CoreShape) -> f64 {
    shape.half_length() / shape.radius()
}

/// Axial demagnetizing factor of the spheroid of axis ratio `m` = axial length / equatorial
/// diameter (Osborn 1945; Stoner, Phil. Mag. 36, 803, 1945): prolate for m > 1, oblate for
/// m < 1, 1/3 for the sphere; the one implementation lives in `axicore_formulas`.
pub fn ellipsoid_factor(m: f64) -> f64 {
    axicore_formulas::ellipsoid_equal_ratio_n(m)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ellipsoid_factors_match_osborn() {
        // Check values [computed] from Osborn 1945 in shared/references.md §1 and §7 row 7.
        for (m, n) in [
            (2.0, 0.173564),
            (10.0, 0.0202859),
            (50.0, 0.0014430),
            (0.5, 0.527200),
            (1.0, 1.0 / 3.0),
        ] {
            let got = ellipsoid_factor(m);
            // The check values are rounded to 5–6 significant digits.
            assert!((got - n).abs() < 4e-5 * n, "m = {m}: {got} vs {n}");
        }
        // Continuity across the sphere.
        assert!((ellipsoid_factor(1.0 + 2e-6) - 1.0 / 3.0).abs() < 1e-5);
        assert!((ellipsoid_factor(1.0 - 2e-6) - 1.0 / 3.0).abs() < 1e-5);
    }
}
