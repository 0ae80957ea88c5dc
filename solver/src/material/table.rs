//! A B–H curve from measured points, made into a smooth, strictly monotone law H(|B|).
//!
//! H is interpolated as a function of B (the solver's unknown) by a piecewise cubic Hermite
//! interpolant with the knot slopes of Steffen, "A simple method for monotonic interpolation in
//! one dimension", Astron. Astrophys. 239, 443–450 (1990). With every secant slope s > 0 his
//! interior slope min(2 s₋, 2 s₊, p) (p: slope of the parabola through three points) keeps
//! each knot slope in (0, 2 s] of both neighbouring secants. Our own argument for strictness:
//! on a cubic with secant s and end slopes α s, β s, (dH/dB)/s is affine in (α, β), positive at
//! the four corners of [0, 2]² for every t in (0, 1), and equal to α, β at the ends, so
//! dH/dB > 0 everywhere when α, β ∈ (0, 2]. Hence the two end slopes are clamped to [s/2, 2 s]
//! (the floor s/2 is our choice; Steffen's boundary rule may give 0).
//!
//! Beyond the last point the curve is continued physically (μr_diff → 1): a quadratic blend
//! on which dH/dB ramps linearly from the interpolant's end slope to 1/μ0, then a straight line
//! of slope 1/μ0 whose offset B − μ0 H is the saturation polarisation.

use super::table_check::validate;
use crate::constants::MU0;
use crate::error::SolverError;

/// One polynomial piece H(b0 + u) = h0 + u (c1 + u (c2 + u c3)), valid for u ≥ 0 up to the
/// next piece; `w0` = ∫_0^b0 H dB.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Piece {
    b0: f64,
    h0: f64,
    c1: f64,
    c2: f64,
    c3: f64,
    w0: f64,
}

impl Piece {
    #[inline]
    fn h(&self, u: f64) -> f64 {
        self.h0 + u * (self.c1 + u * (self.c2 + u * self.c3))
    }

    #[inline]
    fn dh(&self, u: f64) -> f64 {
        self.c1 + u * (2.0 * self.c2 + 3.0 * u * self.c3)
    }

    #[inline]
    fn w(&self, u: f64) -> f64 {
        self.w0 + u * (self.h0 + u * (self.c1 / 2.0 + u * (self.c2 / 3.0 + u * self.c3 / 4.0)))
    }
}

/// A tabulated B–H curve turned into a smooth, strictly monotone law H(|B|).
///
/// Conventions: the slope at B = 0 (the initial reluctivity ν(0) = 1/(μ0 μr,initial)) is the
/// slope at the origin of the parabola through the first three points, clamped to [s/2, 2 s]
/// of the first secant s. The end slope at the last point is the same one-sided parabola
/// estimate, clamped to [s/2, min(2 s, 1/μ0)]. The blend beyond the last point is as long in B
/// as the last data interval; it raises B − μ0 H by L (1 − μ0 dH/dB_end)/2 and then stays
/// constant at [`Self::saturation_b`]. H is odd in B, the other quantities even.
#[derive(Debug, Clone, PartialEq)]
pub struct BhTable {
    points: Vec<[f64; 2]>,
    pieces: Vec<Piece>,
}

/// Slope at the end knot of the parabola through the three end points (Steffen 1990, his
/// boundary estimate), clamped to [s/2, 2 s] of the end secant `s_near`.
fn end_slope(s_near: f64, s_far: f64, w_near: f64, w_far: f64) -> f64 {
    let f = w_near / (w_near + w_far);
    let p = s_near * (1.0 + f) - s_far * f;
    p.clamp(0.5 * s_near, 2.0 * s_near)
}

impl BhTable {
    /// Builds the law from points `[H in A/m, B in T]`, sorted by H; the origin is added if absent.
    pub fn new(points: &[[f64; 2]]) -> Result<Self, SolverError> {
        validate(points)?;
        let mut pts = Vec::with_capacity(points.len() + 1);
        if points[0] != [0.0, 0.0] {
            pts.push([0.0, 0.0]);
        }
        pts.extend_from_slice(points);
        let n = pts.len();
        // In the interpolation B is the abscissa x and H the ordinate y.
        let width: Vec<f64> = pts.windows(2).map(|p| p[1][1] - p[0][1]).collect();
        let secant: Vec<f64> = pts
            .windows(2)
            .zip(&width)
            .map(|(p, w)| (p[1][0] - p[0][0]) / w)
            .collect();
        let mut slope = vec![0.0; n];
        slope[0] = end_slope(secant[0], secant[1], width[0], width[1]);
        for i in 1..n - 1 {
            // Steffen (1990), interior slope: (sgn s₋ + sgn s₊) min(|s₋|, |s₊|, |p|/2), s > 0.
            let p =
                (secant[i - 1] * width[i] + secant[i] * width[i - 1]) / (width[i - 1] + width[i]);
            slope[i] = p.min(2.0 * secant[i - 1]).min(2.0 * secant[i]);
        }
        slope[n - 1] =
            end_slope(secant[n - 2], secant[n - 3], width[n - 2], width[n - 3]).min(1.0 / MU0);

        let mut pieces = Vec::with_capacity(n + 1);
        let mut w0 = 0.0;
        for k in 0..n - 1 {
            let (dx, s, d0, d1) = (width[k], secant[k], slope[k], slope[k + 1]);
            let piece = Piece {
                b0: pts[k][1],
                h0: pts[k][0],
                c1: d0,
                c2: (3.0 * s - 2.0 * d0 - d1) / dx,
                c3: (d0 + d1 - 2.0 * s) / (dx * dx),
                w0,
            };
            w0 = piece.w(dx);
            pieces.push(piece);
        }
        // Blend: dH/dB rises linearly from the end slope to 1/μ0 over one last-interval width.
        let len = width[n - 2];
        let [h_end, b_end] = pts[n - 1];
        let blend = Piece {
            b0: b_end,
            h0: h_end,
            c1: slope[n - 1],
            c2: (1.0 / MU0 - slope[n - 1]) / (2.0 * len),
            c3: 0.0,
            w0,
        };
        pieces.push(blend);
        pieces.push(Piece {
            b0: b_end + len,
            h0: blend.h(len),
            c1: 1.0 / MU0,
            c2: 0.0,
            c3: 0.0,
            w0: blend.w(len),
        });
        Ok(Self {
            points: pts,
            pieces,
        })
    }

    /// The points the law was built from, `[H, B]`, including an added origin.
    pub fn points(&self) -> &[[f64; 2]] {
        &self.points
    }

    /// `[H, B]` where the straight vacuum-slope tail begins (end of the blend).
    pub fn tail_start(&self) -> [f64; 2] {
        let tail = self.pieces[self.pieces.len() - 1];
        [tail.h0, tail.b0]
    }

    /// The piece holding |b| and the offset into it (binary search, no allocation).
    #[inline]
    fn locate(&self, b: f64) -> (&Piece, f64) {
        let b = b.abs();
        let k = self.pieces.partition_point(|p| p.b0 <= b).saturating_sub(1);
        let piece = &self.pieces[k];
        (piece, b - piece.b0)
    }

    /// H in A/m at |B| = `b`.
    #[inline]
    pub fn h(&self, b: f64) -> f64 {
        let (piece, u) = self.locate(b);
        piece.h(u).copysign(b)
    }

    /// Differential reluctivity dH/dB in m/H at |B| = `b`.
    #[inline]
    pub fn nu_diff(&self, b: f64) -> f64 {
        let (piece, u) = self.locate(b);
        piece.dh(u)
    }

    /// Reluctivity H/B in m/H at |B| = `b` (its limit at b = 0).
    #[inline]
    pub fn nu(&self, b: f64) -> f64 {
        let (piece, u) = self.locate(b);
        if piece.b0 == 0.0 {
            // First piece: h0 = 0, so H/B = c1 + u (c2 + u c3) with no 0/0 near the origin.
            piece.c1 + u * (piece.c2 + u * piece.c3)
        } else {
            piece.h(u) / b.abs()
        }
    }

    /// Energy density ∫_0^b H dB in J/m³ (exact for the piecewise polynomial law).
    #[inline]
    pub fn energy_density(&self, b: f64) -> f64 {
        let (piece, u) = self.locate(b);
        piece.w(u)
    }

    /// Limit of B − μ0 H as B → ∞ (the saturation polarisation) in T.
    pub fn saturation_b(&self) -> f64 {
        let [h, b] = self.tail_start();
        b - MU0 * h
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Invented demo curve of a soft-iron torquer-rod core (demo numbers, not data).
    const ROD: [[f64; 2]; 9] = [
        [40.0, 0.2],
        [80.0, 0.6],
        [150.0, 1.0],
        [300.0, 1.3],
        [800.0, 1.5],
        [2000.0, 1.62],
        [5000.0, 1.72],
        [15000.0, 1.85],
        [50000.0, 1.98],
    ];

    fn rod() -> BhTable {
        BhTable::new(&ROD).unwrap()
    }

    /// Fröhlich–Kennelly form B = μ0 H + Js H/(Hk + H) (form from memory), Js = 1.5 T,
    /// Hk = 100 A/m: used only as a smooth, saturating test function, not as a reference.
    fn froehlich_kennelly(h: f64) -> f64 {
        MU0 * h + 1.5 * h / (100.0 + h)
    }

    /// A sweep over the data, the blend and far into the tail.
    fn sweep(t: &BhTable) -> Vec<f64> {
        let top = 2.0 * t.tail_start()[1];
        (0..=20_000)
            .map(|i| top * f64::from(i) / 20_000.0)
            .collect()
    }

    fn rel(a: f64, b: f64) -> f64 {
        (a - b).abs() / a.abs().max(b.abs())
    }

    #[test]
    fn reproduces_data_points_exactly_and_adds_origin() {
        let t = rod();
        assert_eq!(t.points()[0], [0.0, 0.0]);
        assert_eq!(t.points().len(), ROD.len() + 1);
        for &[h, b] in t.points() {
            assert_eq!(t.h(b), h, "at B = {b}");
        }
        let mut with_origin = vec![[0.0, 0.0]];
        with_origin.extend_from_slice(&ROD);
        assert_eq!(BhTable::new(&with_origin).unwrap(), t);
    }

    #[test]
    fn strictly_monotone_with_positive_slope_including_tail() {
        let knee = BhTable::new(&[[1.0, 0.5], [2.0, 0.6], [1e3, 0.61]]).unwrap();
        for t in [rod(), knee] {
            let b = sweep(&t);
            for w in b.windows(2) {
                assert!(t.h(w[1]) > t.h(w[0]), "H not increasing at B = {}", w[1]);
                assert!(t.nu_diff(w[1]) > 0.0 && t.nu(w[1]) > 0.0);
            }
        }
    }

    #[test]
    fn slope_continuous_at_knots_and_blend_ends() {
        let t = rod();
        let mut joins: Vec<f64> = t.points()[1..].iter().map(|p| p[1]).collect();
        joins.push(t.tail_start()[1]);
        for x in joins {
            let d = 1e-6 * x;
            let left = (t.h(x) - t.h(x - d)) / d;
            let right = (t.h(x + d) - t.h(x)) / d;
            assert!(rel(left, right) < 1e-3, "kink at {x} T: {left}, {right}");
            assert!(rel(t.nu_diff(x * (1.0 - 1e-13)), t.nu_diff(x)) < 1e-9);
        }
    }

    #[test]
    fn nu_diff_matches_central_difference_of_h() {
        let t = rod();
        for b in sweep(&t).into_iter().skip(1).step_by(37) {
            let d = 1e-6 * b;
            let fd = (t.h(b + d) - t.h(b - d)) / (2.0 * d);
            assert!(rel(fd, t.nu_diff(b)) < 1e-5, "B = {b}: {fd}");
        }
    }

    #[test]
    fn energy_density_derivative_is_h_and_matches_simpson_per_piece() {
        let t = rod();
        assert_eq!(t.energy_density(0.0), 0.0);
        for b in sweep(&t).into_iter().skip(1).step_by(37) {
            let d = 1e-6 * b;
            let fd = (t.energy_density(b + d) - t.energy_density(b - d)) / (2.0 * d);
            assert!(rel(fd, t.h(b)) < 1e-6, "B = {b}: {fd} vs {}", t.h(b));
        }
        // Simpson's rule is exact for cubics (Burden & Faires, Numerical Analysis, §4.3;
        // section from memory), so it checks each piece's closed-form integral independently.
        let mut b: Vec<f64> = t.points().iter().map(|p| p[1]).collect();
        b.extend([t.tail_start()[1], 3.0 * t.tail_start()[1]]);
        for w in b.windows(2) {
            let (a, c) = (w[0], w[1]);
            let simpson = (c - a) / 6.0 * (t.h(a) + 4.0 * t.h(0.5 * (a + c)) + t.h(c));
            let exact = t.energy_density(c) - t.energy_density(a);
            assert!(rel(simpson, exact) < 1e-9, "[{a}, {c}]: {simpson}");
        }
    }

    #[test]
    fn nu_tends_to_initial_value_at_origin() {
        let t = rod();
        let nu0 = t.nu(0.0);
        assert_eq!(nu0, t.nu_diff(0.0));
        assert!(nu0.is_finite() && nu0 > 0.0);
        // Slope at 0 of the parabola through the first three points, as documented.
        let (s0, s1) = (40.0 / 0.2, 40.0 / 0.4);
        let expect = s0 * (1.0 + 0.2 / 0.6) - s1 * 0.2 / 0.6;
        assert!(rel(nu0, expect) < 1e-12);
        for b in [1e-3, 1e-6, 1e-9, 1e-200, f64::MIN_POSITIVE] {
            assert!(rel(t.nu(b), nu0) < 10.0 * b.max(1e-15), "B = {b}");
        }
    }

    #[test]
    fn tail_slope_is_vacuum_and_saturation_b_consistent() {
        let t = rod();
        let [h_end, b_end] = ROD[ROD.len() - 1];
        let [_, b_tail] = t.tail_start();
        assert!(rel(b_tail - b_end, 1.98 - 1.85) < 1e-12, "blend length");
        for b in [b_tail, 1.5 * b_tail, 10.0, 1e3] {
            assert_eq!(t.nu_diff(b), 1.0 / MU0);
            assert!((b - MU0 * t.h(b) - t.saturation_b()).abs() < 1e-9 * b);
        }
        // On the blend dH/dB ramps linearly, so B − μ0 H grows by L (1 − μ0 ν_end)/2.
        let rise = 0.5 * (b_tail - b_end) * (1.0 - MU0 * t.nu_diff(b_end));
        assert!(rel(t.saturation_b(), b_end - MU0 * h_end + rise) < 1e-12);
        assert!(t.nu_diff(b_end) <= 1.0 / MU0);
    }

    #[test]
    fn odd_h_and_even_rest_for_negative_b() {
        let t = rod();
        assert_eq!(t.h(-1.1), -t.h(1.1));
        assert_eq!(t.nu(-1.1), t.nu(1.1));
        assert_eq!(t.nu_diff(-1.1), t.nu_diff(1.1));
        assert_eq!(t.energy_density(-1.1), t.energy_density(1.1));
        assert!(t.h(f64::NAN).is_nan());
    }

    #[test]
    fn each_invalid_table_is_rejected() {
        let inf = f64::INFINITY;
        let cases: [(&str, Vec<[f64; 2]>); 10] = [
            ("at least 3", vec![[10.0, 0.5], [20.0, 0.8]]),
            ("are not finite", vec![[10.0, 0.5], [inf, 0.8], [30.0, 0.9]]),
            ("≥ 0", vec![[10.0, 0.5], [20.0, -0.8], [30.0, 0.9]]),
            ("remanence", vec![[0.0, 0.1], [20.0, 0.8], [30.0, 0.9]]),
            ("B/(μ0 H)", vec![[10.0, 0.5], [20.0, 0.8], [1e6, 1.2]]),
            ("B/(μ0 H)", vec![[10.0, 0.0], [20.0, 0.8], [30.0, 0.9]]),
            ("H must", vec![[10.0, 0.5], [10.0, 0.8], [30.0, 0.9]]),
            ("B must", vec![[10.0, 0.5], [20.0, 0.5], [30.0, 0.9]]),
            ("ΔB/(μ0 ΔH)", vec![[10.0, 0.5], [20.0, 0.8], [1e5, 0.9]]),
            // Numbered from 1, as h[k] in a case file.
            ("point 3 (H = 1.5", vec![[1.0, 0.5], [2.0, 0.8], [1.5, 0.9]]),
        ];
        for (what, pts) in cases {
            match BhTable::new(&pts) {
                Err(SolverError::BadMaterial(m)) => assert!(m.contains(what), "{what}: {m}"),
                other => panic!("{what}: expected BadMaterial, got {other:?}"),
            }
        }
        // Exactly on the vacuum line (μr = 1, μr_diff = 1) is valid.
        let j = 1.0;
        let on_line = [[10.0, 0.5], [1e5, j + MU0 * 1e5], [3e5, j + MU0 * 3e5]];
        assert!(BhTable::new(&on_line).is_ok());
    }

    #[test]
    fn smooth_law_reproduced_between_points() {
        let hs = [
            5.0, 10.0, 20.0, 35.0, 50.0, 75.0, 100.0, 150.0, 200.0, 300.0, 400.0, 600.0, 1e3,
            1.5e3, 2.5e3, 4e3, 7e3, 1e4, 2e4, 5e4,
        ];
        let pts: Vec<[f64; 2]> = hs.iter().map(|&h| [h, froehlich_kennelly(h)]).collect();
        let t = BhTable::new(&pts).unwrap();
        // Tolerances (our choice, within the usual spread of measured B–H curves, common
        // practice): 2.5 % in H at given B, and 0.5 % in B for the same error read as
        // ΔB = ΔH / (dH/dB). Saturation is steep in H(B), so the H error peaks there (measured
        // 1.9 %, against 5.9 % for chords), while the B error peaks on the first interval.
        let (mut worst_h, mut worst_b): (f64, f64) = (0.0, 0.0);
        for w in t.points().windows(2) {
            for f in [0.1, 0.25, 0.5, 0.75, 0.9] {
                let h = w[0][0] + f * (w[1][0] - w[0][0]);
                let b = froehlich_kennelly(h);
                worst_h = worst_h.max(rel(t.h(b), h));
                worst_b = worst_b.max((t.h(b) - h).abs() / (t.nu_diff(b) * b));
            }
        }
        assert!(worst_h < 0.025, "worst relative H error {worst_h}");
        assert!(worst_b < 0.005, "worst relative B error {worst_b}");
        let mu_r0 = 1.0 / (MU0 * t.nu(0.0));
        let exact = 1.0 + 1.5 / (100.0 * MU0);
        assert!(rel(mu_r0, exact) < 0.05, "initial μr {mu_r0} vs {exact}");
    }

    #[test]
    fn refuses_points_outside_the_supported_magnitudes_and_permeabilities() {
        let ok = [[100.0, 0.5], [1e3, 1.2], [1e4, 1.6]];
        assert!(BhTable::new(&ok).is_ok());
        for (bad, needle) in [
            ([1e-300, 1e-300], "must reach"),
            ([1e3, 1e300], "above the supported"),
            ([1e13, 2e7], "above the supported"),
            ([1e308, 1.9], "< 1"),
            ([1e-6, 1.0], "relative permeability"),
        ] {
            let mut pts = ok.to_vec();
            pts[if bad[0] < 100.0 { 0 } else { 1 }] = bad;
            pts.sort_by(|a, b| a[0].total_cmp(&b[0]));
            let e = BhTable::new(&pts).unwrap_err().to_string();
            assert!(e.contains(needle), "{bad:?}: {e}");
        }
        // A segment steeper than μr_diff = 1e9 between two moderate points.
        let steep = [[100.0, 0.5], [100.000001, 1.2], [1e4, 1.6]];
        let e = BhTable::new(&steep).unwrap_err().to_string();
        assert!(e.contains("ΔB/(μ0 ΔH)"), "{e}");
    }
}
