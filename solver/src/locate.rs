//! Point location: which triangle contains a point, via a uniform bucket grid.

use crate::mesh::{FeMesh, Point};

/// A bucket grid over the mesh's bounding box; each bucket lists the triangles whose bounding
/// boxes overlap it, in triangle order (so the answer is deterministic).
#[derive(Debug, Clone)]
pub struct Locator {
    patches: crate::adjacency::Patches,
    origin: Point,
    cell: [f64; 2],
    dims: [usize; 2],
    start: Vec<u32>,
    items: Vec<u32>,
}

/// Relative barycentric tolerance for points on edges.
const EDGE_TOL: f64 = 1e-10;

impl Locator {
    /// Builds the grid with about one triangle per bucket.
    pub fn new(mesh: &FeMesh) -> Self {
        let (mut lo, mut hi) = ([f64::INFINITY; 2], [f64::NEG_INFINITY; 2]);
        for p in &mesh.nodes {
            for d in 0..2 {
                lo[d] = lo[d].min(p[d]);
                hi[d] = hi[d].max(p[d]);
            }
        }
        let nt = mesh.triangles.len().max(1);
        let ext = [(hi[0] - lo[0]).max(1e-300), (hi[1] - lo[1]).max(1e-300)];
        let aspect = ext[0] / ext[1];
        let ny = ((nt as f64 / aspect).sqrt().ceil() as usize).clamp(1, 4096);
        let nx = ((nt as f64 * aspect).sqrt().ceil() as usize).clamp(1, 4096);
        let cell = [ext[0] / nx as f64, ext[1] / ny as f64];
        let range = |t: usize| {
            let c = mesh.corners(t);
            let mut b = [[usize::MAX, 0usize]; 2];
            for d in 0..2 {
                let n = [nx, ny][d];
                for p in &c {
                    let i = (((p[d] - lo[d]) / cell[d]).floor().max(0.0) as usize).min(n - 1);
                    b[d][0] = b[d][0].min(i);
                    b[d][1] = b[d][1].max(i);
                }
            }
            b
        };
        let mut count = vec![0u32; nx * ny + 1];
        for t in 0..mesh.triangles.len() {
            let b = range(t);
            for iy in b[1][0]..=b[1][1] {
                for ix in b[0][0]..=b[0][1] {
                    count[iy * nx + ix + 1] += 1;
                }
            }
        }
        for i in 1..count.len() {
            count[i] += count[i - 1];
        }
        let mut fill = count.clone();
        let mut items = vec![0u32; *count.last().unwrap_or(&0) as usize];
        for t in 0..mesh.triangles.len() {
            let b = range(t);
            for iy in b[1][0]..=b[1][1] {
                for ix in b[0][0]..=b[0][1] {
                    let k = iy * nx + ix;
                    items[fill[k] as usize] = t as u32;
                    fill[k] += 1;
                }
            }
        }
        Self {
            patches: crate::adjacency::Patches::new(mesh),
            origin: lo,
            cell,
            dims: [nx, ny],
            start: count,
            items,
        }
    }

    /// Node → element adjacency used for recovered point values.
    pub fn patches(&self) -> &crate::adjacency::Patches {
        &self.patches
    }

    /// All triangles containing `p` (edges and corners included) with its barycentric coordinates.
    pub fn containing(&self, mesh: &FeMesh, p: Point) -> Vec<(usize, [f64; 3])> {
        let mut out = Vec::new();
        let mut idx = [0usize; 2];
        for d in 0..2 {
            let f = (p[d] - self.origin[d]) / self.cell[d];
            if !(f >= -1e-9 && f <= self.dims[d] as f64 * (1.0 + 1e-9)) {
                return out;
            }
            idx[d] = (f.floor().max(0.0) as usize).min(self.dims[d] - 1);
        }
        let k = idx[1] * self.dims[0] + idx[0];
        for &t in &self.items[self.start[k] as usize..self.start[k + 1] as usize] {
            let l = barycentric(mesh.corners(t as usize), p);
            if l.iter().all(|&x| x >= -EDGE_TOL) {
                out.push((t as usize, l));
            }
        }
        out
    }

    /// Triangles listed in the bucket of `p` and its eight neighbours (each once, in order):
    /// the candidates for a point near a curved edge, which the straight triangles miss.
    pub fn near(&self, p: Point) -> Vec<usize> {
        let mut out = Vec::new();
        let mut idx = [0i64; 2];
        for d in 0..2 {
            let f = (p[d] - self.origin[d]) / self.cell[d];
            if !f.is_finite() {
                return out;
            }
            idx[d] = f.floor() as i64;
        }
        for dy in -1..=1 {
            for dx in -1..=1 {
                let (ix, iy) = (idx[0] + dx, idx[1] + dy);
                if ix < 0 || iy < 0 || ix >= self.dims[0] as i64 || iy >= self.dims[1] as i64 {
                    continue;
                }
                let k = iy as usize * self.dims[0] + ix as usize;
                out.extend(
                    self.items[self.start[k] as usize..self.start[k + 1] as usize]
                        .iter()
                        .map(|&t| t as usize),
                );
            }
        }
        out.sort_unstable();
        out.dedup();
        out
    }

    /// The triangle that should evaluate the field at `p`: on the axis, one with an axis edge
    /// (where A/r → ∂A/∂r is exact for first-order elements); elsewhere the first containing one.
    pub fn find(&self, mesh: &FeMesh, p: Point) -> Option<(usize, [f64; 3])> {
        let cands = self.containing(mesh, p);
        if p[0] == 0.0 {
            if let Some(c) = cands.iter().find(|(t, _)| {
                mesh.triangles[*t]
                    .iter()
                    .filter(|&&v| mesh.nodes[v as usize][0] == 0.0)
                    .count()
                    == 2
            }) {
                return Some(*c);
            }
        }
        cands.into_iter().next()
    }
}

/// Barycentric coordinates of `p` in the triangle `c`.
pub fn barycentric(c: [Point; 3], p: Point) -> [f64; 3] {
    let d = (c[1][0] - c[0][0]) * (c[2][1] - c[0][1]) - (c[2][0] - c[0][0]) * (c[1][1] - c[0][1]);
    let l1 = ((p[0] - c[0][0]) * (c[2][1] - c[0][1]) - (c[2][0] - c[0][0]) * (p[1] - c[0][1])) / d;
    let l2 = ((c[1][0] - c[0][0]) * (p[1] - c[0][1]) - (p[0] - c[0][0]) * (c[1][1] - c[0][1])) / d;
    [1.0 - l1 - l2, l1, l2]
}
