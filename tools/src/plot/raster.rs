//! |B| sampled at every pixel centre of the plotting area: the smooth colour map.
//!
//! Plotters fills triangles with one flat colour; evaluating the field at each pixel instead
//! shows the element's own variation (linear B in a second-order element) without facets.
//! Two passes: a sequential scan over elements finds the element of each pixel (the first in
//! element order that contains its centre, so the answer does not depend on threads), then the
//! pixels are evaluated in parallel rows.

use rayon::prelude::*;

use super::field_source::FieldSource;
use super::view::View;

/// Barycentric tolerance for a pixel centre on an element edge.
const EDGE: f64 = 1e-12;
/// Marks a pixel outside the mesh.
const NONE: u32 = u32::MAX;

/// Field values at pixel centres, row by row from the top; NaN outside the mesh.
#[derive(Debug, Clone, PartialEq)]
pub struct Raster {
    /// Width in pixels.
    pub width: u32,
    /// Height in pixels.
    pub height: u32,
    /// |B| in T per pixel, row-major from the top left.
    pub values: Vec<f64>,
}

impl Raster {
    /// Values inside the mesh.
    pub fn inside(&self) -> impl Iterator<Item = f64> + '_ {
        self.values.iter().copied().filter(|v| v.is_finite())
    }
}

/// Barycentric coordinates of `p` in the straight triangle `c`.
fn barycentric(c: [[f64; 2]; 3], p: [f64; 2]) -> [f64; 3] {
    let det = (c[1][0] - c[0][0]) * (c[2][1] - c[0][1]) - (c[2][0] - c[0][0]) * (c[1][1] - c[0][1]);
    let l1 =
        ((p[0] - c[0][0]) * (c[2][1] - c[0][1]) - (c[2][0] - c[0][0]) * (p[1] - c[0][1])) / det;
    let l2 =
        ((c[1][0] - c[0][0]) * (p[1] - c[0][1]) - (p[0] - c[0][0]) * (c[1][1] - c[0][1])) / det;
    [1.0 - l1 - l2, l1, l2]
}

/// The element holding each pixel centre (NONE outside the mesh).
fn owners(src: &dyn FieldSource, view: &View) -> Vec<u32> {
    let (w, h) = view.pixels;
    let mut owner = vec![NONE; w as usize * h as usize];
    let mesh = src.mesh();
    let half = view.half_plane();
    for e in 0..mesh.triangles.len() {
        let c = mesh.corners(e);
        let (lo_r, hi_r) = (
            c.iter().map(|p| p[0]).fold(f64::INFINITY, f64::min),
            c.iter().map(|p| p[0]).fold(0.0, f64::max),
        );
        let (lo_z, hi_z) = (
            c.iter().map(|p| p[1]).fold(f64::INFINITY, f64::min),
            c.iter().map(|p| p[1]).fold(f64::NEG_INFINITY, f64::max),
        );
        if hi_r < half.r0 || lo_r > half.r1 || hi_z < half.z0 || lo_z > half.z1 {
            continue;
        }
        let sides: &[f64] = if view.mirror { &[1.0, -1.0] } else { &[1.0] };
        for &s in sides {
            let px: Vec<(f64, f64)> = c.iter().map(|p| view.pixel([s * p[0], p[1]])).collect();
            let x0 = px.iter().map(|q| q.0).fold(f64::INFINITY, f64::min);
            let x1 = px.iter().map(|q| q.0).fold(f64::NEG_INFINITY, f64::max);
            let y0 = px.iter().map(|q| q.1).fold(f64::INFINITY, f64::min);
            let y1 = px.iter().map(|q| q.1).fold(f64::NEG_INFINITY, f64::max);
            // Pixel centres at i + 0.5 within [x0, x1].
            let i0 = (x0 - 0.5).ceil().max(0.0) as i64;
            let i1 = ((x1 - 0.5).floor() as i64).min(w as i64 - 1);
            let j0 = (y0 - 0.5).ceil().max(0.0) as i64;
            let j1 = ((y1 - 0.5).floor() as i64).min(h as i64 - 1);
            for j in j0..=j1 {
                for i in i0..=i1 {
                    let k = j as usize * w as usize + i as usize;
                    if owner[k] != NONE {
                        continue;
                    }
                    let p = view.world(i as f64 + 0.5, j as f64 + 0.5);
                    let l = barycentric(c, [p[0].abs(), p[1]]);
                    if l.iter().all(|&x| x >= -EDGE) {
                        owner[k] = e as u32;
                    }
                }
            }
        }
    }
    owner
}

/// |B| at every pixel centre of `view`.
pub fn sample_b(src: &dyn FieldSource, view: &View) -> Raster {
    let (w, h) = view.pixels;
    let owner = owners(src, view);
    let mesh = src.mesh();
    let values = owner
        .par_chunks(w as usize)
        .enumerate()
        .flat_map_iter(|(j, row)| {
            row.iter().enumerate().map(move |(i, &e)| {
                if e == NONE {
                    return f64::NAN;
                }
                let e = e as usize;
                let q = view.world(i as f64 + 0.5, j as f64 + 0.5);
                let p = [q[0].abs(), q[1]];
                let l0 = barycentric(mesh.corners(e), p);
                let l = src.locate(e, p, l0);
                src.b_abs(e, l, p)
            })
        })
        .collect();
    Raster {
        width: w,
        height: h,
        values,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plot::view::Window;
    use axicore_solver::FeMesh;

    /// |B| = r + 10 z on one square of two triangles.
    struct Plane(FeMesh);
    impl FieldSource for Plane {
        fn mesh(&self) -> &FeMesh {
            &self.0
        }
        fn b_abs(&self, _e: usize, _l: [f64; 3], p: [f64; 2]) -> f64 {
            p[0] + 10.0 * p[1]
        }
        fn flux(&self, _e: usize, _l: [f64; 3], _p: [f64; 2]) -> f64 {
            0.0
        }
    }

    fn square() -> Plane {
        Plane(FeMesh {
            nodes: vec![[0.0, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, 1.0]],
            triangles: vec![[0, 1, 2], [0, 2, 3]],
            tags: vec![0, 1],
            mid: vec![],
        })
    }

    #[test]
    fn every_pixel_inside_the_mesh_gets_the_value_at_its_centre() {
        let view = View {
            window: Window {
                r0: 0.0,
                r1: 2.0,
                z0: 0.0,
                z1: 1.0,
            },
            z_horizontal: false,
            mirror: false,
            pixels: (20, 10),
        };
        let r = sample_b(&square(), &view);
        for j in 0..10 {
            for i in 0..20 {
                let v = r.values[j * 20 + i];
                let p = view.world(i as f64 + 0.5, j as f64 + 0.5);
                if i < 10 {
                    assert!(
                        (v - (p[0] + 10.0 * p[1])).abs() < 1e-12,
                        "pixel {i},{j}: {v}"
                    );
                } else {
                    assert!(v.is_nan(), "pixel {i},{j} lies outside the mesh");
                }
            }
        }
    }

    #[test]
    fn a_mirrored_view_shows_the_field_at_minus_r_as_at_r() {
        let view = View {
            window: Window {
                r0: 0.0,
                r1: 1.0,
                z0: 0.0,
                z1: 1.0,
            },
            z_horizontal: false,
            mirror: true,
            pixels: (20, 10),
        };
        let r = sample_b(&square(), &view);
        for j in 0..10 {
            for i in 0..10 {
                let (a, b) = (r.values[j * 20 + i], r.values[j * 20 + 19 - i]);
                assert!((a - b).abs() < 1e-12, "pixel {i},{j}: {a} against {b}");
            }
        }
        assert!(r.inside().count() == 200);
    }
}
