//! Bad specs give typed errors, never panics.

mod common;

use axicore_mesher::{build_mesh, MeshError, MeshSpec, Refinement, Region, Shape};
use common::*;

fn spec_with(regions: Vec<Region>) -> MeshSpec {
    let mut spec = MeshSpec::new(1.0, AIR);
    spec.regions = regions;
    spec
}

fn core() -> Region {
    rect(CORE, [0.0, 5e-3], [-35e-3, 35e-3], 1e-3)
}

#[test]
fn crossing_rectangles_are_an_overlap() {
    let spec = spec_with(vec![
        core(),
        rect(WINDING, [4e-3, 8e-3], [-30e-3, 30e-3], 1e-3),
    ]);
    assert_eq!(build_mesh(&spec), Err(MeshError::Overlap { a: 0, b: 1 }));
}

#[test]
fn identical_rectangles_are_an_overlap() {
    let spec = spec_with(vec![core(), core()]);
    assert_eq!(build_mesh(&spec), Err(MeshError::Overlap { a: 0, b: 1 }));
}

#[test]
fn nested_rectangle_is_an_overlap() {
    // No edges cross: the inner one lies wholly inside.
    let spec = spec_with(vec![core(), rect(WINDING, [1e-3, 2e-3], [0.0, 1e-3], 1e-3)]);
    assert_eq!(build_mesh(&spec), Err(MeshError::Overlap { a: 0, b: 1 }));
}

#[test]
fn rectangle_inside_another_sharing_an_edge_is_an_overlap() {
    // Shares the core's outer side from inside: same side of the shared edge.
    let spec = spec_with(vec![
        rect(WINDING, [3e-3, 5e-3], [-10e-3, 10e-3], 1e-3),
        core(),
    ]);
    assert_eq!(build_mesh(&spec), Err(MeshError::Overlap { a: 0, b: 1 }));
}

#[test]
fn sphere_overlapping_rectangle_is_an_overlap() {
    let sphere = Region {
        tag: WINDING,
        shape: Shape::HalfEllipse {
            z_centre: 0.04,
            radial: 0.01,
            axial: 0.01,
        },
        size: 1e-3,
    };
    let spec = spec_with(vec![core(), sphere]);
    assert_eq!(build_mesh(&spec), Err(MeshError::Overlap { a: 0, b: 1 }));
}

#[test]
fn region_beyond_outer_radius_is_outside_domain() {
    let spec = spec_with(vec![core(), rect(WINDING, [0.5, 1.2], [0.0, 0.1], 0.01)]);
    assert_eq!(
        build_mesh(&spec),
        Err(MeshError::OutsideDomain { region: 1 })
    );
}

#[test]
fn region_touching_outer_arc_is_outside_domain() {
    // The corner (0, 1) is the outer arc's end: regions must lie strictly inside.
    let spec = spec_with(vec![rect(CORE, [0.0, 0.1], [0.9, 1.0], 0.01)]);
    assert_eq!(
        build_mesh(&spec),
        Err(MeshError::OutsideDomain { region: 0 })
    );
}

#[test]
fn negative_inner_radius_is_a_bad_shape() {
    let spec = spec_with(vec![rect(CORE, [-1e-3, 5e-3], [0.0, 0.01], 1e-3)]);
    assert!(matches!(
        build_mesh(&spec),
        Err(MeshError::BadShape { region: 0, .. })
    ));
}

#[test]
fn degenerate_shapes_are_bad_shapes() {
    let flat = rect(CORE, [0.0, 5e-3], [0.01, 0.01], 1e-3);
    assert!(matches!(
        build_mesh(&spec_with(vec![flat])),
        Err(MeshError::BadShape { .. })
    ));
    let ellipse = Region {
        tag: CORE,
        shape: Shape::HalfEllipse {
            z_centre: 0.0,
            radial: 0.0,
            axial: 0.01,
        },
        size: 1e-3,
    };
    assert!(matches!(
        build_mesh(&spec_with(vec![ellipse])),
        Err(MeshError::BadShape { .. })
    ));
    let nan = rect(CORE, [0.0, f64::NAN], [0.0, 0.01], 1e-3);
    assert!(matches!(
        build_mesh(&spec_with(vec![nan])),
        Err(MeshError::BadShape { .. })
    ));
}

/// One change to a valid spec.
type Edit = Box<dyn Fn(&mut MeshSpec)>;

#[test]
fn non_finite_and_non_positive_numbers_are_bad_sizes() {
    let cases: Vec<(&str, Edit)> = vec![
        ("outer_radius", Box::new(|s| s.outer_radius = f64::INFINITY)),
        ("outer_radius", Box::new(|s| s.outer_radius = -1.0)),
        ("far_size", Box::new(|s| s.far_size = f64::NAN)),
        ("far_size", Box::new(|s| s.far_size = 0.0)),
        ("grading", Box::new(|s| s.grading = -0.1)),
        ("angle_floor_deg", Box::new(|s| s.angle_floor_deg = 31.0)),
        (
            "angle_floor_deg",
            Box::new(|s| s.angle_floor_deg = f64::NAN),
        ),
        ("arc_tolerance", Box::new(|s| s.arc_tolerance = 0.0)),
        ("arc_tolerance", Box::new(|s| s.arc_tolerance = 1.0)),
        ("region size", Box::new(|s| s.regions[0].size = -1e-3)),
        (
            "region size",
            Box::new(|s| s.regions[0].size = f64::INFINITY),
        ),
        (
            "refinement size",
            Box::new(|s| {
                s.refinements.push(Refinement::Point {
                    at: [0.0, 0.0],
                    size: 0.0,
                })
            }),
        ),
        (
            "refinement point r",
            Box::new(|s| {
                s.refinements.push(Refinement::Point {
                    at: [f64::NAN, 0.0],
                    size: 1e-3,
                })
            }),
        ),
        (
            "interior arc radius",
            Box::new(|s| s.interior_arcs.push(-0.5)),
        ),
    ];
    for (what, change) in cases {
        let mut spec = spec_with(vec![core()]);
        change(&mut spec);
        match build_mesh(&spec) {
            Err(MeshError::BadSize { what: got, .. }) => assert_eq!(got, what),
            other => panic!("{what}: expected BadSize, got {other:?}"),
        }
    }
}

#[test]
fn interior_arc_outside_domain_is_a_bad_size() {
    let mut spec = spec_with(vec![]);
    spec.interior_arcs = vec![1.0];
    assert!(matches!(build_mesh(&spec), Err(MeshError::BadSize { .. })));
}

#[test]
fn arc_through_a_region_is_rejected() {
    let mut spec = spec_with(vec![
        core(),
        rect(WINDING, [0.05, 0.06], [-0.01, 0.01], 1e-3),
    ]);
    spec.interior_arcs = vec![0.055];
    assert_eq!(
        build_mesh(&spec),
        Err(MeshError::ArcCrossesRegion { arc: 0, region: 1 })
    );
    // Through the rod, starting on the axis inside it.
    spec.interior_arcs = vec![0.02];
    assert_eq!(
        build_mesh(&spec),
        Err(MeshError::ArcCrossesRegion { arc: 0, region: 0 })
    );
}

#[test]
fn boundary_refinement_of_missing_region_is_rejected() {
    let mut spec = spec_with(vec![core()]);
    spec.refinements.push(Refinement::Boundary {
        region: 3,
        size: 1e-4,
    });
    assert_eq!(
        build_mesh(&spec),
        Err(MeshError::NoSuchRegion {
            refinement: 0,
            region: 3,
            regions: 1
        })
    );
}

#[test]
fn node_cap_is_an_error() {
    let mut spec = torquer_spec();
    spec.max_nodes = 2_000;
    match build_mesh(&spec) {
        Err(MeshError::TooManyNodes { limit, reached }) => {
            assert_eq!(limit, 2_000);
            assert!(reached >= limit);
        }
        other => panic!("expected TooManyNodes, got {other:?}"),
    }
}

#[test]
fn absurd_arc_tolerance_is_refused_before_allocating() {
    let mut spec = spec_with(vec![]);
    spec.arc_tolerance = 1e-300;
    assert!(matches!(
        build_mesh(&spec),
        Err(MeshError::TooManyNodes { .. })
    ));
}

#[test]
fn far_size_too_small_for_the_cap_is_an_error_not_a_hang() {
    let mut spec = spec_with(vec![core()]);
    spec.far_size = 1e-5;
    spec.max_nodes = 50_000;
    assert!(matches!(
        build_mesh(&spec),
        Err(MeshError::TooManyNodes { .. })
    ));
}

fn half_ellipse(tag: u32, z_centre: f64, radial: f64, axial: f64) -> Region {
    Region {
        tag,
        shape: Shape::HalfEllipse {
            z_centre,
            radial,
            axial,
        },
        size: 1e-3,
    }
}

#[test]
fn rectangle_on_a_sphere_tip_is_meshed_or_refused_by_angle() {
    // The rectangle's bottom side touches the sphere's top tip; the chords there leave it at half the
    // normal-angle step: π/(2n) = 0.4° for tol 1e-4 (meshed), 0.08° for tol 1e-6 (refused).
    let regions = vec![
        half_ellipse(CORE, 0.0, 0.01, 0.01),
        rect(WINDING, [0.0, 0.005], [0.01, 0.02], 1e-3),
    ];
    let mut spec = spec_with(regions);
    let mesh = build_mesh(&spec).expect("0.4° is above the input-angle limit");
    check_invariants(&mesh, &spec);
    spec.arc_tolerance = 1e-6;
    assert!(matches!(
        build_mesh(&spec),
        Err(MeshError::SmallInputAngle { .. })
    ));
}
