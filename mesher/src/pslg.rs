//! The planar straight-line graph handed to the triangulator, and the geometry checks that make it safe.
//!
//! spade's `bulk_load_cdt` panics on crossing constraints, so everything that could cross is found here
//! first. Vertices closer than `1e-12 · R` are merged, every segment is split at every vertex lying on
//! it (so collinear touching rectangles share the same constraint edges), and what is left must not
//! cross. Regions must not share area, arcs must not pass from a region's inside to its outside, and
//! no two segments may meet at a cusp (an angle below [`MIN_INPUT_ANGLE_DEG`]), where Delaunay
//! refinement would run away.

use std::collections::{BTreeMap, HashMap};

use crate::error::MeshError;
use crate::shape::{half_ellipse_chain_adaptive, orient, polygon_area, segment_distance, Outline};
use crate::spec::{MeshSpec, Point};
use crate::validate::OUTER_ARC_TOLERANCE;

/// Relative length below which two vertices are the same, and a vertex lies on a segment.
pub(crate) const MERGE_TOLERANCE: f64 = 1e-12;

/// Smallest angle (degrees) allowed between two outline segments meeting at a vertex, as where a
/// rectangle rests on the tip of a half-ellipse or two curves touch tangentially. Measured with spade
/// 2.15 on two segments from one vertex: refinement adds about 150/θ° vertices near such a corner and
/// stops terminating near θ = 0.002°; 0.1° keeps a wide margin and a bounded cost.
pub const MIN_INPUT_ANGLE_DEG: f64 = 0.1;

/// Which input a segment came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
enum Owner {
    Region(usize),
    Arc(usize),
    Outer,
    Axis,
    Band(usize),
}

/// Vertices and constraint edges, ready for the triangulator.
#[derive(Debug, Clone)]
pub(crate) struct Pslg {
    /// Unique vertices (m); axis vertices have r == 0 exactly.
    pub vertices: Vec<Point>,
    /// Unique undirected constraint edges, each split at every vertex on it.
    pub edges: Vec<[usize; 2]>,
    /// Exact polygon of each region, in `MeshSpec::regions` order.
    pub outlines: Vec<Outline>,
    /// Area of the outer half-disc polygon (m²).
    pub domain_area: f64,
}

/// Merges vertices closer than the tolerance, on a hashed grid of cells one tolerance wide.
struct VertexSet {
    tol: f64,
    points: Vec<Point>,
    cells: HashMap<(i64, i64), Vec<usize>>,
}

impl VertexSet {
    fn new(tol: f64) -> Self {
        Self {
            tol,
            points: Vec::new(),
            cells: HashMap::new(),
        }
    }

    fn cell(&self, p: Point) -> (i64, i64) {
        (
            (p[0] / self.tol).floor() as i64,
            (p[1] / self.tol).floor() as i64,
        )
    }

    /// Index of `p`, merged with an earlier vertex within the tolerance (the earlier one is kept).
    fn insert(&mut self, mut p: Point) -> usize {
        if p[0].abs() <= self.tol {
            // Axis vertices must be exactly on r = 0 for the solver's boundary condition.
            p[0] = 0.0;
        }
        let (ci, cj) = self.cell(p);
        for di in -1..=1 {
            for dj in -1..=1 {
                if let Some(list) = self.cells.get(&(ci + di, cj + dj)) {
                    for &k in list {
                        let q = self.points[k];
                        if (p[0] - q[0]).hypot(p[1] - q[1]) <= self.tol {
                            return k;
                        }
                    }
                }
            }
        }
        let k = self.points.len();
        self.points.push(p);
        self.cells.entry((ci, cj)).or_default().push(k);
        k
    }
}

/// Builds and checks the graph: regions inside the domain, no crossings, no overlaps.
pub(crate) fn build(spec: &MeshSpec) -> Result<Pslg, MeshError> {
    let radius = spec.outer_radius;
    let tol = MERGE_TOLERANCE * radius;
    let outlines: Vec<Outline> = spec
        .regions
        .iter()
        .map(|r| Outline::new(&r.shape, spec.arc_tolerance))
        .collect();
    let outer = half_ellipse_chain_adaptive(
        0.0,
        radius,
        radius,
        spec.arc_tolerance.max(OUTER_ARC_TOLERANCE),
    );

    for (i, outline) in outlines.iter().enumerate() {
        if !outline
            .vertices
            .iter()
            .all(|&p| inside_outer(&outer, p, tol))
        {
            return Err(MeshError::OutsideDomain { region: i });
        }
    }

    // Every input as a chain of points; closed chains repeat their first point at the end.
    let arc_chains: Vec<Vec<Point>> = spec
        .interior_arcs
        .iter()
        .map(|&rho| half_ellipse_chain_adaptive(0.0, rho, rho, spec.arc_tolerance))
        .collect();
    let mut chains: Vec<(Owner, Vec<Point>)> = Vec::new();
    for (i, o) in outlines.iter().enumerate() {
        let mut loop_pts = o.vertices.clone();
        loop_pts.push(o.vertices[0]);
        chains.push((Owner::Region(i), loop_pts));
    }
    for (k, chain) in arc_chains.into_iter().enumerate() {
        chains.push((Owner::Arc(k), chain));
    }
    for (k, band) in spec.bands.iter().enumerate() {
        chains.push((Owner::Band(k), band.outline(&band.rows())));
    }
    chains.push((Owner::Outer, outer.clone()));
    chains.push((Owner::Axis, vec![[0.0, -radius], [0.0, radius]]));

    let mut set = VertexSet::new(tol);
    let indexed: Vec<(Owner, Vec<usize>)> = chains
        .iter()
        .map(|(owner, pts)| (*owner, pts.iter().map(|&p| set.insert(p)).collect()))
        .collect();
    let vertices = set.points;
    if vertices.len() > spec.max_nodes {
        return Err(MeshError::TooManyNodes {
            limit: spec.max_nodes,
            reached: vertices.len(),
        });
    }

    // Split every segment at the vertices lying on it; keep each owner's directed pieces.
    let by_r = sorted_by_r(&vertices);
    let mut pieces: Vec<(Owner, Vec<[usize; 2]>)> = Vec::with_capacity(indexed.len());
    let mut edge_owners: BTreeMap<[usize; 2], Vec<Owner>> = BTreeMap::new();
    for (owner, idx) in &indexed {
        let mut directed = Vec::new();
        for w in idx.windows(2) {
            if w[0] == w[1] {
                continue;
            }
            split_segment(&vertices, &by_r, w[0], w[1], tol, &mut directed);
        }
        for &[a, b] in &directed {
            let list = edge_owners.entry([a.min(b), a.max(b)]).or_default();
            if !list.contains(owner) {
                list.push(*owner);
            }
        }
        pieces.push((*owner, directed));
    }
    let edges: Vec<[usize; 2]> = edge_owners.keys().copied().collect();

    if let Some((e, f)) = first_crossing(&vertices, &edges) {
        // Name the most specific pair of inputs (regions sort first) behind the two edges.
        let (a, b) = edge_owners[&edges[e]]
            .iter()
            .flat_map(|&x| {
                edge_owners[&edges[f]]
                    .iter()
                    .map(move |&y| (x.min(y), x.max(y)))
            })
            .min()
            .unwrap_or((Owner::Outer, Owner::Axis));
        return Err(conflict(a, b));
    }
    check_region_overlaps(&vertices, &pieces, &outlines)?;
    check_arcs(&vertices, &pieces, &outlines)?;
    check_input_angles(&vertices, &edges)?;
    let (vertices, edges) = hollow_bands(spec, vertices, edges, &edge_owners)?;

    Ok(Pslg {
        vertices,
        edges,
        outlines,
        // The chain closes along the axis from its top end back to its bottom end.
        domain_area: polygon_area(&outer),
    })
}

/// Takes out what lies inside the graded bands (their grid replaces it after triangulation): edges
/// through a band's inside (region sides along its columns) and vertices strictly inside. Any
/// other input reaching inside a band is an error.
fn hollow_bands(
    spec: &MeshSpec,
    vertices: Vec<Point>,
    edges: Vec<[usize; 2]>,
    owners: &BTreeMap<[usize; 2], Vec<Owner>>,
) -> Result<(Vec<Point>, Vec<[usize; 2]>), MeshError> {
    if spec.bands.is_empty() {
        return Ok((vertices, edges));
    }
    let held = |p: Point| spec.bands.iter().position(|b| b.holds(p));
    let mut kept = Vec::with_capacity(edges.len());
    for e in edges {
        let mid = midpoint(&vertices, e);
        if let Some(band) = held(mid) {
            // A region side may run through along a column, and the outline the band follows
            // may lie inside it; nothing else may.
            let surface = spec.bands[band].surface;
            let inside_ok = owners[&e].iter().all(|o| match *o {
                Owner::Region(i) => Some(spec.regions[i].shape) == surface,
                _ => false,
            });
            let ends_inside = held(vertices[e[0]]).is_some() || held(vertices[e[1]]).is_some();
            let only_regions = owners[&e].iter().all(|o| matches!(o, Owner::Region(_)));
            if !only_regions || (ends_inside && !inside_ok) {
                return Err(band_conflict(band, &owners[&e]));
            }
            continue;
        }
        kept.push(e);
    }
    let mut index = vec![usize::MAX; vertices.len()];
    let mut out = Vec::with_capacity(vertices.len());
    for (k, &p) in vertices.iter().enumerate() {
        if held(p).is_none() {
            index[k] = out.len();
            out.push(p);
        }
    }
    let mut edges = Vec::with_capacity(kept.len());
    for e in kept {
        let (a, b) = (index[e[0]], index[e[1]]);
        if a == usize::MAX || b == usize::MAX {
            let band = held(vertices[e[0]]).or(held(vertices[e[1]])).unwrap_or(0);
            return Err(band_conflict(band, &owners[&e]));
        }
        edges.push([a, b]);
    }
    Ok((out, edges))
}

fn band_conflict(band: usize, owners: &[Owner]) -> MeshError {
    MeshError::Triangulation {
        reason: format!("graded band {band} is entered by {owners:?} off its columns"),
    }
}

/// Strictly inside the convex outer polygon (the chain runs counter-clockwise, closed by the axis).
fn inside_outer(outer: &[Point], p: Point, tol: f64) -> bool {
    p[0] >= 0.0
        && outer.windows(2).all(|w| {
            let len = (w[1][0] - w[0][0]).hypot(w[1][1] - w[0][1]);
            orient(w[0], w[1], p) > tol * len
        })
}

fn sorted_by_r(vertices: &[Point]) -> Vec<usize> {
    let mut order: Vec<usize> = (0..vertices.len()).collect();
    order.sort_by(|&i, &j| vertices[i][0].total_cmp(&vertices[j][0]).then(i.cmp(&j)));
    order
}

/// Pushes the pieces of segment a→b, cut at every other vertex within `tol` of its interior.
fn split_segment(
    vertices: &[Point],
    by_r: &[usize],
    a: usize,
    b: usize,
    tol: f64,
    out: &mut Vec<[usize; 2]>,
) {
    let (pa, pb) = (vertices[a], vertices[b]);
    let (r_lo, r_hi) = (pa[0].min(pb[0]) - tol, pa[0].max(pb[0]) + tol);
    let (z_lo, z_hi) = (pa[1].min(pb[1]) - tol, pa[1].max(pb[1]) + tol);
    let start = by_r.partition_point(|&k| vertices[k][0] < r_lo);
    let mut cuts: Vec<(f64, usize)> = Vec::new();
    for &k in &by_r[start..] {
        let p = vertices[k];
        if p[0] > r_hi {
            break;
        }
        if k == a || k == b || p[1] < z_lo || p[1] > z_hi {
            continue;
        }
        let (dist, t) = segment_distance(p, pa, pb);
        if dist <= tol && t > 0.0 && t < 1.0 {
            cuts.push((t, k));
        }
    }
    cuts.sort_by(|x, y| x.0.total_cmp(&y.0).then(x.1.cmp(&y.1)));
    let mut prev = a;
    for (_, k) in cuts {
        out.push([prev, k]);
        prev = k;
    }
    out.push([prev, b]);
}

/// A pair of edges that intersect without sharing an endpoint, found by a sweep along r.
fn first_crossing(vertices: &[Point], edges: &[[usize; 2]]) -> Option<(usize, usize)> {
    let lo = |e: &[usize; 2]| vertices[e[0]][0].min(vertices[e[1]][0]);
    let hi = |e: &[usize; 2]| vertices[e[0]][0].max(vertices[e[1]][0]);
    let mut order: Vec<usize> = (0..edges.len()).collect();
    order.sort_by(|&i, &j| lo(&edges[i]).total_cmp(&lo(&edges[j])).then(i.cmp(&j)));
    for (pos, &i) in order.iter().enumerate() {
        let ei = edges[i];
        let r_hi = hi(&ei);
        for &j in &order[pos + 1..] {
            let ej = edges[j];
            if lo(&ej) > r_hi {
                break;
            }
            if ei[0] == ej[0] || ei[0] == ej[1] || ei[1] == ej[0] || ei[1] == ej[1] {
                continue;
            }
            if segments_intersect(
                vertices[ei[0]],
                vertices[ei[1]],
                vertices[ej[0]],
                vertices[ej[1]],
            ) {
                return Some((i, j));
            }
        }
    }
    None
}

/// Closed-segment intersection; touching counts, since touching vertices were merged or split before.
fn segments_intersect(p1: Point, p2: Point, q1: Point, q2: Point) -> bool {
    let (d1, d2) = (orient(q1, q2, p1), orient(q1, q2, p2));
    let (d3, d4) = (orient(p1, p2, q1), orient(p1, p2, q2));
    if d1 * d2 > 0.0 || d3 * d4 > 0.0 {
        return false;
    }
    if d1 != 0.0 || d2 != 0.0 || d3 != 0.0 || d4 != 0.0 {
        return true;
    }
    // Exactly collinear: intersect when the projections overlap.
    let axis = if (p2[0] - p1[0]).abs() >= (p2[1] - p1[1]).abs() {
        0
    } else {
        1
    };
    let (a0, a1) = (p1[axis].min(p2[axis]), p1[axis].max(p2[axis]));
    let (b0, b1) = (q1[axis].min(q2[axis]), q1[axis].max(q2[axis]));
    a0 <= b1 && b0 <= a1
}

/// The error for crossing inputs `a` <= `b`.
fn conflict(a: Owner, b: Owner) -> MeshError {
    match (a, b) {
        (Owner::Region(i), Owner::Region(j)) => MeshError::Overlap { a: i, b: j },
        (Owner::Region(region), Owner::Arc(arc)) => MeshError::ArcCrossesRegion { arc, region },
        (Owner::Region(_), Owner::Band(band)) => band_conflict(band, &[a]),
        (Owner::Region(region), _) => MeshError::OutsideDomain { region },
        (x, y) => MeshError::Triangulation {
            reason: format!("constraints of {x:?} and {y:?} cross"),
        },
    }
}

fn midpoint(vertices: &[Point], e: [usize; 2]) -> Point {
    let (a, b) = (vertices[e[0]], vertices[e[1]]);
    [0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1])]
}

fn boxes_touch(a: &[f64; 4], b: &[f64; 4]) -> bool {
    a[0] <= b[1] && b[0] <= a[1] && a[2] <= b[3] && b[2] <= a[3]
}

/// With no crossings left, two regions share area exactly when an edge of one runs through the other's
/// interior, or both lie on the same side of a shared edge (same direction in both counter-clockwise
/// loops).
fn check_region_overlaps(
    vertices: &[Point],
    pieces: &[(Owner, Vec<[usize; 2]>)],
    outlines: &[Outline],
) -> Result<(), MeshError> {
    let n = outlines.len();
    for a in 0..n {
        for b in a + 1..n {
            if !boxes_touch(&outlines[a].bbox, &outlines[b].bbox) {
                continue;
            }
            for (x, y) in [(a, b), (b, a)] {
                let y_edges = &pieces[y].1;
                for &e in &pieces[x].1 {
                    let same_side = y_edges.contains(&e);
                    let shared = same_side || y_edges.contains(&[e[1], e[0]]);
                    if same_side || (!shared && outlines[y].contains(midpoint(vertices, e))) {
                        return Err(MeshError::Overlap { a, b });
                    }
                }
            }
        }
    }
    Ok(())
}

/// An arc may run inside a region or outside it, but not pass from one to the other.
fn check_arcs(
    vertices: &[Point],
    pieces: &[(Owner, Vec<[usize; 2]>)],
    outlines: &[Outline],
) -> Result<(), MeshError> {
    for (owner, arc_edges) in pieces {
        let Owner::Arc(arc) = *owner else { continue };
        for (region, outline) in outlines.iter().enumerate() {
            let loop_edges = &pieces[region].1;
            let (mut inside, mut outside) = (false, false);
            for &e in arc_edges {
                if loop_edges.contains(&e) || loop_edges.contains(&[e[1], e[0]]) {
                    continue;
                }
                if outline.contains(midpoint(vertices, e)) {
                    inside = true;
                } else {
                    outside = true;
                }
            }
            if inside && outside {
                return Err(MeshError::ArcCrossesRegion { arc, region });
            }
        }
    }
    Ok(())
}

/// Rejects vertices where two constraint edges meet at less than [`MIN_INPUT_ANGLE_DEG`].
fn check_input_angles(vertices: &[Point], edges: &[[usize; 2]]) -> Result<(), MeshError> {
    let mut directions: Vec<Vec<f64>> = vec![Vec::new(); vertices.len()];
    for &[a, b] in edges {
        let (pa, pb) = (vertices[a], vertices[b]);
        directions[a].push((pb[1] - pa[1]).atan2(pb[0] - pa[0]));
        directions[b].push((pa[1] - pb[1]).atan2(pa[0] - pb[0]));
    }
    let limit = MIN_INPUT_ANGLE_DEG.to_radians();
    for (v, dirs) in directions.iter_mut().enumerate() {
        if dirs.len() < 2 {
            continue;
        }
        dirs.sort_by(f64::total_cmp);
        let wrap = dirs[0] + 2.0 * std::f64::consts::PI - dirs[dirs.len() - 1];
        let smallest = dirs.windows(2).map(|w| w[1] - w[0]).fold(wrap, f64::min);
        if smallest < limit {
            return Err(MeshError::SmallInputAngle {
                at: vertices[v],
                angle_deg: smallest.to_degrees(),
            });
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn close_vertices_merge_and_axis_vertices_snap_to_r_zero() {
        let mut set = VertexSet::new(1e-12);
        let a = set.insert([1.0, 2.0]);
        let b = set.insert([1.0 + 5e-13, 2.0 - 5e-13]);
        let c = set.insert([1.0 + 3e-12, 2.0]);
        assert_eq!(a, b);
        assert_ne!(a, c);
        let d = set.insert([4e-13, 0.5]);
        assert_eq!(set.points[d], [0.0, 0.5]);
    }

    #[test]
    fn segment_is_split_at_vertices_on_it_in_order() {
        let vertices = vec![[0.0, 0.0], [0.0, 1.0], [0.0, 0.7], [0.0, 0.2], [0.1, 0.5]];
        let by_r = sorted_by_r(&vertices);
        let mut out = Vec::new();
        split_segment(&vertices, &by_r, 0, 1, 1e-12, &mut out);
        assert_eq!(out, vec![[0, 3], [3, 2], [2, 1]]);
    }

    #[test]
    fn crossing_and_touching_segments_are_found() {
        let v = vec![
            [0.0, 0.0],
            [1.0, 1.0],
            [0.0, 1.0],
            [1.0, 0.0],
            [2.0, 2.0],
            [3.0, 3.0],
        ];
        assert_eq!(first_crossing(&v, &[[0, 1], [2, 3]]), Some((0, 1)));
        // Shared endpoint is not a crossing; disjoint collinear segments are not either.
        assert_eq!(first_crossing(&v, &[[0, 1], [1, 3], [4, 5]]), None);
        assert!(
            segments_intersect(v[0], v[4], v[1], v[5]),
            "collinear overlap"
        );
    }
}
