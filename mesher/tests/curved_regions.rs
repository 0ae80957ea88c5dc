//! Half-ellipse regions and interior arcs: areas against the chord-polygon bounds, shared edges with
//! coinciding arcs, quality near the axis tips.

mod common;

use std::f64::consts::PI;

use axicore_mesher::{build_mesh, polygon_areas, MeshSpec, Region, Shape};
use common::*;

/// Upper bound of (exact − polygon) area for half-ellipse regions, which are cut until each chord's
/// sagitta (at the arc's parametric midpoint) is at most tol·min(a, b): each cap lies in its
/// chord × sagitta rectangle, chords sum to at most the half perimeter ≤ (π/2)·√(2(a² + b²))
/// (the classical upper bound of an ellipse's perimeter), and a factor 1.5 covers the gap between
/// the midpoint sagitta and the largest one on a short elliptic arc.
fn ellipse_deficit_bound(a: f64, b: f64, tol: f64) -> f64 {
    1.5 * tol * a.min(b) * 0.5 * PI * (2.0 * (a * a + b * b)).sqrt()
}

#[test]
fn slender_spheroid_keeps_its_volume_to_the_tolerance() {
    // A 2 mm × 100 mm half-ellipse (axis ratio 50): the polygon must stay within the absolute
    // sagitta bound, i.e. its relative area deficit is of order tol, not of order 1.
    let (a, b) = (2e-3, 100e-3);
    let mut spec = spec_with(vec![half_ellipse(CORE, 0.0, a, b, 1e-3)]);
    spec.outer_radius = 0.5;
    let (_, polygons) = polygon_areas(&spec).unwrap();
    let exact = PI * a * b / 2.0;
    let deficit = exact - polygons[0];
    assert!(deficit > 0.0 && deficit <= ellipse_deficit_bound(a, b, spec.arc_tolerance));
    assert!(deficit / exact < 1e-3, "{}", deficit / exact);
}

fn spec_with(regions: Vec<Region>) -> MeshSpec {
    let mut spec = MeshSpec::new(0.5, AIR);
    spec.far_size = 0.05;
    spec.regions = regions;
    spec
}

fn half_ellipse(tag: u32, z_centre: f64, radial: f64, axial: f64, size: f64) -> Region {
    Region {
        tag,
        shape: Shape::HalfEllipse {
            z_centre,
            radial,
            axial,
        },
        size,
    }
}

#[test]
fn sphere_region_area_equals_inscribed_polygon_and_lies_within_sagitta_bound() {
    // A half circle of radius a cut into n equal chords encloses (n/2) a² sin(π/n) with the axis
    // (elementary geometry, from memory). The half disc π a²/2 (exact) exceeds it by at most the bound.
    let a = 0.02;
    let spec = spec_with(vec![half_ellipse(CORE, 0.01, a, a, 2e-3)]);
    let mesh = build_mesh(&spec).unwrap();
    check_invariants(&mesh, &spec);
    // Bisection from 8 equal arcs splits a circle uniformly: n = 8·2^k equal chords, the first
    // such n whose sagitta a(1 − cos(π/2n)) is within tol·a.
    let mut n = 8.0;
    while a * (1.0 - (PI / (2.0 * n)).cos()) > spec.arc_tolerance * a {
        n *= 2.0;
    }
    let polygon = 0.5 * n * a * a * (PI / n).sin();
    let meshed = mesh.region_area(CORE);
    assert!(
        (meshed - polygon).abs() <= 1e-12 * polygon,
        "{meshed} vs {polygon}"
    );
    let exact = PI * a * a / 2.0;
    let deficit = exact - meshed;
    assert!(deficit > 0.0 && deficit <= ellipse_deficit_bound(a, a, spec.arc_tolerance));
    // For a circle the bound is tol · π a², i.e. twice the tolerance relative to the half disc.
    assert!(deficit / exact <= 2.0 * spec.arc_tolerance);
    assert!(mesh.stats().min_angle_deg >= 25.0);
}

#[test]
fn prolate_half_ellipse_area_lies_within_sagitta_bound() {
    // Ellipse area π a b (elementary calculus, from memory); the region is the half of it.
    let (a, b) = (5e-3, 50e-3);
    for tol in [1e-2, 1e-3, 1e-4] {
        let mut spec = spec_with(vec![half_ellipse(CORE, -0.02, a, b, 2e-3)]);
        spec.arc_tolerance = tol;
        let mesh = build_mesh(&spec).unwrap();
        check_invariants(&mesh, &spec);
        let (_, polygons) = polygon_areas(&spec).unwrap();
        let meshed = mesh.region_area(CORE);
        assert!((meshed - polygons[0]).abs() <= 1e-12 * polygons[0]);
        let exact = PI * a * b / 2.0;
        let deficit = exact - meshed;
        let bound = ellipse_deficit_bound(a, b, tol);
        assert!(
            deficit > 0.0 && deficit <= bound,
            "tol {tol}: deficit {deficit} > bound {bound}"
        );
        let stats = mesh.stats();
        assert!(stats.min_angle_deg >= 25.0, "tol {tol}: {stats:?}");
    }
}

#[test]
fn oblate_half_ellipse_meshes_with_quality() {
    let (a, b) = (30e-3, 4e-3);
    let spec = spec_with(vec![half_ellipse(CORE, 0.0, a, b, 2e-3)]);
    let mesh = build_mesh(&spec).unwrap();
    check_invariants(&mesh, &spec);
    let deficit = PI * a * b / 2.0 - mesh.region_area(CORE);
    assert!(deficit > 0.0 && deficit <= ellipse_deficit_bound(a, b, spec.arc_tolerance));
    assert!(mesh.stats().min_angle_deg >= 25.0);
}

#[test]
fn interior_arc_on_a_sphere_outline_shares_its_edges() {
    // Same radius, same tolerance: the arc and the sphere outline are the same polygon.
    let a = 0.05;
    let mut spec = spec_with(vec![half_ellipse(CORE, 0.0, a, a, 5e-3)]);
    spec.interior_arcs = vec![a, 0.2];
    let mesh = build_mesh(&spec).unwrap();
    check_invariants(&mesh, &spec);
    // Bisection from 8 equal arcs splits a circle uniformly: n = 8·2^k equal chords, the first
    // such n whose sagitta a(1 − cos(π/2n)) is within tol·a.
    let mut n = 8.0;
    while a * (1.0 - (PI / (2.0 * n)).cos()) > spec.arc_tolerance * a {
        n *= 2.0;
    }
    let polygon = 0.5 * n * a * a * (PI / n).sin();
    assert!((mesh.region_area(CORE) - polygon).abs() <= 1e-12 * polygon);
}

#[test]
fn interior_arc_inside_a_region_is_allowed() {
    let mut spec = spec_with(vec![half_ellipse(CORE, 0.0, 0.03, 0.03, 3e-3)]);
    spec.interior_arcs = vec![0.01];
    let mesh = build_mesh(&spec).unwrap();
    check_invariants(&mesh, &spec);
    let (_, polygons) = polygon_areas(&spec).unwrap();
    assert!((mesh.region_area(CORE) - polygons[0]).abs() <= 1e-12 * polygons[0]);
}

#[test]
fn interior_arc_nodes_lie_on_or_inside_their_circle() {
    // Arc vertices are exactly on the circle; points added later sit on its chords, which are no
    // further inside than the sagitta tol · ρ.
    let rho = 0.1;
    let mut spec = spec_with(vec![]);
    spec.interior_arcs = vec![rho];
    let mesh = build_mesh(&spec).unwrap();
    check_invariants(&mesh, &spec);
    let near: Vec<f64> = mesh
        .nodes
        .iter()
        .map(|p| p[0].hypot(p[1]))
        .filter(|d| (d - rho).abs() <= 2.0 * spec.arc_tolerance * rho)
        .collect();
    assert!(near.len() >= 8);
    assert!(near
        .iter()
        .all(|&d| d <= rho * (1.0 + 1e-15) && d >= rho * (1.0 - spec.arc_tolerance)));
}
