//! Nm and Nf from a solved core, with error bars propagated from the estimated errors of the
//! quantities they come from.

use axicore_solver::MU0;
use serde::Serialize;

use super::averages::CoreAverages;

/// How the core is driven, which fixes how its factors are read off the field.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Drive {
    /// A linear core of susceptibility χ > 0 alone in a uniform axial field H0 (A/m).
    Uniform {
        /// Applied field, A/m.
        h0: f64,
        /// Susceptibility μr − 1.
        chi: f64,
    },
    /// A core with a prescribed uniform axial magnetization and recoil μr = 1, alone (χ = 0).
    Magnetized,
}

/// Demagnetizing factors of one solved core.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Factors {
    /// Susceptibility of the core (0 for a prescribed magnetization).
    pub chi: f64,
    /// Magnetometric factor.
    pub nm: f64,
    /// Its estimated absolute error (None without an estimate).
    pub nm_error: Option<f64>,
    /// Fluxmetric factor.
    pub nf: f64,
    /// Its estimated absolute error (None without an estimate).
    pub nf_error: Option<f64>,
    /// Apparent susceptibility by the moment, χ/(1 + χ Nm) = m/(V H0) (0 at χ = 0).
    pub chi_app_m: f64,
    /// Apparent susceptibility at the mid-plane, χ/(1 + χ Nf) = ⟨M⟩_mid/H0 (0 at χ = 0).
    pub chi_app_f: f64,
}

/// Relative errors of the two quantities the factors come from: for [`Drive::Uniform`] the
/// core's moment and its mid-plane flux, for [`Drive::Magnetized`] ⟨H_z⟩ over the volume and
/// over the mid-plane.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct SourceErrors {
    /// Relative error of the volume quantity.
    pub volume: Option<f64>,
    /// Relative error of the mid-plane quantity.
    pub mid: Option<f64>,
}

/// ⟨H_z⟩ over the mid-plane of a prescribed-magnetization core (recoil μr = 1, so M = M0 =
/// ⟨M⟩ everywhere in the core), A/m.
pub fn magnetized_mid_h(avg: &CoreAverages) -> f64 {
    avg.mid_b_z() / MU0 - avg.m_z
}

/// The factors of a core driven by `drive` with field averages `avg`.
pub fn factors(drive: Drive, avg: &CoreAverages, err: SourceErrors) -> Factors {
    match drive {
        Drive::Uniform { h0, chi } => {
            // M = χ H and B = μ0 (1 + χ) H inside a linear core, so ⟨M⟩ = χ/(1+χ) ⟨B⟩/μ0.
            let mid_m = chi / (1.0 + chi) * avg.mid_b_z() / MU0;
            let nm = h0 / avg.m_z - 1.0 / chi;
            let nf = h0 / mid_m - 1.0 / chi;
            Factors {
                chi,
                nm,
                nm_error: err.volume.map(|e| (nm + 1.0 / chi) * e),
                nf,
                nf_error: err.mid.map(|e| (nf + 1.0 / chi) * e),
                chi_app_m: avg.m_z / h0,
                chi_app_f: mid_m / h0,
            }
        }
        Drive::Magnetized => {
            let nm = -avg.h_z() / avg.m_z;
            let nf = -magnetized_mid_h(avg) / avg.m_z;
            Factors {
                chi: 0.0,
                nm,
                nm_error: err.volume.map(|e| nm.abs() * e),
                nf,
                nf_error: err.mid.map(|e| nf.abs() * e),
                chi_app_m: 0.0,
                chi_app_f: 0.0,
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn averages(m_z: f64, b_z: f64, mid_b: f64) -> CoreAverages {
        CoreAverages {
            volume_m3: 2.0,
            b_z,
            m_z,
            mid_flux: mid_b * 3.0,
            mid_area: 3.0,
        }
    }

    #[test]
    fn a_uniformly_magnetized_ellipsoid_gives_its_own_factor_both_ways() {
        // Inside a uniformly magnetized ellipsoid H = −N M (Osborn 1945), so both averages
        // give N.
        let (n, m0) = (0.2, 1e5);
        let b = MU0 * (m0 - n * m0);
        let f = factors(
            Drive::Magnetized,
            &averages(m0, b, b),
            SourceErrors::default(),
        );
        assert!((f.nm - n).abs() < 1e-12 && (f.nf - n).abs() < 1e-12);
    }

    #[test]
    fn a_linear_ellipsoid_in_a_uniform_field_gives_its_own_factor_both_ways() {
        // M = χ H0/(1 + χ N) and B = μ0 (H + M) with H = H0 − N M (Osborn 1945).
        let (n, chi, h0) = (0.05, 1e3, 80.0);
        let m = chi * h0 / (1.0 + chi * n);
        let b = MU0 * (h0 - n * m + m);
        let err = SourceErrors {
            volume: Some(1e-4),
            mid: Some(1e-4),
        };
        let f = factors(Drive::Uniform { h0, chi }, &averages(m, b, b), err);
        assert!((f.nm - n).abs() < 1e-12 && (f.nf - n).abs() < 1e-12);
        // δN = (N + 1/χ) δm/m (propagated from m = V χ H0/(1 + χ N)).
        assert!((f.nm_error.unwrap() - (n + 1e-3) * 1e-4).abs() < 1e-15);
        assert!((f.chi_app_m - chi / (1.0 + chi * n)).abs() < 1e-9);
    }
}
