//! Graded bands: the middle of a slender body meshed as a grid of stretched rectangles.
//!
//! Isotropic triangles along a rod of length L and radius a cost about L/a elements per row, so a
//! mesh that resolves the radius along the whole length grows like the slenderness. Away from the
//! ends the field varies along z only on the scale of the distance to the nearer end, so rows may
//! grow with that distance: the band's rows are `end_size` apart at its ends and grow linearly,
//! giving a row count that grows like the logarithm of the band's length. Columns are fixed lines
//! r = const (the core's radius, the windings' radii, a few in between), so every rectangle is
//! cut into two right triangles: angles are 90° and two complements, however long the rectangle.
//! A band may instead follow a half-ellipse (a slender spheroid): its columns then bend with the
//! outline's radius (`column_at`), and the cells are trapezoids.
//!
//! The triangulator does not mesh the band: its outline enters the constrained triangulation as
//! constraint edges, the Delaunay refinement fills its inside with throw-away points, and after
//! refinement everything strictly inside is dropped and replaced by the grid. The refinement may
//! have split the band's edges; a point on the outer edge adds a row, a point on an end edge is
//! carried through the flat first rows as a short column (`ladder`) and joined to the corners of
//! the first cell tall enough (`zipper`), so the two parts always conform without flat
//! triangles with an angle near 180°.

use crate::error::MeshError;
use crate::shape::Outline;
use crate::spec::{Band, MeshSpec, Point, Refinement, Shape};

/// `spec` as the mesh is built from it, `None` when that is `spec` itself: bands refined where
/// cloud refinement points inside them ask for smaller cells (see [`Band::refined_by`]), and the
/// ends of every band that follows a surface moved to the nearest vertices of that surface's
/// polygon, so that the band's end edges meet the polygon at its vertices.
pub(crate) fn prepared(spec: &MeshSpec) -> Option<MeshSpec> {
    let cloud: Vec<(Point, f64)> = spec
        .refinements
        .iter()
        .flat_map(|r| match r {
            Refinement::Cloud { points } => points.as_slice(),
            _ => &[],
        })
        .copied()
        .collect();
    let refined: Vec<Option<Band>> = spec.bands.iter().map(|b| b.refined_by(&cloud)).collect();
    if spec.bands.iter().all(|b| b.surface.is_none()) && refined.iter().all(Option::is_none) {
        return None;
    }
    let mut out = spec.clone();
    for (band, finer) in out.bands.iter_mut().zip(refined) {
        if let Some(finer) = finer {
            *band = finer;
        }
        let Some(surface) = band.surface else {
            continue;
        };
        let outline = Outline::new(&surface, spec.arc_tolerance);
        let nearest = |z: f64| {
            outline
                .vertices
                .iter()
                .filter(|p| p[0] > 0.0)
                .map(|p| p[1])
                .min_by(|a, b| (a - z).abs().total_cmp(&(b - z).abs()))
                .unwrap_or(z)
        };
        band.z_min = nearest(band.z_min);
        band.z_max = nearest(band.z_max);
    }
    Some(out)
}

/// Most subdivisions of a column interval one refinement can ask for.
const MOST_SUBDIVISIONS: f64 = 64.0;

/// Columns of a surface-following band up to this many equatorial radii scale with the local
/// radius of the surface; the rest blend linearly to the band's outer edge.
const SCALED_RADII: f64 = 6.0;

/// Tolerance, relative to the band's extent, for a point to lie on one of its edges.
const ON_EDGE: f64 = 1e-9;

impl Band {
    /// Length below which a point lies on an edge of the band (m).
    pub(crate) fn tol(&self) -> f64 {
        ON_EDGE * self.r_max.max(self.z_max - self.z_min)
    }

    /// Whether `p` lies strictly inside the band (off its edges and the axis).
    pub(crate) fn holds(&self, p: Point) -> bool {
        let t = self.tol();
        p[0] > t && p[0] < self.r_max - t && p[1] > self.z_min + t && p[1] < self.z_max - t
    }

    /// Whether `p` is on the axis strictly between the band's ends (the band's own axis nodes
    /// replace such points).
    pub(crate) fn on_inner_axis(&self, p: Point) -> bool {
        let t = self.tol();
        p[0] <= t && p[1] > self.z_min + t && p[1] < self.z_max - t
    }

    /// Every column line, from the axis to the outer edge.
    fn all_columns(&self) -> Vec<f64> {
        let mut c = vec![0.0];
        c.extend_from_slice(&self.columns);
        c.push(self.r_max);
        c
    }

    /// Radius of column line `c` (its radius at the equator) at height z: itself for straight
    /// columns; for a surface, scaled with the outline's radius up to a few equatorial radii,
    /// blended linearly to r_max beyond.
    pub(crate) fn column_at(&self, c: f64, z: f64) -> f64 {
        let Some(Shape::HalfEllipse {
            z_centre,
            radial,
            axial,
        }) = self.surface
        else {
            return c;
        };
        if c == 0.0 || c == self.r_max {
            return c;
        }
        let u = ((z - z_centre) / axial).clamp(-1.0, 1.0);
        let rho = radial * (1.0 - u * u).sqrt();
        // Near the surface the columns scale with its radius, so a thinning tip keeps its
        // columns close; beyond SCALED_RADII the rest blends linearly to r_max. A column then
        // moves at most SCALED_RADII times as far as the surface from row to row, which bounds
        // the shear of the cells (and their largest angle) near a tip.
        let c1 = (SCALED_RADII * radial).min(0.5 * (radial + self.r_max));
        if c <= c1 {
            rho * (c / radial)
        } else {
            let r1 = rho * (c1 / radial);
            r1 + (c - c1) * (self.r_max - r1) / (self.r_max - c1)
        }
    }

    /// Row positions from `z_min` to `z_max`, graded symmetrically from both ends.
    pub(crate) fn rows(&self) -> Vec<f64> {
        let half = 0.5 * (self.z_max - self.z_min);
        let step = |s: f64| (self.end_size + self.growth * s).min(self.max_size);
        // Distances from the nearer end.
        let mut s = vec![0.0];
        loop {
            let last = s[s.len() - 1];
            let next = last + step(last);
            if next >= half {
                break;
            }
            s.push(next);
        }
        // Whatever is left in the middle is at most two steps; a sliver would be a bad row.
        let last = s[s.len() - 1];
        if s.len() > 1 && half - last < 0.25 * step(last) {
            s.pop();
        }
        let last = s[s.len() - 1];
        let mut rows: Vec<f64> = s.iter().map(|d| self.z_min + d).collect();
        if half - last > 0.75 * step(last) || s.len() < 2 {
            rows.push(self.z_min + half);
        }
        rows.extend(s.iter().rev().map(|d| self.z_max - d));
        rows
    }

    /// The band with smaller cells where refinement points inside it ask for less than its
    /// cells' diagonal, or `None` if none does. A band cannot be refined locally: the largest
    /// factor asked scales every row spacing and subdivides every column interval (adaptive
    /// refinement marks the band's cells as a whole, and the estimate sees every one shrink).
    pub(crate) fn refined_by(&self, points: &[(Point, f64)]) -> Option<Band> {
        let inside: Vec<&(Point, f64)> = points.iter().filter(|(p, _)| self.holds(*p)).collect();
        if inside.is_empty() {
            return None;
        }
        let rows = self.rows();
        let cols = self.all_columns();
        let mut k: f64 = 1.0;
        for &&(p, size) in &inside {
            let i = rows
                .partition_point(|&z| z <= p[1])
                .clamp(1, rows.len() - 1);
            let radii: Vec<f64> = cols.iter().map(|&c| self.column_at(c, p[1])).collect();
            let j = radii
                .partition_point(|&r| r <= p[0])
                .clamp(1, radii.len() - 1);
            let cell = (rows[i] - rows[i - 1]).hypot(radii[j] - radii[j - 1]);
            k = k.min(size / cell);
        }
        if k >= 1.0 {
            return None;
        }
        let n = (1.0 / k).ceil().min(MOST_SUBDIVISIONS) as usize;
        let mut finer = self.clone();
        finer.end_size *= k;
        finer.growth *= k;
        finer.max_size *= k;
        finer.columns.clear();
        for w in cols.windows(2) {
            for q in 1..n {
                finer
                    .columns
                    .push(w[0] + (w[1] - w[0]) * q as f64 / n as f64);
            }
            if w[1] < self.r_max {
                // The original line exactly: a surface band finds its outline's column by it.
                finer.columns.push(w[1]);
            }
        }
        Some(finer)
    }

    /// Number of rows, counted up to `cap` (a band with no growth and a tiny end size would
    /// otherwise allocate them all before the node cap could refuse it).
    pub(crate) fn row_count(&self, cap: usize) -> usize {
        let half = 0.5 * (self.z_max - self.z_min);
        let mut s = 0.0;
        let mut count = 0;
        while s < half && count <= cap {
            s += (self.end_size + self.growth * s).min(self.max_size);
            count += 1;
        }
        2 * count + 1
    }

    /// The band's outline as a closed chain (first point repeated at the end), counter-clockwise:
    /// along the lower end through the columns, up the outer edge through the rows, back along the
    /// upper end, down the axis through the rows.
    pub(crate) fn outline(&self, rows: &[f64]) -> Vec<Point> {
        let cols = self.all_columns();
        let (lo, hi) = (self.z_min, self.z_max);
        let mut chain: Vec<Point> = cols.iter().map(|&c| [self.column_at(c, lo), lo]).collect();
        chain.extend(rows[1..].iter().map(|&z| [self.r_max, z]));
        chain.extend(
            cols.iter()
                .rev()
                .skip(1)
                .map(|&c| [self.column_at(c, hi), hi]),
        );
        chain.extend(rows.iter().rev().skip(1).map(|&z| [0.0, z]));
        chain
    }

    /// Appends the band's grid to a mesh whose nodes on the band's edges are `edge_nodes` (index,
    /// position): new nodes go to `nodes`, triangles (counter-clockwise) to `triangles`.
    pub(crate) fn tile(
        &self,
        edge_nodes: &[(u32, Point)],
        nodes: &mut Vec<Point>,
        triangles: &mut Vec<[u32; 3]>,
    ) -> Result<(), MeshError> {
        let t = self.tol();
        let cols = self.all_columns();
        let m = cols.len() - 1;
        let ends = [self.z_min, self.z_max]
            .map(|z| -> Vec<f64> { cols.iter().map(|&c| self.column_at(c, z)).collect() });
        let is_col = |end: usize, r: f64| ends[end].iter().any(|&c| (c - r).abs() <= t);
        let mut rows = self.rows();
        // Points the refinement put on the outer edge become rows of their own.
        for &(_, p) in edge_nodes {
            let inside = p[1] > self.z_min + t && p[1] < self.z_max - t;
            if (p[0] - self.r_max).abs() <= t
                && inside
                && !rows.iter().any(|&z| (z - p[1]).abs() <= t)
            {
                rows.push(p[1]);
            }
        }
        rows.sort_by(f64::total_cmp);
        let n = rows.len() - 1;
        let find = |r: f64, z: f64| -> Result<u32, MeshError> {
            edge_nodes
                .iter()
                .find(|(_, p)| (p[0] - r).abs() <= t && (p[1] - z).abs() <= t)
                .map(|&(k, _)| k)
                .ok_or_else(|| MeshError::Triangulation {
                    reason: format!("graded band lost its edge node at ({r}, {z}) m"),
                })
        };
        let mut idx = vec![vec![0u32; m + 1]; n + 1];
        for (i, &z) in rows.iter().enumerate() {
            for (j, &c) in cols.iter().enumerate() {
                let r = self.column_at(c, z);
                idx[i][j] = if i == 0 || i == n || j == m {
                    find(r, z)?
                } else {
                    nodes.push([r, z]);
                    (nodes.len() - 1) as u32
                };
            }
        }
        // Points the refinement put on an end edge, by the cell they fall in, as fractions of
        // the cell's width (columns may follow a surface, so the fraction is what carries over).
        let mut extras: Vec<Vec<(f64, u32)>> = vec![Vec::new(); 2 * m];
        for &(k, p) in edge_nodes {
            let end = if (p[1] - self.z_min).abs() <= t {
                0
            } else if (p[1] - self.z_max).abs() <= t {
                1
            } else {
                continue;
            };
            if is_col(end, p[0]) || p[0] < 0.0 || p[0] > self.r_max {
                continue;
            }
            let e = &ends[end];
            let j = e.partition_point(|&c| c < p[0]) - 1;
            extras[end * m + j].push(((p[0] - e[j]) / (e[j + 1] - e[j]), k));
        }
        for e in &mut extras {
            e.sort_by(|a, b| a.0.total_cmp(&b.0));
        }
        let mut done = vec![vec![false; m]; n];
        let mid = n / 2;
        let at = |j: usize, frac: f64, z: f64| {
            let (a, b) = (self.column_at(cols[j], z), self.column_at(cols[j + 1], z));
            [a + frac * (b - a), z]
        };
        for j in 0..m {
            // Lower end: carry the extra points up as short columns through the flat first
            // rows, then join them to the two upper corners of the first cell tall enough.
            let mut below = extras[j].clone();
            let mut i = 0;
            while !below.is_empty() {
                let (bl, br, tr, tl) = (idx[i][j], idx[i][j + 1], idx[i + 1][j + 1], idx[i + 1][j]);
                let width = nodes[br as usize][0] - nodes[bl as usize][0];
                let tall = rows[i + 1] - rows[i] >= 0.5 * width;
                done[i][j] = true;
                let mut chain = vec![bl];
                chain.extend(below.iter().map(|e| e.1));
                chain.push(br);
                if tall || i + 1 >= mid {
                    zipper(&chain, [tl, tr], nodes, triangles);
                    break;
                }
                let lifted: Vec<(f64, u32)> = below
                    .iter()
                    .map(|&(frac, _)| {
                        nodes.push(at(j, frac, rows[i + 1]));
                        (frac, (nodes.len() - 1) as u32)
                    })
                    .collect();
                let mut upper = vec![tl];
                upper.extend(lifted.iter().map(|e| e.1));
                upper.push(tr);
                ladder(&chain, &upper, triangles);
                below = lifted;
                i += 1;
            }
            // Upper end, mirrored.
            let mut above = extras[m + j].clone();
            let mut i = n - 1;
            while !above.is_empty() {
                let (bl, br, tr, tl) = (idx[i][j], idx[i][j + 1], idx[i + 1][j + 1], idx[i + 1][j]);
                let width = nodes[tr as usize][0] - nodes[tl as usize][0];
                let tall = rows[i + 1] - rows[i] >= 0.5 * width;
                done[i][j] = true;
                let mut chain = vec![tr];
                chain.extend(above.iter().rev().map(|e| e.1));
                chain.push(tl);
                if tall || i <= mid {
                    zipper(&chain, [br, bl], nodes, triangles);
                    break;
                }
                let lowered: Vec<(f64, u32)> = above
                    .iter()
                    .map(|&(frac, _)| {
                        nodes.push(at(j, frac, rows[i]));
                        (frac, (nodes.len() - 1) as u32)
                    })
                    .collect();
                let mut lower = vec![br];
                lower.extend(lowered.iter().rev().map(|e| e.1));
                lower.push(bl);
                ladder(&chain, &lower, triangles);
                above = lowered;
                i -= 1;
            }
        }
        for i in 0..n {
            for j in 0..m {
                if !done[i][j] {
                    let (bl, br, tr, tl) =
                        (idx[i][j], idx[i][j + 1], idx[i + 1][j + 1], idx[i + 1][j]);
                    triangles.push([bl, br, tr]);
                    triangles.push([bl, tr, tl]);
                }
            }
        }
        Ok(())
    }
}

/// Two chains of equal length facing each other (`near` along one edge of a strip, `far`
/// along the other, both in the counter-clockwise direction of `near`): the quadrilaterals
/// between them, each cut into two triangles.
fn ladder(near: &[u32], far: &[u32], triangles: &mut Vec<[u32; 3]>) {
    for k in 0..near.len() - 1 {
        // `far` runs in the opposite direction when walked counter-clockwise around a cell.
        let (a, b) = (near[k], near[k + 1]);
        let (c, d) = (far[k + 1], far[k]);
        triangles.push([a, b, c]);
        triangles.push([a, c, d]);
    }
}

/// A chain of points along one side of a cell (counter-clockwise) joined to the two corners of
/// the opposite side, `[left, right]` as seen from the chain: the first half of the chain's
/// segments to the corner across from its start, the rest to the other, and one triangle between.
fn zipper(chain: &[u32], across: [u32; 2], nodes: &[Point], triangles: &mut Vec<[u32; 3]>) {
    let [far_start, far_end] = across;
    let (p0, p1) = (
        nodes[chain[0] as usize],
        nodes[chain[chain.len() - 1] as usize],
    );
    let half = 0.5 * (p0[0] + p1[0]);
    let first = (p0[0] < p1[0]) as usize;
    let mut split = chain.len() - 1;
    for k in 0..chain.len() - 1 {
        let mid_r = 0.5 * (nodes[chain[k] as usize][0] + nodes[chain[k + 1] as usize][0]);
        let before = if first == 1 {
            mid_r < half
        } else {
            mid_r > half
        };
        if before {
            triangles.push([chain[k], chain[k + 1], far_start]);
        } else {
            split = split.min(k);
            triangles.push([chain[k], chain[k + 1], far_end]);
        }
    }
    triangles.push([chain[split], far_end, far_start]);
}

#[cfg(test)]
mod tests {
    use super::*;

    fn band() -> Band {
        Band {
            z_min: -1.0,
            z_max: 1.0,
            r_max: 0.05,
            columns: vec![0.01, 0.02],
            end_size: 0.01,
            growth: 0.3,
            max_size: 0.2,
            surface: None,
        }
    }

    #[test]
    fn rows_grow_from_both_ends_and_stay_below_the_cap() {
        let b = band();
        let rows = b.rows();
        assert_eq!(rows[0], -1.0);
        assert_eq!(*rows.last().unwrap(), 1.0);
        let steps: Vec<f64> = rows.windows(2).map(|w| w[1] - w[0]).collect();
        assert!(
            steps.iter().all(|&s| s > 0.0 && s <= 0.2 + 1e-12),
            "{steps:?}"
        );
        assert!((steps[0] - 0.01).abs() < 1e-12);
        // Symmetric about the middle.
        for (a, b) in steps.iter().zip(steps.iter().rev()) {
            assert!((a - b).abs() < 1e-12);
        }
        // Logarithmic: ten times longer costs only a few more rows.
        let mut long = band();
        long.z_min = -10.0;
        long.z_max = 10.0;
        long.max_size = 2.0;
        assert!(
            long.rows().len() < rows.len() + 20,
            "{} {}",
            long.rows().len(),
            rows.len()
        );
    }

    #[test]
    fn a_refinement_point_inside_refines_the_whole_band() {
        let b = band();
        assert!(b.refined_by(&[([0.1, 0.0], 1.0)]).is_none()); // outside: nothing asked
        assert!(b.refined_by(&[([0.015, 0.0], 1.0)]).is_none()); // larger than the cells
        let finer = b.refined_by(&[([0.015, 0.0], 0.01)]).unwrap();
        assert!(finer.rows().len() > b.rows().len());
        assert!(finer.columns.len() > b.columns.len());
        // The original columns stay, exactly.
        assert!(b.columns.iter().all(|c| finer.columns.contains(c)));
        assert!(finer.end_size < b.end_size && finer.max_size < b.max_size);
    }

    #[test]
    fn tiles_cover_the_band_and_join_extra_edge_points() {
        let b = band();
        let rows = b.rows();
        let mut nodes: Vec<Point> = b.outline(&rows);
        nodes.pop();
        // Extra points as a refinement would leave them: one on the outer edge, one on an end.
        nodes.push([0.05, 0.5 * (rows[3] + rows[4])]);
        nodes.push([0.015, -1.0]);
        let edge: Vec<(u32, Point)> = nodes
            .iter()
            .enumerate()
            .filter(|(_, p)| !b.on_inner_axis(**p))
            .map(|(k, p)| (k as u32, *p))
            .collect();
        let mut tris = Vec::new();
        b.tile(&edge, &mut nodes, &mut tris).unwrap();
        let area: f64 = tris
            .iter()
            .map(|t| {
                let c = t.map(|k| nodes[k as usize]);
                crate::mesh::signed_area(c[0], c[1], c[2])
            })
            .inspect(|&a| assert!(a > 0.0))
            .sum();
        assert!((area - 0.05 * 2.0).abs() < 1e-12, "{area}");
        // Every node of the end extra and the outer extra is used.
        let used = |k: usize| tris.iter().any(|t| t.contains(&(k as u32)));
        let extra_at = nodes.iter().position(|p| *p == [0.015, -1.0]).unwrap();
        assert!(used(extra_at));
    }
}
