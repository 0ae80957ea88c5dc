//! What the field map needs of a solved field: the mesh, and |B| and the flux function inside
//! an element. A trait, so the drawing code can be tested on closed-form fields.

use axicore_solver::mesh::Point;
use axicore_solver::{FeMesh, Model, Solution};

/// A scalar field pair on a triangle mesh, evaluated element by element at barycentric
/// coordinates `l` (of the element's reference triangle) and physical point `p`.
pub trait FieldSource: Sync {
    /// The mesh: nodes (r, z) in m, triangles, region tags.
    fn mesh(&self) -> &FeMesh;

    /// Physical point of barycentric `l` in element `e` (curved elements: their own map).
    fn position(&self, e: usize, l: [f64; 3]) -> Point {
        let [a, b, c] = self.mesh().corners(e);
        [
            l[0] * a[0] + l[1] * b[0] + l[2] * c[0],
            l[0] * a[1] + l[1] * b[1] + l[2] * c[1],
        ]
    }

    /// Reference coordinates of `p` in element `e`, from `l0`, those in its straight triangle.
    fn locate(&self, _e: usize, _p: Point, l0: [f64; 3]) -> [f64; 3] {
        l0
    }

    /// |B| in T at `p` (barycentric `l`) in element `e`.
    fn b_abs(&self, e: usize, l: [f64; 3], p: Point) -> f64;

    /// The flux function ψ = 2π r A_φ in Wb (the flux through the circle of radius r at
    /// height z) at `p` (barycentric `l`) in element `e`.
    fn flux(&self, e: usize, l: [f64; 3], p: Point) -> f64;
}

/// A solved field of the solver: total A_φ (reaction plus the uniform background).
pub struct SolvedField<'a> {
    model: &'a Model,
    sol: &'a Solution,
}

impl<'a> SolvedField<'a> {
    /// The field of `sol` on `model`.
    pub fn new(model: &'a Model, sol: &'a Solution) -> Self {
        Self { model, sol }
    }
}

impl FieldSource for SolvedField<'_> {
    fn mesh(&self) -> &FeMesh {
        self.model.mesh()
    }

    fn position(&self, e: usize, l: [f64; 3]) -> Point {
        self.model.geometry()[e].position(l)
    }

    fn locate(&self, e: usize, p: Point, l0: [f64; 3]) -> [f64; 3] {
        self.model.geometry()[e].invert(p, l0)
    }

    fn b_abs(&self, e: usize, l: [f64; 3], p: Point) -> f64 {
        let g = &self.model.geometry()[e];
        let av = self.sol.element_values(self.model, e);
        let b = if p[0] > 0.0 {
            g.b_at_bary(&av, l, p[0])
        } else {
            // On the axis A/r → ∂A/∂r, so B_z = 2 ∂A/∂r (elements there use the plain basis).
            let [da_dr, da_dz] = g.plain_gradient(&av, l);
            [-da_dz, 2.0 * da_dr]
        };
        b[0].hypot(b[1] + self.sol.b0)
    }

    fn flux(&self, e: usize, l: [f64; 3], p: Point) -> f64 {
        let r = p[0].max(0.0);
        let av = self.sol.element_values(self.model, e);
        let a = self.model.geometry()[e].a_at(&av, l, r) + 0.5 * self.sol.b0 * r;
        2.0 * std::f64::consts::PI * r * a
    }
}
