//! A demagnetization study point by hierarchical elements of rising degree: the point's two
//! source quantities (core moment and mid-plane flux for χ > 0; the mean demagnetizing
//! fields over the volume and the mid-plane for χ = 0) are the goals, and the degree rises
//! until both estimates from the p-sequence meet the tolerance. Every study point is linear,
//! so the hp model applies; its exponential convergence is what the small mid-plane field of a
//! uniformly magnetized slender rod (Nf ≈ 1/(2γ²), a difference of nearly equal fields) needs.

use axicore_solver::hp::adapt::raise_degree_to_goals;
use axicore_solver::MU0;

use super::demag::{
    body, check_value, point_case, DemagStudy, Family, PointResult, B0, BETA, CHI, GAMMA,
};
use crate::case::parse_case;
use crate::demag::averages::{mid_plane_radii, CoreAverages};
use crate::demag::factors::{self, Drive, SourceErrors};
use crate::geometry::CORE_TAG;
use crate::hp_geometry::{discretise_hp, first_degree, layers_for};

/// Highest degree a study point may reach: uniformly magnetized rods of L/D ≥ 280 converge
/// irregularly on their graded bands (their Nf is 5e-6 … 5e-7 of the magnetization's field) and
/// were not certified by p = 10 either, at three times the cost of stopping at 8, where their
/// factors were already within 3e-5 of the closed forms.
pub const STUDY_MAX_DEGREE: u32 = 8;

/// Base mesh fineness of hp points: coarse, the degree does the rest (measured on the torquer
/// rod: 0.25 needed the fewest equations for 1e-3 … 1e-8); rods of L/D ≥ 64 are meshed with a
/// band and need the band's cells shorter at the mid-plane (fineness 1: Nf of a γ = 100 magnet
/// to 4.5e-8 at p = 8, `tests/hp_uniformly_magnetized_rods.rs`).
fn base_fineness(gamma: f64) -> f64 {
    if gamma >= 64.0 {
        1.0
    } else {
        0.25
    }
}

impl DemagStudy {
    /// Solves one point with hierarchical elements (see the module documentation).
    pub fn solve_point_hp(&self, gamma: f64, chi: f64, beta: f64) -> Result<PointResult, String> {
        check_value(self.family, GAMMA, gamma).map_err(|e| format!("gamma: {e}"))?;
        check_value(self.family, CHI, chi).map_err(|e| format!("chi: {e}"))?;
        check_value(self.family, BETA, beta).map_err(|e| format!("bore_ratio: {e}"))?;
        let body = body(self.family, gamma, beta);
        let text = point_case(body, chi, base_fineness(gamma), self.max_nodes);
        let mut case = parse_case(&text, "(study point)").map_err(|e| e.to_string())?;
        if self.family == Family::Cylinder {
            case.mesh.corner_layers = layers_for(self.tolerance);
        }
        let core = case.core.clone().ok_or("the point has no core")?;
        let (problem, curved) = discretise_hp(&case).map_err(|e| e.to_string())?;
        let (ri, ro) = mid_plane_radii(&core.shape);
        let drive = if chi > 0.0 {
            Drive::Uniform { h0: B0 / MU0, chi }
        } else {
            Drive::Magnetized
        };
        let run = raise_degree_to_goals(
            &problem,
            &curved,
            self.tolerance,
            first_degree(self.tolerance),
            STUDY_MAX_DEGREE,
            |model, sol| {
                let mean = model
                    .region_mean(sol, CORE_TAG)?
                    .ok_or(axicore_solver::SolverError::BadMaterial("no core".into()))?;
                let loc = model.locator();
                let psi = |r: f64| -> Result<f64, axicore_solver::SolverError> {
                    if r <= 0.0 {
                        return Ok(0.0);
                    }
                    model.disc_flux(sol, &loc, r, core.centre)
                };
                let mid_flux = psi(ro)? - psi(ri)?;
                // The point has no winding: the sources' moment is the core's.
                let m_core = model.source_moment(sol)?;
                let avg = CoreAverages {
                    volume_m3: mean.volume,
                    b_z: mean.b_z,
                    m_z: m_core / mean.volume,
                    mid_flux,
                    mid_area: std::f64::consts::PI * (ro * ro - ri * ri),
                };
                let goals = match drive {
                    Drive::Uniform { .. } => vec![m_core, mid_flux],
                    Drive::Magnetized => vec![avg.h_z(), factors::magnetized_mid_h(&avg)],
                };
                Ok((goals, avg))
            },
        )
        .map_err(|e| e.to_string())?;
        let last = run.steps.last().ok_or("no degree solved")?;
        let err = SourceErrors {
            volume: last.estimates.first().copied().flatten(),
            mid: last.estimates.get(1).copied().flatten(),
        };
        Ok(PointResult {
            factors: factors::factors(drive, &run.last, err),
            unknowns: last.unknowns,
            levels: run.steps.len(),
            reached: run.reached,
        })
    }
}
