//! Point location on the hp model's elements, curved ones included: which element holds a
//! physical point (r, z), and where in its reference triangle.
//!
//! A uniform bucket grid lists every element whose bounding box meets a bucket. A straight
//! element's box is its corners'; a curved element's is taken from points sampled along its
//! mapped edges, widened so that the arcs between samples stay inside (an arc bulges past its
//! chord, so the corner mesh's boxes would miss points there). A candidate holds the point when
//! the inverse of its map lands in the reference triangle: directly for affine maps, by Newton
//! from the straight triangle's barycentrics for blended ones.

use super::map::ElementMap;
use crate::mesh::{FeMesh, Point};

/// Reference-coordinate tolerance for points on an element's edges (relative to the unit
/// reference triangle).
const EDGE_TOL: f64 = 1e-10;

/// Samples per curved edge for the bounding box.
const EDGE_SAMPLES: usize = 16;

/// Newton iterations of the map's inverse; from the chord's barycentrics the blended maps here
/// (arcs of at most half a turn, no fold) converge in a handful.
const NEWTON_STEPS: usize = 30;

/// Where a point lies: its element and its reference coordinates (ξ, η) there.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Located {
    /// Element index.
    pub element: usize,
    /// Reference coordinates (ξ, η) of the point in that element.
    pub xi: [f64; 2],
}

/// A bucket grid over the elements' (curved) bounding boxes, for [`HpLocator::find`].
#[derive(Debug, Clone)]
pub struct HpLocator {
    origin: Point,
    cell: [f64; 2],
    dims: [usize; 2],
    start: Vec<u32>,
    items: Vec<u32>,
}

/// The axis-aligned box of element `t` under `map`: corners, and for a curved map samples of
/// its edges widened by a tenth of the box (the sub-arcs between samples bulge by far less).
fn element_box(mesh: &FeMesh, map: &ElementMap, t: usize) -> [[f64; 2]; 2] {
    let mut b = [[f64::INFINITY, f64::NEG_INFINITY]; 2];
    let mut add = |p: Point| {
        for d in 0..2 {
            b[d][0] = b[d][0].min(p[d]);
            b[d][1] = b[d][1].max(p[d]);
        }
    };
    for c in mesh.corners(t) {
        add(c);
    }
    if !map.is_affine() {
        let refs = [[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]];
        for k in 0..3 {
            let (a, e) = (refs[k], refs[(k + 1) % 3]);
            for i in 1..EDGE_SAMPLES {
                let s = i as f64 / EDGE_SAMPLES as f64;
                add(map.position(a[0] + s * (e[0] - a[0]), a[1] + s * (e[1] - a[1])));
            }
        }
        let w = 0.1 * (b[0][1] - b[0][0]).max(b[1][1] - b[1][0]);
        for bd in &mut b {
            bd[0] -= w;
            bd[1] += w;
        }
    }
    b
}

impl HpLocator {
    /// The grid for the elements of `mesh` with `maps`, about one element per bucket.
    pub fn new(mesh: &FeMesh, maps: &[ElementMap]) -> Self {
        let nt = mesh.triangles.len();
        let boxes: Vec<[[f64; 2]; 2]> = (0..nt).map(|t| element_box(mesh, &maps[t], t)).collect();
        let (mut lo, mut hi) = ([f64::INFINITY; 2], [f64::NEG_INFINITY; 2]);
        for b in &boxes {
            for d in 0..2 {
                lo[d] = lo[d].min(b[d][0]);
                hi[d] = hi[d].max(b[d][1]);
            }
        }
        if nt == 0 {
            lo = [0.0; 2];
            hi = [1.0; 2];
        }
        let ext = [(hi[0] - lo[0]).max(1e-300), (hi[1] - lo[1]).max(1e-300)];
        let aspect = ext[0] / ext[1];
        let n = nt.max(1) as f64;
        let nx = ((n * aspect).sqrt().ceil() as usize).clamp(1, 4096);
        let ny = ((n / aspect).sqrt().ceil() as usize).clamp(1, 4096);
        let cell = [ext[0] / nx as f64, ext[1] / ny as f64];
        let dims = [nx, ny];
        let index = |x: f64, d: usize| -> usize {
            (((x - lo[d]) / cell[d]).floor().max(0.0) as usize).min(dims[d] - 1)
        };
        let span = |b: &[[f64; 2]; 2]| {
            [
                [index(b[0][0], 0), index(b[0][1], 0)],
                [index(b[1][0], 1), index(b[1][1], 1)],
            ]
        };
        let mut start = vec![0u32; nx * ny + 1];
        for b in &boxes {
            let s = span(b);
            for iy in s[1][0]..=s[1][1] {
                for ix in s[0][0]..=s[0][1] {
                    start[iy * nx + ix + 1] += 1;
                }
            }
        }
        for i in 1..start.len() {
            start[i] += start[i - 1];
        }
        let mut fill = start.clone();
        let mut items = vec![0u32; start[nx * ny] as usize];
        for (t, b) in boxes.iter().enumerate() {
            let s = span(b);
            for iy in s[1][0]..=s[1][1] {
                for ix in s[0][0]..=s[0][1] {
                    let k = iy * nx + ix;
                    items[fill[k] as usize] = t as u32;
                    fill[k] += 1;
                }
            }
        }
        Self {
            origin: lo,
            cell,
            dims,
            start,
            items,
        }
    }

    /// Elements whose box's bucket holds `p`, in element order (empty outside the grid).
    fn candidates(&self, p: Point) -> &[u32] {
        let mut idx = [0usize; 2];
        for d in 0..2 {
            let f = (p[d] - self.origin[d]) / self.cell[d];
            if !(f >= -1e-9 && f <= self.dims[d] as f64 * (1.0 + 1e-9)) {
                return &[];
            }
            idx[d] = (f.floor().max(0.0) as usize).min(self.dims[d] - 1);
        }
        let k = idx[1] * self.dims[0] + idx[0];
        &self.items[self.start[k] as usize..self.start[k + 1] as usize]
    }

    /// Every element holding `p` (edges and corners included), in element order.
    pub fn containing(&self, mesh: &FeMesh, maps: &[ElementMap], p: Point) -> Vec<Located> {
        self.candidates(p)
            .iter()
            .filter_map(|&t| {
                let t = t as usize;
                let xi = invert(&maps[t], mesh.corners(t), p)?;
                inside(xi).then_some(Located { element: t, xi })
            })
            .collect()
    }

    /// The element that should evaluate the field at `p`: on the axis (r = 0) one with an
    /// edge on the axis, where A vanishes along the edge so that A/r → ∂A/∂r holds (an element
    /// touching the axis at a vertex alone leaves A/r direction-dependent there); elsewhere the
    /// first holding one. None outside the mesh.
    pub fn find(&self, mesh: &FeMesh, maps: &[ElementMap], p: Point) -> Option<Located> {
        let found = self.containing(mesh, maps, p);
        if p[0] == 0.0 {
            let on_axis = |l: &&Located| {
                mesh.triangles[l.element]
                    .iter()
                    .filter(|&&v| mesh.nodes[v as usize][0] == 0.0)
                    .count()
                    == 2
            };
            if let Some(l) = found.iter().find(on_axis) {
                return Some(*l);
            }
        }
        found.into_iter().next()
    }
}

/// Whether reference coordinates lie in the reference triangle (within [`EDGE_TOL`]).
fn inside(xi: [f64; 2]) -> bool {
    xi[0] >= -EDGE_TOL && xi[1] >= -EDGE_TOL && 1.0 - xi[0] - xi[1] >= -EDGE_TOL
}

/// Reference coordinates (ξ, η) of `p` under `map` (the element with straight `corners`):
/// exact for an affine map; for a blended one Newton from the chord triangle's barycentrics.
/// None when Newton does not settle (the point is then far outside the element).
pub fn invert(map: &ElementMap, corners: [Point; 3], p: Point) -> Option<[f64; 2]> {
    let l = crate::locate::barycentric(corners, p);
    let mut xi = [l[1], l[2]];
    if map.is_affine() {
        return Some(xi);
    }
    for _ in 0..NEWTON_STEPS {
        let x = map.position(xi[0], xi[1]);
        let res = [x[0] - p[0], x[1] - p[1]];
        let inv = map.jacobian(xi[0], xi[1]).inverse();
        let d = [
            inv[0][0] * res[0] + inv[0][1] * res[1],
            inv[1][0] * res[0] + inv[1][1] * res[1],
        ];
        if !(d[0].is_finite() && d[1].is_finite()) {
            return None;
        }
        xi = [xi[0] - d[0], xi[1] - d[1]];
        if d[0].abs().max(d[1].abs()) < 1e-15 {
            return Some(xi);
        }
    }
    // Quadratic convergence stalls at rounding: accept the last iterate when it maps within
    // rounding of the point.
    let x = map.position(xi[0], xi[1]);
    let scale = corners
        .iter()
        .map(|c| c[0].abs().max(c[1].abs()))
        .fold(0.0f64, f64::max);
    ((x[0] - p[0]).hypot(x[1] - p[1]) <= 1e-12 * scale).then_some(xi)
}
