//! Number checks done before any geometry is built, so later stages can trust finite, positive values.

use crate::error::MeshError;
use crate::shape::chord_count;
use crate::spec::{MeshSpec, Refinement, Shape};

/// Largest quality target accepted: above 30° Delaunay refinement may not terminate (spade 2.15
/// documentation of `AngleLimit::from_deg` and `RefinementParameters::with_angle_limit`).
pub const MAX_ANGLE_FLOOR_DEG: f64 = 30.0;

/// Outer-arc relative sagitta: the outer boundary is an artificial truncation of open space, so a
/// coarser polygon than for the regions does no harm.
pub const OUTER_ARC_TOLERANCE: f64 = 1e-3;

/// Most layers of a [`Refinement::Graded`] point: with factor 0.15–0.2 (common practice for hp
/// elements) 16 layers span 11–13 decades of size, more than any accuracy in double precision
/// needs.
pub const MAX_GRADED_LAYERS: u32 = 16;

/// Smallest innermost size of a graded point (`size · factor^layers`) relative to the outer
/// radius: the edge vectors of the innermost elements then keep about four significant digits
/// (f64 ε · 1e12 ≈ 2e-4) wherever the point lies in the domain. The mesher itself was measured
/// to place clean layers down to 3e-15 m around a corner 35 mm off the origin.
pub const MIN_GRADED_RELATIVE_SIZE: f64 = 1e-12;

fn positive(what: &'static str, value: f64) -> Result<(), MeshError> {
    if value.is_finite() && value > 0.0 {
        Ok(())
    } else {
        Err(MeshError::BadSize { what, value })
    }
}

fn finite(what: &'static str, value: f64) -> Result<(), MeshError> {
    if value.is_finite() {
        Ok(())
    } else {
        Err(MeshError::BadSize { what, value })
    }
}

/// Checks every number of the spec; geometry (overlaps, crossings) is checked later on the polygons.
pub(crate) fn check_numbers(spec: &MeshSpec) -> Result<(), MeshError> {
    positive("outer_radius", spec.outer_radius)?;
    positive("far_size", spec.far_size)?;
    finite("grading", spec.grading)?;
    if spec.grading < 0.0 {
        return Err(MeshError::BadSize {
            what: "grading",
            value: spec.grading,
        });
    }
    let angle = spec.angle_floor_deg;
    if !(angle.is_finite() && (0.0..=MAX_ANGLE_FLOOR_DEG).contains(&angle)) {
        return Err(MeshError::BadSize {
            what: "angle_floor_deg",
            value: angle,
        });
    }
    let tol = spec.arc_tolerance;
    if !(tol.is_finite() && tol > 0.0 && tol < 1.0) {
        return Err(MeshError::BadSize {
            what: "arc_tolerance",
            value: tol,
        });
    }
    // Every curved outline costs `chord_count` vertices: refuse before allocating them.
    let curves = 1
        + spec.interior_arcs.len()
        + spec
            .regions
            .iter()
            .filter(|r| matches!(r.shape, Shape::HalfEllipse { .. }))
            .count();
    let estimate = chord_count(tol) * curves as f64 + 4.0 * spec.regions.len() as f64;
    if estimate > spec.max_nodes as f64 {
        return Err(MeshError::TooManyNodes {
            limit: spec.max_nodes,
            reached: estimate.min(usize::MAX as f64) as usize,
        });
    }

    for (i, region) in spec.regions.iter().enumerate() {
        positive("region size", region.size)?;
        check_shape(i, &region.shape)?;
    }
    // The outer polygon keeps at least R (1 − outer tolerance) from the centre; an arc (whose vertices
    // lie on its circle) inside that radius cannot reach it.
    let outer_inner_radius = spec.outer_radius * (1.0 - tol.max(OUTER_ARC_TOLERANCE));
    for &rho in &spec.interior_arcs {
        positive("interior arc radius", rho)?;
        if rho >= outer_inner_radius {
            return Err(MeshError::BadSize {
                what: "interior arc radius (must be inside the outer polygon)",
                value: rho,
            });
        }
    }
    check_bands(spec)?;
    for (k, refinement) in spec.refinements.iter().enumerate() {
        match *refinement {
            Refinement::Point { at, size } => {
                finite("refinement point r", at[0])?;
                finite("refinement point z", at[1])?;
                positive("refinement size", size)?;
            }
            Refinement::Graded {
                at,
                size,
                factor,
                layers,
            } => {
                finite("graded point r", at[0])?;
                finite("graded point z", at[1])?;
                positive("graded size", size)?;
                if !(factor > 0.0 && factor < 1.0) {
                    return Err(MeshError::BadSize {
                        what: "graded factor (must be between 0 and 1)",
                        value: factor,
                    });
                }
                if layers > MAX_GRADED_LAYERS {
                    return Err(MeshError::BadSize {
                        what: "graded layers (too many)",
                        value: layers as f64,
                    });
                }
                let inner = size * factor.powi(layers as i32);
                // Finite and ≥ 0 here (size and factor are checked); an underflow to 0 is refused too.
                if inner < MIN_GRADED_RELATIVE_SIZE * spec.outer_radius {
                    return Err(MeshError::BadSize {
                        what:
                            "graded innermost size (size · factor^layers, too small for the domain)",
                        value: inner,
                    });
                }
            }
            Refinement::Cloud { ref points } => {
                for &(at, size) in points {
                    finite("refinement point r", at[0])?;
                    finite("refinement point z", at[1])?;
                    positive("refinement size", size)?;
                }
            }
            Refinement::Boundary { region, size } => {
                positive("refinement size", size)?;
                if region >= spec.regions.len() {
                    return Err(MeshError::NoSuchRegion {
                        refinement: k,
                        region,
                        regions: spec.regions.len(),
                    });
                }
            }
        }
    }
    Ok(())
}

/// Bands: finite, positive sizes, increasing columns inside, inside the domain, apart from each
/// other, and a grid that fits under the node cap.
fn check_bands(spec: &MeshSpec) -> Result<(), MeshError> {
    let mut ranges: Vec<(f64, f64)> = Vec::new();
    for band in &spec.bands {
        finite("band z_min", band.z_min)?;
        finite("band z_max", band.z_max)?;
        positive("band length", band.z_max - band.z_min)?;
        positive("band r_max", band.r_max)?;
        positive("band end_size", band.end_size)?;
        positive("band max_size", band.max_size)?;
        finite("band growth", band.growth)?;
        if band.growth < 0.0 {
            return Err(MeshError::BadSize {
                what: "band growth",
                value: band.growth,
            });
        }
        let mut last = 0.0;
        for &c in &band.columns {
            if !(c.is_finite() && c > last && c < band.r_max) {
                return Err(MeshError::BadSize {
                    what: "band column (increasing, between 0 and r_max)",
                    value: c,
                });
            }
            last = c;
        }
        let far = band.r_max.hypot(band.z_min.abs().max(band.z_max.abs()));
        if far >= spec.outer_radius * (1.0 - OUTER_ARC_TOLERANCE) {
            return Err(MeshError::BadSize {
                what: "band extent (must be inside the outer polygon)",
                value: far,
            });
        }
        match band.surface {
            None => {}
            Some(Shape::HalfEllipse {
                z_centre,
                radial,
                axial,
            }) => {
                let on_column = band
                    .columns
                    .iter()
                    .any(|&c| (c - radial).abs() <= 1e-9 * radial);
                if !on_column || band.z_min <= z_centre - axial || band.z_max >= z_centre + axial {
                    return Err(MeshError::BadSize {
                        what:
                            "band surface (its radius must be a column, its ends beyond the band's)",
                        value: radial,
                    });
                }
            }
            Some(Shape::Rect { r_max, .. }) => {
                return Err(MeshError::BadSize {
                    what: "band surface (only half-ellipses)",
                    value: r_max,
                })
            }
        }
        let per_row = band.columns.len() + 2;
        let rows = band.row_count(spec.max_nodes / per_row);
        if rows.saturating_mul(per_row) > spec.max_nodes {
            return Err(MeshError::TooManyNodes {
                limit: spec.max_nodes,
                reached: rows.saturating_mul(per_row),
            });
        }
        if ranges
            .iter()
            .any(|&(lo, hi)| band.z_min < hi && lo < band.z_max)
        {
            return Err(MeshError::BadSize {
                what: "band z_min (bands must not overlap along z)",
                value: band.z_min,
            });
        }
        ranges.push((band.z_min, band.z_max));
    }
    Ok(())
}

fn check_shape(region: usize, shape: &Shape) -> Result<(), MeshError> {
    let bad = |reason| Err(MeshError::BadShape { region, reason });
    match *shape {
        Shape::Rect {
            r_min,
            r_max,
            z_min,
            z_max,
        } => {
            if ![r_min, r_max, z_min, z_max].iter().all(|v| v.is_finite()) {
                return bad("non-finite bound");
            }
            if r_min < 0.0 {
                return bad("r_min < 0");
            }
            if r_max <= r_min {
                return bad("r_max <= r_min");
            }
            if z_max <= z_min {
                return bad("z_max <= z_min");
            }
        }
        Shape::HalfEllipse {
            z_centre,
            radial,
            axial,
        } => {
            if ![z_centre, radial, axial].iter().all(|v| v.is_finite()) {
                return bad("non-finite parameter");
            }
            if radial <= 0.0 || axial <= 0.0 {
                return bad("semi-axis <= 0");
            }
        }
    }
    Ok(())
}
