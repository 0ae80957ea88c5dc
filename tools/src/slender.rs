//! Axial grading of slender cores: the middle of a long rod or prolate spheroid core (and the windings and air beside
//! it) becomes a graded band of the mesher, whose rows grow with the distance from the nearer end
//! zone, so that the mesh grows like the logarithm of the slenderness instead of linearly.
//!
//! Short cores are meshed exactly as before: a band is only made for rods and spheroids with
//! length/diameter ≥ [`MIN_SLENDERNESS`].

use axicore_mesher::{Band, MeshSpec, Refinement, Shape};

use crate::case::{Case, CoreShape};

/// Smallest length/diameter of a rod whose middle is graded. Below it the mesh is the isotropic
/// one of earlier versions; the reference cases (length/diameter 8.75, 10 and 50) are all below,
/// so their baselines do not move.
pub const MIN_SLENDERNESS: f64 = 64.0;

/// Length of the isotropic zone kept at each end of the rod and of every winding, in core
/// diameters: there the corners' singular fields decide the mesh.
pub const END_ZONE_DIAMETERS: f64 = 2.0;

/// Length of the isotropic zone kept at each tip of a slender spheroid, in tip curvature radii:
/// the tip refinement reaches about the local radius there.
pub const TIP_ZONE_RADII: f64 = 20.0;

/// Band outer radius as a fraction of the band's length: wide enough that the rows' largest
/// spacing (the same length) makes no skinny triangles in the band's throw-away inside.
const WIDTH_FRACTION: f64 = 0.125;

/// Adds the graded bands of a case (none unless its core is a slender rod or spheroid) to a spec
/// whose grading and sizes are already set; `core_size` is the core's element size and `f` the
/// order-adjusted fineness.
pub fn add_bands(case: &Case, spec: &mut MeshSpec, core_size: f64, f: f64) {
    let bands = rod_bands(case, spec, core_size, f);
    for band in &bands {
        if let Some(Shape::HalfEllipse {
            z_centre,
            radial,
            axial,
        }) = band.surface
        {
            // Where a band meets a spheroid's tip zone, the Delaunay part resolves the local
            // radius as the band's first row does.
            for z in [band.z_min, band.z_max] {
                let u = ((z - z_centre) / axial).clamp(-1.0, 1.0);
                let rho = radial * (1.0 - u * u).sqrt();
                spec.refinements.push(Refinement::Point {
                    at: [rho, z],
                    size: band.end_size,
                });
            }
        }
    }
    spec.bands = bands;
}

fn rod_bands(case: &Case, spec: &MeshSpec, core_size: f64, f: f64) -> Vec<Band> {
    let Some(core) = &case.core else {
        return Vec::new();
    };
    let (diameter, length, surface) = match core.shape {
        CoreShape::Rod { diameter, length } => (diameter, length, None),
        CoreShape::Spheroid { diameter, length } => (
            diameter,
            length,
            Some(Shape::HalfEllipse {
                z_centre: core.centre,
                radial: 0.5 * diameter,
                axial: 0.5 * length,
            }),
        ),
        _ => return Vec::new(),
    };
    if length < MIN_SLENDERNESS * diameter {
        return Vec::new();
    }
    // A spheroid's columns bend with its outline, a winding's sides are straight: with both in
    // one band the gap between a thin tip and the winding got one or two cells across, and a
    // wound spheroid of length/diameter 200 converged erratically (−1.7 %, −0.9 %, −0.16 % at
    // fineness 1, 2, 3 against the isotropic mesh). Wound spheroids keep the isotropic mesh.
    if surface.is_some() && !case.windings.is_empty() {
        return Vec::new();
    }
    let (r, c, hl) = (0.5 * diameter, core.centre, 0.5 * length);
    let end = END_ZONE_DIAMETERS * diameter;
    // A spheroid has no corners: its band reaches close to the tips, where its columns follow
    // the thinning outline (tip curvature radius r²/hl).
    let core_end = match surface {
        Some(_) => TIP_ZONE_RADII * r * r / hl,
        None => end,
    };
    // Free intervals: the core minus the end zones of its ends and of every winding end.
    let mut free = vec![(c - hl + core_end, c + hl - core_end)];
    for w in &case.windings {
        for z in [w.centre - 0.5 * w.length, w.centre + 0.5 * w.length] {
            free = free
                .into_iter()
                .flat_map(|(a, b)| {
                    if z + end <= a || z - end >= b {
                        vec![(a, b)]
                    } else {
                        vec![(a, z - end), (z + end, b)]
                    }
                })
                .collect();
        }
    }
    let widest = case
        .windings
        .iter()
        .map(|w| w.outer_radius)
        .fold(r, f64::max);
    let mut bands = Vec::new();
    for (z_min, z_max) in free {
        let long = z_max - z_min;
        // A short interval gains little and would make a cramped band.
        if long < 4.0 * end {
            continue;
        }
        // Rows start at the element size across the local radius (all of it for a rod).
        let local = match surface {
            Some(_) => {
                let u = ((z_min - c).abs().max((z_max - c).abs()) / hl).min(1.0);
                r * (1.0 - u * u).sqrt()
            }
            None => r,
        };
        let r_max = (WIDTH_FRACTION * long).max(1.5 * widest);
        // Windings crossing the band's outer edge or lying beyond it are left to the Delaunay
        // part; only their sides inside become columns.
        let columns = columns(case, r, r_max, core_size, spec.grading, f);
        bands.push(Band {
            z_min,
            z_max,
            r_max,
            columns,
            end_size: 0.5 * core_size * (local / r),
            growth: spec.grading,
            max_size: r_max / f,
            surface,
        });
    }
    bands
}

/// Column radii: the core's in steps of its element size, then outwards from its surface with the
/// spec's grading, every winding side inside the band on a column, winding sections no coarser
/// than their element size.
fn columns(case: &Case, r: f64, r_max: f64, core_size: f64, grading: f64, f: f64) -> Vec<f64> {
    let inner = (r / core_size).ceil().max(1.0) as usize;
    let mut cols: Vec<f64> = (1..inner).map(|k| r * k as f64 / inner as f64).collect();
    // Exactly the radius: a surface band finds its outline's column by equality.
    cols.push(r);
    let mut required: Vec<f64> = case
        .windings
        .iter()
        .flat_map(|w| [w.inner_radius, w.outer_radius])
        .filter(|&x| x > r && x < r_max)
        .collect();
    required.sort_by(f64::total_cmp);
    let winding_cap = |x: f64| {
        case.windings
            .iter()
            .filter(|w| x >= w.inner_radius && x < w.outer_radius)
            .map(|w| {
                case.mesh
                    .winding_size
                    .unwrap_or((w.outer_radius - w.inner_radius).min(w.length) / (3.0 * f))
            })
            .fold(f64::INFINITY, f64::min)
    };
    let mut at = r;
    let mut step = 0.5 * core_size;
    loop {
        let h = step.min(winding_cap(at));
        let mut next = at + h;
        let snap = required
            .iter()
            .find(|&&x| x > at * (1.0 + 1e-12) && x <= next + 0.5 * h);
        if let Some(&req) = snap {
            next = req;
        } else if next >= r_max - 0.5 * h {
            break;
        }
        cols.push(next);
        at = next;
        step *= 1.0 + grading;
    }
    cols
}
