//! Special functions and quadrature shared by the closed forms.
//!
//! Elliptic integrals come from the `ellip` crate (a port of Boost.Math); the kernels below
//! re-expand the differences that the field formulas need, because near the axis or far from
//! a loop those differences cancel to a few digits if formed from K and E directly.

use std::f64::consts::PI;

/// Below this parameter the kernels switch to their power series (cancellation would cost > 3 digits).
const SERIES_BELOW: f64 = 0.1;

/// Complete elliptic integral of the first kind K(m), parameter m = k² (DLMF 19.2.8); NaN for m > 1.
pub fn elliptic_k(m: f64) -> f64 {
    ellip::ellipk(m).unwrap_or(f64::NAN)
}

/// Complete elliptic integral of the second kind E(m), parameter m = k² (DLMF 19.2.8); NaN for m > 1.
pub fn elliptic_e(m: f64) -> f64 {
    ellip::ellipe(m).unwrap_or(f64::NAN)
}

/// Carlson's symmetric integral R_D(x, y, z) (DLMF 19.16.5); NaN outside its domain.
pub fn carlson_rd(x: f64, y: f64, z: f64) -> f64 {
    ellip::elliprd(x, y, z).unwrap_or(f64::NAN)
}

/// Sums (π/2)·Σ_{n≥1} coef(n, c_n, c_{n−1}) mⁿ, with c_n = [(2n−1)!!/(2n)!!]² the Maclaurin
/// coefficients of (2/π)K(m) (DLMF 19.5.1); E has c_n/(1−2n) (DLMF 19.5.2).
fn elliptic_series(m: f64, coef: impl Fn(f64, f64, f64) -> f64) -> f64 {
    let mut c_prev = 1.0;
    let mut power = 1.0;
    let mut sum = 0.0;
    for n in 1..200 {
        let nf = n as f64;
        let c = c_prev * ((2.0 * nf - 1.0) / (2.0 * nf)).powi(2);
        power *= m;
        let term = coef(nf, c, c_prev) * power;
        sum += term;
        if n > 2 && term.abs() <= 1e-17 * sum.abs() {
            break;
        }
        c_prev = c;
    }
    0.5 * PI * sum
}

/// K(m) − E(m) without cancellation at small m.
pub(crate) fn k_minus_e(m: f64) -> f64 {
    if (0.0..SERIES_BELOW).contains(&m) {
        // coefficient of mⁿ: c_n − c_n/(1−2n) = c_n·2n/(2n−1)
        elliptic_series(m, |n, c, _| c * 2.0 * n / (2.0 * n - 1.0))
    } else {
        elliptic_k(m) - elliptic_e(m)
    }
}

/// G(m) = (1 − m/2)K(m) − E(m), the loop kernel of Jackson §5.5 and Maxwell's mutual inductance.
pub(crate) fn loop_kernel(m: f64) -> f64 {
    if (0.0..SERIES_BELOW).contains(&m) {
        // coefficient of mⁿ: c_n − c_{n−1}/2 − c_n/(1−2n); starts at m²/16 (so G ≈ πm²/32)
        elliptic_series(m, |n, c, cp| c * 2.0 * n / (2.0 * n - 1.0) - 0.5 * cp)
    } else {
        (1.0 - 0.5 * m) * elliptic_k(m) - elliptic_e(m)
    }
}

/// H(m) = (1 − m/2)E(m) − (1 − m)K(m), the radial-field kernel of a loop (starts at 3πm²/32).
pub(crate) fn radial_kernel(m: f64) -> f64 {
    if (0.0..SERIES_BELOW).contains(&m) {
        // coefficient of mⁿ: e_n − e_{n−1}/2 − c_n + c_{n−1}, with e_n = c_n/(1−2n)
        elliptic_series(m, |n, c, cp| {
            let e = c / (1.0 - 2.0 * n);
            let ep = cp / (3.0 - 2.0 * n);
            e - 0.5 * ep - c + cp
        })
    } else {
        (1.0 - 0.5 * m) * elliptic_e(m) - (1.0 - m) * elliptic_k(m)
    }
}

/// Bessel function J1(x) from Bessel's integral (DLMF 10.9.2) by the periodic trapezoidal rule,
/// with Hankel's expansion (DLMF 10.17.3) for |x| > 1000.
///
/// The trapezoidal rule on a full period converges geometrically for analytic periodic integrands
/// (Trefethen & Weideman, SIAM Review 56(3), 385–458, 2014); its aliasing error is J_{N−1}(x),
/// negligible once the point count N clears x by many widths of the turning region (~x^{1/3}).
pub fn bessel_j1(x: f64) -> f64 {
    if x.is_nan() {
        return f64::NAN;
    }
    if x.is_infinite() {
        return 0.0;
    }
    let ax = x.abs();
    let value = if ax > 1000.0 {
        let t = 1.0 / (8.0 * ax);
        // μ = 4ν² = 4 for ν = 1
        let p = 1.0 - (3.0 * -5.0) / 2.0 * t * t + (3.0 * -5.0 * -21.0 * -45.0) / 24.0 * t.powi(4);
        let q = 3.0 * t - (3.0 * -5.0 * -21.0) / 6.0 * t.powi(3);
        let w = ax - 0.75 * PI;
        (2.0 / (PI * ax)).sqrt() * (p * w.cos() - q * w.sin())
    } else {
        let n = (ax + 25.0 * ax.cbrt() + 40.0).ceil() as usize;
        let h = 2.0 * PI / n as f64;
        let sum: f64 = (0..n)
            .map(|j| {
                let th = h * j as f64;
                (th - ax * th.sin()).cos()
            })
            .sum();
        sum / n as f64
    };
    // J1 is odd
    if x < 0.0 {
        -value
    } else {
        value
    }
}

/// Nodes and weights of the n-point Gauss–Legendre rule on [−1, 1], by Newton on P_n.
fn gauss_legendre(n: usize) -> Vec<(f64, f64)> {
    (1..=n)
        .map(|i| {
            let mut x = (PI * (i as f64 - 0.25) / (n as f64 + 0.5)).cos();
            let mut dp = 1.0;
            for _ in 0..100 {
                let (mut p0, mut p1) = (1.0, x);
                for k in 2..=n {
                    let kf = k as f64;
                    let p2 = ((2.0 * kf - 1.0) * x * p1 - (kf - 1.0) * p0) / kf;
                    p0 = p1;
                    p1 = p2;
                }
                dp = n as f64 * (x * p1 - p0) / (x * x - 1.0);
                let dx = p1 / dp;
                x -= dx;
                if dx.abs() < 1e-16 {
                    break;
                }
            }
            (x, 2.0 / ((1.0 - x * x) * dp * dp))
        })
        .collect()
}

/// Adaptive Gauss–Legendre quadrature of f over [a, b] to a relative tolerance (NaN if f is not finite).
///
/// Each panel is accepted when the 10-point rule on it agrees with the sum over its two halves;
/// the absolute floor is set from a first pass so that panels of an oscillating integrand whose
/// integral is near zero do not force endless splitting.
pub(crate) fn integrate(f: impl Fn(f64) -> f64, a: f64, b: f64, rel_tol: f64) -> f64 {
    let rule = gauss_legendre(10);
    let panel = |lo: f64, hi: f64| -> f64 {
        let (c, r) = (0.5 * (lo + hi), 0.5 * (hi - lo));
        r * rule.iter().map(|&(x, w)| w * f(c + r * x)).sum::<f64>()
    };
    let first = 16;
    let width = (b - a) / first as f64;
    let mut stack: Vec<(f64, f64, f64)> = (0..first)
        .map(|i| {
            let lo = a + width * i as f64;
            let hi = if i + 1 == first { b } else { lo + width };
            (lo, hi, panel(lo, hi))
        })
        .collect();
    let scale: f64 = stack.iter().map(|p| p.2.abs()).sum();
    if !scale.is_finite() {
        return f64::NAN;
    }
    let floor = rel_tol * scale.max(f64::MIN_POSITIVE) / (b - a).abs();
    let mut total = 0.0;
    let mut evaluations = 0usize;
    while let Some((lo, hi, whole)) = stack.pop() {
        let mid = 0.5 * (lo + hi);
        let (left, right) = (panel(lo, mid), panel(mid, hi));
        evaluations += 2;
        let halves = left + right;
        let converged = (halves - whole).abs() <= rel_tol * halves.abs() + floor * (hi - lo).abs();
        // a panel too narrow to split further, or a runaway budget, is taken as it stands
        if converged || mid == lo || mid == hi || evaluations > 200_000 {
            total += halves;
        } else {
            stack.push((lo, mid, left));
            stack.push((mid, hi, right));
        }
    }
    total
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn elliptic_integrals_match_boost_doc_values_at_half() {
        // ellip 1.2.3 doc examples (Boost.Math port): K(0.5), E(0.5)
        assert!((elliptic_k(0.5) - 1.854_074_677_301_372).abs() < 1e-15);
        assert!((elliptic_e(0.5) - 1.350_643_881_047_675_5).abs() < 1e-15);
        assert!(elliptic_k(1.5).is_nan());
        assert!(elliptic_k(1.0).is_infinite());
    }

    #[test]
    fn legendre_relation_holds_dlmf_19_7_1() {
        // DLMF 19.7.1 (Legendre): E K' + E' K − K K' = π/2
        for m in [0.1, 0.3, 0.5, 0.77] {
            let (k, e, kp, ep) = (
                elliptic_k(m),
                elliptic_e(m),
                elliptic_k(1.0 - m),
                elliptic_e(1.0 - m),
            );
            assert!((e * kp + ep * k - k * kp - 0.5 * PI).abs() < 1e-14);
        }
    }

    #[test]
    fn kernel_series_join_direct_forms_at_switch() {
        // both sides of the switch must agree: the series is DLMF 19.5.1/19.5.2 term by term
        let m = SERIES_BELOW;
        let above = m * (1.0 + 1e-12);
        let below = m * (1.0 - 1e-12);
        for (f, name) in [
            (k_minus_e as fn(f64) -> f64, "K-E"),
            (loop_kernel, "G"),
            (radial_kernel, "H"),
        ] {
            let (a, b) = (f(above), f(below));
            assert!((a - b).abs() <= 1e-11 * a.abs(), "{name}: {a} vs {b}");
        }
        // leading terms: G ≈ πm²/32, H ≈ 3πm²/32
        let m = 1e-6;
        assert!((loop_kernel(m) / (PI * m * m / 32.0) - 1.0).abs() < 1e-5);
        assert!((radial_kernel(m) / (3.0 * PI * m * m / 32.0) - 1.0).abs() < 1e-5);
    }

    #[test]
    fn bessel_j1_matches_mpmath_values() {
        // computed with mpmath 1.3.0 besselj(1, x) at 30 digits
        let cases = [
            (1.0, 0.440_050_585_744_933_5),
            (10.0, 0.043_472_746_168_861_44),
            (50.5, -0.058_062_876_421_320_69),
        ];
        for (x, want) in cases {
            assert!((bessel_j1(x) - want).abs() < 1e-14, "J1({x})");
            assert!((bessel_j1(-x) + want).abs() < 1e-14, "J1(-{x})");
        }
        assert!(bessel_j1(0.0).abs() < 1e-16);
        // the two branches meet: Hankel's expansion at the switch against the trapezoidal sum
        let (x, y) = (1000.0, 1000.0 * (1.0 + 1e-15));
        assert!((bessel_j1(x) - bessel_j1(y)).abs() < 1e-13);
    }

    #[test]
    fn gauss_legendre_10_is_exact_to_degree_19() {
        // an n-point Gauss rule integrates polynomials of degree 2n−1 exactly (DLMF 3.5.15)
        let rule = gauss_legendre(10);
        let integral: f64 = rule.iter().map(|&(x, w)| w * x.powi(18)).sum();
        assert!((integral - 2.0 / 19.0).abs() < 1e-15);
        let weights: f64 = rule.iter().map(|&(_, w)| w).sum();
        assert!((weights - 2.0).abs() < 1e-15);
    }

    #[test]
    fn adaptive_quadrature_resolves_log_endpoint_and_oscillation() {
        // ∫0^1 ln x dx = −1; ∫0^{20π} sin²x dx = 10π (exact)
        let a = integrate(|x: f64| x.ln(), 0.0, 1.0, 1e-12);
        assert!((a + 1.0).abs() < 1e-10);
        let b = integrate(|x: f64| x.sin().powi(2), 0.0, 20.0 * PI, 1e-12);
        assert!((b - 10.0 * PI).abs() < 1e-10);
    }
}
