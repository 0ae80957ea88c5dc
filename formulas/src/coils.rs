//! Loops, solenoids and inductance in closed form (sources: ../shared/references.md (outside the repository) §3–§4).
//!
//! Every function returns NaN for input outside its physical domain (negative radius, zero
//! length, …) instead of panicking, so a test comparing against it fails loudly.

use std::f64::consts::PI;

use crate::special::{k_minus_e, loop_kernel, radial_kernel};
use crate::{elliptic_e, MU0};

fn finite(values: &[f64]) -> bool {
    values.iter().all(|v| v.is_finite())
}

/// A_φ (Wb/m) of a circular loop (radius a, current I) at (ρ, z), loop in z = 0 (Jackson, *Classical Electrodynamics*, 3rd ed., §5.5, eq. 5.37).
///
/// A_φ = (μ0I/(πk))·sqrt(a/ρ)·[(1 − k²/2)K(k) − E(k)], k² = 4aρ/((a+ρ)² + z²); zero on the axis,
/// infinite on the wire. The flux through the coaxial circle (ρ, z) is 2πρA_φ.
pub fn loop_vector_potential(a: f64, current: f64, rho: f64, z: f64) -> f64 {
    if !finite(&[a, current, rho, z]) || a <= 0.0 || rho < 0.0 {
        return f64::NAN;
    }
    if rho == 0.0 {
        return 0.0;
    }
    let m = 4.0 * a * rho / ((a + rho).powi(2) + z * z);
    MU0 * current / (PI * m.sqrt()) * (a / rho).sqrt() * loop_kernel(m)
}

/// (B_ρ, B_z) (T) of a circular loop (radius a, current I) at (ρ, z), loop in z = 0 (Smythe, *Static and Dynamic Electricity*, 3rd ed., 1968, §7.10 [section from memory]; B = curl A of Jackson §5.5).
///
/// B_z = (μ0I/2π)/β·[K + (a² − ρ² − z²)/α²·E], B_ρ = (μ0I/2π)·z/(ρβ)·[−K + (a² + ρ² + z²)/α²·E],
/// α² = (a−ρ)² + z², β² = (a+ρ)² + z², m = 1 − α²/β². The B_ρ bracket is evaluated as
/// [(1 − m/2)E − (1 − m)K]/(1 − m), which keeps its digits near the axis.
pub fn loop_field(a: f64, current: f64, rho: f64, z: f64) -> (f64, f64) {
    if !finite(&[a, current, rho, z]) || a <= 0.0 || rho < 0.0 {
        return (f64::NAN, f64::NAN);
    }
    if rho == 0.0 {
        return (0.0, loop_axial_field(a, current, z));
    }
    let alpha2 = (a - rho).powi(2) + z * z;
    let beta2 = (a + rho).powi(2) + z * z;
    let beta = beta2.sqrt();
    let m = 4.0 * a * rho / beta2;
    let c = MU0 * current / (2.0 * PI);
    let k = crate::elliptic_k(m);
    let e = elliptic_e(m);
    let bz = c / beta * (k + (a * a - rho * rho - z * z) / alpha2 * e);
    let br = c * z / (rho * beta) * radial_kernel(m) / (1.0 - m);
    (br, bz)
}

/// On-axis B_z (T) of a circular loop: μ0Ia²/(2(a² + z²)^{3/2}) (Biot–Savart; Jackson §5.5).
pub fn loop_axial_field(a: f64, current: f64, z: f64) -> f64 {
    if !finite(&[a, current, z]) || a <= 0.0 {
        return f64::NAN;
    }
    MU0 * current * a * a / (2.0 * (a * a + z * z).powf(1.5))
}

/// B_z (T) at the centre of a circular loop: μ0I/(2a) (Biot–Savart, exact; references §7 #1).
pub fn loop_axial_field_centre(a: f64, current: f64) -> f64 {
    if !finite(&[a, current]) || a <= 0.0 {
        return f64::NAN;
    }
    MU0 * current / (2.0 * a)
}

/// Mutual inductance (H) of coaxial loops of radii a, b at axial separation d (Maxwell; NIST DLMF §19.34; references §4).
///
/// M = μ0·sqrt(ab)·[(2/k − k)K(k) − (2/k)E(k)] = μ0·sqrt(ab)·(2/k)·[(1 − k²/2)K − E],
/// k² = 4ab/((a+b)² + d²); infinite for coincident loops.
pub fn mutual_inductance_coaxial_loops(a: f64, b: f64, d: f64) -> f64 {
    if !finite(&[a, b, d]) || a <= 0.0 || b <= 0.0 {
        return f64::NAN;
    }
    let m = 4.0 * a * b / ((a + b).powi(2) + d * d);
    MU0 * (a * b).sqrt() * 2.0 / m.sqrt() * loop_kernel(m)
}

/// On-axis B_z (T) of a thick solenoid with uniform current density (Montgomery, *Solenoid Magnet Design*, Wiley 1969, ch. 1; references §3).
///
/// Inner radius a1, outer a2, length 2b centred on z = 0, `turns` turns carrying `current`, so
/// J = NI/(2b(a2 − a1)). Uses ln((a2 + sqrt(a2² + s²))/(a1 + sqrt(a1² + s²))) = asinh(a2/|s|) −
/// asinh(a1/|s|), which stays finite for a1 = 0 and at the end planes.
pub fn thick_solenoid_axial_field(
    a1: f64,
    a2: f64,
    half_length: f64,
    turns: f64,
    current: f64,
    z: f64,
) -> f64 {
    if !finite(&[a1, a2, half_length, turns, current, z])
        || a1 < 0.0
        || a2 <= a1
        || half_length <= 0.0
    {
        return f64::NAN;
    }
    let j = turns * current / (2.0 * half_length * (a2 - a1));
    let term = |s: f64| {
        if s == 0.0 {
            0.0
        } else {
            s * ((a2 / s.abs()).asinh() - (a1 / s.abs()).asinh())
        }
    };
    0.5 * MU0 * j * (term(z + half_length) - term(z - half_length))
}

/// Dipole moment (A·m²) of a thick solenoid with uniform current density: NIπ(a1² + a1a2 + a2²)/3 (references §3, ∫πr²J over the section).
pub fn thick_solenoid_dipole(a1: f64, a2: f64, turns: f64, current: f64) -> f64 {
    if !finite(&[a1, a2, turns, current]) || a1 < 0.0 || a2 <= a1 {
        return f64::NAN;
    }
    turns * current * PI * (a1 * a1 + a1 * a2 + a2 * a2) / 3.0
}

/// Antiderivative F with ∂⁴F/∂x²∂y² = ln sqrt(x² + y²), even in x and y (derived for this crate; the GMD test checks it against quadrature).
///
/// F = [(6x²y² − x⁴ − y⁴)·ln(x² + y²)]/48 + [x³y·atan(y/x) + xy³·atan(x/y)]/6 − 25x²y²/48.
fn log_antiderivative(x: f64, y: f64) -> f64 {
    let (x, y) = (x.abs(), y.abs());
    let (x2, y2) = (x * x, y * y);
    let r2 = x2 + y2;
    if r2 == 0.0 {
        return 0.0;
    }
    let log_part = (6.0 * x2 * y2 - x2 * x2 - y2 * y2) * r2.ln() / 48.0;
    let atan_part = if x == 0.0 || y == 0.0 {
        0.0
    } else {
        (x2 * x * y * (y / x).atan() + x * y2 * y * (x / y).atan()) / 6.0
    };
    log_part + atan_part - 25.0 * x2 * y2 / 48.0
}

/// Mean of ln ρ between two w×h rectangles whose centres are offset by (dx, dy): the log of their geometric mean distance (Maxwell's GMD; Grover 1946).
///
/// The four-fold integral is a second difference of F in each direction (the convolution of two
/// equal boxes is a triangle), so it is closed form. The difference cancels like (d²/wh)², so the
/// thin side is floored at 1e-3 of the other (the GMD is then that of a segment to ~1e-3), and far
/// apart the second-moment expansion takes over (see `log_gmd_excess`).
fn mean_log_distance(dx: f64, dy: f64, w: f64, h: f64) -> f64 {
    let w = w.max(1e-3 * h);
    let h = h.max(1e-3 * w);
    let c = [(-1.0, 1.0), (0.0, -2.0), (1.0, 1.0)];
    let mut sum = 0.0;
    for (a, ca) in c {
        for (b, cb) in c {
            sum += ca * cb * log_antiderivative(dx + a * w, dy + b * h);
        }
    }
    sum / (w * w * h * h)
}

/// ln(centre distance) − ln(GMD) for two w×h cells offset by (dx, dy); −ln(GMD) for a cell with itself.
///
/// Beyond 16 cell diagonals the exact form is replaced by its second-moment expansion: the box
/// convolution has variances w²/6 and h²/6, and ln r is harmonic, so
/// ⟨ln ρ⟩ ≈ ln d + (w² − h²)(dy² − dx²)/(12d⁴), with a fourth-order remainder below ~3e-7 there.
fn log_gmd_excess(dx: f64, dy: f64, w: f64, h: f64) -> f64 {
    let d2 = dx * dx + dy * dy;
    if d2 == 0.0 {
        return -mean_log_distance(0.0, 0.0, w, h);
    }
    if d2 > 256.0 * (w * w + h * h) {
        (w * w - h * h) * (dx * dx - dy * dy) / (12.0 * d2 * d2)
    } else {
        0.5 * d2.ln() - mean_log_distance(dx, dy, w, h)
    }
}

/// Geometric mean distance (m) of a w×h rectangle from itself (Maxwell; Grover 1946: ≈ 0.2235(w + h), 0.44705·side for a square).
pub fn rectangle_gmd(w: f64, h: f64) -> f64 {
    if !finite(&[w, h]) || w < 0.0 || h < 0.0 || w + h == 0.0 {
        return f64::NAN;
    }
    mean_log_distance(0.0, 0.0, w, h).exp()
}

/// Inductance (H) of a rectangular-section winding with uniform current density, by summing Maxwell's mutual inductance over an nr×nz grid of filament loops (Grover, *Inductance Calculations*, 1946).
///
/// Each filament carries turns/(nr·nz) of the ampere-turns, so L = (N/(nr·nz))²·Σ_i Σ_j M_ij.
/// Self term: the round-wire loop formula with the wire radius replaced by the geometric mean
/// distance g of the cell, L_self = μ0a(ln(8a/g) − 2) (a round wire has g = r·e^{−1/4}, giving the
/// familiar ln(8a/r) − 7/4); g is Maxwell's exact rectangle GMD, which Grover's 0.2235(w + h)
/// approximates to 0.5% (see [`rectangle_gmd`]). Other pairs: a filament at each centre misjudges
/// the logarithmic part of M by ln(centre distance/GMD of the two cells), which for elongated
/// cells spoils convergence, so every pair gets M(centres) + μ0·sqrt(r r')·(ln d − ln g_pair).
/// What remains is the midpoint error of the smooth part, O(cell²): cells near square converge
/// fastest. NaN for a1 ≤ 0, a2 < a1, length ≤ 0 or an empty grid.
pub fn thick_winding_inductance_filaments(
    a1: f64,
    a2: f64,
    length: f64,
    turns: f64,
    nr: usize,
    nz: usize,
) -> f64 {
    if !finite(&[a1, a2, length, turns]) || a1 <= 0.0 || a2 < a1 || length <= 0.0 {
        return f64::NAN;
    }
    if nr == 0 || nz == 0 {
        return f64::NAN;
    }
    let w = (a2 - a1) / nr as f64;
    let h = length / nz as f64;
    let radius = |i: usize| a1 + (i as f64 + 0.5) * w;
    // the log-GMD correction depends only on the cell offset (p, q): tabulate it once
    let correction: Vec<Vec<f64>> = (0..nz)
        .map(|q| {
            (0..nr)
                .map(|p| log_gmd_excess(p as f64 * w, q as f64 * h, w, h))
                .collect()
        })
        .collect();
    let mut sum = 0.0;
    // M depends on the pair of radii and the layer offset only: count each offset's pairs once
    for (q, by_p) in correction.iter().enumerate() {
        let pairs = if q == 0 { nz } else { 2 * (nz - q) } as f64;
        let sep = q as f64 * h;
        for i in 0..nr {
            let ri = radius(i);
            let mut row = 0.0;
            for k in i..nr {
                let rk = radius(k);
                let p = k - i;
                let fix = by_p[p];
                let m = if p == 0 && q == 0 {
                    MU0 * ri * ((8.0 * ri).ln() + fix - 2.0)
                } else {
                    mutual_inductance_coaxial_loops(ri, rk, sep) + MU0 * (ri * rk).sqrt() * fix
                };
                row += if p == 0 { m } else { 2.0 * m };
            }
            sum += pairs * row;
        }
    }
    let per_filament = turns / (nr * nz) as f64;
    per_filament * per_filament * sum
}

/// Nagaoka's coefficient k_N of a current sheet, diameter over length u = D/l (Nagaoka 1909; Grover 1946, Table 36; references §4).
///
/// k_N = (4/(3π))·[(sqrt(1+u²)/u²)(K − E) + sqrt(1+u²)·E − u], k² = u²/(1+u²); k_N(0) = 1.
pub fn nagaoka_coefficient(diameter_over_length: f64) -> f64 {
    let u = diameter_over_length;
    if !u.is_finite() || u < 0.0 {
        return f64::NAN;
    }
    if u == 0.0 {
        return 1.0;
    }
    let m = u * u / (1.0 + u * u);
    let s = (1.0 + u * u).sqrt();
    4.0 / (3.0 * PI) * (s / (u * u) * k_minus_e(m) + s * elliptic_e(m) - u)
}

/// Wheeler's approximation to Nagaoka's coefficient, 1/(1 + 0.45·D/l) (Wheeler, Proc. IRE 16, 1398, 1928; references §4).
pub fn wheeler_coefficient(diameter_over_length: f64) -> f64 {
    let u = diameter_over_length;
    if !u.is_finite() || u < 0.0 {
        return f64::NAN;
    }
    1.0 / (1.0 + 0.45 * u)
}

/// Inductance (H) of a current-sheet solenoid: L = μ0N²πr²k_N/l (Nagaoka 1909; references §4).
pub fn current_sheet_inductance(radius: f64, length: f64, turns: f64) -> f64 {
    if !finite(&[radius, length, turns]) || radius <= 0.0 || length <= 0.0 {
        return f64::NAN;
    }
    let k_n = nagaoka_coefficient(2.0 * radius / length);
    MU0 * turns * turns * PI * radius * radius * k_n / length
}

/// H (A/m) inside a very long solenoid of n turns per metre carrying I: nI, whatever the core (Ampère's law; references §7 #11).
pub fn long_solenoid_h(turns_per_metre: f64, current: f64) -> f64 {
    turns_per_metre * current
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::test_support::assert_digits;

    #[test]
    fn loop_centre_field_is_biot_savart_check_1() {
        // references.md §7 #1: Biot–Savart, exact
        assert_digits(loop_axial_field_centre(0.1, 1.0), "6.283185e-6");
        assert_digits(loop_axial_field(0.1, 1.0, 0.0), "6.283185e-6");
        assert_digits(loop_field(0.1, 1.0, 0.0, 0.0).1, "6.283185e-6");
    }

    #[test]
    fn loop_vector_potential_matches_jackson_5_37_check_2() {
        // references.md §7 #2 (§4 loop formula, computed)
        assert_digits(loop_vector_potential(0.1, 1.0, 0.05, 0.05), "1.112067e-7");
        assert_digits(loop_vector_potential(0.1, 1.0, 0.1, 0.1), "7.863503e-8");
        assert_digits(loop_vector_potential(0.1, 1.0, 0.2, 0.0), "8.731526e-8");
        assert_eq!(loop_vector_potential(0.1, 1.0, 0.0, 0.3), 0.0);
        assert!(loop_vector_potential(0.1, 1.0, -0.1, 0.0).is_nan());
    }

    #[test]
    fn loop_vector_potential_near_axis_is_linear_in_rho() {
        // Jackson §5.5 eq. 5.38 small-ρ limit: A_φ → (μ0Ia²/4)·ρ/(a² + z²)^{3/2} = B_z(0, z)·ρ/2
        let (a, z) = (0.1, 0.07);
        for rho in [1e-9, 1e-6, 1e-4] {
            let want = 0.5 * rho * loop_axial_field(a, 1.0, z);
            let got = loop_vector_potential(a, 1.0, rho, z);
            assert!(
                (got / want - 1.0).abs() < 1e-6,
                "rho {rho}: {got} vs {want}"
            );
        }
    }

    #[test]
    fn loop_field_is_curl_of_vector_potential() {
        // B_ρ = −∂A/∂z, B_z = (1/ρ)∂(ρA)/∂ρ (Jackson §5.5), by central differences
        let (a, i) = (0.1, 1.0);
        for (rho, z) in [(0.05, 0.05), (0.2, 0.03), (0.13, -0.21), (1e-3, 0.02)] {
            let h = 1e-6;
            let (br, bz) = loop_field(a, i, rho, z);
            let br_fd = -(loop_vector_potential(a, i, rho, z + h)
                - loop_vector_potential(a, i, rho, z - h))
                / (2.0 * h);
            let flux = |r: f64| r * loop_vector_potential(a, i, r, z);
            let bz_fd = (flux(rho + h) - flux(rho - h)) / (2.0 * h * rho);
            assert!(
                (br - br_fd).abs() < 1e-7 * bz.abs().max(br.abs()),
                "{rho},{z}"
            );
            assert!(
                (bz - bz_fd).abs() < 1e-7 * bz.abs().max(br.abs()),
                "{rho},{z}"
            );
        }
        // computed with mpmath 1.3.0 from the same closed form, 30 digits
        let (br, bz) = loop_field(0.1, 1.0, 0.05, 0.05);
        assert!((br / 1.616_890_840_755_077e-6 - 1.0).abs() < 1e-12);
        assert!((bz / 4.345_848_935_941_638e-6 - 1.0).abs() < 1e-12);
    }

    #[test]
    fn mutual_inductance_matches_dlmf_19_34_check_3() {
        // references.md §7 #3 (DLMF §19.34, computed)
        assert_digits(
            mutual_inductance_coaxial_loops(0.1, 0.1, 0.1),
            "4.940785e-8",
        );
        assert_digits(
            mutual_inductance_coaxial_loops(0.1, 0.05, 0.0),
            "5.486179e-8",
        );
        // flux of one loop through the other: M = 2πb·A_φ(b, d) (references §4)
        let m = 2.0 * PI * 0.05 * loop_vector_potential(0.1, 1.0, 0.05, 0.0);
        assert!((m / mutual_inductance_coaxial_loops(0.1, 0.05, 0.0) - 1.0).abs() < 1e-13);
    }

    #[test]
    fn mutual_inductance_far_apart_tends_to_dipole_coupling() {
        // two dipoles on a common axis: M → μ0πa²b²/(2d³) (Jackson §5.6 dipole field, on axis)
        let (a, b, d) = (0.1, 0.05, 1e3_f64);
        let want = MU0 * PI * a * a * b * b / (2.0 * d.powi(3));
        assert!((mutual_inductance_coaxial_loops(a, b, d) / want - 1.0).abs() < 1e-7);
    }

    #[test]
    fn thick_solenoid_axial_field_matches_montgomery_check_4() {
        // references.md §7 #4 (§3, Montgomery 1969 ch. 1, computed): a1 = 10 mm, a2 = 20 mm, 100 mm, 1000 turns, 1 A
        let bz = |z| thick_solenoid_axial_field(0.01, 0.02, 0.05, 1000.0, 1.0, z);
        assert_digits(bz(0.0), "1.2022574e-2");
        assert_digits(bz(0.05), "6.211308e-3");
        assert_digits(bz(0.1), "2.396043e-4");
        // centre form of references §3: B0 = μ0·J·b·ln[(a2 + sqrt(a2² + b²))/(a1 + sqrt(a1² + b²))]
        let j = 1000.0 / (0.1 * 0.01);
        let b0 = MU0 * j * 0.05 * ((0.02 + 0.0029f64.sqrt()) / (0.01 + 0.0026f64.sqrt())).ln();
        assert!((bz(0.0) / b0 - 1.0).abs() < 1e-13);
    }

    #[test]
    fn thick_solenoid_dipole_matches_check_5() {
        // references.md §7 #5 (§3)
        assert_digits(thick_solenoid_dipole(0.01, 0.02, 1000.0, 1.0), "0.7330383");
        // far on the axis the field is the dipole's: μ0m/(2πz³) (Jackson §5.6)
        let z = 50.0;
        let far = thick_solenoid_axial_field(0.01, 0.02, 0.05, 1000.0, 1.0, z);
        let dip = MU0 * thick_solenoid_dipole(0.01, 0.02, 1000.0, 1.0) / (2.0 * PI * z.powi(3));
        assert!((far / dip - 1.0).abs() < 1e-5);
    }

    #[test]
    fn thick_solenoid_thin_limit_is_loop_stack() {
        // a2 → a1 recovers the thin-sheet (Jackson §5.5 on-axis loop integrated over length) field
        let (a, b) = (0.02, 0.05);
        let thin = thick_solenoid_axial_field(a, a * (1.0 + 1e-7), b, 100.0, 1.0, 0.0);
        let sheet = MU0 * 100.0 / (2.0 * b) * b / (a * a + b * b).sqrt();
        assert!((thin / sheet - 1.0).abs() < 1e-6);
    }

    #[test]
    fn nagaoka_coefficient_matches_grover_table_36_check_values() {
        // references.md §4 (Nagaoka 1909; Grover Table 36), computed
        assert_digits(nagaoka_coefficient(0.1), "0.958807");
        assert_digits(nagaoka_coefficient(0.5), "0.818136");
        assert_digits(nagaoka_coefficient(1.0), "0.688423");
        assert_digits(nagaoka_coefficient(2.0), "0.525510");
        assert_digits(nagaoka_coefficient(5.0), "0.319825");
        assert_eq!(nagaoka_coefficient(0.0), 1.0);
        // long-coil expansion k_N ≈ 1 − 4u/(3π) (Grover 1946 [from memory]), u → 0
        let u = 1e-4;
        assert!((nagaoka_coefficient(u) - (1.0 - 4.0 * u / (3.0 * PI))).abs() < 1e-7);
    }

    #[test]
    fn wheeler_coefficient_matches_check_12() {
        // references.md §7 #12 (Wheeler, Proc. IRE 16, 1398, 1928)
        assert_digits(wheeler_coefficient(1.0), "0.689655");
        // references §4: within 0.3% of Nagaoka for D/l ≤ 2, −3.8% at 5 [computed]
        for u in [0.1, 0.5, 1.0, 2.0] {
            assert!((wheeler_coefficient(u) / nagaoka_coefficient(u) - 1.0).abs() < 3e-3);
        }
        let off = wheeler_coefficient(5.0) / nagaoka_coefficient(5.0) - 1.0;
        assert!((off + 0.038).abs() < 5e-4, "{off}");
    }

    #[test]
    fn long_solenoid_h_is_ampere_check_11() {
        // references.md §7 #11 (Ampère's law): n = 1e4 /m, I = 1 A
        assert_eq!(long_solenoid_h(1e4, 1.0), 1e4);
    }

    #[test]
    fn rectangle_gmd_matches_quadrature_and_grover_rule() {
        // exp of the mean log distance, computed with mpmath 1.3.0 (2-D quadrature, 20 digits)
        assert!((rectangle_gmd(1.0, 1.0) - 0.447_049_155_903_662_5).abs() < 1e-12);
        assert!((rectangle_gmd(1.0, 3.0) - 0.894_657_272_384_383_1).abs() < 1e-12);
        let adjacent = mean_log_distance(1.0, 0.0, 1.0, 1.0).exp();
        assert!((adjacent - 1.006_549_813_176_422_3).abs() < 1e-12);
        // a line segment: ln g = ln h − 3/2 (Maxwell, exact); floor of the thin side at 1e-3
        assert!((rectangle_gmd(0.0, 2.0) / (2.0 * (-1.5f64).exp()) - 1.0).abs() < 2e-3);
        // Grover 1946: g ≈ 0.2235(w + h), within 0.5% for any aspect ratio [from memory]
        for r in [1.0, 2.0, 5.0, 10.0, 100.0] {
            let g = rectangle_gmd(1.0, r);
            assert!((g / (0.2235 * (1.0 + r)) - 1.0).abs() < 5e-3, "aspect {r}");
        }
        // far cells: the second-moment expansion joins the exact form at 16 diagonals
        let (w, h) = (1.0_f64, 7.0);
        let d = 16.0 * w.hypot(h);
        for angle in [0.0f64, 0.4, 1.1] {
            let (dx, dy) = (d * angle.cos(), d * angle.sin());
            let exact = 0.5 * (dx * dx + dy * dy).ln() - mean_log_distance(dx, dy, w, h);
            let near = log_gmd_excess(dx * (1.0 - 1e-9), dy * (1.0 - 1e-9), w, h);
            let far = log_gmd_excess(dx * (1.0 + 1e-9), dy * (1.0 + 1e-9), w, h);
            assert!(
                (near - exact).abs() < 1e-8 && (far - exact).abs() < 1e-6,
                "{angle}"
            );
        }
    }

    #[test]
    fn filament_winding_inductance_converges_under_grid_refinement() {
        // Grover 1946 filament method: 20×20 → 40×40 must agree to better than 0.1%.
        // Brooks coil (square section c, inner radius c, outer 2c): square cells
        let coarse = thick_winding_inductance_filaments(1.0, 2.0, 1.0, 1.0, 20, 20);
        let fine = thick_winding_inductance_filaments(1.0, 2.0, 1.0, 1.0, 40, 40);
        assert!((coarse / fine - 1.0).abs() < 1e-4, "{coarse} vs {fine}");
        // the §7 #4 coil (10 mm × 100 mm section) with near-square cells
        let (a1, a2, len, n) = (0.01, 0.02, 0.1, 1000.0);
        let coarse = thick_winding_inductance_filaments(a1, a2, len, n, 10, 100);
        let fine = thick_winding_inductance_filaments(a1, a2, len, n, 20, 200);
        assert!((coarse / fine - 1.0).abs() < 1e-3, "{coarse} vs {fine}");
    }

    #[test]
    fn filament_winding_inductance_converges_at_second_order() {
        // midpoint rule on the smooth remainder: successive differences shrink ~4× per halving,
        // even with 10:1 cells (the §7 #4 coil on square grids)
        let l = |n| thick_winding_inductance_filaments(0.01, 0.02, 0.1, 1000.0, n, n);
        let (l20, l40, l80) = (l(20), l(40), l(80));
        let ratio = (l40 - l20) / (l80 - l40);
        assert!((3.5..4.5).contains(&ratio), "ratio {ratio}");
        // Richardson-extrapolated limits of the 10:1-cell and the near-square-cell grids agree
        let elongated = l80 + (l80 - l40) / 3.0;
        let sq = |nr| thick_winding_inductance_filaments(0.01, 0.02, 0.1, 1000.0, nr, 10 * nr);
        let (s10, s20) = (sq(10), sq(20));
        let square = s20 + (s20 - s10) / 3.0;
        assert!(
            (elongated / square - 1.0).abs() < 1e-5,
            "{elongated} vs {square}"
        );
    }

    #[test]
    fn filament_winding_reproduces_brooks_coil_constant() {
        // Brooks coil: L = 1.6994e-6·a·N² H with a the mean radius in m (Brooks & Turner, Univ.
        // Illinois Eng. Exp. Sta. Bull. 53, 1912; Grover 1946) [constant and citation from memory]
        let (c, n) = (0.01, 100.0);
        let l = thick_winding_inductance_filaments(c, 2.0 * c, c, n, 40, 40);
        let brooks = 1.6994e-6 * 1.5 * c * n * n;
        assert!((l / brooks - 1.0).abs() < 1e-4, "{l} vs {brooks}");
    }

    #[test]
    fn filament_winding_matches_wheeler_multilayer_formula() {
        // Wheeler, Proc. IRE 16, 1398, 1928: L[µH] = 31.6·N²r²/(6r + 9l + 10c), r mean radius,
        // l length, c depth in metres; ~1% when the three terms are about equal [accuracy from memory]
        let (r, len, c, n) = (0.015, 0.01, 0.009, 50.0);
        let wheeler = 31.6e-6 * n * n * r * r / (6.0 * r + 9.0 * len + 10.0 * c);
        let l = thick_winding_inductance_filaments(r - 0.5 * c, r + 0.5 * c, len, n, 30, 30);
        assert!((l / wheeler - 1.0).abs() < 1e-2, "{l} vs {wheeler}");
    }

    #[test]
    fn filament_winding_thin_limit_matches_nagaoka_current_sheet() {
        // a2 → a1: the winding becomes Nagaoka's current sheet (references §4, eq. L = μ0N²πr²k_N/l)
        let (a, len, n) = (0.02, 0.1, 100.0);
        let t = a * 1e-4;
        let sheet = current_sheet_inductance(a + 0.5 * t, len, n);
        let filaments = thick_winding_inductance_filaments(a, a + t, len, n, 1, 400);
        let off = (filaments / sheet - 1.0).abs();
        assert!(
            off < 1e-3,
            "filaments {filaments}, sheet {sheet}, off {off}"
        );
    }

    #[test]
    fn bad_input_gives_nan_not_panic() {
        assert!(loop_vector_potential(-1.0, 1.0, 0.1, 0.0).is_nan());
        assert!(mutual_inductance_coaxial_loops(0.0, 1.0, 0.1).is_nan());
        assert!(thick_solenoid_axial_field(0.02, 0.01, 0.05, 1.0, 1.0, 0.0).is_nan());
        assert!(thick_winding_inductance_filaments(0.01, 0.02, 0.1, 1.0, 0, 5).is_nan());
        assert!(nagaoka_coefficient(f64::NAN).is_nan());
        assert!(current_sheet_inductance(0.01, 0.0, 10.0).is_nan());
    }
}
