//! Contour lines of a scalar field on a triangle mesh (marching triangles), for flux lines.
//!
//! Each element is cut into s² sub-triangles at equal steps of its reference coordinates and
//! the field is taken as linear on each: a second-order element (and the flux-basis blend of
//! first-order ones) is not linear, and the sub-triangles keep the lines smooth. The segments
//! are joined into polylines at shared end points and clipped to the window.

use std::collections::HashMap;

use axicore_solver::mesh::Point;
use rayon::prelude::*;

use super::field_source::FieldSource;
use super::view::Window;

/// Sampled field on sub-triangles: points (r, z) in m, values, and triangles of point indices.
#[derive(Debug, Clone, Default)]
pub struct Sampled {
    /// Sub-triangle corners.
    pub points: Vec<Point>,
    /// Field value at each point.
    pub values: Vec<f64>,
    /// Sub-triangles.
    pub triangles: Vec<[u32; 3]>,
}

impl Sampled {
    /// Smallest and largest value at points inside `window`; None when no point lies there.
    pub fn range_in(&self, window: &Window) -> Option<(f64, f64)> {
        self.points
            .iter()
            .zip(&self.values)
            .filter(|(p, v)| window.contains(**p) && v.is_finite())
            .map(|(_, &v)| v)
            .fold(None, |acc, v| match acc {
                None => Some((v, v)),
                Some((lo, hi)) => Some((f64::min(lo, v), f64::max(hi, v))),
            })
    }
}

/// The flux function sampled on every element that overlaps `window`, each cut into
/// `subdivisions`² sub-triangles.
pub fn sample_flux(src: &dyn FieldSource, window: &Window, subdivisions: usize) -> Sampled {
    let s = subdivisions.max(1);
    let mesh = src.mesh();
    let overlaps = |e: usize| {
        let c = mesh.corners(e);
        let (r0, r1) = c.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |a, p| {
            (a.0.min(p[0]), a.1.max(p[0]))
        });
        let (z0, z1) = c.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |a, p| {
            (a.0.min(p[1]), a.1.max(p[1]))
        });
        // A curved edge bulges by less than its element's size: widen the test by that.
        let pad = 0.5 * mesh.longest_edge(e);
        r1 + pad >= window.r0
            && r0 - pad <= window.r1
            && z1 + pad >= window.z0
            && z0 - pad <= window.z1
    };
    let elements: Vec<usize> = (0..mesh.triangles.len()).filter(|&e| overlaps(e)).collect();
    // Local layout: point (i, j), i + j ≤ s, at l = (1 − (i + j)/s, i/s, j/s).
    let index = |i: usize, j: usize| (j * (2 * s + 3 - j) / 2 + i) as u32;
    let per = (s + 1) * (s + 2) / 2;
    let local: Vec<(Vec<Point>, Vec<f64>)> = elements
        .par_iter()
        .map(|&e| {
            let mut pts = Vec::with_capacity(per);
            let mut vals = Vec::with_capacity(per);
            for j in 0..=s {
                for i in 0..=s - j {
                    let l = [
                        1.0 - (i + j) as f64 / s as f64,
                        i as f64 / s as f64,
                        j as f64 / s as f64,
                    ];
                    let p = src.position(e, l);
                    pts.push(p);
                    vals.push(src.flux(e, l, p));
                }
            }
            (pts, vals)
        })
        .collect();
    let mut out = Sampled::default();
    for (pts, vals) in local {
        let base = out.points.len() as u32;
        out.points.extend(pts);
        out.values.extend(vals);
        for j in 0..s {
            for i in 0..s - j {
                out.triangles.push([
                    base + index(i, j),
                    base + index(i + 1, j),
                    base + index(i, j + 1),
                ]);
                if i + j + 1 < s {
                    out.triangles.push([
                        base + index(i + 1, j),
                        base + index(i + 1, j + 1),
                        base + index(i, j + 1),
                    ]);
                }
            }
        }
    }
    out
}

/// Crossing of `level` on the edge (a, b), computed from the endpoints in a fixed order so two
/// triangles sharing the edge get the same bits.
fn crossing(f: &Sampled, a: u32, b: u32, level: f64) -> Point {
    let (a, b) = if (f.points[a as usize], a) <= (f.points[b as usize], b) {
        (a, b)
    } else {
        (b, a)
    };
    let (pa, pb) = (f.points[a as usize], f.points[b as usize]);
    let (va, vb) = (f.values[a as usize], f.values[b as usize]);
    let t = ((level - va) / (vb - va)).clamp(0.0, 1.0);
    [pa[0] + t * (pb[0] - pa[0]), pa[1] + t * (pb[1] - pa[1])]
}

/// Segments of the contour at `level`, one per crossed sub-triangle.
fn segments(f: &Sampled, level: f64) -> Vec<[Point; 2]> {
    let mut out = Vec::new();
    for t in &f.triangles {
        let above = t.map(|n| f.values[n as usize] > level);
        if above[0] == above[1] && above[1] == above[2] {
            continue;
        }
        if t.iter().any(|&n| !f.values[n as usize].is_finite()) {
            continue;
        }
        let mut ends = [[0.0; 2]; 2];
        let mut k = 0;
        for e in 0..3 {
            let (a, b) = (e, (e + 1) % 3);
            if above[a] != above[b] && k < 2 {
                ends[k] = crossing(f, t[a], t[b], level);
                k += 1;
            }
        }
        // A level through a sub-triangle's corner gives a point, not a segment.
        if k == 2 && ends[0] != ends[1] {
            out.push(ends);
        }
    }
    out
}

/// Joins segments into polylines at end points that agree to `tol` (m).
fn chain(segs: &[[Point; 2]], tol: f64) -> Vec<Vec<Point>> {
    let key = |p: Point| ((p[0] / tol).round() as i64, (p[1] / tol).round() as i64);
    let mut ends: HashMap<(i64, i64), Vec<(usize, usize)>> = HashMap::new();
    for (s, seg) in segs.iter().enumerate() {
        for (k, &p) in seg.iter().enumerate() {
            ends.entry(key(p)).or_default().push((s, k));
        }
    }
    let mut used = vec![false; segs.len()];
    // The segment that continues from end `k` of segment `s`, and its far end.
    let next = |s: usize, k: usize, used: &[bool]| {
        ends[&key(segs[s][k])]
            .iter()
            .find(|&&(t, _)| t != s && !used[t])
            .map(|&(t, kt)| (t, 1 - kt))
    };
    let mut lines = Vec::new();
    for s0 in 0..segs.len() {
        if used[s0] {
            continue;
        }
        used[s0] = true;
        let mut fwd = vec![segs[s0][0], segs[s0][1]];
        let (mut s, mut k) = (s0, 1);
        while let Some((t, kt)) = next(s, k, &used) {
            used[t] = true;
            fwd.push(segs[t][kt]);
            (s, k) = (t, kt);
        }
        let mut back = Vec::new();
        let (mut s, mut k) = (s0, 0);
        while let Some((t, kt)) = next(s, k, &used) {
            used[t] = true;
            back.push(segs[t][kt]);
            (s, k) = (t, kt);
        }
        back.reverse();
        back.extend(fwd);
        lines.push(back);
    }
    lines
}

/// Liang–Barsky: the part of segment a→b inside `w` as parameters (t0, t1), if any.
fn clip_segment(w: &Window, a: Point, b: Point) -> Option<(f64, f64)> {
    let d = [b[0] - a[0], b[1] - a[1]];
    let (mut t0, mut t1) = (0.0f64, 1.0f64);
    for (p, q) in [
        (-d[0], a[0] - w.r0),
        (d[0], w.r1 - a[0]),
        (-d[1], a[1] - w.z0),
        (d[1], w.z1 - a[1]),
    ] {
        if p == 0.0 {
            if q < 0.0 {
                return None;
            }
        } else {
            let t = q / p;
            if p < 0.0 {
                t0 = t0.max(t);
            } else {
                t1 = t1.min(t);
            }
        }
    }
    (t0 <= t1).then_some((t0, t1))
}

/// Splits polylines into the runs inside `w`.
pub fn clip(lines: Vec<Vec<Point>>, w: &Window) -> Vec<Vec<Point>> {
    let lerp = |a: Point, b: Point, t: f64| [a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])];
    let mut out = Vec::new();
    for line in lines {
        let mut run: Vec<Point> = Vec::new();
        for pair in line.windows(2) {
            let (a, b) = (pair[0], pair[1]);
            match clip_segment(w, a, b) {
                Some((t0, t1)) => {
                    let (p, q) = (lerp(a, b, t0), lerp(a, b, t1));
                    if run.is_empty() {
                        run.push(p);
                    }
                    run.push(q);
                    if t1 < 1.0 {
                        out.push(std::mem::take(&mut run));
                    }
                }
                None => {
                    if run.len() > 1 {
                        out.push(std::mem::take(&mut run));
                    }
                    run.clear();
                }
            }
        }
        if run.len() > 1 {
            out.push(run);
        }
    }
    out
}

/// The contour polylines of `f` at each of `levels`, clipped to `window`.
pub fn contours(f: &Sampled, levels: &[f64], window: &Window) -> Vec<Vec<Vec<Point>>> {
    let tol = window.size() * 1e-9;
    levels
        .par_iter()
        .map(|&c| clip(chain(&segments(f, c), tol), window))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use axicore_solver::FeMesh;

    /// ψ = r² on a structured mesh of `n` × `n` squares over [0, 1]², each cut in two.
    struct Quadratic(FeMesh);
    impl FieldSource for Quadratic {
        fn mesh(&self) -> &FeMesh {
            &self.0
        }
        fn b_abs(&self, _e: usize, _l: [f64; 3], _p: Point) -> f64 {
            1.0
        }
        fn flux(&self, _e: usize, _l: [f64; 3], p: Point) -> f64 {
            p[0] * p[0]
        }
    }

    fn grid(n: usize) -> FeMesh {
        let mut nodes = Vec::new();
        for j in 0..=n {
            for i in 0..=n {
                nodes.push([i as f64 / n as f64, j as f64 / n as f64]);
            }
        }
        let id = |i: usize, j: usize| (j * (n + 1) + i) as u32;
        let mut triangles = Vec::new();
        for j in 0..n {
            for i in 0..n {
                triangles.push([id(i, j), id(i + 1, j), id(i + 1, j + 1)]);
                triangles.push([id(i, j), id(i + 1, j + 1), id(i, j + 1)]);
            }
        }
        let tags = vec![0; triangles.len()];
        FeMesh {
            nodes,
            triangles,
            tags,
            mid: vec![],
        }
    }

    const UNIT: Window = Window {
        r0: 0.0,
        r1: 1.0,
        z0: 0.0,
        z1: 1.0,
    };

    #[test]
    fn contours_of_r_squared_are_single_vertical_lines_at_the_root_of_the_level() {
        // ψ = r²: the contour ψ = c is the line r = √c; sub-triangles make the linear
        // interpolant's error (≤ h²/8 in ψ with h = 1/(6·4)) small against the tolerance.
        let src = Quadratic(grid(6));
        let f = sample_flux(&src, &UNIT, 4);
        let levels = [0.04, 0.25, 0.5, 0.81];
        let lines = contours(&f, &levels, &UNIT);
        for (c, set) in levels.iter().zip(&lines) {
            assert_eq!(
                set.len(),
                1,
                "level {c}: one polyline expected, got {}",
                set.len()
            );
            let line = &set[0];
            let r = c.sqrt();
            for p in line {
                assert!(
                    (p[0] - r).abs() < 2e-3,
                    "level {c}: point {p:?} off r = {r}"
                );
            }
            let (z_lo, z_hi) = line
                .iter()
                .fold((1.0f64, 0.0f64), |a, p| (a.0.min(p[1]), a.1.max(p[1])));
            assert!(
                z_lo < 1e-12 && z_hi > 1.0 - 1e-12,
                "level {c}: spans z {z_lo}…{z_hi}"
            );
        }
    }

    #[test]
    fn clipping_keeps_only_the_runs_inside_the_window() {
        let w = Window {
            r0: 0.0,
            r1: 1.0,
            z0: 0.0,
            z1: 1.0,
        };
        let line = vec![[-1.0, 0.5], [0.5, 0.5], [0.5, 2.0], [0.7, 0.5]];
        let runs = clip(vec![line], &w);
        assert_eq!(runs.len(), 2);
        assert_eq!(runs[0], vec![[0.0, 0.5], [0.5, 0.5], [0.5, 1.0]]);
        assert!(runs[1].iter().all(|p| w.contains(*p)));
        assert!(clip(vec![vec![[2.0, 2.0], [3.0, 3.0]]], &w).is_empty());
    }

    #[test]
    fn range_in_the_window_ignores_points_outside_it() {
        let src = Quadratic(grid(4));
        let f = sample_flux(&src, &UNIT, 2);
        let half = Window { r1: 0.5, ..UNIT };
        let (lo, hi) = f.range_in(&half).unwrap();
        assert_eq!((lo, hi), (0.0, 0.25));
    }
}
