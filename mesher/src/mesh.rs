//! The finished mesh and its quality figures.

use crate::spec::Point;

/// Where a node sits, for boundary conditions.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum NodeKind {
    /// Neither on the axis nor on the outer arc.
    Interior,
    /// On the axis: r == 0 exactly. The two ends of the outer arc are `Axis` too.
    Axis,
    /// On the outer arc polygon (r > 0).
    Outer,
}

/// Linear triangles of the (r, z) half-disc, with a region tag per triangle.
#[derive(Debug, Clone, PartialEq)]
pub struct Mesh {
    /// Node coordinates (r, z) in m.
    pub nodes: Vec<Point>,
    /// Node indices, counter-clockwise in the (r, z) plane (positive signed area with r as x, z as y).
    pub triangles: Vec<[u32; 3]>,
    /// Per triangle: its region's tag, or the background tag.
    pub tags: Vec<u32>,
    /// Per node: where it sits.
    pub node_kinds: Vec<NodeKind>,
}

/// Size and quality figures of a mesh.
#[derive(Debug, Clone, PartialEq)]
pub struct MeshStats {
    /// Number of nodes.
    pub nodes: usize,
    /// Number of triangles.
    pub triangles: usize,
    /// Triangle count per tag, sorted by tag.
    pub triangles_per_tag: Vec<(u32, usize)>,
    /// Smallest interior angle over all triangles (degrees).
    pub min_angle_deg: f64,
    /// Largest aspect ratio: longest edge / (2·√3 · inradius), which is 1 for an equilateral triangle
    /// and grows without bound as a triangle flattens.
    pub max_aspect_ratio: f64,
}

/// Signed area of triangle (a, b, c) in m², positive when counter-clockwise.
pub fn signed_area(a: Point, b: Point, c: Point) -> f64 {
    0.5 * ((b[0] - a[0]) * (c[1] - a[1]) - (c[0] - a[0]) * (b[1] - a[1]))
}

fn dist(a: Point, b: Point) -> f64 {
    (b[0] - a[0]).hypot(b[1] - a[1])
}

/// The three interior angles (radians) of triangle (a, b, c), from its side lengths.
pub fn triangle_angles(a: Point, b: Point, c: Point) -> [f64; 3] {
    // Law of cosines; clamped since rounding can push the cosine just past ±1.
    let (la, lb, lc) = (dist(b, c), dist(c, a), dist(a, b));
    let angle = |opp: f64, s1: f64, s2: f64| {
        ((s1 * s1 + s2 * s2 - opp * opp) / (2.0 * s1 * s2))
            .clamp(-1.0, 1.0)
            .acos()
    };
    [angle(la, lb, lc), angle(lb, lc, la), angle(lc, la, lb)]
}

/// Longest edge / (2·√3 · inradius) of triangle (a, b, c); 1 for an equilateral triangle.
pub fn aspect_ratio(a: Point, b: Point, c: Point) -> f64 {
    let (la, lb, lc) = (dist(b, c), dist(c, a), dist(a, b));
    // Inradius = area / semi-perimeter.
    let inradius = signed_area(a, b, c).abs() / (0.5 * (la + lb + lc));
    la.max(lb).max(lc) / (2.0 * 3f64.sqrt() * inradius)
}

impl Mesh {
    /// Corner points of triangle `t`.
    pub fn corners(&self, t: usize) -> [Point; 3] {
        self.triangles[t].map(|n| self.nodes[n as usize])
    }

    /// Signed area of triangle `t` in m².
    pub fn triangle_area(&self, t: usize) -> f64 {
        let [a, b, c] = self.corners(t);
        signed_area(a, b, c)
    }

    /// Total area (m², in the (r, z) plane) of the triangles tagged `tag`.
    pub fn region_area(&self, tag: u32) -> f64 {
        (0..self.triangles.len())
            .filter(|&t| self.tags[t] == tag)
            .map(|t| self.triangle_area(t))
            .sum()
    }

    /// Counts, smallest angle and largest aspect ratio.
    pub fn stats(&self) -> MeshStats {
        let mut per_tag: Vec<(u32, usize)> = Vec::new();
        let mut sorted_tags = self.tags.clone();
        sorted_tags.sort_unstable();
        for tag in sorted_tags {
            match per_tag.last_mut() {
                Some((t, n)) if *t == tag => *n += 1,
                _ => per_tag.push((tag, 1)),
            }
        }
        let mut min_angle = f64::INFINITY;
        let mut max_aspect: f64 = 0.0;
        for t in 0..self.triangles.len() {
            let [a, b, c] = self.corners(t);
            for angle in triangle_angles(a, b, c) {
                min_angle = min_angle.min(angle);
            }
            max_aspect = max_aspect.max(aspect_ratio(a, b, c));
        }
        MeshStats {
            nodes: self.nodes.len(),
            triangles: self.triangles.len(),
            triangles_per_tag: per_tag,
            min_angle_deg: if self.triangles.is_empty() {
                0.0
            } else {
                min_angle.to_degrees()
            },
            max_aspect_ratio: max_aspect,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn equilateral_triangle_has_aspect_one_and_sixty_degrees() {
        let (a, b, c) = ([0.0, 0.0], [1.0, 0.0], [0.5, 0.75f64.sqrt()]);
        assert!((aspect_ratio(a, b, c) - 1.0).abs() < 1e-12);
        for angle in triangle_angles(a, b, c) {
            assert!((angle.to_degrees() - 60.0).abs() < 1e-9);
        }
        assert!(signed_area(a, b, c) > 0.0);
    }

    #[test]
    fn right_isosceles_triangle_aspect_matches_closed_form() {
        // Legs 1: hypotenuse √2, inradius (2 − √2)/2, so the ratio is √2 / (√3 (2 − √2)).
        let r = aspect_ratio([0.0, 0.0], [1.0, 0.0], [0.0, 1.0]);
        let expected = 2f64.sqrt() / (3f64.sqrt() * (2.0 - 2f64.sqrt()));
        assert!((r - expected).abs() < 1e-12);
    }
}
