//! The core's field averages that define its demagnetizing factors: ⟨B_z⟩ and ⟨M_z⟩ over the
//! volume, and the flux through the mid-plane cross-section.

use axicore_solver::locate::Locator;
use axicore_solver::{Model, Solution, SolverError, MU0};

use crate::case::{Core, CoreShape};
use crate::geometry::CORE_TAG;

/// Field averages over a core, SI units.
#[allow(non_snake_case)]
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CoreAverages {
    /// Meshed core volume, m³.
    pub volume_m3: f64,
    /// ⟨B_z⟩ over the core volume, T.
    pub b_z: f64,
    /// ⟨M_z⟩ = m_core / V over the core volume, A/m.
    pub m_z: f64,
    /// Flux through the mid-plane cross-section of the core (a disc, or an annulus for a
    /// tube), Wb.
    pub mid_flux: f64,
    /// Area of that cross-section, m².
    pub mid_area: f64,
}

impl CoreAverages {
    /// ⟨H_z⟩ over the core volume, A/m (H = B/μ0 − M, exactly, for any law).
    pub fn h_z(&self) -> f64 {
        self.b_z / MU0 - self.m_z
    }

    /// ⟨B_z⟩ over the mid-plane cross-section, T.
    pub fn mid_b_z(&self) -> f64 {
        self.mid_flux / self.mid_area
    }
}

/// Radii (inner, outer) of the core's mid-plane cross-section, m.
pub fn mid_plane_radii(shape: &CoreShape) -> (f64, f64) {
    match *shape {
        CoreShape::Tube { bore, diameter, .. } => (0.5 * bore, 0.5 * diameter),
        _ => (0.0, shape.radius()),
    }
}

/// The averages of `core` in the solved field `sol`; `core_moment` is the core's
/// magnetization moment ∫ M_z dV (A·m²) from the source route.
pub fn core_averages(
    model: &Model,
    sol: &Solution,
    locator: &Locator,
    core: &Core,
    core_moment: f64,
) -> Result<CoreAverages, SolverError> {
    let volume = axicore_solver::post::flux::region_volume(model, CORE_TAG);
    let b_z = crate::apparent::core_average_bz(model, sol);
    let (ri, ro) = mid_plane_radii(&core.shape);
    // The flux through the circle of radius r in the plane z is 2π r A_φ(r, z): A is
    // continuous, so its value on the core's surface needs no derivative.
    let psi = |r: f64| -> Result<f64, SolverError> {
        if r <= 0.0 {
            return Ok(0.0);
        }
        let (_, a, _) = sol.b_at_point(model, locator, [r, core.centre])?;
        Ok(2.0 * std::f64::consts::PI * r * a)
    };
    let mid_flux = psi(ro)? - psi(ri)?;
    Ok(CoreAverages {
        volume_m3: volume,
        b_z,
        m_z: if volume > 0.0 {
            core_moment / volume
        } else {
            0.0
        },
        mid_flux,
        mid_area: std::f64::consts::PI * (ro * ro - ri * ri),
    })
}
