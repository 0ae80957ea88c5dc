//! Reluctivity laws: the material answers ν(|B|²) and dν/d(|B|²) and knows nothing of meshes.

use crate::{SolverError, MU0};

/// A magnetic material of a region.
#[derive(Debug, Clone, PartialEq)]
pub enum Material {
    /// Linear, isotropic: B = μ0 μr H with constant relative permeability μr ≥ 1.
    Linear {
        /// Relative permeability (dimensionless).
        mu_r: f64,
    },
}

impl Material {
    /// Vacuum (and air, to far better than any model accuracy here).
    pub const AIR: Material = Material::Linear { mu_r: 1.0 };

    /// Checks the parameters.
    pub fn validate(&self) -> Result<(), SolverError> {
        match *self {
            Material::Linear { mu_r } => {
                if !mu_r.is_finite() || mu_r < 1.0 {
                    return Err(SolverError::BadMaterial(format!(
                        "relative permeability {mu_r} must be finite and ≥ 1"
                    )));
                }
            }
        }
        Ok(())
    }

    /// Reluctivity ν = H/B in m/H at |B|² = `b2` (T²).
    #[inline]
    pub fn nu(&self, _b2: f64) -> f64 {
        match *self {
            Material::Linear { mu_r } => 1.0 / (MU0 * mu_r),
        }
    }

    /// dν/d(|B|²) in m/(H·T²); zero for linear laws.
    #[inline]
    pub fn dnu_db2(&self, _b2: f64) -> f64 {
        match *self {
            Material::Linear { .. } => 0.0,
        }
    }

    /// Energy density ∫_0^B H dB in J/m³ at |B|² = `b2`.
    #[inline]
    pub fn energy_density(&self, b2: f64) -> f64 {
        match *self {
            Material::Linear { mu_r } => 0.5 * b2 / (MU0 * mu_r),
        }
    }

    /// Whether ν is independent of B (one linear solve suffices).
    pub fn is_linear(&self) -> bool {
        matches!(self, Material::Linear { .. })
    }
}
