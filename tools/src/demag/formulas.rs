//! The demagnetizing-factor formulas users reach for, evaluated for a core's shape and
//! compared with its field solution. The closed forms live in `axicore-formulas`, with their
//! sources.

use serde::Serialize;

use super::factors::Factors;

/// The formulas compared, in report order.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Formula {
    /// The prolate/oblate spheroid of the core's length/diameter (Osborn, Phys. Rev. 67, 351,
    /// 1945): exact for spheroids at every χ, a substitute for rods.
    Ellipsoid,
    /// Sato & Ishii's cylinder formula 1/(4γ/√π + 1) (J. Appl. Phys. 66(2), 983, 1989), an
    /// approximation of Nm at χ = 0.
    SatoIshii,
    /// The torquer design-report formula 4[ln(2γ) − 1]/[(2γ)² − 4 ln(2γ)] (Miller, Univ. of
    /// Michigan, 2013; Li et al., J. Control Sci. Eng. 2013, eq. 2 [citation from memory]),
    /// slender rods.
    Miller,
    /// The ferrite-rod fit 0.37 γ^(−1.44), stated for 2 < γ < 20 (references.md §1).
    FerriteFit,
    /// The exact χ = 0 factors of a uniformly magnetized rod or tube (Nm from the inductance
    /// analogy, Nf from the charge picture; references.md §1): what the factors are worth
    /// when the core's own χ is ignored.
    #[serde(rename = "chi0_exact")]
    UniformMagnetization,
}

impl Formula {
    /// Every formula, in report order.
    pub const ALL: [Formula; 5] = [
        Formula::Ellipsoid,
        Formula::SatoIshii,
        Formula::Miller,
        Formula::FerriteFit,
        Formula::UniformMagnetization,
    ];

    /// Our short name (CSV columns, plot legends).
    pub fn name(self) -> &'static str {
        match self {
            Formula::Ellipsoid => "ellipsoid",
            Formula::SatoIshii => "sato_ishii",
            Formula::Miller => "miller",
            Formula::FerriteFit => "ferrite_fit",
            Formula::UniformMagnetization => "chi0_exact",
        }
    }

    /// A legend label.
    pub fn label(self) -> &'static str {
        match self {
            Formula::Ellipsoid => "ellipsoid of equal L/D (Osborn 1945)",
            Formula::SatoIshii => "Sato–Ishii (1989)",
            Formula::Miller => "torquer report (Miller 2013)",
            Formula::FerriteFit => "ferrite-rod fit 0.37γ^−1.44",
            Formula::UniformMagnetization => "exact χ = 0 factors",
        }
    }

    /// Whether the formula is meant for the fluxmetric factor (else the magnetometric one).
    pub fn targets_fluxmetric(self) -> bool {
        self == Formula::FerriteFit
    }
}

/// The core shapes the formulas are evaluated for.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Body {
    /// A solid rod of length/diameter γ.
    Rod {
        /// L/D.
        gamma: f64,
    },
    /// A tube of outer length/diameter γ and bore/diameter β.
    Tube {
        /// L/D.
        gamma: f64,
        /// Bore diameter / outer diameter.
        beta: f64,
    },
    /// A spheroid of axis ratio γ (polar over equatorial diameter; a sphere at 1).
    Spheroid {
        /// Axis ratio.
        gamma: f64,
    },
}

impl Body {
    /// Length over (outer) diameter.
    pub fn gamma(self) -> f64 {
        match self {
            Body::Rod { gamma } | Body::Tube { gamma, .. } | Body::Spheroid { gamma } => gamma,
        }
    }
}

/// A formula's factors for a body: (for Nm, for Nf); None where it does not apply (outside
/// its stated range or domain, or not meant for this shape).
pub fn formula_factors(f: Formula, body: Body) -> Option<(f64, f64)> {
    use axicore_formulas as cf;
    let g = body.gamma();
    let both = |n: f64| n.is_finite().then_some((n, n));
    match (f, body) {
        (Formula::Ellipsoid, _) => both(cf::ellipsoid_equal_ratio_n(g)),
        (_, Body::Spheroid { .. }) => None,
        (Formula::SatoIshii, _) => both(cf::sato_ishii_n(g)),
        (Formula::Miller, _) => both(cf::miller_rod_n(g)),
        (Formula::FerriteFit, _) => {
            let (lo, hi) = cf::FERRITE_FIT_RANGE;
            (g > lo && g < hi)
                .then(|| both(cf::ferrite_rod_fit_n(g)))
                .flatten()
        }
        (Formula::UniformMagnetization, Body::Rod { .. }) => {
            Some((cf::rod_nm_chi0(g), cf::rod_nf_chi0(g)))
        }
        (Formula::UniformMagnetization, Body::Tube { beta, .. }) => {
            Some((cf::tube_nm_chi0(g, beta), cf::tube_nf_chi0(g, beta)))
        }
    }
}

/// How far one formula is from the field solution at one point.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Deviation {
    /// The formula.
    pub formula: Formula,
    /// Its factor for Nm.
    pub n_for_nm: f64,
    /// Its factor for Nf.
    pub n_for_nf: f64,
    /// N_formula/Nm − 1.
    pub vs_nm: f64,
    /// N_formula/Nf − 1.
    pub vs_nf: f64,
    /// Moment from the formula's apparent susceptibility χ/(1 + χN) over the solved moment,
    /// minus 1 (0 at χ = 0).
    pub moment: f64,
    /// The deviation of the factor the formula is meant for (Nf for the ferrite fit, Nm
    /// otherwise), beyond the solution's own relative error bar.
    pub significant: f64,
    /// Whether |that deviation| exceeds the threshold beyond the error bar.
    pub flagged: bool,
}

impl Deviation {
    /// Sets `significant` and `flagged` from the relative error bars of Nm and Nf: the
    /// deviation of the factor the formula is meant for, less that factor's bar, against
    /// `threshold`.
    pub fn judge(&mut self, bar_nm: f64, bar_nf: f64, threshold: f64) {
        let (dev, bar) = if self.formula.targets_fluxmetric() {
            (self.vs_nf, bar_nf)
        } else {
            (self.vs_nm, bar_nm)
        };
        self.significant = dev.signum() * (dev.abs() - bar).max(0.0);
        self.flagged = self.significant.abs() > threshold;
    }
}

/// A factor's relative error bar from its absolute one (0 without an estimate).
pub fn relative_bar(n: f64, error: Option<f64>) -> f64 {
    match error {
        Some(e) if n != 0.0 => e / n.abs(),
        _ => 0.0,
    }
}

/// The deviations of every applicable formula at one solved point, flagged above
/// `threshold` (relative).
pub fn deviations(body: Body, fe: &Factors, threshold: f64) -> Vec<Deviation> {
    Formula::ALL
        .iter()
        .filter_map(|&f| {
            let (a, b) = formula_factors(f, body)?;
            let vs_nm = a / fe.nm - 1.0;
            let vs_nf = b / fe.nf - 1.0;
            let chi = fe.chi;
            let moment = if chi > 0.0 {
                (1.0 + chi * fe.nm) / (1.0 + chi * a) - 1.0
            } else {
                0.0
            };
            let mut d = Deviation {
                formula: f,
                n_for_nm: a,
                n_for_nf: b,
                vs_nm,
                vs_nf,
                moment,
                significant: 0.0,
                flagged: false,
            };
            d.judge(
                relative_bar(fe.nm, fe.nm_error),
                relative_bar(fe.nf, fe.nf_error),
                threshold,
            );
            Some(d)
        })
        .collect()
}
