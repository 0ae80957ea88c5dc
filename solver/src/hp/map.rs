//! Geometry maps from the reference triangle to a physical element in (r, z).
//!
//! Reference triangle v0 = (0, 0), v1 = (1, 0), v2 = (0, 1); barycentrics λ0 = 1 − ξ − η,
//! λ1 = ξ, λ2 = η; local edge k joins local vertices k and (k + 1) % 3.
//!
//! A straight triangle gets the [`Affine`] map. A triangle with one or more edges on an exact
//! [`Curve`] gets the [`Blended`] map: the blending-function (transfinite) interpolation of
//! Gordon & Hall (Numer. Math. 21, 109–129, 1973 [pages from memory]), in the per-edge form for
//! triangles used by Szabó & Babuška (*Finite Element Analysis*, Wiley 1991, the
//! blending-function chapter [chapter from memory]):
//!
//! ```text
//!   x(ξ, η) = Σ_i λ_i v_i + Σ_{curved k} λ_a λ_b · d_k(t_k) / (t_k (1 − t_k)),
//!   a = k, b = (k + 1) % 3,  t_k = (1 + λ_b − λ_a) / 2,
//!   d_k(t) = γ_k(t) − (1 − t) γ_k(0) − t γ_k(1)   (the arc's deviation from its chord).
//! ```
//!
//! On edge k (λ_a + λ_b = 1) the factor λ_a λ_b / (t(1 − t)) is 1 and t = λ_b, so the edge is
//! the arc γ_k; on the other two edges λ_a λ_b = 0, so every correction leaves the other edges
//! alone (straight edges stay straight, several curved edges add) and the vertices stay put.
//! Inside, λ_a λ_b ≤ t(1 − t), so the factor is bounded. These properties are what the tests
//! below check, not taken on trust.
//!
//! # Where curved edges come from today (for the integration step; not rewired here)
//!
//! The existing second-order pipeline knows curved edges only implicitly:
//! * `tools/src/pipeline.rs`, `outlines(case, ro)`, lists the outlines as
//!   `quadratic::Outline::Ellipse { centre_z, semi_r, semi_z }`, all centred on the axis: the
//!   outer boundary sphere (centre 0, semi-axes `ro`) and a sphere or spheroid core (centre
//!   `core.centre`, `semi_r` = radius, `semi_z` = half-length). Rods and tubes have no curve.
//! * `solver/src/quadratic.rs`, `elevate`, decides per edge: a boundary edge (one triangle) or
//!   an interface edge (two triangles of different tags), not lying on the axis, whose two
//!   corners both have |level| < `ON_OUTLINE` (0.15) for the same outline (the first that
//!   matches) follows that outline. Its corners off the axis are projected onto it (gradient
//!   steps to |level| < 1e-15), its mid node too. Moves that fold an element or close an angle
//!   below half the mesher's floor are undone: those edges end up straight again.
//! * Which outline an edge follows (`outline_of`, indexed like the returned `MidNode`s) is not
//!   returned: `elevate` gives only the second-order mesh and each mid node's parents and
//!   boundary flag. The integration step should return it, then declare for every triangle t
//!   and local edge k whose edge has outline o a [`super::curved_edges::CurvedEdge`] with
//!   `Curve::Ellipse { centre: [0, centre_z], semi_r, semi_z }` (a `Curve::Circle` when the
//!   semi-axes are equal), on the moved corner positions (within [`super::curve::ON_CURVE_TOLERANCE`]).
//!   Both triangles of an interface edge must be declared, or the mesh would gap.

use super::curve::{Arc, Curve};
use crate::error::SolverError;
use crate::mesh::Point;

/// Gradients of the barycentrics (λ0, λ1, λ2) with respect to (ξ, η).
const GRAD_LAMBDA: [[f64; 2]; 3] = [[-1.0, -1.0], [1.0, 0.0], [0.0, 1.0]];

/// Intervals per side of the lattice of reference points where a map must have det J > 0.
/// A sampled check cannot prove a map one-to-one; the lattice (45 points with the vertices and
/// 7 points inside each edge) catches the folds that come from an arc bulging across the
/// element, which start at the curved edge.
const CHECK_DIVISIONS: usize = 8;

/// The Jacobian matrix ∂(r, z)/∂(ξ, η) of a map at one point: `m[i][j]` = ∂x_i/∂ξ_j.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Jacobian {
    /// Entries: row i = physical coordinate (r, z), column j = reference coordinate (ξ, η).
    pub m: [[f64; 2]; 2],
}

impl Jacobian {
    /// Determinant (the local area ratio physical/reference, m²).
    pub fn det(&self) -> f64 {
        self.m[0][0] * self.m[1][1] - self.m[0][1] * self.m[1][0]
    }

    /// The inverse ∂(ξ, η)/∂(r, z) (entries non-finite when det J = 0; maps built by the
    /// constructors here have det J > 0 at their check points).
    pub fn inverse(&self) -> [[f64; 2]; 2] {
        let d = self.det();
        [
            [self.m[1][1] / d, -self.m[0][1] / d],
            [-self.m[1][0] / d, self.m[0][0] / d],
        ]
    }

    /// The physical gradient (∂/∂r, ∂/∂z) of a function with reference gradient `g`
    /// (∂/∂ξ, ∂/∂η): J⁻ᵀ g.
    pub fn physical_gradient(&self, g: [f64; 2]) -> [f64; 2] {
        let inv = self.inverse();
        [
            inv[0][0] * g[0] + inv[1][0] * g[1],
            inv[0][1] * g[0] + inv[1][1] * g[1],
        ]
    }
}

/// The affine map of a straight triangle: x = v0 + ξ (v1 − v0) + η (v2 − v0).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Affine {
    corners: [Point; 3],
    jacobian: Jacobian,
}

impl Affine {
    /// The map onto the triangle with `corners` (counter-clockwise); `element` names it in
    /// the error when the triangle is degenerate or clockwise.
    pub fn new(corners: [Point; 3], element: usize) -> Result<Self, SolverError> {
        let [v0, v1, v2] = corners;
        let jacobian = Jacobian {
            m: [
                [v1[0] - v0[0], v2[0] - v0[0]],
                [v1[1] - v0[1], v2[1] - v0[1]],
            ],
        };
        let det = jacobian.det();
        if det.is_nan() || det <= 0.0 {
            return Err(SolverError::FoldedElement {
                element,
                det,
                xi: 1.0 / 3.0,
                eta: 1.0 / 3.0,
            });
        }
        Ok(Self { corners, jacobian })
    }

    /// The physical point of reference point (ξ, η).
    pub fn position(&self, xi: f64, eta: f64) -> Point {
        linear(&self.corners, xi, eta)
    }

    /// The (constant) Jacobian.
    pub fn jacobian(&self) -> Jacobian {
        self.jacobian
    }
}

/// The blended map of a triangle with one or more edges on exact curves (see the module doc).
#[derive(Debug, Clone, PartialEq)]
pub struct Blended {
    corners: [Point; 3],
    arcs: [Option<Arc>; 3],
}

impl Blended {
    /// The map onto the triangle with `corners` whose local edge k follows `curves[k]` (straight
    /// when `None`). Fails when an end point is off its curve, an arc is half a turn or more,
    /// or det J ≤ 0 at a check point (the map folds).
    pub fn new(
        corners: [Point; 3],
        curves: [Option<Curve>; 3],
        element: usize,
    ) -> Result<Self, SolverError> {
        let mut arcs = [None; 3];
        for k in 0..3 {
            if let Some(c) = curves[k] {
                arcs[k] = Some(Arc::new(c, corners[k], corners[(k + 1) % 3], element, k)?);
            }
        }
        let map = Self { corners, arcs };
        let n = CHECK_DIVISIONS;
        for i in 0..=n {
            for j in 0..=n - i {
                let (xi, eta) = (i as f64 / n as f64, j as f64 / n as f64);
                let det = map.jacobian(xi, eta).det();
                if det.is_nan() || det <= 0.0 {
                    return Err(SolverError::FoldedElement {
                        element,
                        det,
                        xi,
                        eta,
                    });
                }
            }
        }
        Ok(map)
    }

    /// The physical point of reference point (ξ, η).
    pub fn position(&self, xi: f64, eta: f64) -> Point {
        let l = [1.0 - xi - eta, xi, eta];
        let mut x = linear(&self.corners, xi, eta);
        for (k, arc) in self.arcs.iter().enumerate() {
            if let Some(arc) = arc {
                let (la, lb) = (l[k], l[(k + 1) % 3]);
                let (phi, _) = scaled_deviation(arc, 0.5 * (1.0 + lb - la));
                x[0] += la * lb * phi[0];
                x[1] += la * lb * phi[1];
            }
        }
        x
    }

    /// The Jacobian at reference point (ξ, η).
    pub fn jacobian(&self, xi: f64, eta: f64) -> Jacobian {
        let l = [1.0 - xi - eta, xi, eta];
        let [v0, v1, v2] = self.corners;
        let mut m = [
            [v1[0] - v0[0], v2[0] - v0[0]],
            [v1[1] - v0[1], v2[1] - v0[1]],
        ];
        for (k, arc) in self.arcs.iter().enumerate() {
            if let Some(arc) = arc {
                let (a, b) = (k, (k + 1) % 3);
                let (la, lb) = (l[a], l[b]);
                let (phi, dphi) = scaled_deviation(arc, 0.5 * (1.0 + lb - la));
                for j in 0..2 {
                    // ∂(λa λb)/∂ξj and ∂t/∂ξj.
                    let dprod = lb * GRAD_LAMBDA[a][j] + la * GRAD_LAMBDA[b][j];
                    let dt = 0.5 * (GRAD_LAMBDA[b][j] - GRAD_LAMBDA[a][j]);
                    for i in 0..2 {
                        m[i][j] += dprod * phi[i] + la * lb * dphi[i] * dt;
                    }
                }
            }
        }
        Jacobian { m }
    }
}

/// Σ λ_i v_i: in barycentric form so that the vertices come out exactly (v0 + ξ (v1 − v0)
/// rounds at ξ = 1), which keeps neighbouring elements' corners bitwise equal.
fn linear(corners: &[Point; 3], xi: f64, eta: f64) -> Point {
    let l = [1.0 - xi - eta, xi, eta];
    [
        l[0] * corners[0][0] + l[1] * corners[1][0] + l[2] * corners[2][0],
        l[0] * corners[0][1] + l[1] * corners[1][1] + l[2] * corners[2][1],
    ]
}

/// φ(t) = d(t) / (t (1 − t)) and φ'(t) for the arc's deviation d. At the ends, where the
/// quotient is 0/0, φ takes its limit (d'(0) at t = 0, −d'(1) at t = 1) and φ' is returned
/// as zero: there λa λb = 0, so φ' is never used (t = 0 or 1 only at the edge's vertices).
fn scaled_deviation(arc: &Arc, t: f64) -> (Point, Point) {
    let (d, dd) = arc.deviation(t);
    let s = t * (1.0 - t);
    if s == 0.0 {
        let sign = if t == 0.0 { 1.0 } else { -1.0 };
        return ([sign * dd[0], sign * dd[1]], [0.0, 0.0]);
    }
    let ds = 1.0 - 2.0 * t;
    (
        [d[0] / s, d[1] / s],
        [(dd[0] - d[0] * ds / s) / s, (dd[1] - d[1] * ds / s) / s],
    )
}

/// The map of one element: affine when every edge is straight, blended otherwise.
#[derive(Debug, Clone, PartialEq)]
pub enum ElementMap {
    /// A straight triangle.
    Affine(Affine),
    /// A triangle with at least one curved edge (boxed: few elements are curved, and the
    /// arcs would otherwise quadruple the size of every straight element's map).
    Blended(Box<Blended>),
}

impl ElementMap {
    /// The map onto the triangle with `corners` whose local edge k follows `curves[k]`;
    /// `element` names it in errors.
    pub fn new(
        corners: [Point; 3],
        curves: [Option<Curve>; 3],
        element: usize,
    ) -> Result<Self, SolverError> {
        if curves.iter().all(Option::is_none) {
            Affine::new(corners, element).map(Self::Affine)
        } else {
            Blended::new(corners, curves, element).map(|b| Self::Blended(Box::new(b)))
        }
    }

    /// The physical point of reference point (ξ, η).
    pub fn position(&self, xi: f64, eta: f64) -> Point {
        match self {
            Self::Affine(m) => m.position(xi, eta),
            Self::Blended(m) => m.position(xi, eta),
        }
    }

    /// The Jacobian at reference point (ξ, η).
    pub fn jacobian(&self, xi: f64, eta: f64) -> Jacobian {
        match self {
            Self::Affine(m) => m.jacobian(),
            Self::Blended(m) => m.jacobian(xi, eta),
        }
    }

    /// Whether the Jacobian is the same at every point (kernels may then compute it once).
    pub fn is_affine(&self) -> bool {
        matches!(self, Self::Affine(_))
    }
}

#[cfg(test)]
#[path = "map_tests.rs"]
mod tests;
