//! The demo torquer-rod spec (invented scenario, see `common`): mesh invariants, quality, exact areas,
//! grading, determinism and a speed print-out.

mod common;

use std::f64::consts::PI;

use axicore_mesher::{build_mesh, polygon_areas, Mesh, MeshSpec, Refinement, Shape};
use common::*;

/// Distance from `p` to segment [a, b].
fn segment_distance(p: [f64; 2], a: [f64; 2], b: [f64; 2]) -> f64 {
    let d = [b[0] - a[0], b[1] - a[1]];
    let t = (((p[0] - a[0]) * d[0] + (p[1] - a[1]) * d[1]) / (d[0] * d[0] + d[1] * d[1]))
        .clamp(0.0, 1.0);
    (p[0] - a[0] - t * d[0]).hypot(p[1] - a[1] - t * d[1])
}

/// The documented target size h(x), written out again independently of the crate, for rectangles only.
fn target_size(spec: &MeshSpec, p: [f64; 2]) -> f64 {
    let corners = |s: &Shape| match *s {
        Shape::Rect {
            r_min,
            r_max,
            z_min,
            z_max,
        } => [
            [r_min, z_min],
            [r_max, z_min],
            [r_max, z_max],
            [r_min, z_max],
        ],
        Shape::HalfEllipse { .. } => unreachable!("rectangles only"),
    };
    let mut h = spec.far_size;
    for region in &spec.regions {
        let c = corners(&region.shape);
        if p[0] > c[0][0] && p[0] < c[2][0] && p[1] > c[0][1] && p[1] < c[2][1] {
            h = h.min(region.size);
        }
    }
    for refinement in &spec.refinements {
        match *refinement {
            Refinement::Point { at, size } => {
                h = h.min(size + spec.grading * (p[0] - at[0]).hypot(p[1] - at[1]));
            }
            Refinement::Graded {
                at,
                size,
                factor,
                layers,
            } => {
                let d = (p[0] - at[0]).hypot(p[1] - at[1]);
                let inner = size * factor.powi(layers as i32);
                h = h.min(inner.max(d.min(size + spec.grading * d)));
            }
            Refinement::Cloud { ref points } => {
                for &(at, size) in points {
                    h = h.min(size + spec.grading * (p[0] - at[0]).hypot(p[1] - at[1]));
                }
            }
            Refinement::Boundary { region, size } => {
                let c = corners(&spec.regions[region].shape);
                for i in 0..4 {
                    let (a, b) = (c[i], c[(i + 1) % 4]);
                    if a[0] == 0.0 && b[0] == 0.0 {
                        continue; // the axis is not a surface
                    }
                    h = h.min(size + spec.grading * segment_distance(p, a, b));
                }
            }
        }
    }
    h
}

fn torquer_mesh() -> (MeshSpec, Mesh) {
    let spec = torquer_spec();
    let mesh = build_mesh(&spec).expect("the demo spec meshes");
    (spec, mesh)
}

#[test]
fn torquer_rod_mesh_holds_invariants() {
    // Orientation, one or two triangles per edge, axis edges between Axis nodes, Euler's V − E + F = 1.
    let (spec, mesh) = torquer_mesh();
    check_invariants(&mesh, &spec);
}

#[test]
fn angle_floor_of_25_degrees_is_reached() {
    let (_, mesh) = torquer_mesh();
    let stats = mesh.stats();
    assert!(stats.min_angle_deg >= 25.0, "{stats:?}");
    // An angle of at least 25° bounds the aspect ratio; the mesh is far from that bound.
    assert!(stats.max_aspect_ratio < 4.0, "{stats:?}");
}

#[test]
fn angle_floor_of_30_degrees_is_reached() {
    let mut spec = torquer_spec();
    spec.angle_floor_deg = 30.0;
    let mesh = build_mesh(&spec).expect("30° is the documented upper limit and must finish");
    let stats = mesh.stats();
    assert!(stats.min_angle_deg >= 30.0 - 1e-9, "{stats:?}");
    check_invariants(&mesh, &spec);
}

#[test]
fn rectangle_region_areas_are_exact() {
    // Rectangle area (r_max − r_min)(z_max − z_min): the meshed polygon is the rectangle itself.
    let (spec, mesh) = torquer_mesh();
    for region in &spec.regions {
        let exact = region.shape.exact_area();
        let meshed = mesh.region_area(region.tag);
        assert!(
            (meshed - exact).abs() <= 1e-9 * exact,
            "tag {}: {meshed} vs {exact}",
            region.tag
        );
    }
}

#[test]
fn total_area_equals_outer_half_disc_polygon_area() {
    // N equal chords over a half circle of radius R enclose (N/2) R² sin(π/N) with the axis
    // (N isosceles triangles of apex angle π/N; elementary geometry, from memory).
    // Bisection from 8 equal arcs: N = 8·2^k, the first whose sagitta R(1 − cos(π/2N)) is within
    // the documented outer tolerance 1e-3·R.
    let (spec, mesh) = torquer_mesh();
    let mut n = 8.0f64;
    while 1.0 - (PI / (2.0 * n)).cos() > 1e-3 {
        n *= 2.0;
    }
    let r = spec.outer_radius;
    let polygon = 0.5 * n * r * r * (PI / n).sin();
    let total: f64 = (0..mesh.triangles.len())
        .map(|t| mesh.triangle_area(t))
        .sum();
    assert!(
        (total - polygon).abs() <= 1e-12 * polygon,
        "{total} vs {polygon}"
    );
    let (domain, _) = polygon_areas(&spec).unwrap();
    assert!((domain - polygon).abs() <= 1e-12 * polygon);
    // And the polygon is within the sagitta bound of the half disc: deficit ≤ tol · R · πR.
    assert!(PI * r * r / 2.0 - polygon <= 1e-3 * PI * r * r);
}

#[test]
fn same_spec_gives_bitwise_same_mesh() {
    let (_, first) = torquer_mesh();
    let (_, second) = torquer_mesh();
    assert_eq!(first.triangles, second.triangles);
    assert_eq!(first.tags, second.tags);
    assert_eq!(first.node_kinds, second.node_kinds);
    let bits = |m: &Mesh| {
        m.nodes
            .iter()
            .flat_map(|p| p.map(f64::to_bits))
            .collect::<Vec<u64>>()
    };
    assert_eq!(bits(&first), bits(&second));
}

#[test]
fn every_edge_is_within_the_graded_target_size() {
    // The documented guarantee: longest edge ≤ h(centroid), h rewritten independently above.
    let (spec, mesh) = torquer_mesh();
    for t in 0..mesh.triangles.len() {
        let h = target_size(&spec, centroid(&mesh, t));
        let l = longest_edge(&mesh, t);
        assert!(
            l <= h * (1.0 + 1e-12),
            "triangle {t}: edge {l} > target {h}"
        );
    }
}

#[test]
fn triangles_near_refinement_point_are_smaller_than_far_away() {
    let (_, mesh) = torquer_mesh();
    let corner = [5e-3, 35e-3];
    let (mut near, mut far) = (Vec::new(), Vec::new());
    for t in 0..mesh.triangles.len() {
        let c = centroid(&mesh, t);
        let d = (c[0] - corner[0]).hypot(c[1] - corner[1]);
        if d < 0.5e-3 {
            near.push(longest_edge(&mesh, t));
        } else if d > 0.3 {
            far.push(longest_edge(&mesh, t));
        }
    }
    let near_max = near.iter().copied().fold(0.0, f64::max);
    let far_min = far.iter().copied().fold(f64::INFINITY, f64::min);
    assert!(!near.is_empty() && !far.is_empty());
    // 0.2 mm asked at the corner and 0.25 growth: nothing near it exceeds 0.2 + 0.25 · 0.5 mm (+ half an edge).
    assert!(near_max <= 0.4e-3, "near {near_max}");
    assert!(
        far_min > 10.0 * near_max,
        "far {far_min} vs near {near_max}"
    );
}

#[test]
fn torquer_rod_size_and_speed_report() {
    // Speed sanity only, no wall-clock assertion: run with --release --nocapture to read the figures.
    let spec = torquer_spec();
    let start = std::time::Instant::now();
    let mesh = build_mesh(&spec).unwrap();
    let elapsed = start.elapsed();
    let stats = mesh.stats();
    println!(
        "torquer rod: {} nodes, {} triangles in {elapsed:?}; {stats:?}",
        stats.nodes, stats.triangles
    );
    assert!(
        stats.triangles > 5_000 && stats.triangles < 60_000,
        "{stats:?}"
    );
}

#[test]
fn cloud_refinement_points_are_honoured_like_single_points() {
    // Adaptive refinement adds clouds of points; the same longest-edge guarantee must hold
    // with them (reference size function above, written independently of the bucket grid).
    let mut spec = torquer_spec();
    let points: Vec<([f64; 2], f64)> = (0..40)
        .map(|k| {
            let t = k as f64 / 40.0;
            ([0.004 + 0.01 * t, -0.03 + 0.06 * t], 2e-4 + 1e-4 * t)
        })
        .collect();
    spec.refinements.push(Refinement::Cloud { points });
    let mesh = build_mesh(&spec).expect("the refined spec meshes");
    check_invariants(&mesh, &spec);
    for t in 0..mesh.triangles.len() {
        let p = mesh.triangles[t].map(|v| mesh.nodes[v as usize]);
        let c = [
            (p[0][0] + p[1][0] + p[2][0]) / 3.0,
            (p[0][1] + p[1][1] + p[2][1]) / 3.0,
        ];
        let longest = (0..3)
            .map(|k| (p[k][0] - p[(k + 1) % 3][0]).hypot(p[k][1] - p[(k + 1) % 3][1]))
            .fold(0.0, f64::max);
        assert!(
            longest <= target_size(&spec, c) * (1.0 + 1e-9),
            "triangle {t}"
        );
    }
}
