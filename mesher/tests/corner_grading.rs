//! Geometric grading toward singular points (`Refinement::Graded`): the layers' sizes follow
//! the geometric sequence, their cost grows linearly in the number of layers, the angle floor
//! holds, and bad inputs are refused. Geometry: the demo torquer rod of `common` (an invented
//! scenario); the bands below were measured on it and are stated beside each check.

mod common;

use axicore_mesher::{
    build_mesh, triangle_angles, Mesh, MeshError, MeshSpec, Point, Refinement, MAX_GRADED_LAYERS,
};
use common::*;

/// The core's upper outer corner (air on three quarters around it) and the corner where the
/// winding's inner side ends on the core's surface (three regions meet there).
const CORNER_CORE: Point = [5e-3, 35e-3];
const CORNER_WINDING: Point = [5e-3, 30e-3];
/// Size at the outer edge of the graded zones (m).
const SIZE: f64 = 1e-3;

/// Core and winding of the demo rod with graded points at both corners and nothing else refined.
fn graded_spec(factor: f64, layers: u32) -> MeshSpec {
    let mut spec = MeshSpec::new(1.0, AIR);
    spec.far_size = 0.1;
    spec.regions = vec![
        rect(CORE, [0.0, 5e-3], [-35e-3, 35e-3], 1e-3),
        rect(WINDING, [5e-3, 8e-3], [-30e-3, 30e-3], 1e-3),
    ];
    spec.interior_arcs = vec![0.2];
    for at in [CORNER_CORE, CORNER_WINDING] {
        spec.refinements.push(Refinement::Graded {
            at,
            size: SIZE,
            factor,
            layers,
        });
    }
    spec
}

fn distance(a: Point, b: Point) -> f64 {
    (a[0] - b[0]).hypot(a[1] - b[1])
}

/// Per layer k = 0 … layers − 1 (triangles whose centroid lies SIZE·σ^(k+1) … SIZE·σ^k from
/// `at`): (count, smallest and largest longest-edge / centroid distance, median longest edge /
/// (SIZE·σ^k)).
fn layer_stats(mesh: &Mesh, at: Point, factor: f64, layers: u32) -> Vec<(usize, f64, f64, f64)> {
    (0..layers as i32)
        .map(|k| {
            let (lo, hi) = (SIZE * factor.powi(k + 1), SIZE * factor.powi(k));
            let mut over_d = Vec::new();
            let mut over_layer = Vec::new();
            for t in 0..mesh.triangles.len() {
                let d = distance(centroid(mesh, t), at);
                if d >= lo && d < hi {
                    over_d.push(longest_edge(mesh, t) / d);
                    over_layer.push(longest_edge(mesh, t) / hi);
                }
            }
            over_layer.sort_by(f64::total_cmp);
            let min = over_d.iter().copied().fold(f64::INFINITY, f64::min);
            let max = over_d.iter().copied().fold(0.0, f64::max);
            (over_d.len(), min, max, over_layer[over_layer.len() / 2])
        })
        .collect()
}

/// Longest edges of the triangles that have `at` as a vertex.
fn touching(mesh: &Mesh, at: Point) -> Vec<f64> {
    (0..mesh.triangles.len())
        .filter(|&t| mesh.corners(t).contains(&at))
        .map(|t| longest_edge(mesh, t))
        .collect()
}

#[test]
fn layer_sizes_follow_the_geometric_sequence() {
    // Measured (σ 0.15 with 6 layers, σ 0.2 with 8, both corners): every triangle of a layer
    // has its longest edge 0.175…0.99 × its centroid's distance to the point (≤ 1 is the
    // target h = d itself; the lower band, with a margin of 1.75, says no layer is refined
    // more than the sequence asks); the median longest edge of layer k is 0.17…0.33 × SIZE·σ^k
    // (band 0.12…0.5: the medians follow σ^k over 8 layers, 2.6e-6, to within a factor 2 of
    // the measured spread); the triangles touching the point 0.36…0.87 × SIZE·σ^layers.
    for (factor, layers) in [(0.15, 6), (0.2, 8)] {
        let spec = graded_spec(factor, layers);
        let mesh = build_mesh(&spec).expect("the graded spec meshes");
        check_invariants(&mesh, &spec);
        for at in [CORNER_CORE, CORNER_WINDING] {
            let stats = layer_stats(&mesh, at, factor, layers);
            for (k, &(n, min, max, median)) in stats.iter().enumerate() {
                let what = format!("σ {factor}, {at:?}, layer {k}: {n} triangles, edge/d {min:.3}…{max:.3}, median {median:.3}");
                assert!(n > 0, "{what}");
                assert!(min >= 0.1 && max <= 1.0, "{what}");
                assert!((0.12..=0.5).contains(&median), "{what}");
            }
            let inner = SIZE * factor.powi(layers as i32);
            let edges = touching(&mesh, at);
            assert!(edges.len() >= 3, "{at:?}: {edges:?}");
            for e in edges {
                assert!(
                    (0.25..=1.0).contains(&(e / inner)),
                    "{at:?}: {} × inner",
                    e / inner
                );
            }
        }
    }
}

#[test]
fn triangle_count_grows_linearly_in_the_layers() {
    // Measured: about 110 triangles per layer per point at σ = 0.2 (80…160 per layer above).
    // A uniform mesh at the innermost size would grow like σ^(−2n) (25⁴ = 4e5 from 4 to 8).
    let count = |layers| {
        build_mesh(&graded_spec(0.2, layers))
            .unwrap()
            .triangles
            .len() as f64
    };
    let (n0, n4, n8) = (count(0), count(4), count(8));
    let (first, second) = ((n4 - n0) / 8.0, (n8 - n4) / 8.0);
    eprintln!("triangles: {n0} {n4} {n8}; per layer per point {first:.0}, {second:.0}");
    assert!((50.0..=200.0).contains(&first), "{first}");
    assert!((50.0..=200.0).contains(&second), "{second}");
    assert!((second / first - 1.0).abs() < 0.3, "{first} {second}");
}

#[test]
fn graded_meshes_keep_the_angle_floor() {
    // The target h = d changes by at most 1 per unit length, gentle enough for the Delaunay
    // refinement to reach its angle floor (spade 2.15 `RefinementParameters`); deepest
    // grading allowed at factor 0.2 and factor 0.1 included.
    for (factor, layers, floor) in [(0.2, 12, 25.0), (0.1, 6, 25.0), (0.15, 8, 30.0)] {
        let mut spec = graded_spec(factor, layers);
        spec.angle_floor_deg = floor;
        let mesh = build_mesh(&spec).expect("the graded spec meshes");
        check_invariants(&mesh, &spec);
        let stats = mesh.stats();
        assert!(
            stats.min_angle_deg >= floor - 1e-9,
            "σ {factor}, {layers}: {stats:?}"
        );
        let smallest = (0..mesh.triangles.len())
            .map(|t| {
                let p = mesh.corners(t);
                triangle_angles(p[0], p[1], p[2])
                    .into_iter()
                    .fold(f64::INFINITY, f64::min)
            })
            .fold(f64::INFINITY, f64::min);
        assert!(
            smallest.to_degrees() >= floor - 1e-9,
            "{}",
            smallest.to_degrees()
        );
    }
}

#[test]
fn graded_points_inside_air_and_on_the_axis_are_graded_too() {
    // Not only corners of regions: a point in open air and one on the axis.
    let (factor, layers) = (0.2, 5);
    for at in [[20e-3, 50e-3], [0.0, 50e-3]] {
        let mut spec = graded_spec(factor, 0);
        spec.refinements.clear();
        spec.refinements.push(Refinement::Graded {
            at,
            size: SIZE,
            factor,
            layers,
        });
        let mesh = build_mesh(&spec).expect("meshes");
        check_invariants(&mesh, &spec);
        let inner = SIZE * factor.powi(layers as i32);
        let edges = touching(&mesh, at);
        assert!(
            !edges.is_empty() && edges.iter().all(|&e| (0.25..=1.0).contains(&(e / inner))),
            "{at:?}: {edges:?}"
        );
        for (k, &(n, min, max, _)) in layer_stats(&mesh, at, factor, layers).iter().enumerate() {
            assert!(
                n > 0 && min >= 0.1 && max <= 1.0,
                "{at:?} layer {k}: {n} {min} {max}"
            );
        }
    }
}

#[test]
fn bad_graded_inputs_are_refused_as_bad_sizes() {
    let graded = |at: Point, size: f64, factor: f64, layers: u32| Refinement::Graded {
        at,
        size,
        factor,
        layers,
    };
    let cases = [
        ("graded point r", graded([f64::NAN, 0.0], SIZE, 0.2, 4)),
        ("graded point z", graded([0.0, f64::INFINITY], SIZE, 0.2, 4)),
        ("graded size", graded(CORNER_CORE, 0.0, 0.2, 4)),
        ("graded size", graded(CORNER_CORE, -1e-3, 0.2, 4)),
        ("graded size", graded(CORNER_CORE, f64::NAN, 0.2, 4)),
        (
            "graded factor (must be between 0 and 1)",
            graded(CORNER_CORE, SIZE, 0.0, 4),
        ),
        (
            "graded factor (must be between 0 and 1)",
            graded(CORNER_CORE, SIZE, 1.0, 4),
        ),
        (
            "graded factor (must be between 0 and 1)",
            graded(CORNER_CORE, SIZE, -0.2, 4),
        ),
        (
            "graded factor (must be between 0 and 1)",
            graded(CORNER_CORE, SIZE, f64::NAN, 4),
        ),
        (
            "graded layers (too many)",
            graded(CORNER_CORE, SIZE, 0.5, MAX_GRADED_LAYERS + 1),
        ),
        (
            "graded layers (too many)",
            graded(CORNER_CORE, SIZE, 0.5, u32::MAX),
        ),
        (
            "graded innermost size (size · factor^layers, too small for the domain)",
            graded(CORNER_CORE, SIZE, 0.1, 10),
        ),
        (
            "graded innermost size (size · factor^layers, too small for the domain)",
            graded(CORNER_CORE, SIZE, 1e-300, 2),
        ),
    ];
    for (what, refinement) in cases {
        let mut spec = graded_spec(0.2, 0);
        spec.refinements = vec![refinement.clone()];
        match build_mesh(&spec) {
            Err(MeshError::BadSize { what: got, .. }) => assert_eq!(got, what, "{refinement:?}"),
            other => panic!("{refinement:?}: expected BadSize {{ {what} }}, got {other:?}"),
        }
    }
}
