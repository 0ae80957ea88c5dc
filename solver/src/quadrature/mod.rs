//! Quadrature rules: on the reference triangle in barycentric coordinates (Dunavant's symmetric
//! rules and collapsed Gauss–Jacobi rules of any degree up to [`MAX_TRIANGLE_DEGREE`]), and Gauss
//! rules on [−1, 1], with the orthogonal polynomials that define them.

pub mod dunavant;
pub mod error;
pub mod gauss;
pub mod polynomials;
pub mod triangle;

pub use dunavant::{DUNAVANT_5, DUNAVANT_6};
pub use error::QuadratureError;
pub use gauss::{gauss_jacobi, gauss_legendre, line_rule, LineRule, MAX_LINE_POINTS};
pub use triangle::{TriangleRule, MAX_TRIANGLE_DEGREE};

/// One point of a rule: barycentric coordinates and a weight (weights sum to 1).
#[derive(Debug, Clone, Copy)]
pub struct RulePoint {
    /// Barycentric coordinates (λ0, λ1, λ2).
    pub bary: [f64; 3],
    /// Weight as a fraction of the triangle area.
    pub weight: f64,
}
