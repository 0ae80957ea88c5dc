//! What to solve: a mesh, per-region properties and the nodes held by Dirichlet conditions.

use crate::constants::MU0;
use crate::error::SolverError;
use crate::material::Material;
use crate::mesh::FeMesh;

/// Physical properties of one tagged region.
#[derive(Debug, Clone, PartialEq)]
pub struct RegionProps {
    /// Magnetic material.
    pub material: Material,
    /// Azimuthal current density J_φ in A/m² (positive along +e_φ).
    pub current_density: f64,
    /// Prescribed polarization J0 = μ0 M0 along +z in T (a permanent magnet; 0 for none).
    /// The law is then B = μ0 μr H + J0 e_z with the region's linear μr (the recoil
    /// permeability), i.e. H = ν (B − J0 e_z); see the crate documentation.
    pub polarization: f64,
}

impl RegionProps {
    /// Air without current.
    pub fn air() -> Self {
        Self {
            material: Material::AIR,
            current_density: 0.0,
            polarization: 0.0,
        }
    }

    /// Whether the region is anything but vacuum: a permeable material or a magnet (both
    /// carry magnetization, and both use the plain basis, see [`crate::solve::flux_nodes`]).
    pub fn is_magnetic(&self) -> bool {
        self.material.is_magnetic() || self.polarization != 0.0
    }

    /// B − J0 e_z at flux density `b` = (B_r, B_z) in T: the part of B the law answers for.
    #[inline]
    pub fn law_b(&self, b: [f64; 2]) -> [f64; 2] {
        [b[0], b[1] - self.polarization]
    }

    /// Reluctivity ν(|B − J0 e_z|) in m/H at flux density `b` in T.
    #[inline]
    pub fn nu(&self, b: [f64; 2]) -> f64 {
        let bl = self.law_b(b);
        self.material.nu(bl[0].hypot(bl[1]))
    }

    /// Field strength H = ν(|B − J0 e_z|)·(B − J0 e_z) in A/m at flux density `b` in T (for
    /// J0 = 0 the plain law ν(|B|)·B).
    #[inline]
    pub fn h(&self, b: [f64; 2]) -> [f64; 2] {
        let bl = self.law_b(b);
        let nu = self.nu(b);
        [nu * bl[0], nu * bl[1]]
    }

    /// Magnetization M = B/μ0 − H = (1/μ0 − ν) B + ν J0 e_z in A/m at flux density `b` in T
    /// (J0/μ0 e_z in a magnet of recoil permeability 1; exactly 0 in vacuum).
    #[inline]
    pub fn magnetization(&self, b: [f64; 2]) -> [f64; 2] {
        let nu = self.nu(b);
        let chi = 1.0 / MU0 - nu;
        [chi * b[0], chi * b[1] + nu * self.polarization]
    }

    /// Secant relative permeability of the law, 1/(μ0 ν(|B − J0 e_z|)), at flux density `b`
    /// in T; for a magnet its recoil permeability.
    #[inline]
    pub fn secant_mu_r(&self, b: [f64; 2]) -> f64 {
        1.0 / (MU0 * self.nu(b))
    }

    /// Energy density ∫ H·dB from the law's zero-field state B = J0 e_z to `b`, J/m³: for a
    /// linear law ν|B − J0 e_z|²/2 = μ0 μr |H|²/2 (see [`crate::post::energy`]).
    #[inline]
    pub fn energy_density(&self, b: [f64; 2]) -> f64 {
        let bl = self.law_b(b);
        self.material.energy_density(bl[0].hypot(bl[1]))
    }
}

/// What drives the field: per-element current densities (A/m²) and prescribed polarizations
/// (T), per-node Dirichlet values of the reaction part (Wb/m, read at fixed nodes) and the
/// uniform background B_z (T). The problem's own excitation takes its regions' values (see
/// [`crate::Model::problem_currents`], [`crate::Model::problem_polarizations`]); a response
/// to currents alone passes zero polarizations.
#[derive(Debug, Clone, Copy)]
pub struct Excitation<'a> {
    /// Current density per element, A/m².
    pub currents: &'a [f64],
    /// Polarization J0 along +z per element, T (non-zero only in linear regions).
    pub polarizations: &'a [f64],
    /// Dirichlet values per node, Wb/m.
    pub a_fixed: &'a [f64],
    /// Uniform background B_z, T.
    pub b0: f64,
}

/// A magnetostatic problem: the solve is a pure function of this value.
#[derive(Debug, Clone)]
pub struct Problem {
    /// The mesh.
    pub mesh: FeMesh,
    /// Properties indexed by region tag.
    pub regions: Vec<RegionProps>,
    /// Dirichlet data of the reaction part: (node, A_φ in Wb/m). The background's own
    /// potential B0 r/2 is added on top, so zero here means A = B0 r/2 there.
    pub fixed: Vec<(u32, f64)>,
    /// Uniform background flux density along +z, T (enters as the exact field B0 e_z).
    pub background_b: f64,
    /// The exact exterior on the outer arc (None: the arc's nodes are in `fixed`).
    pub exact_exterior: Option<crate::exterior::ExactExterior>,
}

impl Problem {
    /// Checks mesh, materials and that every tag used has properties.
    pub fn validate(&self) -> Result<(), SolverError> {
        self.mesh.validate()?;
        if self.mesh.tag_count() > self.regions.len() {
            let tag = self
                .mesh
                .tags
                .iter()
                .copied()
                .find(|&t| t as usize >= self.regions.len())
                .unwrap_or(0);
            return Err(SolverError::MissingRegion { tag });
        }
        if !self.background_b.is_finite() {
            return Err(SolverError::BadMaterial(format!(
                "background field {} is not finite",
                self.background_b
            )));
        }
        for r in &self.regions {
            r.material.validate()?;
            if !r.current_density.is_finite() {
                return Err(SolverError::BadMaterial(format!(
                    "current density {} is not finite",
                    r.current_density
                )));
            }
            if !r.polarization.is_finite() {
                return Err(SolverError::BadMaterial(format!(
                    "polarization {} T is not finite",
                    r.polarization
                )));
            }
            // The recoil law B = μ0 μr H + J0 is a linear one; a saturating magnet would need
            // a law of its own (its demagnetization curve), not a shifted soft-magnetic one.
            if r.polarization != 0.0 && !r.material.is_linear() {
                return Err(SolverError::PolarizedNonlinear);
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::material::SaturationLaw;

    fn one_region(region: RegionProps) -> Problem {
        Problem {
            mesh: FeMesh {
                nodes: vec![[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]],
                triangles: vec![[0, 1, 2]],
                tags: vec![0],
                mid: Vec::new(),
            },
            regions: vec![region],
            fixed: Vec::new(),
            background_b: 0.0,
            exact_exterior: None,
        }
    }

    #[test]
    fn a_polarized_region_must_have_a_linear_finite_law() {
        let magnet = RegionProps {
            material: Material::Linear { mu_r: 1.05 },
            current_density: 0.0,
            polarization: -1.2,
        };
        assert!(one_region(magnet.clone()).validate().is_ok());
        let saturating = RegionProps {
            material: Material::Saturable(std::sync::Arc::new(SaturationLaw::Arctan {
                js: 1.5,
                mu_ri: 1000.0,
            })),
            ..magnet.clone()
        };
        assert!(matches!(
            one_region(saturating).validate(),
            Err(SolverError::PolarizedNonlinear)
        ));
        let nan = RegionProps {
            polarization: f64::NAN,
            ..magnet
        };
        assert!(matches!(
            one_region(nan).validate(),
            Err(SolverError::BadMaterial(_))
        ));
    }

    #[test]
    fn a_magnet_of_recoil_permeability_one_has_its_prescribed_magnetization_in_any_field() {
        // B = μ0 H + J0 e_z: M = B/μ0 − H = J0/μ0 whatever B (the constitutive law itself).
        let j0 = 1.2;
        let magnet = RegionProps {
            polarization: j0,
            ..RegionProps::air()
        };
        for b in [[0.0, 0.0], [0.3, -0.7], [-1.0, 2.5]] {
            let m = magnet.magnetization(b);
            assert!(m[0].abs() < 1e-9 && (m[1] - j0 / MU0).abs() < 1e-9 * j0 / MU0);
            let h = magnet.h(b);
            assert!((MU0 * h[1] + j0 - b[1]).abs() < 1e-15 && (MU0 * h[0] - b[0]).abs() < 1e-15);
        }
        assert!(magnet.is_magnetic() && !RegionProps::air().is_magnetic());
    }
}
