//! The exact curves an element edge may follow (circles and axis-aligned ellipses in (r, z)),
//! and the arc of such a curve between an edge's two end points.
//!
//! Sphere and spheroid outlines and the outer boundary sphere are circles or ellipses in the
//! meridian half-plane; representing them exactly (instead of by the chords or the quadratic
//! arcs of isoparametric elements) removes the geometry error that would otherwise stop the
//! exponential convergence of high-order elements.

use crate::error::SolverError;
use crate::mesh::Point;

/// End points whose relative level |(r − c_r)²/a² + (z − c_z)²/b² − 1| exceeds this are refused:
/// the blended map keeps the mesh vertices, so an end point off the curve would leave the edge
/// off it by as much near that end. 1e-10 is far below any accuracy the solver targets, yet
/// above the rounding of projected vertices (the pipeline's projection stops at 1e-15).
pub const ON_CURVE_TOLERANCE: f64 = 1e-10;

/// A curve of the (r, z) half-plane that element edges follow exactly.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Curve {
    /// The circle |x − centre| = radius (a sphere's outline, the outer boundary sphere).
    Circle {
        /// Centre (r, z) in m; anywhere, not only on the axis.
        centre: Point,
        /// Radius in m, > 0.
        radius: f64,
    },
    /// The ellipse ((r − c_r)/a)² + ((z − c_z)/b)² = 1 with axes along r and z (a spheroid).
    Ellipse {
        /// Centre (r, z) in m.
        centre: Point,
        /// Semi-axis a along r, m, > 0.
        semi_r: f64,
        /// Semi-axis b along z, m, > 0.
        semi_z: f64,
    },
}

impl Curve {
    /// Centre and semi-axes (a along r, b along z); a circle has a = b.
    pub fn axes(&self) -> (Point, f64, f64) {
        match *self {
            Curve::Circle { centre, radius } => (centre, radius, radius),
            Curve::Ellipse {
                centre,
                semi_r,
                semi_z,
            } => (centre, semi_r, semi_z),
        }
    }

    /// ((r − c_r)/a)² + ((z − c_z)/b)² − 1 at `p`: 0 on the curve, about twice the relative
    /// distance near it.
    pub fn level(&self, p: Point) -> f64 {
        let (c, a, b) = self.axes();
        ((p[0] - c[0]) / a).powi(2) + ((p[1] - c[1]) / b).powi(2) - 1.0
    }

    /// The parameter angle θ of `p`: the curve point (c_r + a cos θ, c_z + b sin θ) on the ray
    /// from the centre through `p` in the scaled coordinates (exactly `p` when `p` is on it).
    pub fn angle(&self, p: Point) -> f64 {
        let (c, a, b) = self.axes();
        ((p[1] - c[1]) / b).atan2((p[0] - c[0]) / a)
    }

    /// The curve point at parameter angle θ.
    pub fn point(&self, theta: f64) -> Point {
        let (c, a, b) = self.axes();
        let (s, co) = theta.sin_cos();
        [c[0] + a * co, c[1] + b * s]
    }

    /// dγ/dθ at parameter angle θ.
    pub fn tangent(&self, theta: f64) -> Point {
        let (_, a, b) = self.axes();
        let (s, co) = theta.sin_cos();
        [-a * s, b * co]
    }

    /// Why the curve's data cannot describe a curve, if so.
    fn fault(&self) -> Option<String> {
        let (c, a, b) = self.axes();
        if !(c[0].is_finite() && c[1].is_finite()) {
            return Some(format!("curve centre ({}, {}) is not finite", c[0], c[1]));
        }
        if !(a.is_finite() && b.is_finite() && a > 0.0 && b > 0.0) {
            return Some(format!(
                "curve semi-axes {a} m, {b} m must be finite and > 0"
            ));
        }
        None
    }
}

/// The arc of a [`Curve`] an element edge follows, from the edge's first end point to its
/// second, parametrised linearly in the angle: γ(t) = curve.point(θ0 + t Δθ), t ∈ [0, 1].
///
/// The shorter of the two arcs between the end points is taken, so an edge must span less than
/// half a turn (mesh edges span a small fraction of it). The parameter is the angle, not arc
/// length: on a slender spheroid near its tip the speed |γ'| varies along a long edge. Tip
/// elements of a 1:100 spheroid with edges up to 0.4 rad were measured not to fold (test
/// `tip_elements_of_a_slender_spheroid_map_without_folding`); where one would, the map's fold
/// check reports it instead of returning it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Arc {
    /// The curve.
    pub curve: Curve,
    /// Parameter angle of the first end point, rad.
    pub theta0: f64,
    /// Signed angle spanned from the first end point to the second, rad (|Δθ| < π).
    pub dtheta: f64,
    /// γ(0) and γ(1): the curve points the end points were matched to (equal to the mesh
    /// vertices up to rounding; the blended map subtracts their chord, not the vertices').
    pub ends: [Point; 2],
}

impl Arc {
    /// The arc from `p0` to `p1` on `curve`; `element` and `edge` only name the place in errors.
    pub fn new(
        curve: Curve,
        p0: Point,
        p1: Point,
        element: usize,
        edge: usize,
    ) -> Result<Self, SolverError> {
        if let Some(reason) = curve.fault() {
            return Err(SolverError::BadCurvedEdge {
                element,
                edge,
                reason,
            });
        }
        for p in [p0, p1] {
            let off = curve.level(p);
            if off.is_nan() || off.abs() > ON_CURVE_TOLERANCE {
                return Err(SolverError::EdgeOffCurve {
                    element,
                    edge,
                    r: p[0],
                    z: p[1],
                    off,
                });
            }
        }
        let theta0 = curve.angle(p0);
        let mut dtheta = curve.angle(p1) - theta0;
        // atan2 cuts at ±π; the shorter arc is the one with |Δθ| ≤ π.
        if dtheta > std::f64::consts::PI {
            dtheta -= 2.0 * std::f64::consts::PI;
        } else if dtheta < -std::f64::consts::PI {
            dtheta += 2.0 * std::f64::consts::PI;
        }
        // Half a turn is ambiguous (either arc), and an arc that long cannot be one element edge
        // of a usable mesh; a zero arc is a degenerate edge.
        if !(dtheta.abs() < 0.99 * std::f64::consts::PI && dtheta != 0.0) {
            return Err(SolverError::BadCurvedEdge {
                element,
                edge,
                reason: format!(
                    "the edge spans {:.3} rad of its curve (must be in (0, 0.99π))",
                    dtheta.abs()
                ),
            });
        }
        Ok(Self {
            curve,
            theta0,
            dtheta,
            ends: [curve.point(theta0), curve.point(theta0 + dtheta)],
        })
    }

    /// The arc point γ(t).
    pub fn point(&self, t: f64) -> Point {
        self.curve.point(self.theta0 + t * self.dtheta)
    }

    /// The deviation of the arc from its chord, d(t) = γ(t) − (1 − t) γ(0) − t γ(1), and its
    /// derivative d'(t). d vanishes at both ends, which is what lets the blended map keep the
    /// element's vertices.
    pub fn deviation(&self, t: f64) -> (Point, Point) {
        let theta = self.theta0 + t * self.dtheta;
        let g = self.curve.point(theta);
        let dg = self.curve.tangent(theta);
        let [e0, e1] = self.ends;
        let d = [
            g[0] - (1.0 - t) * e0[0] - t * e1[0],
            g[1] - (1.0 - t) * e0[1] - t * e1[1],
        ];
        let dd = [
            self.dtheta * dg[0] - (e1[0] - e0[0]),
            self.dtheta * dg[1] - (e1[1] - e0[1]),
        ];
        (d, dd)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn arc_takes_the_shorter_way_across_the_angle_cut() {
        // End points at angles 170° and −170° of the unit circle: the short arc crosses θ = π
        // and spans 20°, not 340°.
        let c = Curve::Circle {
            centre: [2.0, -1.0],
            radius: 1.0,
        };
        let p0 = c.point(170f64.to_radians());
        let p1 = c.point((-170f64).to_radians());
        let arc = Arc::new(c, p0, p1, 0, 0).unwrap();
        assert!((arc.dtheta - 20f64.to_radians()).abs() < 1e-14);
        let mid = arc.point(0.5);
        assert!((mid[0] - 1.0).abs() < 1e-15 && (mid[1] + 1.0).abs() < 1e-15);
    }

    #[test]
    fn arc_refuses_end_points_off_the_curve_and_bad_curves() {
        let e = Curve::Ellipse {
            centre: [0.0, 0.5],
            semi_r: 0.1,
            semi_z: 2.0,
        };
        let on = e.point(0.3);
        let off = [on[0] * (1.0 + 1e-8), on[1]];
        assert!(matches!(
            Arc::new(e, on, off, 7, 2),
            Err(SolverError::EdgeOffCurve {
                element: 7,
                edge: 2,
                ..
            })
        ));
        let bad = Curve::Circle {
            centre: [0.0, 0.0],
            radius: -1.0,
        };
        assert!(matches!(
            Arc::new(bad, [1.0, 0.0], [0.0, 1.0], 0, 0),
            Err(SolverError::BadCurvedEdge { .. })
        ));
        // Diametrically opposite end points: which half is meant is undecidable.
        let c = Curve::Circle {
            centre: [0.0, 0.0],
            radius: 1.0,
        };
        assert!(matches!(
            Arc::new(c, [0.0, -1.0], [0.0, 1.0], 0, 0),
            Err(SolverError::BadCurvedEdge { .. })
        ));
    }

    #[test]
    fn deviation_vanishes_at_the_ends_and_its_derivative_matches_differences() {
        let e = Curve::Ellipse {
            centre: [0.3, 0.0],
            semi_r: 0.2,
            semi_z: 0.7,
        };
        let arc = Arc::new(e, e.point(0.2), e.point(0.9), 0, 0).unwrap();
        assert_eq!(arc.deviation(0.0).0, [0.0, 0.0]);
        let d1 = arc.deviation(1.0).0;
        assert!(d1[0].abs() < 1e-16 && d1[1].abs() < 1e-16, "{d1:?}");
        let h = 1e-6;
        for t in [0.1, 0.5, 0.83] {
            let (_, dd) = arc.deviation(t);
            let (p, m) = (arc.deviation(t + h).0, arc.deviation(t - h).0);
            for i in 0..2 {
                let fd = (p[i] - m[i]) / (2.0 * h);
                assert!((fd - dd[i]).abs() < 1e-8, "{fd} vs {}", dd[i]);
            }
        }
    }
}
