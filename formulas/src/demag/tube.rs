//! χ = 0 demagnetizing factors of a tube (hollow cylinder) magnetized along its axis, derived
//! here from the charge picture of Chen, Brug & Goldfarb (1991) / references.md §1; not a
//! published table.
//!
//! Outer radius a, bore radius b = βa, length L = 2γa. The uniformly magnetized tube carries the
//! charge density ±M on its end annuli and none elsewhere. An annulus of unit charge density
//! has the Hankel transform F(k)/k with F(k) = a·J1(ka) − b·J1(kb), so the axial field of an end
//! is (M/2)∫F(k)J0(kr)e^{−k|z|} dk; averaging J0(kr) over the annulus gives 2F/(k(a² − b²)), and
//! averaging over the mid-plane or over the length gives
//!
//! ```text
//! Nf = 2/(a² − b²) ∫0^∞ F² e^{−kL/2}/k dk,   Nm = 2/(L(a² − b²)) ∫0^∞ F² (1 − e^{−kL})/k² dk,
//! ```
//!
//! which at b = 0 are the rod's Bessel forms of references §1. They are not summed as they
//! stand: F² beats at the two radii and decays like 1/k, so the tails oscillate slowly. With
//! e^{−kL/2}/k = ∫_{L/2}^∞ e^{−kt} dt and (1 − e^{−kL})/k² = ∫0^∞ min(s, L)e^{−ks} ds, every
//! product c·d∫J1(kc)J1(kd)e^{−kt} dk is the coupling of two coaxial loops of radii c, d at
//! spacing t (Maxwell's mutual inductance over μ0π, DLMF §19.34; the identity `rod_nf_chi0`
//! uses), smooth in t and decaying like 1/t³:
//!
//! ```text
//! Nf = 2/(a² − b²) ∫_{L/2}^∞ C(t) dt,   Nm = 2/(L(a² − b²)) ∫0^∞ min(s, L) C(s) ds,
//! C = c(a, a) − 2c(a, b) + c(b, b).
//! ```
//!
//! Accuracy [measured]: against the Bessel forms summed with mpmath 1.3.0 at 22 digits on
//! γ ∈ {0.01, 0.03, 0.1, … , 1e4} × β ∈ {0, 0.1, 0.3, 0.5, 0.7, 0.9, 0.95} (77 points), the
//! worst relative error was 7.6e-15 for Nm and 1.3e-14 for Nf. Above β ≈ 0.98 the quadrature
//! tolerance loosens as 1e-15/(1 − β²)², because the three couplings in C cancel that much.

use std::f64::consts::PI;

use crate::special::{integrate, k_minus_e};

/// Below this complementary parameter 1 − k1² the loop coupling comes from its logarithmic
/// expansion: k1² itself rounds to within an ulp of 1, where K is singular.
const LOG_BELOW: f64 = 1e-4;

/// Relative tolerance of each quadrature piece, where the couplings allow it (`tolerance`).
const TOL: f64 = 1e-12;

/// Relative noise of one loop coupling: C cancels (1 − β²)² of its terms, which bounds the
/// tolerance a quadrature of C can meet.
const COUPLING_NOISE: f64 = 1e-15;

/// Panels break at 2^j·a from j = LADDER_START (or from the lower limit) up to j = LADDER_END:
/// C has logarithmic peaks of width a − b and b at t = 0, and a factor-2 ladder resolves every
/// such scale; beyond 2^LADDER_END·a C is a smooth 1/t³ decay.
const LADDER_START: i32 = -16;
const LADDER_END: i32 = 3;

/// c·d∫0^∞ J1(kc)J1(kd)e^{−kt} dk for loop radii c, d ≥ 0 at spacing t: Maxwell's mutual
/// inductance (DLMF §19.34) over μ0π, in its Landen-transformed form (r1 + r2)(K − E)/π of
/// modulus k1 = (r1 − r2)/(r1 + r2), r1,2 the largest and smallest distances between the loops
/// (DLMF §19.8(ii) applied to k = 2√(cd)/r1).
///
/// Why this form: Maxwell's (1 − k²/2)K − E cancels to ~m² and loses three digits at m = 0.1,
/// while K − E has a positive series. With Maxwell's form the annuli's coupling C (which
/// cancels a further (1 − β²)²) scattered by ~5e-11 at β = 0.95 [measured], and the adaptive
/// quadrature split its panels without end.
fn loop_coupling(c: f64, d: f64, t: f64) -> f64 {
    if c == 0.0 || d == 0.0 {
        return 0.0;
    }
    // hypot: neither t² nor r2 may underflow or overflow at extreme γ
    let r1 = (c + d).hypot(t);
    let r2 = (c - d).hypot(t);
    let s = r1 + r2;
    // r1 − r2 = 4cd/(r1 + r2), and 1 − k1 = 2r2/(r1 + r2): both without cancellation
    let k1 = 4.0 * c * d / s / s;
    let mc = 2.0 * r2 / s * (1.0 + k1);
    s / PI * k_minus_e_near_one(k1 * k1, mc)
}

/// K(m) − E(m) given m and its complement m' = 1 − m computed without cancellation.
fn k_minus_e_near_one(m: f64, mc: f64) -> f64 {
    if mc < LOG_BELOW {
        // DLMF 19.12.1–2 to second order in m': K − E = (l − 1) − (m'/4)l − (3m'²/64)(l − 5/6)
        // + O(m'³ l), l = ln(4/√m') (the m'² term checked with mpmath 1.3.0)
        let l = (4.0 / mc.sqrt()).ln();
        l - 1.0 - 0.25 * mc * l - 3.0 / 64.0 * mc * mc * (l - 5.0 / 6.0)
    } else {
        k_minus_e(m)
    }
}

/// C(t) = c(1, 1) − 2c(1, β) + c(β, β): the end annuli's coupling at spacing t, outer radius 1.
fn annulus_coupling(beta: f64, t: f64) -> f64 {
    loop_coupling(1.0, 1.0, t) - 2.0 * loop_coupling(1.0, beta, t) + loop_coupling(beta, beta, t)
}

/// The relative tolerance the quadrature of C can meet for bore ratio β.
fn tolerance(beta: f64) -> f64 {
    TOL.max(COUPLING_NOISE / (1.0 - beta * beta).powi(2))
}

/// ∫_lo^hi f for 0 ≤ lo < hi ≤ ∞ to relative `tol`: adaptive panels between the ladder points,
/// and beyond S = max(lo, 2^LADDER_END) the map s = S/u, under which a 1/s² or 1/s³ decay
/// becomes smooth on (0, 1].
fn integrate_ladder(f: impl Fn(f64) -> f64, lo: f64, hi: f64, tol: f64) -> f64 {
    let top = 2f64.powi(LADDER_END).max(lo);
    let near_end = hi.min(top);
    // a small lower limit starts the ladder there, so that no panel spans many decades
    let start = if lo > 0.0 {
        lo.log2().ceil() as i32
    } else {
        LADDER_START
    };
    let mut points = vec![lo];
    points.extend(
        (start..=LADDER_END)
            .map(|j| 2f64.powi(j))
            .filter(|&p| p > lo && p < near_end),
    );
    points.push(near_end);
    let mut total: f64 = points
        .windows(2)
        .filter(|w| w[1] > w[0])
        .map(|w| integrate(&f, w[0], w[1], tol))
        .sum();
    if hi > top {
        let mapped = |u: f64| {
            if u <= 0.0 {
                0.0
            } else {
                f(top / u) * top / (u * u)
            }
        };
        total += integrate(mapped, top / hi, 1.0, tol);
    }
    total
}

/// Below this slenderness both factors are 1 to the last bit (they differ from 1 by O(γ ln γ)),
/// and the quadrature's lengths would underflow.
const FLAT_BELOW: f64 = 1e-100;

/// Above this slenderness the factors are their far-field expansions (`tube_nm_far`,
/// `tube_nf_far`), exact there to the last bit: the squared loop moduli of the quadrature
/// underflow from γ ~ 1e77 on.
const SLENDER_ABOVE: f64 = 1e8;

/// Far-field expansion of Nm for a slender tube, given the moment I = ∫0^∞ s·C(s) ds (outer radius 1).
///
/// Beyond the tube C = (1 − β²)²[1/(2s³) − 3(1 + β²)/(2s⁵) + O(s⁻⁷)] (the small-k series of J1,
/// DLMF 10.2.2, under the k-integral), and Nm = (2/(L(1 − β²)))[I − ∫_L^∞ (s − L)C ds] gives
/// Nm = I/(γ(1 − β²)) − (1 − β²)/(8γ²) + (1 − β⁴)/(64γ⁴) + O(γ⁻⁶) (derived here; at β = 0 the
/// Nagaoka series of 1 − k_N(1/γ)).
fn tube_nm_far(gamma: f64, bore_ratio: f64, moment: f64) -> f64 {
    let b2 = bore_ratio * bore_ratio;
    let g2 = gamma * gamma;
    moment / gamma / (1.0 - b2) - (1.0 - b2) / (8.0 * g2) + (1.0 - b2 * b2) / (64.0 * g2) / g2
}

/// Far-field expansion of Nf for a slender tube: (1 − β²)/(2γ²) − 3(1 − β⁴)/(4γ⁴) + O(γ⁻⁶),
/// from the same series of C integrated over t > γ (derived here; 1/(2γ²) at β = 0, references §1).
fn tube_nf_far(gamma: f64, bore_ratio: f64) -> f64 {
    let b2 = bore_ratio * bore_ratio;
    let g2 = gamma * gamma;
    (1.0 - b2) / (2.0 * gamma) / gamma - 0.75 * (1.0 - b2 * b2) / g2 / g2
}

/// Checks the shared domain: γ ≥ 0 and 0 ≤ β < 1.
fn in_domain(gamma: f64, bore_ratio: f64) -> bool {
    gamma >= 0.0 && (0.0..1.0).contains(&bore_ratio)
}

/// Magnetometric factor Nm of a uniformly magnetized tube (χ = 0), γ = L/D, β = bore/outer diameter: derived here from the charge picture of Chen, Brug & Goldfarb (1991) / references.md §1; not a published table.
///
/// Nm = 2/(L(a² − b²))∫0^∞ (aJ1(ka) − bJ1(kb))²(1 − e^{−kL})/k² dk, the demagnetizing field
/// averaged over the tube's volume; equals `rod_nm_chi0` at β = 0. 1 for a flat annulus
/// (γ = 0), 0 for γ = ∞; NaN for γ < 0 or β outside [0, 1).
pub fn tube_nm_chi0(gamma: f64, bore_ratio: f64) -> f64 {
    if !in_domain(gamma, bore_ratio) {
        return f64::NAN;
    }
    if gamma < FLAT_BELOW {
        return 1.0;
    }
    let c = |s: f64| annulus_coupling(bore_ratio, s);
    let tol = tolerance(bore_ratio);
    if gamma > SLENDER_ABOVE {
        let moment = integrate_ladder(|s| s * c(s), 0.0, f64::INFINITY, tol);
        return tube_nm_far(gamma, bore_ratio, moment);
    }
    let wall = 1.0 - bore_ratio * bore_ratio;
    let length = 2.0 * gamma;
    let inside = integrate_ladder(|s| s * c(s), 0.0, length, tol);
    let beyond = integrate_ladder(c, length, f64::INFINITY, tol);
    (inside + length * beyond) / (gamma * wall)
}

/// Fluxmetric factor Nf of a uniformly magnetized tube (χ = 0), γ = L/D, β = bore/outer diameter: derived here from the charge picture of Chen, Brug & Goldfarb (1991) / references.md §1; not a published table.
///
/// Nf = 2/(a² − b²)∫0^∞ (aJ1(ka) − bJ1(kb))² e^{−kL/2}/k dk, the demagnetizing field averaged
/// over the annulus of the mid-plane; equals `rod_nf_chi0` at β = 0. 1 for a flat annulus
/// (γ = 0), 0 for γ = ∞; NaN for γ < 0 or β outside [0, 1).
pub fn tube_nf_chi0(gamma: f64, bore_ratio: f64) -> f64 {
    if !in_domain(gamma, bore_ratio) {
        return f64::NAN;
    }
    if gamma < FLAT_BELOW {
        return 1.0;
    }
    if gamma > SLENDER_ABOVE {
        return tube_nf_far(gamma, bore_ratio);
    }
    let half_length = gamma;
    let c = |t: f64| annulus_coupling(bore_ratio, t);
    let tail = integrate_ladder(c, half_length, f64::INFINITY, tolerance(bore_ratio));
    2.0 * tail / (1.0 - bore_ratio * bore_ratio)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::special::bessel_j1;
    use crate::{mutual_inductance_coaxial_loops, rod_nf_chi0, rod_nm_chi0, MU0};

    fn rel(a: f64, b: f64) -> f64 {
        (a / b - 1.0).abs()
    }

    /// ₂F₁(a, b; c; z) by its defining series (DLMF 15.2.1), 0 ≤ z < 1.
    fn hypergeometric(a: f64, b: f64, c: f64, z: f64) -> f64 {
        let (mut term, mut sum) = (1.0, 1.0);
        for n in 0..10_000 {
            let n = n as f64;
            term *= (a + n) * (b + n) / ((c + n) * (n + 1.0)) * z;
            sum += term;
            if term.abs() < 1e-18 {
                break;
            }
        }
        sum
    }

    /// ∫0^∞ (J1(x) − βJ1(βx))²/x² dx from Weber–Schafheitlin's integral (DLMF 10.22.56):
    /// ∫J1(x)J1(βx)/x² dx = (β/2)·₂F₁(−1/2, 1/2; 2; β²) for β ≤ 1, which at β = 1 is 4/(3π).
    fn slender_moment(beta: f64) -> f64 {
        4.0 / (3.0 * PI) * (1.0 + beta.powi(3))
            - beta * beta * hypergeometric(-0.5, 0.5, 2.0, beta * beta)
    }

    #[test]
    fn weber_schafheitlin_moment_of_a_full_wall_is_four_over_three_pi() {
        // DLMF 10.22.56 at β = 1 must give ∫J1²/x² = 4/(3π) (references §1: Nm → 4/(3πγ)), so the
        // annulus of zero width has no moment; the series converges like n⁻³ there
        assert!(
            (0.5 * hypergeometric(-0.5, 0.5, 2.0, 1.0 - 1e-12) - 4.0 / (3.0 * PI)).abs() < 1e-8
        );
        assert!((slender_moment(0.0) - 4.0 / (3.0 * PI)).abs() < 1e-16);
    }

    #[test]
    fn tube_factors_at_zero_bore_equal_rod_factors() {
        // β = 0 is the rod: Nm against the elliptic closed form (Moskowitz & Della Torre 1966,
        // references §1), a route independent of the loop couplings; Nf against rod_nf_chi0
        for g in [0.1, 0.3, 1.0, 3.0, 10.0, 30.0, 100.0, 300.0, 1000.0] {
            assert!(
                rel(tube_nm_chi0(g, 0.0), rod_nm_chi0(g)) < 1e-9,
                "Nm, γ {g}"
            );
            assert!(
                rel(tube_nf_chi0(g, 0.0), rod_nf_chi0(g)) < 1e-9,
                "Nf, γ {g}"
            );
        }
        // and a vanishing bore joins the rod continuously
        assert!(rel(tube_nm_chi0(2.0, 1e-4), rod_nm_chi0(2.0)) < 1e-7);
    }

    #[test]
    fn tube_slender_expansions_match_weber_schafheitlin() {
        // the far-field forms with the moment ∫0^∞ s·C ds = ∫F²/k² dk taken from DLMF 10.22.56
        // instead of the quadrature: an independent route to the whole of C(s)
        for beta in [0.2, 0.5, 0.8, 0.95] {
            for g in [50.0, 500.0] {
                let want = tube_nm_far(g, beta, slender_moment(beta));
                let got = tube_nm_chi0(g, beta);
                assert!(rel(got, want) < 1e-9, "β {beta}, γ {g}: {got} vs {want}");
            }
            assert!(
                rel(tube_nf_chi0(300.0, beta), tube_nf_far(300.0, beta)) < 1e-8,
                "β {beta}"
            );
        }
        // at β = 0 the Nm series is Nagaoka's, 1 − k_N(1/γ) (Moskowitz & Della Torre 1966)
        assert!(
            rel(
                tube_nm_far(30.0, 0.0, slender_moment(0.0)),
                rod_nm_chi0(30.0)
            ) < 1e-9
        );
        // the quadrature hands over to the expansions without a step
        for beta in [0.0, 0.7] {
            let (below, above) = (SLENDER_ABOVE * (1.0 - 1e-12), SLENDER_ABOVE * (1.0 + 1e-12));
            assert!(rel(tube_nm_chi0(below, beta), tube_nm_chi0(above, beta)) < 1e-11);
            assert!(rel(tube_nf_chi0(below, beta), tube_nf_chi0(above, beta)) < 1e-11);
        }
    }

    #[test]
    fn tube_nf_matches_bessel_integral_form() {
        // the defining form Nf = 2/(1 − β²)∫0^∞ (J1(x) − βJ1(βx))² e^{−γx}/x dx (outer radius 1),
        // summed directly and truncated where e^{−γx} < 1e-15
        for (g, beta) in [(0.5, 0.5), (2.0, 0.9), (1.0, 0.95)] {
            let f = |x: f64| {
                let amp = bessel_j1(x) - beta * bessel_j1(beta * x);
                if x < 1e-8 {
                    0.0
                } else {
                    amp * amp * (-g * x).exp() / x
                }
            };
            let direct = 2.0 / (1.0 - beta * beta) * integrate(f, 0.0, 35.0 / g, 1e-13);
            let got = tube_nf_chi0(g, beta);
            assert!(
                rel(got, direct) < 1e-9,
                "γ {g}, β {beta}: {got} vs {direct}"
            );
        }
    }

    #[test]
    fn tube_factors_match_mpmath_bessel_forms() {
        // computed with mpmath 1.3.0 at 22 digits from the Bessel forms of the module doc: Nf
        // directly, Nm as (I − ∫F²e^{−2γx}/x² dx)/(γ(1 − β²)) with I from DLMF 10.22.56
        let table = [
            (0.01, 0.95, 0.690_784_004_872_643_8, 0.667_000_192_081_917_7),
            (
                0.03,
                0.95,
                0.460_091_854_788_111_27,
                0.402_341_511_560_629_75,
            ),
            (0.3, 0.7, 0.357_932_578_949_082_54, 0.286_121_883_717_449_23),
            (1.0, 0.5, 0.231_270_243_586_388_15, 0.156_398_979_136_178_42),
            (
                10.0,
                0.95,
                5.090_276_464_636_43e-3,
                4.740_666_681_652_666_4e-4,
            ),
            (
                1e4,
                0.9,
                9.277_137_731_094_219e-6,
                9.499_999_742_075_008e-10,
            ),
        ];
        for (g, beta, nm, nf) in table {
            assert!(rel(tube_nm_chi0(g, beta), nm) < 1e-10, "Nm γ {g}, β {beta}");
            assert!(rel(tube_nf_chi0(g, beta), nf) < 1e-10, "Nf γ {g}, β {beta}");
        }
    }

    #[test]
    fn loop_coupling_is_maxwells_mutual_inductance() {
        // the Landen form against Maxwell's (DLMF §19.34, references §7 #3 checks that one)
        for (c, d, t) in [
            (1.0, 1.0, 0.5),
            (1.0, 0.5, 0.0),
            (1.0, 0.95, 3.0),
            (1.0, 1.0, 5.9),
            (1.0, 0.9, 100.0),
        ] {
            let maxwell = mutual_inductance_coaxial_loops(c, d, t) / (MU0 * PI);
            assert!(rel(loop_coupling(c, d, t), maxwell) < 1e-12, "{c} {d} {t}");
        }
        // the log expansion joins the direct K − E at its switch (DLMF 19.12.1–2)
        let mc = LOG_BELOW;
        let series = k_minus_e_near_one(1.0 - mc, mc * (1.0 - 1e-12));
        assert!(rel(series, k_minus_e(1.0 - mc)) < 1e-12);
    }

    #[test]
    fn tube_factors_limits_and_bad_input() {
        // a flat annulus is a sheet (N = 1), an endless tube has no ends (N = 0)
        assert_eq!(tube_nm_chi0(0.0, 0.5), 1.0);
        assert_eq!(tube_nf_chi0(0.0, 0.5), 1.0);
        assert_eq!(tube_nm_chi0(f64::INFINITY, 0.5), 0.0);
        let thin = tube_nf_chi0(1e-3, 0.5);
        assert!(thin < 1.0 && thin > 0.99, "{thin}");
        for (g, beta) in [
            (-1.0, 0.5),
            (f64::NAN, 0.5),
            (1.0, 1.0),
            (1.0, -0.1),
            (1.0, f64::NAN),
        ] {
            assert!(tube_nm_chi0(g, beta).is_nan() && tube_nf_chi0(g, beta).is_nan());
        }
        // extreme but valid slenderness: finite factors in [0, 1], never NaN
        for g in [5e-324, 1e-300, 1e300, f64::MAX] {
            let (nm, nf) = (tube_nm_chi0(g, 0.5), tube_nf_chi0(g, 0.5));
            assert!(
                (0.0..=1.0).contains(&nm) && (0.0..=1.0).contains(&nf),
                "γ {g}: {nm} {nf}"
            );
        }
        // (1 − e^{−x})/x = e^{−x/2}·sinh(x/2)/(x/2) ≥ e^{−x/2} weights the Nm integrand above
        // the Nf one, so Nm ≥ Nf; both fall as the tube lengthens
        for beta in [0.0, 0.5, 0.95] {
            let mut last = (1.0, 1.0);
            for i in 0..10 {
                let g = 10f64.powi(i - 3);
                let (nm, nf) = (tube_nm_chi0(g, beta), tube_nf_chi0(g, beta));
                assert!(nm > nf && nm < last.0 && nf < last.1, "β {beta}, γ {g}");
                last = (nm, nf);
            }
        }
        // a bore removes the most strongly demagnetized inner material: both factors fall
        assert!(tube_nm_chi0(3.0, 0.6) < tube_nm_chi0(3.0, 0.3));
        assert!(tube_nf_chi0(3.0, 0.6) < tube_nf_chi0(3.0, 0.3));
    }
}
