//! A solved field as data: the reaction coefficients and the uniform background, and the
//! field at one point. Evaluation through a model lives in [`crate::field`].

use crate::mesh::Point;

/// A solved field: A_φ = Σ a_i φ_i + B0 r/2, the discrete reaction field plus the exact
/// uniform background (reduced-potential split: the background is never discretised).
#[derive(Debug, Clone, PartialEq)]
pub struct Solution {
    /// Nodal coefficients a_i of the reaction part, in Wb/m.
    pub a: Vec<f64>,
    /// Uniform background B_z in T.
    pub b0: f64,
}

/// The field at one point.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PointField {
    /// The point (r, z) in m.
    pub at: Point,
    /// A_φ in Wb/m.
    pub a: f64,
    /// (B_r, B_z) in T.
    pub b: [f64; 2],
    /// (H_r, H_z) in A/m: ν (B − J0 e_z), J0 a magnet's polarization (0 elsewhere).
    pub h: [f64; 2],
    /// Secant relative permeability |B − J0 e_z|/(μ0|H|) of the material there (|B|/(μ0|H|)
    /// outside magnets, the recoil permeability in one).
    pub mu_r: f64,
    /// Region tag of the evaluating triangle.
    pub tag: u32,
}
