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

/// The points graded toward with `mesh.corner_layers`, each once, in m: the core's corners
/// ([`core_corners`]), where the field is singular (a permeability jump at a re-entrant corner).
/// A winding's corners are not among them: there only the current density jumps, the field
/// stays continuous with bounded gradient, and grading them bought nothing — measured with the
/// hp model on the torquer rod (8 × 70 mm, μr 5000, winding 4.5–5.5 mm × 60 mm), fineness
/// 0.125: the same moments to 1e-12 at p = 5…8 with 2.5× fewer equations without them.
/// Spheres and spheroids have none.
pub fn singular_points(case: &Case) -> Vec<Point> {
    core_corners(case)
}

/// Size ratio of successive layers toward a singular point with `mesh.corner_layers` > 0
/// (0.15–0.2 is common practice for hp elements).
pub const CORNER_LAYER_FACTOR: f64 = 0.2;

/// Smallest innermost layer size relative to the surroundings radius: ten times the mesher's
/// floor ([`axicore_mesher::MIN_GRADED_RELATIVE_SIZE`]), so that a case never asks for more.
const MIN_CORNER_RELATIVE_SIZE: f64 = 1e-11;

/// Replaces the core corners' point refinements of `spec` by geometric grading toward every
/// singular point of the case with `layers` layers (fewer where the innermost size would fall
/// below [`MIN_CORNER_RELATIVE_SIZE`] × the surroundings radius). The graded zone of a point
/// ends at the finest boundary size of the outlines through it (the core's or a winding's),
/// where it meets the mesh of those outlines. Points inside a graded band are left to the band.
fn grade_singular_points(case: &Case, spec: &mut MeshSpec, layers: u32) {
    let corners = core_corners(case);
    spec.refinements
        .retain(|r| !matches!(r, Refinement::Point { at, .. } if corners.contains(at)));
    let on_outline = |p: Point, s: &Shape| match *s {
        Shape::Rect {
            r_min,
            r_max,
            z_min,
            z_max,
        } => {
            let inside = (r_min..=r_max).contains(&p[0]) && (z_min..=z_max).contains(&p[1]);
            inside && (p[0] == r_min || p[0] == r_max || p[1] == z_min || p[1] == z_max)
        }
        Shape::HalfEllipse { .. } => false,
    };
    let mut graded = Vec::new();
    for at in singular_points(case) {
        let in_band = spec
            .bands
            .iter()
            .any(|b| at[0] <= b.r_max && (b.z_min..=b.z_max).contains(&at[1]));
        let size = spec
            .refinements
            .iter()
            .filter_map(|r| match *r {
                Refinement::Boundary { region, size }
                    if on_outline(at, &spec.regions[region].shape) =>
                {
                    Some(size)
                }
                _ => None,
            })
            .fold(f64::INFINITY, f64::min);
        if in_band || !size.is_finite() {
            continue;
        }
        let floor = MIN_CORNER_RELATIVE_SIZE * spec.outer_radius;
        let most = ((floor / size).ln() / CORNER_LAYER_FACTOR.ln())
            .floor()
            .max(0.0) as u32;
        graded.push(Refinement::Graded {
            at,
            size,
            factor: CORNER_LAYER_FACTOR,
            layers: layers.min(most),
        });
    }
    spec.refinements.extend(graded);
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
    if case.mesh.corner_layers > 0 {
        grade_singular_points(case, &mut spec, case.mesh.corner_layers);
    }
    spec
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::case::parse_case;

    fn case(text: &str) -> Case {
        parse_case(text, "c.toml").unwrap()
    }

    const TUBE: &str = "title = \"t\"\n[core]\nshape = \"tube\"\nlength = \"40 mm\"\ndiameter = \"8 mm\"\nbore = \"3 mm\"\nmaterial = \"pure-iron\"\n[[winding]]\nturns = 10\ncurrent = \"1 A\"\ninner_radius = \"4 mm\"\nouter_radius = \"6 mm\"\nlength = \"40 mm\"\n";

    #[test]
    fn singular_points_are_the_core_corners_each_once() {
        // The example rod (r 4 mm, |z| ≤ 35 mm) in a winding 4.2–6 mm, |z| ≤ 30 mm: 2.
        let rod = case(crate::EXAMPLE_CASE);
        let p = singular_points(&rod);
        assert_eq!(p.len(), 2, "{p:?}");
        for at in [[4e-3, -35e-3], [4e-3, 35e-3]] {
            assert!(
                p.iter()
                    .any(|q| (q[0] - at[0]).abs() < 1e-12 && (q[1] - at[1]).abs() < 1e-12),
                "{at:?} in {p:?}"
            );
        }
        // A tube's four corners; an air-core winding and a sphere have none.
        assert_eq!(singular_points(&case(TUBE)).len(), 4);
        let coil = "title = \"t\"\n[[winding]]\nturns = 10\ncurrent = \"1 A\"\ninner_radius = \"0 mm\"\nouter_radius = \"6 mm\"\nlength = \"40 mm\"\n";
        assert!(singular_points(&case(coil)).is_empty());
        let sphere = "title = \"t\"\n[core]\nshape = \"sphere\"\ndiameter = \"10 mm\"\nmaterial = \"pure-iron\"\n[background]\nb_axial = \"1 mT\"\n";
        assert!(singular_points(&case(sphere)).is_empty());
    }

    #[test]
    fn corner_layers_replace_the_corner_points_by_graded_ones() {
        let plain = case(crate::EXAMPLE_CASE);
        let mut graded = plain.clone();
        graded.mesh.corner_layers = 3;
        let (a, b) = (mesh_spec(&plain), mesh_spec(&graded));
        let points = |s: &MeshSpec| {
            s.refinements
                .iter()
                .filter(|r| matches!(r, Refinement::Point { .. }))
                .count()
        };
        assert_eq!(points(&a), 2);
        assert_eq!(points(&b), 0);
        let layers: Vec<(u32, f64)> = b
            .refinements
            .iter()
            .filter_map(|r| match *r {
                Refinement::Graded { layers, size, .. } => Some((layers, size)),
                _ => None,
            })
            .collect();
        assert_eq!(layers.len(), 2);
        // The core corners' zones end at the core's boundary size.
        let core_boundary = a
            .refinements
            .iter()
            .find_map(|r| match *r {
                Refinement::Boundary { region: 0, size } => Some(size),
                _ => None,
            })
            .unwrap();
        assert!(layers.iter().all(|&(n, _)| n == 3));
        assert_eq!(layers[0].1, core_boundary);
        assert_eq!(a.regions, b.regions);
    }

    #[test]
    fn corner_layers_stop_above_the_smallest_size() {
        let mut deep = case(crate::EXAMPLE_CASE);
        deep.mesh.corner_layers = axicore_mesher::MAX_GRADED_LAYERS;
        let spec = mesh_spec(&deep);
        for r in &spec.refinements {
            if let Refinement::Graded {
                size,
                factor,
                layers,
                ..
            } = *r
            {
                let inner = size * factor.powi(layers as i32);
                assert!(
                    inner >= MIN_CORNER_RELATIVE_SIZE * spec.outer_radius,
                    "{inner}"
                );
                assert!(inner < MIN_CORNER_RELATIVE_SIZE * spec.outer_radius / factor);
            }
        }
    }
}
