//! What to solve: a mesh, per-region properties and the nodes held by Dirichlet conditions.

use crate::material::Material;
use crate::mesh::FeMesh;
use crate::SolverError;

/// Physical properties of one tagged region.
#[derive(Debug, Clone, PartialEq)]
pub struct RegionProps {
    /// Magnetic material.
    pub material: Material,
    /// Azimuthal current density J_φ in A/m² (positive along +e_φ).
    pub current_density: f64,
}

impl RegionProps {
    /// Air without current.
    pub fn air() -> Self {
        Self {
            material: Material::AIR,
            current_density: 0.0,
        }
    }
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
        }
        Ok(())
    }
}
