//! Demagnetizing factors of spheroids, ellipsoids, finite rods and tubes, and the approximations
//! users compare against (sources: references.md §1–§2).
//!
//! Input outside a formula's domain gives NaN, never a panic.

use std::f64::consts::PI;

use crate::special::{integrate, k_minus_e, loop_kernel};
use crate::{carlson_rd, elliptic_e};

mod tube;

pub use tube::{tube_nf_chi0, tube_nm_chi0};

/// Axis ratios this close to 1 go through Carlson's R_D: the spheroid closed forms cancel there.
const NEAR_SPHERE: f64 = 1e-2;

/// Demagnetizing factor along the axis c of an ellipsoid with semi-axes a, b, c: (abc/3)·R_D(a², b², c²) (Osborn, Phys. Rev. 67, 351, 1945, integral form; DLMF 19.16.5).
///
/// N_c = (abc/2)∫0^∞ ds/((c² + s)^{3/2}(a² + s)^{1/2}(b² + s)^{1/2}), which is the R_D integral;
/// the three factors sum to 1.
pub fn ellipsoid_demag_factor(a: f64, b: f64, c: f64) -> f64 {
    if [a, b, c].iter().any(|v| v.is_nan() || *v <= 0.0) || !(a * b * c).is_finite() {
        return f64::NAN;
    }
    a * b * c / 3.0 * carlson_rd(a * a, b * b, c * c)
}

/// Axial demagnetizing factor of a prolate spheroid, axis ratio m = c/a ≥ 1 (Osborn, Phys. Rev. 67, 351, 1945; Stoner, Phil. Mag. 36, 803, 1945; references §2).
///
/// N = [m/sqrt(m²−1)·ln(m + sqrt(m²−1)) − 1]/(m² − 1); 1/3 at m = 1. Within 1% of the sphere the
/// closed form loses digits to cancellation, so R_D (same integral) is used there.
pub fn prolate_demag_factor(m: f64) -> f64 {
    if m.is_nan() || m < 1.0 {
        return f64::NAN;
    }
    if m.is_infinite() {
        return 0.0;
    }
    if m - 1.0 < NEAR_SPHERE {
        return ellipsoid_demag_factor(1.0, 1.0, m);
    }
    let s = (m * m - 1.0).sqrt();
    (m / s * (m + s).ln() - 1.0) / (m * m - 1.0)
}

/// Axial demagnetizing factor of an oblate spheroid, axis ratio m = c/a in [0, 1] (Osborn 1945; Stoner 1945; references §2).
///
/// N = [1 − m·arccos(m)/sqrt(1 − m²)]/(1 − m²); 1 for a flat disc (m = 0), 1/3 at m = 1.
pub fn oblate_demag_factor(m: f64) -> f64 {
    if !(0.0..=1.0).contains(&m) {
        return f64::NAN;
    }
    if 1.0 - m < NEAR_SPHERE {
        return ellipsoid_demag_factor(1.0, 1.0, m);
    }
    let s2 = 1.0 - m * m;
    (1.0 - m * m.acos() / s2.sqrt()) / s2
}

/// Axial demagnetizing factor of a spheroid of any axis ratio m = c/a ≥ 0 (prolate above 1, oblate below; Osborn 1945).
pub fn spheroid_demag_factor(m: f64) -> f64 {
    if m >= 1.0 {
        prolate_demag_factor(m)
    } else {
        oblate_demag_factor(m)
    }
}

/// Magnetometric factor Nm of a uniformly magnetized rod (χ = 0), γ = L/D (Chen, Brug & Goldfarb, IEEE Trans. Magn. 27(4), 3601, 1991; Moskowitz & Della Torre 1966; references §1).
///
/// Nm = 1 + 4/(3πγ) − [4·sqrt(1+γ²)/(3πγ)]·[γ²K(k) + (1−γ²)E(k)], k² = 1/(1+γ²), evaluated as
/// γ²(K − E) + E so that long rods keep their digits; 1 for a flat disc (γ = 0).
pub fn rod_nm_chi0(gamma: f64) -> f64 {
    if gamma.is_nan() || gamma < 0.0 {
        return f64::NAN;
    }
    if gamma == 0.0 {
        return 1.0;
    }
    if gamma.is_infinite() {
        return 0.0;
    }
    let g2 = gamma * gamma;
    let m = 1.0 / (1.0 + g2);
    let bracket = g2 * k_minus_e(m) + elliptic_e(m);
    1.0 + 4.0 / (3.0 * PI * gamma) - 4.0 * (1.0 + g2).sqrt() / (3.0 * PI * gamma) * bracket
}

/// Fluxmetric (mid-plane) factor Nf of a uniformly magnetized rod (χ = 0), γ = L/D (Chen, Brug & Goldfarb 1991; references §1).
///
/// The published form is Nf = 2∫0^∞ J1(x)² e^{−γx}/x dx. Neumann's integral for two coaxial loops
/// of unit radius, M(t) = μ0π∫0^∞ J1(x)² e^{−xt} dx (Smythe §7.13 [section from memory]; it
/// reproduces Maxwell's closed form of DLMF §19.34), turns it into an integral of Maxwell's
/// formula over the loop spacing, free of oscillation and of Bessel functions:
/// Nf = (2/(πμ0))∫_γ^∞ M(1, 1, t) dt, the flux that the end charges send back through the
/// mid-plane disc. It is summed by adaptive Gauss–Legendre quadrature, with t = T/s on the tail.
/// The test module cross-checks it against the Bessel form itself. 1 for a flat disc (γ = 0).
pub fn rod_nf_chi0(gamma: f64) -> f64 {
    if gamma.is_nan() || gamma < 0.0 {
        return f64::NAN;
    }
    if gamma == 0.0 {
        return 1.0;
    }
    if gamma.is_infinite() {
        return 0.0;
    }
    // M(1,1,t)/μ0 = (2/k)·G(m) with m = 4/(4 + t²); ~ π/(2t³) far out
    let coupling = |t: f64| {
        let m = 4.0 / (4.0 + t * t);
        (4.0 + t * t).sqrt() * loop_kernel(m)
    };
    let tol = 1e-12;
    let split = gamma.max(1.0);
    let near = if gamma < split {
        integrate(coupling, gamma, split, tol)
    } else {
        0.0
    };
    let tail = integrate(
        |s: f64| {
            if s <= 0.0 {
                0.0
            } else {
                coupling(split / s) * split / (s * s)
            }
        },
        0.0,
        1.0,
        tol,
    );
    2.0 / PI * (near + tail)
}

/// Sato & Ishii's approximation to a cylinder's magnetometric factor, N = 1/(4γ/√π + 1) (Sato & Ishii, J. Appl. Phys. 66(2), 983, 1989; references §1).
pub fn sato_ishii_n(gamma: f64) -> f64 {
    if gamma.is_nan() || gamma < 0.0 {
        return f64::NAN;
    }
    1.0 / (4.0 * gamma / PI.sqrt() + 1.0)
}

/// Rod demagnetizing factor N_d = 4[ln(l/r) − 1]/[(l/r)² − 4ln(l/r)] with l/r = 2γ, from a small-satellite torquer design report (Miller, Univ. of Michigan, 2013; references §1).
///
/// The same formula is eq. 2 of Li et al., J. Control Sci. Eng. 2013 [citation from memory].
/// A slender-rod formula: NaN for l/r ≤ e (γ ≲ 1.36), where it would turn negative.
pub fn miller_rod_n(gamma: f64) -> f64 {
    let lr = 2.0 * gamma;
    if lr.is_nan() || lr <= std::f64::consts::E || lr.is_infinite() {
        return f64::NAN;
    }
    4.0 * (lr.ln() - 1.0) / (lr * lr - 4.0 * lr.ln())
}

/// The range of slenderness 2 < γ < 20 over which the ferrite-rod fit `ferrite_rod_fit_n` is stated (references §1).
pub const FERRITE_FIT_RANGE: (f64, f64) = (2.0, 20.0);

/// Pettengill/Burhans ferrite-rod fit N = 0.37·γ^(−1.44), which tracks the high-χ fluxmetric factor (references §1).
///
/// Evaluated for any γ > 0 so that a study can show where it drifts; the range it is stated
/// for is `FERRITE_FIT_RANGE`. NaN for γ ≤ 0.
pub fn ferrite_rod_fit_n(gamma: f64) -> f64 {
    if gamma.is_nan() || gamma <= 0.0 {
        return f64::NAN;
    }
    0.37 * gamma.powf(-1.44)
}

/// Demagnetizing factor of the spheroid with the rod's axis ratio γ = L/D: Osborn 1945, the ellipsoid of equal axis ratio users substitute for a rod (references §1–§2).
///
/// Prolate for γ > 1, oblate for γ < 1, 1/3 at γ = 1, 1 for γ = 0; NaN for γ < 0.
pub fn ellipsoid_equal_ratio_n(gamma: f64) -> f64 {
    spheroid_demag_factor(gamma)
}

/// Slender prolate-spheroid limit N ≈ (ln 2γ − 1)/γ² for γ ≫ 1 (Osborn 1945, asymptotic form; references §1).
pub fn prolate_demag_slender(gamma: f64) -> f64 {
    if gamma.is_nan() || gamma <= 0.0 {
        return f64::NAN;
    }
    ((2.0 * gamma).ln() - 1.0) / (gamma * gamma)
}

/// Apparent (effective) permeability of a body with demagnetizing factor N: μr/(1 + N(μr − 1)) (references §1).
/// It follows from H_in = H0 − N·M with M = (μr − 1)·H_in, the uniformly magnetised ellipsoid
/// (Osborn, Phys. Rev. 67, 351 (1945); Jackson, Classical Electrodynamics, 3rd ed., §5.10–5.11
/// [section numbers from memory] for the sphere, N = 1/3), as μapp = μ0⁻¹·B_in/H0.
pub fn apparent_permeability(mu_r: f64, n: f64) -> f64 {
    mu_r / (1.0 + n * (mu_r - 1.0))
}

/// Apparent susceptibility χ/(1 + χN) of a body with demagnetizing factor N, the same relation as `apparent_permeability` in χ = μr − 1 (references §1).
///
/// NaN for N outside [0, 1] or χ < −1 (below a perfect diamagnet); χ → ∞ gives 1/N.
pub fn apparent_susceptibility(chi: f64, n: f64) -> f64 {
    if chi.is_nan() || chi < -1.0 || !(0.0..=1.0).contains(&n) {
        return f64::NAN;
    }
    if chi.is_infinite() {
        return 1.0 / n;
    }
    chi / (1.0 + chi * n)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::special::bessel_j1;
    use crate::test_support::assert_digits;

    #[test]
    fn prolate_factor_matches_osborn_check_7() {
        // references.md §7 #7 (Osborn, Phys. Rev. 67, 351, 1945)
        assert_digits(prolate_demag_factor(2.0), "0.173564");
        assert_digits(prolate_demag_factor(10.0), "0.0202859");
        assert_digits(prolate_demag_factor(50.0), "0.0014430");
        // the rest of the §1 table's spheroid column
        // the table prints 0.108710; Osborn's formula gives 0.1087094651 (mpmath 1.3.0, 30
        // digits), so the table's last digit is off by one: assert the formula's value
        assert_digits(prolate_demag_factor(3.0), "0.108709");
        assert_digits(prolate_demag_factor(5.0), "0.055821");
        assert_digits(prolate_demag_factor(20.0), "0.0067491");
        assert_digits(prolate_demag_factor(100.0), "0.00042990");
        assert_eq!(prolate_demag_factor(1.0), 1.0 / 3.0);
        assert!(prolate_demag_factor(0.5).is_nan());
    }

    #[test]
    fn oblate_factor_matches_osborn_table_value() {
        // references.md §1 table, γ = 0.5 (oblate), Osborn 1945
        assert_digits(oblate_demag_factor(0.5), "0.527200");
        assert_eq!(oblate_demag_factor(0.0), 1.0);
        assert!((oblate_demag_factor(1.0) - 1.0 / 3.0).abs() < 1e-15);
        assert!(oblate_demag_factor(1.5).is_nan());
    }

    #[test]
    fn spheroid_closed_forms_agree_with_carlson_integral() {
        // Osborn's closed forms against the same integral as R_D (DLMF 19.16.5), on both sides of the switch
        for m in [0.05, 0.3, 0.98, 0.995, 1.005, 1.02, 1.5, 7.0, 300.0] {
            let closed = spheroid_demag_factor(m);
            let rd = ellipsoid_demag_factor(1.0, 1.0, m);
            assert!(
                (closed / rd - 1.0).abs() < 1e-12,
                "m = {m}: {closed} vs {rd}"
            );
        }
    }

    #[test]
    fn ellipsoid_factors_sum_to_one() {
        // Nx + Ny + Nz = 1 (Osborn 1945; references §1 preamble)
        for (a, b, c) in [(1.0, 2.0, 3.0), (0.1, 5.0, 0.7), (1.0, 1.0, 1.0)] {
            let sum = ellipsoid_demag_factor(b, c, a)
                + ellipsoid_demag_factor(c, a, b)
                + ellipsoid_demag_factor(a, b, c);
            assert!((sum - 1.0).abs() < 1e-13);
        }
        assert!((ellipsoid_demag_factor(2.0, 2.0, 2.0) - 1.0 / 3.0).abs() < 1e-15);
    }

    #[test]
    fn rod_factors_chi0_match_check_8() {
        // references.md §7 #8 (§1 closed forms; Chen, Brug & Goldfarb 1991)
        assert_digits(rod_nm_chi0(1.0), "0.311577");
        assert_digits(rod_nf_chi0(1.0), "0.232211");
        assert_digits(rod_nm_chi0(10.0), "0.041193");
        assert_digits(rod_nf_chi0(10.0), "0.0049265");
    }

    #[test]
    fn rod_factors_chi0_match_table_of_references_1() {
        // references.md §1 table, γ = 0.5 … 100 [computed from the closed forms, two routes]
        let table = [
            (0.5, "0.474490", "0.422088"),
            (2.0, "0.181864", "0.093506"),
            (3.0, "0.127769", "0.047989"),
            (5.0, "0.079907", "0.018891"),
            (20.0, "0.020908", "0.0012453"),
            (50.0, "0.0084383", "0.00019988"),
            (100.0, "0.0042316", "0.00004999"),
        ];
        for (g, nm, nf) in table {
            assert_digits(rod_nm_chi0(g), nm);
            assert_digits(rod_nf_chi0(g), nf);
        }
        // computed with mpmath 1.3.0 from the Bessel form, 30 digits
        assert!((rod_nf_chi0(100.0) / 4.999_250_156_211_729e-5 - 1.0).abs() < 1e-9);
        assert!((rod_nf_chi0(0.5) / 0.422_088_231_083_978_75 - 1.0).abs() < 1e-10);
    }

    #[test]
    fn rod_nm_chi0_is_one_minus_nagaoka() {
        // Moskowitz & Della Torre 1966: Nm(χ=0, γ) = 1 − k_N(D/L) (references §1)
        for g in [0.2, 1.0, 4.0, 30.0] {
            let via_nagaoka = 1.0 - crate::nagaoka_coefficient(1.0 / g);
            assert!((rod_nm_chi0(g) - via_nagaoka).abs() < 1e-14);
        }
    }

    #[test]
    fn rod_nm_chi0_matches_bessel_integral() {
        // references §1: Nm = (1/γ)∫0^∞ J1(x)²(1 − e^{−2γx})/x² dx; tail beyond X from J1² ≈ 2cos²/(πx)
        for g in [0.5, 2.0] {
            let x_max = 400.0;
            let f = |x: f64| {
                let j = bessel_j1(x);
                if x < 1e-8 {
                    0.5 * g // J1 ≈ x/2, 1 − e^{−2γx} ≈ 2γx: the integrand tends to γ/2
                } else {
                    j * j * (1.0 - (-2.0 * g * x).exp()) / (x * x)
                }
            };
            let body = integrate(f, 0.0, x_max, 1e-13);
            let tail = 1.0 / (2.0 * PI * x_max * x_max); // ∫_X^∞ dx/(πx³), cos² averaged
            let nm = (body + tail) / g;
            assert!((nm / rod_nm_chi0(g) - 1.0).abs() < 1e-6, "γ {g}: {nm}");
        }
    }

    #[test]
    fn rod_nf_chi0_matches_bessel_integral() {
        // references §1: Nf = 2∫0^∞ J1(x)² e^{−γx}/x dx, truncated where e^{−γx} < 1e-14
        for g in [0.5, 1.0, 3.0, 10.0] {
            let x_max = 33.0 / g;
            let f = |x: f64| {
                let j = bessel_j1(x);
                if x < 1e-8 {
                    0.0
                } else {
                    j * j * (-g * x).exp() / x
                }
            };
            let nf = 2.0 * integrate(f, 0.0, x_max, 1e-13);
            assert!((nf / rod_nf_chi0(g) - 1.0).abs() < 1e-9, "γ {g}: {nf}");
        }
    }

    #[test]
    fn rod_factors_approach_slender_limits() {
        // references §1: γ → ∞, Nm → 4/(3πγ), Nf → 1/(2γ²)
        let g = 1e4;
        assert!((rod_nm_chi0(g) * 3.0 * PI * g / 4.0 - 1.0).abs() < 1e-3);
        assert!((rod_nf_chi0(g) * 2.0 * g * g - 1.0).abs() < 1e-3);
        assert_eq!(rod_nm_chi0(0.0), 1.0);
        assert_eq!(rod_nf_chi0(0.0), 1.0);
        // a very flat disc: both factors near 1, from below
        let flat = rod_nf_chi0(1e-4);
        assert!(flat < 1.0 && flat > 0.999, "{flat}");
    }

    #[test]
    fn sato_ishii_matches_check_12() {
        // references.md §7 #12 (Sato & Ishii, J. Appl. Phys. 66(2), 983, 1989)
        assert_digits(sato_ishii_n(1.0), "0.307054");
    }

    #[test]
    fn slender_approximations_track_exact_factors() {
        // references §1: (ln 2γ − 1)/γ² approaches the prolate factor as γ grows
        let g = 1000.0;
        assert!((prolate_demag_slender(g) / prolate_demag_factor(g) - 1.0).abs() < 1e-5);
        // the report's formula is (ln 2γ − 1)/(γ² − ln 2γ): the slender prolate spheroid again,
        // within 1.5% of Osborn's factor at γ = 10 [computed] and converging as γ grows
        let off = miller_rod_n(10.0) / prolate_demag_factor(10.0) - 1.0;
        assert!(off > 0.0 && off < 0.015, "{off}");
        assert!((miller_rod_n(g) / prolate_demag_factor(g) - 1.0).abs() < 1e-4);
        assert!(miller_rod_n(0.5).is_nan());
    }

    #[test]
    fn ferrite_fit_is_its_power_law_over_any_positive_gamma() {
        // references §1: N = 0.37·γ^(−1.44), stated for 2 < γ < 20 (Pettengill/Burhans)
        assert_eq!(ferrite_rod_fit_n(1.0), 0.37);
        let decade = (ferrite_rod_fit_n(20.0) / ferrite_rod_fit_n(2.0)).log10();
        assert!((decade + 1.44).abs() < 1e-12, "{decade}");
        assert_eq!(FERRITE_FIT_RANGE, (2.0, 20.0));
        // evaluated outside the stated range too, for a study to show the drift
        assert!(ferrite_rod_fit_n(100.0) > 0.0 && ferrite_rod_fit_n(0.5) > 0.37);
        for bad in [0.0, -1.0, f64::NAN] {
            assert!(ferrite_rod_fit_n(bad).is_nan());
        }
    }

    #[test]
    fn ellipsoid_of_equal_ratio_is_osborns_spheroid() {
        // references.md §7 #7 and the §1 table's oblate entry (Osborn 1945)
        assert_digits(ellipsoid_equal_ratio_n(2.0), "0.173564");
        assert_digits(ellipsoid_equal_ratio_n(10.0), "0.0202859");
        assert_digits(ellipsoid_equal_ratio_n(0.5), "0.527200");
        assert_eq!(ellipsoid_equal_ratio_n(1.0), 1.0 / 3.0);
        assert_eq!(ellipsoid_equal_ratio_n(0.0), 1.0);
        assert_eq!(ellipsoid_equal_ratio_n(f64::INFINITY), 0.0);
        assert!(
            ellipsoid_equal_ratio_n(-1.0).is_nan() && ellipsoid_equal_ratio_n(f64::NAN).is_nan()
        );
    }

    #[test]
    fn apparent_susceptibility_matches_permeability_relation() {
        // H_in = H0 − N·M (references §2) gives χapp = M/H0 = χ/(1 + χN) and
        // μapp = B_in/(μ0H0) = 1 + (1 − N)·χapp, the apparent permeability of references §1
        for (chi, n) in [
            (999.0, 0.0202859),
            (0.5, 1.0 / 3.0),
            (1e4, 0.0),
            (-0.5, 0.9),
        ] {
            let via_chi = 1.0 + (1.0 - n) * apparent_susceptibility(chi, n);
            assert!((via_chi / apparent_permeability(1.0 + chi, n) - 1.0).abs() < 1e-13);
        }
        assert_eq!(apparent_susceptibility(f64::INFINITY, 0.25), 4.0);
        for (chi, n) in [
            (1.0, -0.1),
            (1.0, 1.5),
            (-2.0, 0.3),
            (f64::NAN, 0.3),
            (1.0, f64::NAN),
        ] {
            assert!(apparent_susceptibility(chi, n).is_nan(), "{chi} {n}");
        }
    }

    #[test]
    fn apparent_permeability_limits() {
        // references §1: μapp = μr/(1 + N(μr − 1)); N = 0 gives μr, large μr gives 1/N
        assert_eq!(apparent_permeability(500.0, 0.0), 500.0);
        assert!((apparent_permeability(1e12, 0.01) - 100.0).abs() < 1e-6);
    }
}
