//! Magnetic materials as single-valued, isotropic laws H(|B|): the solver asks for the
//! reluctivity ν = H/B, the differential reluctivity ν_d = dH/dB and the energy density, and
//! nothing here knows of meshes.
//!
//! Every law is strictly monotone with a continuous derivative, so the magnetic energy is a
//! convex function of B and Newton's tangent ν I + (ν_d − ν) b̂ b̂ᵀ is symmetric positive
//! definite (see [`crate::nonlinear`]).

mod invert;
pub(crate) use invert::solve_increasing;
mod laws;
mod table;
mod table_check;

use std::sync::Arc;

pub use laws::{Brauer, SaturationLaw};

/// Largest relative permeability a material may have (linear μr, a law's initial or maximum
/// μr, B/(μ0 H) of a table point). The most permeable soft alloys reach about 1e6 (typical
/// value, from memory); far above, inputs such as μmax = 1e308 or a table point at 1e300 T
/// reached the solver (Newton failures, singular systems) instead of a named fault.
pub const MAX_MU_R: f64 = 1e7;

/// Smallest saturation of an analytic law, T. Soft magnetic materials saturate at 0.2–2.4 T
/// (typical values, from memory); far below, Newton met NaN residuals.
pub const MIN_SATURATION: f64 = 1e-3;
pub use table::BhTable;
pub use table_check::{check_bh_points, BhColumn, BhTableFault};

use crate::constants::MU0;
use crate::error::SolverError;

/// A magnetic material of a region.
#[derive(Debug, Clone, PartialEq)]
pub enum Material {
    /// Linear, isotropic: B = μ0 μr H with constant relative permeability μr ≥ 1.
    Linear {
        /// Relative permeability (dimensionless).
        mu_r: f64,
    },
    /// A saturating law H(|B|) (shared, as one law may fill many regions).
    Saturable(Arc<SaturationLaw>),
}

impl Material {
    /// Vacuum (and air, to far better than any model accuracy here).
    pub const AIR: Material = Material::Linear { mu_r: 1.0 };

    /// Checks the parameters.
    pub fn validate(&self) -> Result<(), SolverError> {
        match self {
            Material::Linear { mu_r } => {
                if !mu_r.is_finite() || *mu_r < 1.0 {
                    return Err(SolverError::BadMaterial(format!(
                        "relative permeability {mu_r} must be finite and ≥ 1"
                    )));
                }
                Ok(())
            }
            Material::Saturable(law) => law.validate(),
        }
    }

    /// Magnetic field strength H in A/m at flux density |B| = `b` (T).
    #[inline]
    pub fn h(&self, b: f64) -> f64 {
        match self {
            Material::Linear { mu_r } => b / (MU0 * mu_r),
            Material::Saturable(law) => law.h(b),
        }
    }

    /// Reluctivity ν = H/B in m/H at |B| = `b` (T); the initial value at b = 0.
    #[inline]
    pub fn nu(&self, b: f64) -> f64 {
        match self {
            Material::Linear { mu_r } => 1.0 / (MU0 * mu_r),
            Material::Saturable(law) => law.nu(b),
        }
    }

    /// Differential reluctivity ν_d = dH/dB in m/H at |B| = `b` (T).
    #[inline]
    pub fn nu_diff(&self, b: f64) -> f64 {
        match self {
            Material::Linear { mu_r } => 1.0 / (MU0 * mu_r),
            Material::Saturable(law) => law.nu_diff(b),
        }
    }

    /// (ν, ν_d) at |B| = `b` in m/H: cheaper than asking for each.
    #[inline]
    pub fn reluctivities(&self, b: f64) -> (f64, f64) {
        match self {
            Material::Linear { mu_r } => (1.0 / (MU0 * mu_r), 1.0 / (MU0 * mu_r)),
            Material::Saturable(law) => law.reluctivities(b),
        }
    }

    /// Energy density ∫_0^B H dB in J/m³ at |B| = `b` (T).
    #[inline]
    pub fn energy_density(&self, b: f64) -> f64 {
        match self {
            Material::Linear { mu_r } => 0.5 * b * b / (MU0 * mu_r),
            Material::Saturable(law) => law.energy_density(b),
        }
    }

    /// Flux density |B| in T at field strength `h` ≥ 0 (A/m): the inverse of [`Self::h`].
    pub fn b_of_h(&self, h: f64) -> f64 {
        match self {
            Material::Linear { mu_r } => MU0 * mu_r * h,
            Material::Saturable(law) => law.b_of_h(h),
        }
    }

    /// Saturation flux density in T: the limit of B − μ0 H (the saturation polarisation),
    /// `None` for linear laws and for laws without a saturation asymptote.
    pub fn saturation_b(&self) -> Option<f64> {
        match self {
            Material::Linear { .. } => None,
            Material::Saturable(law) => law.saturation_b(),
        }
    }

    /// Relative permeability at the origin, 1/(μ0 ν(0)).
    pub fn initial_mu_r(&self) -> f64 {
        1.0 / (MU0 * self.nu(0.0))
    }

    /// Whether ν is independent of B (one linear solve suffices).
    pub fn is_linear(&self) -> bool {
        matches!(self, Material::Linear { .. })
    }

    /// Whether the material is anything but vacuum.
    pub fn is_magnetic(&self) -> bool {
        *self != Material::AIR
    }
}
