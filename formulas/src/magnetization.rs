//! Linear and nonlinear bodies in a uniform field, and B–H laws used as exact benchmarks
//! (sources: references.md §2 and §6).

use std::f64::consts::PI;

use crate::MU0;

/// H (A/m) inside a linear sphere in a uniform field H0: 3H0/(μr + 2) (Jackson, *Classical Electrodynamics*, 3rd ed., §5.11 [section from memory]; references §2).
pub fn sphere_interior_h(mu_r: f64, h0: f64) -> f64 {
    3.0 * h0 / (mu_r + 2.0)
}

/// B (T) inside a linear sphere in a uniform applied field B0 = μ0H0: 3μr·B0/(μr + 2) (Jackson §5.11 [section from memory]; references §2).
pub fn sphere_interior_b(mu_r: f64, b0: f64) -> f64 {
    3.0 * mu_r * b0 / (mu_r + 2.0)
}

/// Dipole moment (A·m²) of a linear sphere of radius a in a uniform field H0: 4πa³H0(μr − 1)/(μr + 2) (Jackson §5.11 [section from memory]; references §2).
pub fn sphere_dipole(a: f64, mu_r: f64, h0: f64) -> f64 {
    4.0 * PI * a.powi(3) * h0 * (mu_r - 1.0) / (mu_r + 2.0)
}

/// Dipole moment (A·m²) of a linear ellipsoid (volume V, susceptibility χ, factor N along H0): VχH0/(1 + χN) (Osborn 1945; references §1–§2).
///
/// Also the magnetometric definition for a rod: with Nm in place of N it fixes the total moment.
pub fn ellipsoid_dipole(volume: f64, chi: f64, n: f64, h0: f64) -> f64 {
    volume * chi * h0 / (1.0 + chi * n)
}

/// Interior field H_in (A/m) of an ellipsoid with any monotone law M(H), solving H + N·M(H) = H0 (references §2, nonlinear ellipsoid).
///
/// The field inside an ellipsoid of an isotropic single-valued material is uniform, so this scalar
/// equation is exact. The left side rises strictly with H when M does not fall, so the root is
/// bracketed by stepping out from H0 and then bisected to the last bit. Returns NaN when N is
/// outside [0, 1], when M gives a non-finite value, or when no bracket is found.
pub fn nonlinear_ellipsoid_h_in(h0: f64, n: f64, m_of_h: impl Fn(f64) -> f64) -> f64 {
    if !h0.is_finite() || !(0.0..=1.0).contains(&n) {
        return f64::NAN;
    }
    let residual = |h: f64| h + n * m_of_h(h) - h0;
    let r0 = residual(h0);
    if !r0.is_finite() {
        return f64::NAN;
    }
    if r0 == 0.0 {
        return h0;
    }
    // step away from H0 towards the root, doubling, until the residual changes sign
    let direction = if r0 > 0.0 { -1.0 } else { 1.0 };
    let mut step = if h0 == 0.0 { 1.0 } else { h0.abs() };
    let mut far = h0;
    let mut found = false;
    for _ in 0..200 {
        far = h0 + direction * step;
        let r = residual(far);
        if !r.is_finite() {
            return f64::NAN;
        }
        if r == 0.0 {
            return far;
        }
        if (r > 0.0) != (r0 > 0.0) {
            found = true;
            break;
        }
        step *= 2.0;
    }
    if !found {
        return f64::NAN;
    }
    let (mut lo, mut hi) = if direction > 0.0 {
        (h0, far)
    } else {
        (far, h0)
    };
    let r_lo_positive = residual(lo) > 0.0;
    for _ in 0..2200 {
        let mid = 0.5 * (lo + hi);
        if mid <= lo || mid >= hi {
            break;
        }
        let r = residual(mid);
        if !r.is_finite() {
            return f64::NAN;
        }
        if r == 0.0 {
            return mid;
        }
        if (r > 0.0) == r_lo_positive {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

/// Polarization J = μ0M (T) of the arctangent law: (2Js/π)·atan(π·μ0(μri − 1)·H/(2Js)) (references §6, analytic laws).
///
/// Smooth, odd and monotone, with initial relative permeability μri and saturation polarization Js.
pub fn arctan_law_j(h: f64, js: f64, mu_ri: f64) -> f64 {
    2.0 * js / PI * (PI * MU0 * (mu_ri - 1.0) * h / (2.0 * js)).atan()
}

/// B (T) of the arctangent law: μ0H + J(H) (references §6).
pub fn arctan_law_b(h: f64, js: f64, mu_ri: f64) -> f64 {
    MU0 * h + arctan_law_j(h, js, mu_ri)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::test_support::assert_digits;
    use crate::{long_solenoid_h, prolate_demag_factor};

    #[test]
    fn sphere_in_uniform_field_matches_check_6() {
        // references.md §7 #6 (Jackson §5.11): μr = 1000
        let b0 = 1.0;
        assert_digits(sphere_interior_b(1000.0, b0) / b0, "2.994012");
        let (a, h0) = (0.02_f64, 1.0);
        let volume = 4.0 / 3.0 * PI * a.powi(3);
        assert_digits(sphere_dipole(a, 1000.0, h0) / (volume * h0), "2.991018");
        // the general ellipsoid with N = 1/3 is the same sphere
        let e = ellipsoid_dipole(volume, 999.0, 1.0 / 3.0, h0);
        assert!((e / sphere_dipole(a, 1000.0, h0) - 1.0).abs() < 1e-14);
        assert!((sphere_interior_h(1000.0, 3.0) - 9.0 / 1002.0).abs() < 1e-15);
    }

    #[test]
    fn nonlinear_sphere_arctan_law_matches_check_9() {
        // references.md §7 #9: sphere (N = 1/3), Js = 1.5 T, μri = 1000
        let law = |h: f64| arctan_law_j(h, 1.5, 1000.0) / MU0;
        for (b0, want) in [(0.1, "0.299071"), (0.5, "1.447696"), (1.0, "1.498177")] {
            let h = nonlinear_ellipsoid_h_in(b0 / MU0, 1.0 / 3.0, law);
            assert_digits(arctan_law_j(h, 1.5, 1000.0), want);
        }
    }

    #[test]
    fn nonlinear_prolate_arctan_law_matches_check_10() {
        // references.md §7 #10: prolate spheroid m = 10 (Osborn 1945 N), same law
        let n = prolate_demag_factor(10.0);
        let law = |h: f64| arctan_law_j(h, 1.5, 1000.0) / MU0;
        for (b0, want) in [(0.01, "0.467826"), (0.1, "1.486930")] {
            let h = nonlinear_ellipsoid_h_in(b0 / MU0, n, law);
            assert_digits(arctan_law_j(h, 1.5, 1000.0), want);
        }
    }

    #[test]
    fn nonlinear_root_reduces_to_linear_ellipsoid() {
        // M = χH: H_in = H0/(1 + Nχ) (references §2)
        let (chi, n, h0) = (250.0, 0.07, -3.5e3);
        let h = nonlinear_ellipsoid_h_in(h0, n, |h| chi * h);
        assert!((h / (h0 / (1.0 + n * chi)) - 1.0).abs() < 1e-14);
        assert_eq!(nonlinear_ellipsoid_h_in(0.0, n, |h| chi * h), 0.0);
    }

    #[test]
    fn long_solenoid_core_sees_ampere_field_check_11() {
        // references.md §7 #11 (Ampère's law): N = 0, so H = nI and B = B(H) of the law
        let h0 = long_solenoid_h(1e4, 1.0);
        let h = nonlinear_ellipsoid_h_in(h0, 0.0, |h| arctan_law_j(h, 1.5, 1000.0) / MU0);
        assert_eq!(h, 1e4);
        let b = arctan_law_b(h, 1.5, 1000.0);
        assert_eq!(b, MU0 * 1e4 + arctan_law_j(1e4, 1.5, 1000.0));
    }

    #[test]
    fn arctan_law_limits() {
        // references §6: initial slope μ0(μri − 1), saturation Js
        let h = 1e-3;
        assert!((arctan_law_j(h, 1.5, 1000.0) / (MU0 * 999.0 * h) - 1.0).abs() < 1e-12);
        assert!((arctan_law_j(1e12, 1.5, 1000.0) - 1.5).abs() < 1e-6);
        assert_eq!(
            arctan_law_j(-2.0, 1.5, 1000.0),
            -arctan_law_j(2.0, 1.5, 1000.0)
        );
    }

    #[test]
    fn nonlinear_root_rejects_bad_input() {
        assert!(nonlinear_ellipsoid_h_in(1.0, 1.5, |h| h).is_nan());
        assert!(nonlinear_ellipsoid_h_in(f64::NAN, 0.3, |h| h).is_nan());
        assert!(nonlinear_ellipsoid_h_in(1.0, 0.3, |_| f64::INFINITY).is_nan());
    }
}
