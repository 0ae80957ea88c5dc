//! A mesh-independent peak flux density in a region.
//!
//! At the sharp end corners of a high-permeability rod |B| is singular (about ρ^(−1/3) at
//! distance ρ from the corner), so the largest element value grows without bound as the mesh is
//! refined. The peak reported here is the largest recovered |B| (patch fit of the nodal
//! potential, see [`crate::recover`]) at the centroids of the region's elements that lie farther
//! than a stated distance from every listed corner. Recovery, not the raw element value, because
//! the raw value carries the basis-switch error of the layer under a magnetic surface.

use crate::locate::Locator;
use crate::mesh::Point;
use crate::solution::Solution;
use crate::solve::Model;

/// Where and how large the peak is.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Peak {
    /// Recovered |B| in T.
    pub b: f64,
    /// Centroid (r, z) of the element, in m.
    pub at: Point,
}

/// Largest recovered |B| at centroids of elements tagged `tag`, excluding discs of radius
/// `exclusion` (m) around `corners`. None if no element qualifies.
pub fn peak_b(
    model: &Model,
    sol: &Solution,
    locator: &Locator,
    tag: u32,
    corners: &[Point],
    exclusion: f64,
) -> Option<Peak> {
    let mesh = model.mesh();
    let mut best: Option<Peak> = None;
    for e in 0..mesh.triangles.len() {
        if mesh.tags[e] != tag {
            continue;
        }
        let c = mesh.corners(e);
        let centroid = [
            (c[0][0] + c[1][0] + c[2][0]) / 3.0,
            (c[0][1] + c[1][1] + c[2][1]) / 3.0,
        ];
        if corners
            .iter()
            .any(|k| (k[0] - centroid[0]).hypot(k[1] - centroid[1]) < exclusion)
        {
            continue;
        }
        let b = locator
            .patches()
            .b_at(model, sol, e, centroid)
            .unwrap_or_else(|| sol.b_mean(model, e));
        let mag = b[0].hypot(b[1]);
        if best.is_none_or(|p| mag > p.b) {
            best = Some(Peak {
                b: mag,
                at: centroid,
            });
        }
    }
    best
}
