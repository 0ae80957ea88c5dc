//! An hp field sampled on a refined sub-mesh of linear triangles, for viewers that draw only
//! straight cells with linear interpolation (the VTK map of [`crate::export::hp_map`]).
//!
//! Every element is cut into k² sub-triangles on the regular lattice ξ = i/k, η = j/k of its
//! reference triangle, whose points are mapped through the element's own (possibly curved)
//! map. One k serves the whole mesh, k = max(p_max, `min_divisions`): with k ≥ p the lattice
//! holds a unisolvent set for polynomials of degree p (the equispaced points of degree p), so
//! the written values of A_φ determine the element's polynomial and nothing of A is lost; a
//! single k keeps neighbouring elements' edge lattices identical, hence the sub-mesh
//! conforming (no hanging points where degrees differ).
//!
//! * A_φ is continuous (the H1 space), so it is point data: lattice points on a shared edge
//!   or vertex are merged into one point, keyed by the global vertex or by (global edge, step
//!   from its lower vertex), and take the value of the lowest-numbered element holding them.
//! * B = curl(A e_φ) is discontinuous across element edges (only its normal part is
//!   continuous, and across a material interface not even that of H). Merged points can hold
//!   only one value, so B and what follows from it (H, |B|, μr) are cell data: one value per
//!   sub-triangle, the element's own B at the sub-triangle's centroid. A centroid lies inside
//!   its element, never on the axis, so B there needs no limit A/r → ∂A/∂r.
//!
//! Linear sub-cells rather than 6-node ones: the map would then interpolate A and the outline
//! quadratically between the same points, but B is per cell either way, and VTK's filters
//! (contours, probes, clips) cut quadratic triangles into linear ones before working on them.

use rayon::prelude::*;

use super::locate::Located;
use super::model::{HpModel, HpSolution};
use crate::error::SolverError;
use crate::mesh::Point;

/// Largest number of divisions per element side (k² sub-triangles per element).
pub const MAX_DIVISIONS: usize = 64;

/// Divisions per side used by default: at least 2, so that at p = 1 a curved edge is still
/// drawn as two chords.
pub const MIN_DIVISIONS: usize = 2;

/// The sampled field: a conforming linear triangle mesh over the hp mesh, A_φ per point, B and
/// H per sub-triangle.
#[derive(Debug, Clone, PartialEq)]
pub struct SampledField {
    /// Divisions per element side (k).
    pub divisions: usize,
    /// Point coordinates (r, z), m.
    pub points: Vec<Point>,
    /// A_φ at each point, background included, Wb/m.
    pub a: Vec<f64>,
    /// Sub-triangles as point ids, counter-clockwise in the reference triangle.
    pub triangles: Vec<[u32; 3]>,
    /// The hp element each sub-triangle belongs to.
    pub element: Vec<u32>,
    /// Region tag of each sub-triangle (its element's).
    pub tag: Vec<u32>,
    /// Polynomial degree of each sub-triangle's element.
    pub degree: Vec<u32>,
    /// Where each sub-triangle's B is evaluated: its reference centroid mapped, (r, z), m.
    pub at: Vec<Point>,
    /// (B_r, B_z) there, background included, T.
    pub b: Vec<[f64; 2]>,
    /// (H_r, H_z) there by the element's region law, A/m.
    pub h: Vec<[f64; 2]>,
    /// Secant relative permeability there.
    pub mu_r: Vec<f64>,
}

/// A sub-triangle: point ids, where B is evaluated, B, H and μr there.
type SubCell = ([u32; 3], Point, [f64; 2], [f64; 2], f64);

/// Where a lattice point of an element goes: a shared mesh vertex, a point on a global edge
/// (step from the edge's lower vertex), or the element's own interior.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Slot {
    Vertex(u32),
    Edge(usize, usize),
    Interior,
}

/// Lattice points (i, j), i + j ≤ k, of the reference triangle in a fixed order.
fn lattice(k: usize) -> Vec<[usize; 2]> {
    (0..=k)
        .flat_map(|j| (0..=k - j).map(move |i| [i, j]))
        .collect()
}

/// Sub-triangles of the lattice as pairs of lattice indices (counter-clockwise).
fn lattice_triangles(k: usize) -> Vec<[[usize; 2]; 3]> {
    let mut out = Vec::with_capacity(k * k);
    for j in 0..k {
        for i in 0..k - j {
            out.push([[i, j], [i + 1, j], [i, j + 1]]);
            if i + j + 2 <= k {
                out.push([[i + 1, j], [i + 1, j + 1], [i, j + 1]]);
            }
        }
    }
    out
}

impl HpModel {
    /// Samples `sol` on k² sub-triangles per element, k = max(p_max, `min_divisions`) (clamped
    /// to 1..=[`MAX_DIVISIONS`]; see the module doc).
    pub fn sample(
        &self,
        sol: &HpSolution,
        min_divisions: usize,
    ) -> Result<SampledField, SolverError> {
        let nt = self.mesh.triangles.len();
        let p_max = (0..nt)
            .map(|t| self.dofs.element(t).degree as usize)
            .max()
            .unwrap_or(1);
        let k = p_max.max(min_divisions).clamp(1, MAX_DIVISIONS);
        let lat = lattice(k);
        let index_of = |[i, j]: [usize; 2]| j * (k + 1) - j * (j.saturating_sub(1)) / 2 + i;
        debug_assert!(lat.iter().enumerate().all(|(n, &ij)| index_of(ij) == n));
        let subs = lattice_triangles(k);

        // Point ids, created in element order so the numbering is deterministic.
        let steps = k.saturating_sub(1);
        let mut vertex_point = vec![u32::MAX; self.mesh.nodes.len()];
        let mut edge_point = vec![u32::MAX; self.dofs.edges().len() * steps];
        let mut owner: Vec<(usize, [usize; 2])> = Vec::new();
        let mut element_points: Vec<Vec<u32>> = Vec::with_capacity(nt);
        for t in 0..nt {
            let ed = self.dofs.element(t);
            let tri = self.mesh.triangles[t];
            let mut ids = Vec::with_capacity(lat.len());
            for &ij in &lat {
                let shared = match slot(k, ij, tri, &ed.edges, &ed.reversed) {
                    Slot::Vertex(v) => Some(&mut vertex_point[v as usize]),
                    Slot::Edge(e, s) => Some(&mut edge_point[e * steps + s - 1]),
                    Slot::Interior => None,
                };
                let id = match shared {
                    Some(id) if *id != u32::MAX => *id,
                    shared => {
                        let id = owner.len() as u32;
                        owner.push((t, ij));
                        if let Some(s) = shared {
                            *s = id;
                        }
                        id
                    }
                };
                ids.push(id);
            }
            element_points.push(ids);
        }

        // Positions and A at the points, each from its owning element.
        let on_axis = |t: usize, ij: [usize; 2]| {
            let [a, b, c] = self.mesh.corners(t);
            let axis = |p: Point| p[0] == 0.0;
            let [i, j] = ij;
            (j == 0 && axis(a) && axis(b))
                || (i + j == k && axis(b) && axis(c))
                || (i == 0 && axis(c) && axis(a))
        };
        let sampled: Vec<(Point, f64)> = owner
            .par_iter()
            .map(|&(t, ij)| {
                let xi = [ij[0] as f64 / k as f64, ij[1] as f64 / k as f64];
                let mut x = self.maps[t].position(xi[0], xi[1]);
                // Barycentric rounding leaves ~1e-17 r on an axis edge: put it on the axis.
                if on_axis(t, ij) {
                    x[0] = 0.0;
                }
                let v = self.value_in(sol, Located { element: t, xi }, x[0])?;
                Ok((x, v.a))
            })
            .collect::<Result<_, SolverError>>()?;
        let (points, a) = sampled.into_iter().unzip();

        // Sub-triangles with B at their centroids, element by element.
        let cells: Vec<Vec<SubCell>> = (0..nt)
            .into_par_iter()
            .map(|t| {
                let props = self.element_props(t);
                subs.iter()
                    .map(|tri| {
                        let ids = tri.map(|ij| element_points[t][index_of(ij)]);
                        let c = [0, 1].map(|d| {
                            tri.iter().map(|ij| ij[d] as f64).sum::<f64>() / (3.0 * k as f64)
                        });
                        let x = self.maps[t].position(c[0], c[1]);
                        let v = self.value_in(sol, Located { element: t, xi: c }, x[0])?;
                        Ok((ids, x, v.b, v.h, props.secant_mu_r(v.b)))
                    })
                    .collect()
            })
            .collect::<Result<_, SolverError>>()?;
        let n = nt * subs.len();
        let mut out = SampledField {
            divisions: k,
            points,
            a,
            triangles: Vec::with_capacity(n),
            element: Vec::with_capacity(n),
            tag: Vec::with_capacity(n),
            degree: Vec::with_capacity(n),
            at: Vec::with_capacity(n),
            b: Vec::with_capacity(n),
            h: Vec::with_capacity(n),
            mu_r: Vec::with_capacity(n),
        };
        for (t, list) in cells.into_iter().enumerate() {
            for (ids, x, b, h, mu) in list {
                out.triangles.push(ids);
                out.element.push(t as u32);
                out.tag.push(self.mesh.tags[t]);
                out.degree.push(self.dofs.element(t).degree);
                out.at.push(x);
                out.b.push(b);
                out.h.push(h);
                out.mu_r.push(mu);
            }
        }
        Ok(out)
    }
}

/// Where lattice point `ij` of an element with corner nodes `tri`, global edges `edges` and
/// orientations `reversed` goes (local edge m joins local vertices m and (m + 1) % 3).
fn slot(
    k: usize,
    [i, j]: [usize; 2],
    tri: [u32; 3],
    edges: &[u32; 3],
    reversed: &[bool; 3],
) -> Slot {
    // (local edge, step from its local start vertex) of a point on an edge.
    let on_edge = match (i, j) {
        (0, 0) => return Slot::Vertex(tri[0]),
        (i, 0) if i == k => return Slot::Vertex(tri[1]),
        (0, j) if j == k => return Slot::Vertex(tri[2]),
        (i, 0) => Some((0, i)),
        (i, j) if i + j == k => Some((1, j)),
        (0, j) => Some((2, k - j)),
        _ => None,
    };
    match on_edge {
        Some((m, s)) => {
            let s = if reversed[m] { k - s } else { s };
            Slot::Edge(edges[m] as usize, s)
        }
        None => Slot::Interior,
    }
}

#[cfg(test)]
#[path = "sample_tests.rs"]
mod tests;
