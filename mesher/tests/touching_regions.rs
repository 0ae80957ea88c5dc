//! Regions that touch along edges or at corners: shared constraint edges, no hanging vertices.

mod common;

use std::collections::HashMap;

use axicore_mesher::{build_mesh, Mesh, MeshSpec};
use common::*;

/// Tags of the triangles on each side of every edge.
fn edge_tags(mesh: &Mesh) -> HashMap<(u32, u32), Vec<u32>> {
    let mut map: HashMap<(u32, u32), Vec<u32>> = HashMap::new();
    for (tri, &tag) in mesh.triangles.iter().zip(&mesh.tags) {
        for i in 0..3 {
            let (a, b) = (tri[i], tri[(i + 1) % 3]);
            map.entry((a.min(b), a.max(b))).or_default().push(tag);
        }
    }
    map
}

#[test]
fn winding_against_core_shares_edges_along_the_contact() {
    // The winding's inner side (r = 5 mm, |z| ≤ 30 mm) is part of the core's outer side (|z| ≤ 35 mm).
    let spec = torquer_spec();
    let mesh = build_mesh(&spec).unwrap();
    check_invariants(&mesh, &spec);
    let mut contact_length = 0.0;
    for ((a, b), tags) in edge_tags(&mesh) {
        let (pa, pb) = (mesh.nodes[a as usize], mesh.nodes[b as usize]);
        // Points the refinement adds on a segment are interpolated, so they sit on the line only up
        // to rounding (the axis, r = 0, is the exception: there it is exact).
        let on_line = |p: [f64; 2]| (p[0] - 5e-3).abs() <= 1e-15;
        if on_line(pa) && on_line(pb) {
            let mut sorted = tags.clone();
            sorted.sort_unstable();
            let inside = pa[1].abs() <= 30e-3 + 1e-15 && pb[1].abs() <= 30e-3 + 1e-15;
            let expected = if inside {
                vec![CORE, WINDING]
            } else {
                vec![AIR, CORE]
            };
            assert_eq!(sorted, expected, "edge at z {}..{}", pa[1], pb[1]);
            if inside {
                contact_length += (pb[1] - pa[1]).abs();
            }
        }
    }
    assert!((contact_length - 60e-3).abs() < 1e-14, "{contact_length}");
}

#[test]
fn stacked_rectangles_on_the_axis_share_their_common_side() {
    let mut spec = MeshSpec::new(0.5, AIR);
    spec.regions = vec![
        rect(1, [0.0, 0.01], [0.0, 0.01], 1e-3),
        rect(2, [0.0, 0.02], [0.01, 0.015], 2e-3),
        // Touches region 1 at its corner (0.01, 0) only.
        rect(3, [0.01, 0.03], [-0.01, 0.0], 2e-3),
    ];
    let mesh = build_mesh(&spec).unwrap();
    check_invariants(&mesh, &spec);
    assert!(mesh.stats().min_angle_deg >= 25.0);
    for region in &spec.regions {
        let exact = region.shape.exact_area();
        assert!((mesh.region_area(region.tag) - exact).abs() <= 1e-9 * exact);
    }
    // Every edge on z = 0.01 with r < 0.01 lies between tags 1 and 2, and together they span it.
    let mut shared_length = 0.0;
    for ((a, b), tags) in edge_tags(&mesh) {
        let (pa, pb) = (mesh.nodes[a as usize], mesh.nodes[b as usize]);
        let on_line = |p: [f64; 2]| (p[1] - 0.01).abs() <= 1e-15;
        if on_line(pa) && on_line(pb) && pa[0].max(pb[0]) <= 0.01 {
            let mut sorted = tags.clone();
            sorted.sort_unstable();
            assert_eq!(sorted, vec![1, 2]);
            shared_length += (pb[0] - pa[0]).abs();
        }
    }
    assert!((shared_length - 0.01).abs() < 1e-15, "{shared_length}");
}

#[test]
fn axis_edges_join_axis_nodes_only() {
    // Regions touching the axis put their vertices there; all of them keep r == 0 exactly.
    let spec = torquer_spec();
    let mesh = build_mesh(&spec).unwrap();
    let on_axis = mesh.nodes.iter().filter(|p| p[0] == 0.0).count();
    let kinds = mesh
        .node_kinds
        .iter()
        .filter(|k| **k == axicore_mesher::NodeKind::Axis)
        .count();
    assert_eq!(on_axis, kinds);
    // The core's axis corners are mesh nodes.
    for z in [-35e-3, 35e-3, -1.0, 1.0] {
        assert!(
            mesh.nodes.iter().any(|p| p[0] == 0.0 && p[1] == z),
            "no node at (0, {z})"
        );
    }
}
