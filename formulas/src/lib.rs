//! Closed-form results with their published sources, shared by the validation tests (`tests/`)
//! and the `axicore` program (its ellipsoid estimate and the demagnetization study).
//!
//! Pure functions in SI units (m, A, T, A/m, H, Wb/m), each citing the published formula it
//! evaluates; the check values of `../shared/references.md` (outside the repository) §1 and §7
//! are asserted in the unit tests beside each function. Input outside a formula's domain returns
//! NaN rather than panicking, so a comparison against it fails instead of aborting a test run or
//! a study.
//!
//! Modules: `special` (elliptic integrals via the `ellip` crate, J1, quadrature), `coils` (loops,
//! solenoids, inductance), `demag` (demagnetizing factors of spheroids, rods and tubes, and the
//! approximations users compare against), `magnetization` (bodies in a uniform field, B–H laws).
//! Everything is re-exported at the crate root.

#![deny(missing_docs)]
#![forbid(unsafe_code)]

pub mod coils;
pub mod demag;
pub mod magnetization;
pub mod special;

pub use coils::{
    current_sheet_inductance, long_solenoid_h, loop_axial_field, loop_axial_field_centre,
    loop_field, loop_vector_potential, mutual_inductance_coaxial_loops, nagaoka_coefficient,
    rectangle_gmd, thick_solenoid_axial_field, thick_solenoid_dipole,
    thick_winding_inductance_filaments, wheeler_coefficient,
};
pub use demag::{
    apparent_permeability, apparent_susceptibility, ellipsoid_demag_factor,
    ellipsoid_equal_ratio_n, ferrite_rod_fit_n, miller_rod_n, oblate_demag_factor,
    prolate_demag_factor, prolate_demag_slender, rod_nf_chi0, rod_nm_chi0, sato_ishii_n,
    spheroid_demag_factor, tube_nf_chi0, tube_nm_chi0, FERRITE_FIT_RANGE,
};
pub use magnetization::{
    arctan_law_b, arctan_law_j, ellipsoid_dipole, nonlinear_ellipsoid_h_in, sphere_dipole,
    sphere_interior_b, sphere_interior_h,
};
pub use special::{bessel_j1, carlson_rd, elliptic_e, elliptic_k};

/// Vacuum permeability μ0 = 4π × 10⁻⁷ H/m, the exact pre-2019 SI value.
///
/// Chosen because the check values of references.md §7 were computed with it. Since the 2019 SI
/// redefinition μ0 is measured; CODATA 2018 gives 1.25663706212(19) × 10⁻⁶ N/A² [from memory],
/// about 5.5 × 10⁻¹⁰ relative above this constant, far below any tolerance used here.
pub const MU0: f64 = 4.0e-7 * std::f64::consts::PI;

#[cfg(test)]
mod test_support {
    /// Asserts `actual` equals `expected` to the digits written, i.e. within half a unit of its last digit.
    pub fn assert_digits(actual: f64, expected: &str) {
        let (mantissa, exponent) = match expected.split_once(['e', 'E']) {
            Some((m, e)) => (m, e.parse::<i32>().expect("exponent")),
            None => (expected, 0),
        };
        let decimals = mantissa.split_once('.').map_or(0, |(_, f)| f.len()) as i32;
        let want: f64 = expected.parse().expect("number");
        // a hair over half a unit, so that a value exactly on the rounding boundary passes
        let half_unit = 0.5 * 10f64.powi(exponent - decimals) * (1.0 + 1e-9);
        assert!(
            (actual - want).abs() <= half_unit,
            "got {actual:.10e}, expected {expected} (±{half_unit:.1e})"
        );
    }

    #[test]
    fn assert_digits_reads_plain_and_exponent_forms() {
        assert_digits(0.0049265252, "0.0049265");
        assert_digits(6.2831853e-6, "6.283185e-6");
        assert!(std::panic::catch_unwind(|| assert_digits(0.00492666, "0.0049265")).is_err());
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn mu0_is_4pi_e_minus_7() {
        // SI before 2019: μ0 = 4π × 10⁻⁷ H/m exactly (references §7 #1 uses it)
        assert!((MU0 - 1.256_637_061_435_917_3e-6).abs() < 1e-21);
    }
}
