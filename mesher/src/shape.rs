//! Shapes as polygons: polygonisation of curved outlines, exact point-in-shape tests, small
//! plane-geometry helpers.
//!
//! Curved outlines are sampled at equal steps of the outward normal angle ψ. A chord whose arc turns its
//! tangent by Δψ has sagitta s ≤ ρ_max (1 − cos(Δψ/2)), with ρ_max the largest radius of curvature along
//! that arc (integrate the offset from either end up to the point whose tangent is parallel to the
//! chord). Taking `n = ceil(π / (2 acos(1 − tol)))` chords over the half turn of a half-ellipse therefore
//! keeps s / ρ_max ≤ tol, and every sample lies on the exact curve.

use crate::spec::{Point, Shape};

/// Number of chords that keeps the relative sagitta of a half turn (π of tangent rotation) at or below
/// `tol`; returned as f64 so a silly tolerance can be caught before anything is allocated.
pub(crate) fn chord_count(tol: f64) -> f64 {
    let half_step = (1.0 - tol).clamp(-1.0, 1.0).acos();
    (std::f64::consts::PI / (2.0 * half_step)).ceil().max(2.0)
}

/// Points on the right half of an ellipse, from the bottom tip (0, z_c − axial) to the top tip
/// (0, z_c + axial), `n` chords, equal steps of the normal angle. The tips are exact and on r = 0.
#[cfg(test)]
pub(crate) fn half_ellipse_chain(z_centre: f64, radial: f64, axial: f64, n: usize) -> Vec<Point> {
    let (a2, b2) = (radial * radial, axial * axial);
    let mut pts = Vec::with_capacity(n + 1);
    pts.push([0.0, z_centre - axial]);
    for k in 1..n {
        // ψ is the angle of the outward normal (cos ψ, sin ψ); the point with that normal on
        // r²/a² + z²/b² = 1 is (a² cos ψ, b² sin ψ) / sqrt(a² cos² ψ + b² sin² ψ).
        let psi = -std::f64::consts::FRAC_PI_2 + std::f64::consts::PI * (k as f64) / (n as f64);
        let (s, c) = psi.sin_cos();
        let d = (a2 * c * c + b2 * s * s).sqrt();
        pts.push([a2 * c / d, z_centre + b2 * s / d]);
    }
    pts.push([0.0, z_centre + axial]);
    pts
}

/// Points on the right half of an ellipse from the bottom tip to the top tip, chords bisected
/// (in the parametric angle) until each chord's sagitta, measured at its parametric midpoint, is at
/// most `tol · min(radial, axial)`. Equal normal-angle steps put almost every point at the tips
/// of a slender ellipse and leave its long flat sides far inside the curve (a 4 mm × 200 mm
/// spheroid lost 17 % of its volume that way); an absolute bound tied to the smaller semi-axis keeps
/// the thin dimension accurate. Deterministic: the same inputs give the same points.
pub(crate) fn half_ellipse_chain_adaptive(
    z_centre: f64,
    radial: f64,
    axial: f64,
    tol: f64,
) -> Vec<Point> {
    let at = |t: f64| -> Point {
        if t <= 0.0 {
            [0.0, z_centre - axial]
        } else if t >= std::f64::consts::PI {
            [0.0, z_centre + axial]
        } else {
            [radial * t.sin(), z_centre - axial * t.cos()]
        }
    };
    let limit = tol * radial.min(axial);
    let mut pts = vec![at(0.0)];
    // Depth-first bisection from 8 starting intervals; depth capped so a silly tolerance cannot
    // run away (2^24 chords per start interval is far beyond any node cap).
    let mut stack: Vec<(f64, f64, u32)> = (0..8)
        .rev()
        .map(|k| {
            let h = std::f64::consts::PI / 8.0;
            (k as f64 * h, (k + 1) as f64 * h, 0)
        })
        .collect();
    while let Some((t0, t1, depth)) = stack.pop() {
        let (p0, p1) = (at(t0), at(t1));
        let tm = 0.5 * (t0 + t1);
        let (sag, _) = segment_distance(at(tm), p0, p1);
        if sag > limit && depth < 24 {
            stack.push((tm, t1, depth + 1));
            stack.push((t0, tm, depth + 1));
        } else {
            pts.push(p1);
        }
    }
    pts
}

/// Signed area of a closed polygon (positive when counter-clockwise in (r, z)).
pub(crate) fn polygon_area(pts: &[Point]) -> f64 {
    let n = pts.len();
    let mut twice = 0.0;
    for i in 0..n {
        let (p, q) = (pts[i], pts[(i + 1) % n]);
        twice += p[0] * q[1] - q[0] * p[1];
    }
    0.5 * twice
}

/// Twice the signed area of triangle (a, b, c): > 0 when counter-clockwise.
pub(crate) fn orient(a: Point, b: Point, c: Point) -> f64 {
    (b[0] - a[0]) * (c[1] - a[1]) - (c[0] - a[0]) * (b[1] - a[1])
}

/// Distance from `p` to segment [a, b], and the parameter of the closest point along it.
pub(crate) fn segment_distance(p: Point, a: Point, b: Point) -> (f64, f64) {
    let d = [b[0] - a[0], b[1] - a[1]];
    let len2 = d[0] * d[0] + d[1] * d[1];
    let t = if len2 > 0.0 {
        (((p[0] - a[0]) * d[0] + (p[1] - a[1]) * d[1]) / len2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    let q = [a[0] + t * d[0], a[1] + t * d[1]];
    (((p[0] - q[0]).powi(2) + (p[1] - q[1]).powi(2)).sqrt(), t)
}

/// Axis-aligned bounding box `[r_min, r_max, z_min, z_max]` of a point set.
pub(crate) fn bounding_box(pts: &[Point]) -> [f64; 4] {
    let mut bb = [
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::INFINITY,
        f64::NEG_INFINITY,
    ];
    for p in pts {
        bb[0] = bb[0].min(p[0]);
        bb[1] = bb[1].max(p[0]);
        bb[2] = bb[2].min(p[1]);
        bb[3] = bb[3].max(p[1]);
    }
    bb
}

/// Distance from `p` to a bounding box (0 inside): a lower bound of the distance to anything in it.
pub(crate) fn box_distance(p: Point, bb: &[f64; 4]) -> f64 {
    let dr = (bb[0] - p[0]).max(p[0] - bb[1]).max(0.0);
    let dz = (bb[2] - p[1]).max(p[1] - bb[3]).max(0.0);
    dr.hypot(dz)
}

/// A region outline as the exact polygon that is meshed.
#[derive(Debug, Clone)]
pub(crate) struct Outline {
    /// Closed loop, counter-clockwise, without repeating the first vertex.
    pub vertices: Vec<Point>,
    /// Bounding box of `vertices`.
    pub bbox: [f64; 4],
    /// True for a half-ellipse: `vertices` is then the right-hand chain, monotone in z, closed by the
    /// axis segment from the top tip back to the bottom tip.
    monotone_chain: bool,
}

impl Outline {
    /// The polygon of `shape`, curved parts cut into `chord_count(tol)` chords.
    pub fn new(shape: &Shape, tol: f64) -> Self {
        let (vertices, monotone_chain) = match *shape {
            Shape::Rect {
                r_min,
                r_max,
                z_min,
                z_max,
            } => (
                vec![
                    [r_min, z_min],
                    [r_max, z_min],
                    [r_max, z_max],
                    [r_min, z_max],
                ],
                false,
            ),
            Shape::HalfEllipse {
                z_centre,
                radial,
                axial,
            } => (
                half_ellipse_chain_adaptive(z_centre, radial, axial, tol),
                true,
            ),
        };
        let bbox = bounding_box(&vertices);
        Self {
            vertices,
            bbox,
            monotone_chain,
        }
    }

    /// Area of the polygon (m²).
    pub fn area(&self) -> f64 {
        polygon_area(&self.vertices)
    }

    /// Whether `p` lies strictly inside the polygon (points on its boundary are outside).
    pub fn contains(&self, p: Point) -> bool {
        let bb = &self.bbox;
        if !(p[0] > bb[0] && p[0] < bb[1] && p[1] > bb[2] && p[1] < bb[3]) {
            return false;
        }
        if !self.monotone_chain {
            // A rectangle: strictly inside its bounding box.
            return true;
        }
        // The chain rises monotonically in z, so the boundary radius at height z is found by bisection.
        let v = &self.vertices;
        let upper = v.partition_point(|q| q[1] <= p[1]);
        if upper == 0 || upper >= v.len() {
            return false;
        }
        let (a, b) = (v[upper - 1], v[upper]);
        // Left of the upward chord a→b means inside.
        orient(a, b, p) > 0.0
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn chain_points_lie_on_the_ellipse_and_tips_on_axis() {
        let pts = half_ellipse_chain(0.01, 0.002, 0.03, 57);
        assert_eq!(pts.len(), 58);
        assert_eq!(pts[0], [0.0, 0.01 - 0.03]);
        assert_eq!(pts[57], [0.0, 0.01 + 0.03]);
        for p in &pts {
            let e = (p[0] / 0.002).powi(2) + ((p[1] - 0.01) / 0.03).powi(2);
            assert!((e - 1.0).abs() < 1e-14, "{e}");
        }
        for w in pts.windows(2) {
            assert!(w[1][1] > w[0][1], "chain must rise in z");
        }
    }

    #[test]
    fn chord_count_meets_circle_sagitta_bound() {
        // Circle: sagitta of a chord spanning angle θ is ρ (1 − cos(θ/2)) (elementary geometry).
        for tol in [1e-2, 1e-3, 1e-4, 1e-6] {
            let n = chord_count(tol);
            let theta = std::f64::consts::PI / n;
            assert!(1.0 - (theta / 2.0).cos() <= tol * (1.0 + 1e-9));
            let coarser = std::f64::consts::PI / (n - 1.0);
            assert!(
                1.0 - (coarser / 2.0).cos() > tol,
                "n must be the smallest count"
            );
        }
    }

    #[test]
    fn half_ellipse_contains_matches_exact_ellipse_away_from_boundary() {
        let o = Outline::new(
            &Shape::HalfEllipse {
                z_centre: 0.0,
                radial: 1.0,
                axial: 2.0,
            },
            1e-4,
        );
        assert!(o.contains([0.5, 0.0]));
        assert!(o.contains([0.1, 1.9]));
        assert!(!o.contains([0.99, 1.0]));
        assert!(!o.contains([0.0, 0.0]), "axis points are on the boundary");
        assert!(!o.contains([0.1, 2.1]));
        assert!(o.area() > 0.0);
    }
}
