//! The target element size h(x): the smallest of the far size, the size of the region holding x, and
//! `size_f + grading · dist(x, f)` over the refinement features f.

use crate::shape::{bounding_box, box_distance, segment_distance, Outline};
use crate::spec::{MeshSpec, Point, Refinement};

/// A boundary feature: the non-axis segments of a region outline.
struct Boundary {
    segments: Vec<[Point; 2]>,
    bbox: [f64; 4],
    size: f64,
}

/// Target element size as a function of position.
pub(crate) struct SizeField<'a> {
    far: f64,
    grading: f64,
    outlines: &'a [Outline],
    region_sizes: Vec<f64>,
    points: Vec<(Point, f64)>,
    boundaries: Vec<Boundary>,
    floor: f64,
}

impl<'a> SizeField<'a> {
    /// Builds the size field of `spec`, with region outlines already polygonised.
    pub fn new(spec: &MeshSpec, outlines: &'a [Outline]) -> Self {
        let region_sizes: Vec<f64> = spec.regions.iter().map(|r| r.size).collect();
        let mut points = Vec::new();
        let mut boundaries = Vec::new();
        for refinement in &spec.refinements {
            match *refinement {
                Refinement::Point { at, size } => points.push((at, size)),
                Refinement::Boundary { region, size } => {
                    let v = &outlines[region].vertices;
                    let segments: Vec<[Point; 2]> = (0..v.len())
                        .map(|i| [v[i], v[(i + 1) % v.len()]])
                        // On r = 0 the outline is the axis of revolution, not a surface.
                        .filter(|s| !(s[0][0] == 0.0 && s[1][0] == 0.0))
                        .collect();
                    let ends: Vec<Point> = segments.iter().flatten().copied().collect();
                    boundaries.push(Boundary {
                        bbox: bounding_box(&ends),
                        segments,
                        size,
                    });
                }
            }
        }
        let floor = region_sizes
            .iter()
            .chain(points.iter().map(|p| &p.1))
            .chain(boundaries.iter().map(|b| &b.size))
            .fold(spec.far_size, |m, &s| m.min(s));
        Self {
            far: spec.far_size,
            grading: spec.grading,
            outlines,
            region_sizes,
            points,
            boundaries,
            floor,
        }
    }

    /// The smallest size the field takes anywhere (m).
    pub fn floor(&self) -> f64 {
        self.floor
    }

    /// Index of the first region whose polygon holds `p` strictly inside.
    pub fn region_at(&self, p: Point) -> Option<usize> {
        self.outlines.iter().position(|o| o.contains(p))
    }

    /// h(p) in m; `region` is `region_at(p)`. The mesher itself only needs `exceeded_by`.
    #[cfg(test)]
    pub fn target(&self, p: Point, region: Option<usize>) -> f64 {
        let mut h = self.far;
        if let Some(i) = region {
            h = h.min(self.region_sizes[i]);
        }
        for &(at, size) in &self.points {
            h = h.min(size + self.grading * (p[0] - at[0]).hypot(p[1] - at[1]));
        }
        for b in &self.boundaries {
            if b.size + self.grading * box_distance(p, &b.bbox) >= h {
                continue;
            }
            for s in &b.segments {
                h = h.min(b.size + self.grading * segment_distance(p, s[0], s[1]).0);
            }
        }
        h
    }

    /// Whether a length `len` exceeds h(p); cheaper than `target` because it stops at the first
    /// feature that asks for less and skips features too far away to matter.
    pub fn exceeded_by(&self, len: f64, p: Point, region: Option<usize>) -> bool {
        if len <= self.floor {
            return false;
        }
        if len > self.far {
            return true;
        }
        if let Some(i) = region {
            if len > self.region_sizes[i] {
                return true;
            }
        }
        let g = self.grading;
        for &(at, size) in &self.points {
            if len > size + g * (p[0] - at[0]).hypot(p[1] - at[1]) {
                return true;
            }
        }
        for b in &self.boundaries {
            if b.size + g * box_distance(p, &b.bbox) >= len {
                continue;
            }
            for s in &b.segments {
                if len > b.size + g * segment_distance(p, s[0], s[1]).0 {
                    return true;
                }
            }
        }
        false
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::spec::{Region, Shape};

    fn spec() -> MeshSpec {
        let mut s = MeshSpec::new(1.0, 0);
        s.far_size = 0.1;
        s.grading = 0.5;
        s.regions.push(Region {
            tag: 1,
            shape: Shape::Rect {
                r_min: 0.0,
                r_max: 0.1,
                z_min: -0.1,
                z_max: 0.1,
            },
            size: 0.05,
        });
        s.refinements.push(Refinement::Point {
            at: [0.5, 0.5],
            size: 0.001,
        });
        s.refinements.push(Refinement::Boundary {
            region: 0,
            size: 0.002,
        });
        s
    }

    #[test]
    fn target_is_the_minimum_of_all_contributions() {
        let s = spec();
        let outlines: Vec<Outline> = s
            .regions
            .iter()
            .map(|r| Outline::new(&r.shape, 1e-4))
            .collect();
        let f = SizeField::new(&s, &outlines);
        // Far away from everything: the far size.
        assert_eq!(f.target([0.9, -0.9], None), 0.1);
        // At the point: its size.
        assert!((f.target([0.5, 0.5], None) - 0.001).abs() < 1e-15);
        // 0.02 m right of the rectangle's outer side: 0.002 + 0.5 * 0.02.
        assert!((f.target([0.12, 0.0], None) - 0.012).abs() < 1e-15);
        // On the axis inside the rectangle, 0.1 m from the top and bottom and the outer side:
        // the axis side does not count, so the region size 0.05 wins.
        assert!((f.target([0.0, 0.0], Some(0)) - 0.05).abs() < 1e-15);
        assert_eq!(f.floor(), 0.001);
    }

    #[test]
    fn exceeded_by_agrees_with_target() {
        let s = spec();
        let outlines: Vec<Outline> = s
            .regions
            .iter()
            .map(|r| Outline::new(&r.shape, 1e-4))
            .collect();
        let f = SizeField::new(&s, &outlines);
        for k in 0..200 {
            let p = [0.005 * k as f64, 0.3 - 0.004 * k as f64];
            let region = f.region_at(p);
            let h = f.target(p, region);
            assert!(f.exceeded_by(h * 1.001, p, region));
            assert!(!f.exceeded_by(h * 0.999, p, region));
        }
    }
}
