//! The target element size h(x): the smallest of the far size, the size of the region holding x,
//! `size_f + grading · dist(x, f)` over the refinement features f, and
//! `max(inner_g, min(dist(x, g), size_g + grading · dist(x, g)))` over the graded points g
//! (h proportional to the distance inside the graded zone, which is what makes Delaunay
//! refinement lay out geometric layers: each triangle is about as large as its distance to g).

use crate::shape::{bounding_box, box_distance, segment_distance, Outline};
use crate::spec::{Band, MeshSpec, Point, Refinement};

/// A boundary feature: the non-axis segments of a region outline.
struct Boundary {
    segments: Vec<[Point; 2]>,
    bbox: [f64; 4],
    size: f64,
}

/// A point with geometric grading toward it (see [`Refinement::Graded`]).
struct GradedPoint {
    at: Point,
    size: f64,
    /// `size · factor^layers`: the size of the elements touching the point.
    inner: f64,
}

impl GradedPoint {
    /// Whether a triangle edge of length `len` with its triangle's centroid `d` from the point is
    /// larger than the graded target there, with grading `g` beyond the graded zone.
    fn exceeded_by(&self, len: f64, d: f64, g: f64) -> bool {
        len > self.inner && (len > d || len > self.size + g * d)
    }
}

/// Refinement points in a bucket grid: "is any size + g·dist below len near p?" visits only the
/// buckets within reach.
struct Cloud {
    origin: Point,
    cell: f64,
    nx: usize,
    nz: usize,
    buckets: Vec<Vec<(Point, f64)>>,
    smallest: f64,
}

impl Cloud {
    fn new(points: &[(Point, f64)]) -> Option<Self> {
        if points.is_empty() {
            return None;
        }
        let ends: Vec<Point> = points.iter().map(|p| p.0).collect();
        let [r0, r1, z0, z1] = bounding_box(&ends);
        let smallest = points.iter().map(|p| p.1).fold(f64::INFINITY, f64::min);
        let extent = (r1 - r0).max(z1 - z0).max(smallest);
        // About 64² buckets at most, none smaller than the smallest size.
        let cell = (extent / 64.0).max(smallest);
        let nx = ((r1 - r0) / cell) as usize + 1;
        let nz = ((z1 - z0) / cell) as usize + 1;
        let mut buckets = vec![Vec::new(); nx * nz];
        for &(p, s) in points {
            let i = (((p[0] - r0) / cell) as usize).min(nx - 1);
            let k = (((p[1] - z0) / cell) as usize).min(nz - 1);
            buckets[k * nx + i].push((p, s));
        }
        Some(Self {
            origin: [r0, z0],
            cell,
            nx,
            nz,
            buckets,
            smallest,
        })
    }

    /// Whether some point asks for less than `len` at `p` with grading `g`.
    fn exceeded_by(&self, len: f64, p: Point, g: f64) -> bool {
        if len <= self.smallest {
            return false;
        }
        let reach = if g > 0.0 {
            (len - self.smallest) / g
        } else {
            f64::INFINITY
        };
        let span = |x: f64, o: f64, n: usize| -> (usize, usize) {
            let lo = ((x - reach - o) / self.cell).floor().max(0.0);
            let hi = ((x + reach - o) / self.cell).floor().min(n as f64 - 1.0);
            (lo as usize, hi.max(-1.0) as usize)
        };
        let (i0, i1) = span(p[0], self.origin[0], self.nx);
        let (k0, k1) = span(p[1], self.origin[1], self.nz);
        if p[0] + reach < self.origin[0]
            || p[1] + reach < self.origin[1]
            || p[0] - reach > self.origin[0] + self.cell * self.nx as f64
            || p[1] - reach > self.origin[1] + self.cell * self.nz as f64
        {
            return false;
        }
        for k in k0..=k1.min(self.nz - 1) {
            for i in i0..=i1.min(self.nx - 1) {
                for &(at, size) in &self.buckets[k * self.nx + i] {
                    if len > size + g * (p[0] - at[0]).hypot(p[1] - at[1]) {
                        return true;
                    }
                }
            }
        }
        false
    }
}

/// The parts of `segments` outside every band: inside one, the band's rows grade the size along
/// the outline instead (a boundary refinement there would ask the triangles beside the band for
/// the fine size all along it).
fn outside_bands(segments: Vec<[Point; 2]>, bands: &[Band]) -> Vec<[Point; 2]> {
    let mut pieces = segments;
    for band in bands {
        let mut next = Vec::with_capacity(pieces.len());
        for [a, b] in pieces {
            let mut cuts = vec![0.0, 1.0];
            for z in [band.z_min, band.z_max] {
                let t = (z - a[1]) / (b[1] - a[1]);
                if t > 0.0 && t < 1.0 {
                    cuts.push(t);
                }
            }
            cuts.sort_by(f64::total_cmp);
            let at = |t: f64| [a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])];
            for w in cuts.windows(2) {
                let (p, q) = (at(w[0]), at(w[1]));
                if !band.holds([0.5 * (p[0] + q[0]), 0.5 * (p[1] + q[1])]) {
                    next.push([p, q]);
                }
            }
        }
        pieces = next;
    }
    pieces
}

/// Target element size as a function of position.
pub(crate) struct SizeField<'a> {
    far: f64,
    grading: f64,
    outlines: &'a [Outline],
    region_sizes: Vec<f64>,
    points: Vec<(Point, f64)>,
    graded: Vec<GradedPoint>,
    boundaries: Vec<Boundary>,
    cloud: Option<Cloud>,
    floor: f64,
}

impl<'a> SizeField<'a> {
    /// Builds the size field of `spec`, with region outlines already polygonised.
    pub fn new(spec: &MeshSpec, outlines: &'a [Outline]) -> Self {
        let region_sizes: Vec<f64> = spec.regions.iter().map(|r| r.size).collect();
        let mut points = Vec::new();
        let mut graded = Vec::new();
        let mut boundaries = Vec::new();
        let mut cloud_points = Vec::new();
        for refinement in &spec.refinements {
            match *refinement {
                Refinement::Point { at, size } => points.push((at, size)),
                Refinement::Graded {
                    at,
                    size,
                    factor,
                    layers,
                } => graded.push(GradedPoint {
                    at,
                    size,
                    inner: size * factor.powi(layers as i32),
                }),
                Refinement::Cloud { ref points } => cloud_points.extend_from_slice(points),
                Refinement::Boundary { region, size } => {
                    let v = &outlines[region].vertices;
                    let segments: Vec<[Point; 2]> = (0..v.len())
                        .map(|i| [v[i], v[(i + 1) % v.len()]])
                        // On r = 0 the outline is the axis of revolution, not a surface.
                        .filter(|s| !(s[0][0] == 0.0 && s[1][0] == 0.0))
                        .collect();
                    let segments = outside_bands(segments, &spec.bands);
                    if segments.is_empty() {
                        continue;
                    }
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
            .chain(graded.iter().map(|p| &p.inner))
            .chain(cloud_points.iter().map(|p| &p.1))
            .chain(boundaries.iter().map(|b| &b.size))
            .fold(spec.far_size, |m, &s| m.min(s));
        let cloud = Cloud::new(&cloud_points);
        Self {
            far: spec.far_size,
            grading: spec.grading,
            outlines,
            region_sizes,
            points,
            graded,
            boundaries,
            cloud,
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
        for g in &self.graded {
            let d = (p[0] - g.at[0]).hypot(p[1] - g.at[1]);
            h = h.min(g.inner.max(d.min(g.size + self.grading * d)));
        }
        for b in &self.boundaries {
            if b.size + self.grading * box_distance(p, &b.bbox) >= h {
                continue;
            }
            for s in &b.segments {
                h = h.min(b.size + self.grading * segment_distance(p, s[0], s[1]).0);
            }
        }
        if let Some(c) = &self.cloud {
            for bucket in &c.buckets {
                for &(at, size) in bucket {
                    h = h.min(size + self.grading * (p[0] - at[0]).hypot(p[1] - at[1]));
                }
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
        for gp in &self.graded {
            if gp.exceeded_by(len, (p[0] - gp.at[0]).hypot(p[1] - gp.at[1]), g) {
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
        if let Some(c) = &self.cloud {
            return c.exceeded_by(len, p, g);
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

    #[test]
    fn graded_target_is_the_distance_between_the_inner_and_outer_sizes() {
        let mut s = spec();
        s.refinements.push(Refinement::Graded {
            at: [0.3, -0.3],
            size: 0.01,
            factor: 0.2,
            layers: 3,
        });
        let outlines: Vec<Outline> = s
            .regions
            .iter()
            .map(|r| Outline::new(&r.shape, 1e-4))
            .collect();
        let f = SizeField::new(&s, &outlines);
        let inner = 0.01 * 0.2f64.powi(3);
        assert!((f.floor() - inner).abs() < 1e-18);
        // Inside the innermost size: clipped; in the graded zone: the distance itself; beyond
        // the zone: size + grading · d (grading 0.5 here, so past d = 0.02).
        for (d, h) in [
            (0.0, inner),
            (5e-5, inner),
            (1e-3, 1e-3),
            (0.015, 0.015),
            (0.1, 0.06),
        ] {
            let p = [0.3 + d, -0.3];
            assert!(
                (f.target(p, None) - h).abs() < 1e-15,
                "{d}: {}",
                f.target(p, None)
            );
            assert!(f.exceeded_by(h * 1.001, p, None));
            assert!(!f.exceeded_by(h * 0.999, p, None));
        }
    }

    #[test]
    fn cloud_lookup_agrees_with_the_brute_force_minimum() {
        // 400 scattered points with sizes over three decades; the bucket grid must answer
        // exactly what the linear scan in `target` answers.
        let mut s = spec();
        let mut x: u64 = 12345;
        let mut next = || {
            x = x
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            (x >> 11) as f64 / (1u64 << 53) as f64
        };
        let points: Vec<(Point, f64)> = (0..400)
            .map(|_| {
                (
                    [0.6 * next(), 0.8 * next() - 0.4],
                    1e-4 * 10f64.powf(3.0 * next()),
                )
            })
            .collect();
        s.refinements.push(Refinement::Cloud { points });
        let outlines: Vec<Outline> = s
            .regions
            .iter()
            .map(|r| Outline::new(&r.shape, 1e-4))
            .collect();
        let f = SizeField::new(&s, &outlines);
        for _ in 0..2000 {
            let p = [0.9 * next(), 1.8 * next() - 0.9];
            let region = f.region_at(p);
            let h = f.target(p, region);
            assert!(f.exceeded_by(h * 1.000_001, p, region), "{p:?} {h}");
            assert!(!f.exceeded_by(h * 0.999_999, p, region), "{p:?} {h}");
        }
    }
}
