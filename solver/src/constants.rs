//! Physical constants, in SI units.

/// Permeability of vacuum μ0 in H/m (the exact pre-2019 SI value 4π·10⁻⁷; the CODATA 2018
/// value differs by 5.5·10⁻¹⁰ relative, far below any discretisation error here).
pub const MU0: f64 = 4.0e-7 * std::f64::consts::PI;
