//! Saturating laws: a tabulated curve and analytic laws used in practice.
//!
//! Laws given naturally as B(H) (Fröhlich–Kennelly, arctangent, knee) are inverted for H(B)
//! with a safeguarded Newton iteration to rounding accuracy; laws given as H(B) (table,
//! Brauer) are inverted the other way only for output ([`SaturationLaw::b_of_h`]).

use super::invert::solve_increasing;
use super::table::BhTable;
use super::{MAX_MU_R, MIN_SATURATION};
use crate::constants::MU0;
use crate::error::SolverError;

/// A single-valued, isotropic, strictly monotone magnetisation law.
#[derive(Debug, Clone, PartialEq)]
pub enum SaturationLaw {
    /// A B–H table made smooth and monotone (see [`BhTable`]).
    Table(BhTable),
    /// Fröhlich–Kennelly with the vacuum asymptote: B = μ0 H + Js H/(Hk + H), where
    /// Hk = Js/(μ0 (μri − 1)) gives the initial relative permeability μri.
    FrohlichKennelly {
        /// Saturation polarisation Js = μ0 Ms in T.
        js: f64,
        /// Initial relative permeability.
        mu_ri: f64,
    },
    /// Arctangent law: B = μ0 H + (2Js/π)·atan(π μ0 (μri − 1) H / (2Js)).
    Arctan {
        /// Saturation polarisation in T.
        js: f64,
        /// Initial relative permeability.
        mu_ri: f64,
    },
    /// Brauer's reluctivity ν(B²) = k1·exp(k2 B²) + k3 (IEEE Trans. Magn. MAG-11, 81, 1975),
    /// continued with the vacuum slope from the flux density where its differential
    /// reluctivity reaches 1/μ0, so that it stays physical (μr ≥ 1) at any field.
    Brauer(Brauer),
    /// Our three-parameter rational law with a knee: B = μ0 H + Js·(1 − 1/(1 + a x + x²)),
    /// x = H/Hk, where a and Hk are fixed by the initial and the maximum relative permeability
    /// (max of B/(μ0 H)): (μi − 1)/(μmax − 1) = a(2 − a), Hk = Js/(μ0 (μmax − 1)(2 − a)).
    /// It reproduces Js, μi and μmax exactly, is C^∞ and strictly increasing.
    Knee {
        /// Saturation polarisation in T.
        js: f64,
        /// Initial relative permeability.
        mu_i: f64,
        /// Maximum relative permeability (≥ μi).
        mu_max: f64,
    },
}

/// Brauer's coefficients with the flux density where the vacuum continuation starts.
#[derive(Debug, Clone, PartialEq)]
pub struct Brauer {
    k1: f64,
    k2: f64,
    k3: f64,
    knee: f64,
}

impl Brauer {
    /// The law ν(B²) = k1·exp(k2 B²) + k3 with k1, k3 in m/H and k2 in 1/T².
    pub fn new(k1: f64, k2: f64, k3: f64) -> Result<Self, SolverError> {
        let ok = |v: f64| v.is_finite() && v >= 0.0;
        if !(ok(k1) && ok(k2) && ok(k3) && k3 > 0.0) {
            return Err(SolverError::BadMaterial(format!(
                "Brauer coefficients need k1 ≥ 0, k2 ≥ 0, k3 > 0 (got {k1}, {k2}, {k3})"
            )));
        }
        if (k1 + k3) * MU0 > 1.0 {
            return Err(SolverError::BadMaterial(format!(
                "Brauer initial reluctivity k1 + k3 = {} m/H exceeds 1/μ0 (μr < 1)",
                k1 + k3
            )));
        }
        if (k1 + k3) * MU0 * MAX_MU_R < 1.0 {
            return Err(SolverError::BadMaterial(format!(
                "Brauer initial relative permeability 1/(μ0 (k1 + k3)) = {:.3e} is above the \
                 supported {MAX_MU_R:e}",
                1.0 / (MU0 * (k1 + k3))
            )));
        }
        if k1 * k2 == 0.0 {
            return Err(SolverError::BadMaterial(
                "Brauer law with k1·k2 = 0 never saturates; use a linear μr".into(),
            ));
        }
        let knee = brauer_knee(k1, k2, k3);
        // Far below any soft magnetic material's saturation: the law would be vacuum-like at
        // every field the solver meets (k2 = 1e300 ended in a singular system, exit code 1).
        if knee.is_nan() || knee < MIN_SATURATION {
            return Err(SolverError::BadMaterial(format!(
                "Brauer law reaches the vacuum slope at B = {knee:.3e} T, below the supported \
                 {MIN_SATURATION} T (k2 too large?)"
            )));
        }
        Ok(Self { k1, k2, k3, knee })
    }

    /// The coefficients (k1 in m/H, k2 in 1/T², k3 in m/H).
    pub fn coefficients(&self) -> [f64; 3] {
        [self.k1, self.k2, self.k3]
    }

    fn h(&self, b: f64) -> f64 {
        let h = |b: f64| (self.k1 * (self.k2 * b * b).exp() + self.k3) * b;
        if b <= self.knee {
            h(b)
        } else {
            h(self.knee) + (b - self.knee) / MU0
        }
    }

    fn nu_diff(&self, b: f64) -> f64 {
        if b >= self.knee {
            1.0 / MU0
        } else {
            let e = self.k1 * (self.k2 * b * b).exp();
            self.k3 + e * (1.0 + 2.0 * self.k2 * b * b)
        }
    }

    fn energy_density(&self, b: f64) -> f64 {
        let (k1, k2, k3) = (self.k1, self.k2, self.k3);
        let w = |b: f64| k1 * (k2 * b * b).exp_m1() / (2.0 * k2) + 0.5 * k3 * b * b;
        let bx = self.knee;
        if b <= bx {
            w(b)
        } else {
            w(bx) + self.h(bx) * (b - bx) + 0.5 * (b - bx) * (b - bx) / MU0
        }
    }
}

fn bad(msg: String) -> Result<(), SolverError> {
    Err(SolverError::BadMaterial(msg))
}

/// Rejects a saturation below [`MIN_SATURATION`] or a permeability above [`MAX_MU_R`].
fn check_ranges(js: f64, mu: f64) -> Result<(), SolverError> {
    if js < MIN_SATURATION {
        return bad(format!(
            "saturation polarisation {js:e} T is below the supported {MIN_SATURATION} T"
        ));
    }
    if mu > MAX_MU_R {
        return bad(format!(
            "relative permeability {mu:e} is above the supported {MAX_MU_R:e}"
        ));
    }
    Ok(())
}

impl SaturationLaw {
    /// Checks the parameters.
    pub fn validate(&self) -> Result<(), SolverError> {
        let pos = |v: f64| v.is_finite() && v > 0.0;
        match *self {
            SaturationLaw::Table(_) => Ok(()),
            SaturationLaw::FrohlichKennelly { js, mu_ri } | SaturationLaw::Arctan { js, mu_ri } => {
                if !pos(js) {
                    return bad(format!("saturation polarisation {js} T must be > 0"));
                }
                if !(mu_ri.is_finite() && mu_ri > 1.0) {
                    return bad(format!("initial relative permeability {mu_ri} must be > 1"));
                }
                check_ranges(js, mu_ri)
            }
            SaturationLaw::Brauer(_) => Ok(()),
            SaturationLaw::Knee { js, mu_i, mu_max } => {
                if !pos(js) {
                    return bad(format!("saturation polarisation {js} T must be > 0"));
                }
                if !(mu_i.is_finite() && mu_i > 1.0) {
                    return bad(format!("initial relative permeability {mu_i} must be > 1"));
                }
                if !(mu_max.is_finite() && mu_max >= mu_i) {
                    return bad(format!(
                        "maximum relative permeability {mu_max} must be ≥ the initial {mu_i}"
                    ));
                }
                check_ranges(js, mu_max)
            }
        }
    }

    /// B in T and dB/dH in H/m at field strength `h` ≥ 0, for laws given as B(H).
    fn b_and_slope(&self, h: f64) -> (f64, f64) {
        match *self {
            SaturationLaw::FrohlichKennelly { js, mu_ri } => {
                let hk = js / (MU0 * (mu_ri - 1.0));
                let d = hk + h;
                (MU0 * h + js * h / d, MU0 + js * hk / (d * d))
            }
            SaturationLaw::Arctan { js, mu_ri } => {
                let c = std::f64::consts::FRAC_PI_2 * MU0 * (mu_ri - 1.0) / js;
                let j = js / std::f64::consts::FRAC_PI_2 * (c * h).atan();
                (
                    MU0 * h + j,
                    MU0 + MU0 * (mu_ri - 1.0) / (1.0 + (c * h) * (c * h)),
                )
            }
            SaturationLaw::Knee { js, mu_i, mu_max } => {
                let (a, hk) = knee_shape(js, mu_i, mu_max);
                let x = h / hk;
                let q = 1.0 + a * x + x * x;
                let j = js * (a * x + x * x) / q;
                (MU0 * h + j, MU0 + js * (a + 2.0 * x) / (q * q * hk))
            }
            SaturationLaw::Table(_) | SaturationLaw::Brauer(_) => {
                let b = self.b_of_h(h);
                (b, 1.0 / self.nu_diff(b))
            }
        }
    }

    /// H in A/m at |B| = `b` (T).
    pub fn h(&self, b: f64) -> f64 {
        match self {
            SaturationLaw::Table(t) => t.h(b),
            SaturationLaw::FrohlichKennelly { .. } => self.nu(b) * b,
            SaturationLaw::Brauer(l) => l.h(b),
            _ => {
                if b <= 0.0 {
                    return 0.0;
                }
                if let SaturationLaw::Knee { js, mu_i, mu_max } = *self {
                    return knee_h(js, mu_i, mu_max, b);
                }
                // B ≥ μ0 H bounds H from above. Guess: the initial permeability below the
                // knee, the vacuum line shifted by Js above it.
                let js = self.saturation_b().unwrap_or(0.0);
                let guess = (b * self.nu(0.0)).max((b - js) / MU0);
                solve_increasing(|h| self.b_and_slope(h), b, 0.0, b / MU0, guess)
            }
        }
    }

    /// Reluctivity H/B in m/H (its limit at b = 0).
    pub fn nu(&self, b: f64) -> f64 {
        match *self {
            SaturationLaw::Table(ref t) => t.nu(b),
            SaturationLaw::FrohlichKennelly { js, mu_ri } => {
                // Root of μ0 H² + (μ0 Hk + Js − B) H − B Hk = 0, in the form without cancellation.
                let hk = js / (MU0 * (mu_ri - 1.0));
                let p = MU0 * hk + js - b;
                let s = (p * p + 4.0 * MU0 * b * hk).sqrt();
                if p >= 0.0 {
                    2.0 * hk / (p + s)
                } else {
                    (s - p) / (2.0 * MU0 * b)
                }
            }
            SaturationLaw::Arctan { mu_ri, .. } | SaturationLaw::Knee { mu_i: mu_ri, .. }
                if b <= 0.0 =>
            {
                1.0 / (MU0 * mu_ri)
            }
            SaturationLaw::Brauer(ref l) if b <= 0.0 => l.k1 + l.k3,
            _ => self.h(b) / b,
        }
    }

    /// (ν, ν_d) at |B| = `b`, sharing one inversion of the law where it is needed.
    pub fn reluctivities(&self, b: f64) -> (f64, f64) {
        match *self {
            SaturationLaw::Arctan { .. } | SaturationLaw::Knee { .. } if b > 0.0 => {
                let h = self.h(b);
                (h / b, 1.0 / self.b_and_slope(h).1)
            }
            _ => (self.nu(b), self.nu_diff(b)),
        }
    }

    /// Differential reluctivity dH/dB in m/H.
    pub fn nu_diff(&self, b: f64) -> f64 {
        match *self {
            SaturationLaw::Table(ref t) => t.nu_diff(b),
            SaturationLaw::Brauer(ref l) => l.nu_diff(b),
            _ => 1.0 / self.b_and_slope(self.h(b)).1,
        }
    }

    /// Energy density ∫_0^b H dB in J/m³.
    pub fn energy_density(&self, b: f64) -> f64 {
        match *self {
            SaturationLaw::Table(ref t) => t.energy_density(b),
            SaturationLaw::Brauer(ref l) => l.energy_density(b),
            _ => {
                // Legendre transform: w(B) = B·H − ∫_0^H B dh, the co-energy in closed form.
                let h = self.h(b);
                b * h - self.coenergy_density(h)
            }
        }
    }

    /// Co-energy density ∫_0^H B dh in J/m³ for the laws given as B(H).
    fn coenergy_density(&self, h: f64) -> f64 {
        let vacuum = 0.5 * MU0 * h * h;
        match *self {
            SaturationLaw::FrohlichKennelly { js, mu_ri } => {
                let hk = js / (MU0 * (mu_ri - 1.0));
                vacuum + js * (h - hk * (h / hk).ln_1p())
            }
            SaturationLaw::Arctan { js, mu_ri } => {
                let c = std::f64::consts::FRAC_PI_2 * MU0 * (mu_ri - 1.0) / js;
                let ch = c * h;
                let int_atan = h * ch.atan() - (ch * ch).ln_1p() / (2.0 * c);
                vacuum + js / std::f64::consts::FRAC_PI_2 * int_atan
            }
            SaturationLaw::Knee { js, mu_i, mu_max } => {
                let (a, hk) = knee_shape(js, mu_i, mu_max);
                let x = h / hk;
                let d = (4.0 - a * a).sqrt();
                let int_q = 2.0 / d * (((2.0 * x + a) / d).atan() - (a / d).atan());
                vacuum + js * (h - hk * int_q)
            }
            SaturationLaw::Table(_) | SaturationLaw::Brauer(_) => {
                unreachable!("co-energy is only used for laws given as B(H)")
            }
        }
    }

    /// |B| in T at field strength `h` ≥ 0 (A/m).
    pub fn b_of_h(&self, h: f64) -> f64 {
        match self {
            SaturationLaw::Table(_) | SaturationLaw::Brauer(_) => {
                if h <= 0.0 {
                    return 0.0;
                }
                // B ≥ μ0 H from below; above, widen from the initial permeability (a curve
                // whose permeability rises first may need more).
                let lo = MU0 * h;
                let mut hi = h / self.nu(0.0);
                while self.h(hi) < h {
                    hi *= 2.0;
                }
                solve_increasing(|b| (self.h(b), self.nu_diff(b)), h, lo, hi, lo)
            }
            _ => self.b_and_slope(h).0,
        }
    }

    /// Saturation polarisation: the limit of B − μ0 H in T.
    pub fn saturation_b(&self) -> Option<f64> {
        match *self {
            SaturationLaw::Table(ref t) => Some(t.saturation_b()),
            SaturationLaw::FrohlichKennelly { js, .. }
            | SaturationLaw::Arctan { js, .. }
            | SaturationLaw::Knee { js, .. } => Some(js),
            SaturationLaw::Brauer(ref l) => Some(l.knee - MU0 * l.h(l.knee)),
        }
    }
}

/// Shape parameters (a, Hk in A/m) of the knee law.
fn knee_shape(js: f64, mu_i: f64, mu_max: f64) -> (f64, f64) {
    let ratio = ((mu_i - 1.0) / (mu_max - 1.0)).min(1.0);
    let a = 1.0 - (1.0 - ratio).sqrt();
    (a, js / (MU0 * (mu_max - 1.0) * (2.0 - a)))
}

/// H in A/m of the knee law at |B| = `b` > 0: the positive root of the cubic in x = H/Hk that
/// clears the law's denominator, p(x) = m x³ + (a m + Js − B) x² + (m + a Js − a B) x − B with
/// m = μ0 Hk. Why not the generic inversion of B(H): this runs at every quadrature point of
/// every residual, and Newton on B(H) from below creeps along the knee (119 ns per call,
/// measured on the 80 % Ni-Fe law over 0–1.2 T). p has one positive root with p < 0 left of
/// it and is convex right of it, so Newton from an upper bound descends monotonically; the
/// bounds below make the first guess close.
fn knee_h(js: f64, mu_i: f64, mu_max: f64, b: f64) -> f64 {
    if !b.is_finite() {
        // NaN stays NaN (the bounds' max/min would drop it); an infinite B needs infinite H.
        return b;
    }
    let (a, hk) = knee_shape(js, mu_i, mu_max);
    let m = MU0 * hk;
    let (c2, c1) = (a * m + js - b, m + a * (js - b));
    let p = |x: f64| ((m * x + c2) * x + c1) * x - b;
    let dp = |x: f64| (3.0 * m * x + 2.0 * c2) * x + c1;
    let polarisation = |x: f64| js * (a * x + x * x) / (1.0 + a * x + x * x);
    let (lo, hi) = if b < js {
        // μ0 H ≥ 0 gives J ≤ B: the root of (Js − B)(x² + a x) = B bounds x from above; so does
        // m x³ ≤ m x q = B − (Js − B)(a x + x²) ≤ B.
        let d = js - b;
        let below = 2.0 * b / (a * d + (a * a * d * d + 4.0 * d * b).sqrt());
        // (cbrt is slow: taken only where it is the tighter bound, close below Js.)
        let cubic = if m * below * below * below > b {
            (b / m).cbrt()
        } else {
            below
        };
        (0.0, below.min(cubic))
    } else {
        // J < Js gives x > (B − Js)/m; J ≥ J(that) gives x ≤ (B − J(lo))/m; and m x³/2 exceeds
        // each term of m x q = B + (B − Js)(a x + x²) once x passes the cubic and linear bounds.
        let lo = (b - js) / m;
        let linear = (2.0 * (1.0 + a) * lo).max(1.0);
        let split = if m * linear * linear * linear < 2.0 * b {
            (2.0 * b / m).cbrt()
        } else {
            linear
        };
        (lo, split.min((b - polarisation(lo)) / m))
    };
    let (mut lo, mut hi) = (lo, hi.max(lo));
    let mut x = hi;
    for _ in 0..100 {
        let y = p(x);
        // Stop at the rounding level of p's terms (their sum cancels at the root).
        let noise = 8.0 * f64::EPSILON * (((m * x + c2.abs()) * x + c1.abs()) * x + b);
        if y.abs() <= noise {
            break;
        }
        if y > 0.0 {
            hi = x;
        } else {
            lo = x;
        }
        let d = dp(x);
        let newton = x - y / d;
        x = if d > 0.0 && newton > lo && newton < hi {
            newton
        } else {
            0.5 * (lo + hi)
        };
        if hi - lo <= 4.0 * f64::EPSILON * hi {
            break;
        }
    }
    hk * x
}

/// Flux density where Brauer's differential reluctivity reaches 1/μ0 (it grows monotonically).
fn brauer_knee(k1: f64, k2: f64, k3: f64) -> f64 {
    let nu_d = |b: f64| k3 + k1 * (k2 * b * b).exp() * (1.0 + 2.0 * k2 * b * b);
    let target = 1.0 / MU0;
    let mut hi = 1.0;
    while nu_d(hi) < target {
        hi *= 2.0;
    }
    let slope = |b: f64| {
        let e = k1 * (k2 * b * b).exp();
        (nu_d(b), e * k2 * b * (6.0 + 4.0 * k2 * b * b))
    };
    solve_increasing(slope, target, 0.0, hi, hi)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn laws() -> Vec<SaturationLaw> {
        vec![
            SaturationLaw::FrohlichKennelly {
                js: 1.5,
                mu_ri: 2000.0,
            },
            SaturationLaw::Arctan {
                js: 1.5,
                mu_ri: 1000.0,
            },
            SaturationLaw::Knee {
                js: 0.8,
                mu_i: 30000.0,
                mu_max: 200000.0,
            },
            // Coefficients of the order of Brauer's 1975 steel fit (demo values).
            SaturationLaw::Brauer(Brauer::new(3.8, 2.17, 396.2).unwrap()),
        ]
    }

    #[test]
    fn each_law_is_strictly_monotone_with_consistent_derivative_and_energy() {
        for law in laws() {
            law.validate().unwrap();
            let mut prev = -1.0;
            for i in 1..400 {
                let b = 3.0 * i as f64 / 400.0;
                let h = law.h(b);
                assert!(h > prev, "{law:?} at {b}");
                prev = h;
                let db = 1e-6 * b;
                let fd = (law.h(b + db) - law.h(b - db)) / (2.0 * db);
                let nd = law.nu_diff(b);
                let (n1, n2) = law.reluctivities(b);
                assert!((n1 - law.nu(b)).abs() <= 1e-14 * n1 && (n2 - nd).abs() <= 1e-14 * nd);
                assert!((fd - nd).abs() < 1e-5 * nd, "{law:?} b={b} {fd} {nd}");
                let fw = (law.energy_density(b + db) - law.energy_density(b - db)) / (2.0 * db);
                assert!((fw - h).abs() < 1e-5 * h, "{law:?} b={b} {fw} {h}");
                assert!(nd * MU0 <= 1.0 + 1e-12 && law.nu(b) * MU0 <= 1.0 + 1e-12);
            }
        }
    }

    #[test]
    fn b_of_h_inverts_h_of_b() {
        for law in laws() {
            for b in [1e-4, 0.1, 0.7, 1.2, 2.5, 10.0] {
                let back = law.b_of_h(law.h(b));
                assert!((back - b).abs() < 1e-12 * b, "{law:?} {b} {back}");
            }
        }
    }

    #[test]
    fn knee_law_cubic_root_matches_the_generic_inversion_of_b_of_h() {
        // The closed-form bracket and Newton on the cubic (`knee_h`) against bisection-safeguarded
        // Newton on B(H) itself, from far below the knee to deep saturation.
        for (js, mu_i, mu_max) in [
            (0.78, 5e4, 2.5e5),
            (2.0, 300.0, 5000.0),
            (1.6, 6000.0, 6000.0),
        ] {
            let law = SaturationLaw::Knee { js, mu_i, mu_max };
            let sweep = (0..=400).map(|k| 3.0 * js * (k as f64 / 400.0).powi(2) + 1e-9);
            let edges = [1e-12, js * (1.0 - 1e-9), js, js * (1.0 + 1e-9), 100.0 * js];
            for b in sweep.chain(edges) {
                let h = law.h(b);
                let generic = solve_increasing(|h| law.b_and_slope(h), b, 0.0, b / MU0, 0.0);
                let back = law.b_and_slope(h).0;
                assert!(
                    (h - generic).abs() <= 1e-12 * generic,
                    "{law:?} b={b}: {h} vs {generic}"
                );
                assert!(
                    (back - b).abs() <= 1e-14 * b,
                    "{law:?} b={b}: B(H) = {back}"
                );
            }
            assert!(law.h(f64::NAN).is_nan());
        }
    }

    #[test]
    fn laws_outside_the_supported_ranges_are_refused() {
        // Each reached the solver before: singular systems (exit code 1) or NaN residuals.
        assert!(Brauer::new(1e-300, 2.0, 1e-300).is_err(), "μr ≈ 4e305");
        assert!(Brauer::new(3.8, 1e300, 396.2).is_err(), "knee at 6e-61 T");
        assert!(Brauer::new(3.8, 2.17, 396.2).is_ok());
        let knee = |js, mu_max| {
            SaturationLaw::Knee {
                js,
                mu_i: 3000.0,
                mu_max,
            }
            .validate()
        };
        assert!(knee(1e-300, 2e4).is_err());
        assert!(knee(1.5, 1e308).is_err());
        assert!(knee(1.5, 2e4).is_ok());
    }

    #[test]
    fn knee_law_has_the_stated_initial_and_maximum_permeability() {
        let (js, mu_i, mu_max) = (0.8, 30000.0, 200000.0);
        let law = SaturationLaw::Knee { js, mu_i, mu_max };
        let mu0 = 1.0 / (MU0 * law.nu(0.0));
        assert!((mu0 - mu_i).abs() < 1e-9 * mu_i);
        let peak = (1..20000)
            .map(|i| {
                let h = 0.01 * i as f64;
                law.b_of_h(h) / (MU0 * h)
            })
            .fold(0.0, f64::max);
        assert!((peak - mu_max).abs() < 1e-4 * mu_max, "{peak}");
    }

    #[test]
    fn laws_tend_to_the_vacuum_slope_above_saturation() {
        for law in laws() {
            let js = law.saturation_b().unwrap();
            let b = js + 50.0;
            assert!((law.nu_diff(b) * MU0 - 1.0).abs() < 1e-3, "{law:?}");
            let j = b - MU0 * law.h(b);
            assert!((j - js).abs() < 2e-3 * js, "{law:?} {j} {js}");
        }
    }
}
