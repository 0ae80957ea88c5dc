//! From a case to the mesher's description: region shapes, tags and graded sizes.
//!
//! Region tags: 0 air, 1 core, 2 + k for winding k (counted from 0).

use axicore_mesher::{MeshSpec, Point, Refinement, Region, Shape};

use crate::case::BALL_FACTOR;
use crate::case::{Case, CoreShape};

/// Tag of the air region.
pub const AIR_TAG: u32 = 0;
/// Tag of the core.
pub const CORE_TAG: u32 = 1;
/// Tag of winding `k` (from 0).
pub fn winding_tag(k: usize) -> u32 {
    2 + k as u32
}

/// Radius of the ball used for the field-route dipole check, in m.
pub fn ball_radius(case: &Case) -> f64 {
    BALL_FACTOR * case.source_radius()
}

/// The core's characteristic thickness (radius, wall or equatorial radius) in m.
pub fn core_thickness(shape: &CoreShape) -> f64 {
    match *shape {
        CoreShape::Rod { diameter, length } => 0.5 * diameter.min(length),
        CoreShape::Tube {
            diameter,
            bore,
            length,
        } => (0.5 * (diameter - bore)).min(length),
        CoreShape::Sphere { diameter } => 0.5 * diameter,
        CoreShape::Spheroid { diameter, length } => 0.5 * diameter.min(length),
    }
}

/// Sharp corners of the core's meridian section (where |B| is singular), in m.
pub fn core_corners(case: &Case) -> Vec<Point> {
    let Some(core) = &case.core else {
        return Vec::new();
    };
    let (r, hl, c) = (core.shape.radius(), core.shape.half_length(), core.centre);
    match core.shape {
        CoreShape::Rod { .. } => vec![[r, c - hl], [r, c + hl]],
        CoreShape::Tube { bore, .. } => {
            let ri = 0.5 * bore;
            vec![[ri, c - hl], [r, c - hl], [r, c + hl], [ri, c + hl]]
        }
        CoreShape::Sphere { .. } | CoreShape::Spheroid { .. } => Vec::new(),
    }
}

/// Element size ratio of second- to first-order meshes at the same fineness: a 6-node
/// triangle carries about four times the unknowns of a 3-node one of the same size, so twice
/// the size keeps the node count of a fineness close across orders (measured on the built-in
/// rod at fineness 1: 8.3k nodes first order, 14k second order, with 0.13 % and 0.016 % error).
pub const SECOND_ORDER_SIZE: f64 = 2.0;

/// Corner size divisor (corner size = thickness / (divisor · fineness)). Second-order elements
/// converge fast away from the core's sharp corners, so there the field singularity decides the
/// error and pays for a finer start (measured on the built-in rod, second order at the same
/// node count: t/30 gave 2.9e-4, t/120 1.6e-4 relative error of the moment).
fn corner_divisor(order: usize) -> f64 {
    if order == 2 {
        240.0
    } else {
        30.0
    }
}

/// The mesh specification of a case.
pub fn mesh_spec(case: &Case) -> MeshSpec {
    let f = if case.mesh.order == 2 {
        case.mesh.fineness / SECOND_ORDER_SIZE
    } else {
        case.mesh.fineness
    };
    let ro = case.effective_surroundings_radius();
    let mut spec = MeshSpec::new(ro, AIR_TAG);
    spec.grading = case.mesh.grading.unwrap_or(0.15 / f);
    spec.angle_floor_deg = case.mesh.angle_floor_deg;
    spec.arc_tolerance = case.mesh.effective_arc_tolerance();
    if let (2, None, Some(core)) = (case.mesh.order, case.mesh.arc_tolerance, &case.core) {
        if let CoreShape::Spheroid { .. } = core.shape {
            // The loose second-order polygon must still follow a slender tip, whose curvature
            // radius is r²/hl: a sagitta above half of it relative to r leaves a polygon
            // corner sharper than the minimum angle (axis ratio 500: 9° with 1e-2, 24.7° with
            // 1e-3).
            let r_over_hl = core.shape.radius() / core.shape.half_length();
            spec.arc_tolerance = spec.arc_tolerance.min(0.5 * r_over_hl);
        }
    }
    // The cap counts every node; a second-order mesh has about four nodes per corner node,
    // so the mesher (which counts corners) stops early and the elevated mesh is checked too.
    spec.max_nodes = if case.mesh.order == 2 {
        (case.mesh.max_nodes / 3).max(100)
    } else {
        case.mesh.max_nodes
    };
    spec.far_size = case.mesh.far_size.unwrap_or(ro / (6.0 * f));
    spec.interior_arcs = vec![ball_radius(case)];

    if let Some(core) = &case.core {
        let t = core_thickness(&core.shape);
        // The core keeps the first-order size at second order too: its mesh and the air layer
        // against it carry the moment (axis-ratio-10 spheroid, second order at fineness 0.7:
        // −3.6e-3 with the doubled size, −1.7e-4 with this one; the rod is not size-limited).
        let size = case
            .mesh
            .core_size
            .unwrap_or(t / (3.0 * case.mesh.fineness));
        let (r, hl, c) = (core.shape.radius(), core.shape.half_length(), core.centre);
        let shape = match core.shape {
            CoreShape::Rod { .. } => Shape::Rect {
                r_min: 0.0,
                r_max: r,
                z_min: c - hl,
                z_max: c + hl,
            },
            CoreShape::Tube { bore, .. } => Shape::Rect {
                r_min: 0.5 * bore,
                r_max: r,
                z_min: c - hl,
                z_max: c + hl,
            },
            CoreShape::Sphere { .. } | CoreShape::Spheroid { .. } => Shape::HalfEllipse {
                z_centre: c,
                radial: r,
                axial: hl,
            },
        };
        spec.regions.push(Region {
            tag: CORE_TAG,
            shape,
            size,
        });
        spec.refinements.push(Refinement::Boundary {
            region: 0,
            size: 0.5 * size,
        });
        let corner = case
            .mesh
            .corner_size
            .unwrap_or(t / (corner_divisor(case.mesh.order) * f));
        for at in core_corners(case) {
            spec.refinements
                .push(Refinement::Point { at, size: corner });
        }
        if let CoreShape::Spheroid { .. } = core.shape {
            // The tips of a prolate spheroid have curvature radius r²/hl: resolve it.
            let tip = (r * r / hl).min(t) / (3.0 * f);
            for z in [c - hl, c + hl] {
                spec.refinements.push(Refinement::Point {
                    at: [0.0, z],
                    size: tip,
                });
            }
        }
    }
    for (k, w) in case.windings.iter().enumerate() {
        let thick = (w.outer_radius - w.inner_radius).min(w.length);
        let size = case.mesh.winding_size.unwrap_or(thick / (3.0 * f));
        spec.regions.push(Region {
            tag: winding_tag(k),
            shape: Shape::Rect {
                r_min: w.inner_radius,
                r_max: w.outer_radius,
                z_min: w.centre - 0.5 * w.length,
                z_max: w.centre + 0.5 * w.length,
            },
            size,
        });
        spec.refinements.push(Refinement::Boundary {
            region: spec.regions.len() - 1,
            size,
        });
    }
    if let Some(core) = &case.core {
        let size = case
            .mesh
            .core_size
            .unwrap_or(core_thickness(&core.shape) / (3.0 * case.mesh.fineness));
        crate::slender::add_bands(case, &mut spec, size, f);
    }
    spec
}
