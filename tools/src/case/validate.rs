//! Geometric sanity of a parsed case: sizes, overlaps, and fit inside the meshed surroundings.

use super::{Case, CaseError, CoreShape, Edge, Winding};

/// With a fixed edge the automatic surroundings radius is this multiple of the farthest source
/// point. The cut-off bias of the dipole scales like (source radius / surroundings radius)³
/// (see the README), ~1e-4 here.
pub const AUTO_FIXED_RADIUS_FACTOR: f64 = 20.0;
/// With the exact edge the automatic surroundings radius is this multiple: only the ball of
/// the field-route check (1.5×) and room to grade the mesh are needed.
pub const AUTO_EXACT_RADIUS_FACTOR: f64 = 3.0;
/// The ball used for the field-route dipole check has this multiple of the source radius.
pub const BALL_FACTOR: f64 = 1.5;
/// The surroundings radius must be at least this multiple of the source radius.
pub const MIN_SURROUNDINGS_FACTOR: f64 = 2.0;

impl Case {
    /// Distance from the origin of the farthest point of any core or winding, in m.
    pub fn source_radius(&self) -> f64 {
        let rect = |r: f64, z0: f64, z1: f64| r.hypot(z0.abs().max(z1.abs()));
        let mut s: f64 = 0.0;
        if let Some(core) = &self.core {
            let (rad, hl, c) = (core.shape.radius(), core.shape.half_length(), core.centre);
            s = s.max(match core.shape {
                CoreShape::Rod { .. } | CoreShape::Tube { .. } => rect(rad, c - hl, c + hl),
                // The ellipse lies inside its bounding box; the box corner is a safe bound.
                CoreShape::Sphere { .. } | CoreShape::Spheroid { .. } => c.abs() + rad.max(hl),
            });
        }
        for w in &self.windings {
            s = s.max(rect(
                w.outer_radius,
                w.centre - 0.5 * w.length,
                w.centre + 0.5 * w.length,
            ));
        }
        s
    }

    /// Radius of the meshed surroundings in m (given, or automatic).
    pub fn effective_surroundings_radius(&self) -> f64 {
        let factor = match self.edge {
            Edge::Exact => AUTO_EXACT_RADIUS_FACTOR,
            Edge::Fixed => AUTO_FIXED_RADIUS_FACTOR,
        };
        self.surroundings_radius
            .unwrap_or(factor * self.source_radius())
    }
}

pub(super) fn validate(case: &Case, file: &str) -> Result<(), CaseError> {
    let fault = |key: String, fault: String| CaseError::Key {
        file: file.to_string(),
        key,
        fault,
    };
    if case.core.is_none() && case.windings.is_empty() {
        return Err(fault(
            "winding".into(),
            "the case has neither a core nor a winding: nothing to solve".into(),
        ));
    }
    let magnet = case.core.as_ref().is_some_and(|c| c.polarization() != 0.0);
    if case.windings.is_empty() && case.background_b == 0.0 && !magnet {
        return Err(fault(
            "background.b_axial".into(),
            "no winding, no background field and no core magnetization: nothing drives the field"
                .into(),
        ));
    }
    if let Some(core) = &case.core {
        if let CoreShape::Tube { diameter, bore, .. } = core.shape {
            if bore >= diameter {
                return Err(fault(
                    "core.bore".into(),
                    format!(
                        "bore {} mm must be smaller than the diameter {} mm",
                        bore * 1e3,
                        diameter * 1e3
                    ),
                ));
            }
        }
    }
    for (i, w) in case.windings.iter().enumerate() {
        let key = |k: &str| format!("winding[{}].{k}", i + 1);
        if w.outer_radius <= w.inner_radius {
            return Err(fault(
                key("outer_radius"),
                format!(
                    "{} mm must exceed inner_radius {} mm",
                    w.outer_radius * 1e3,
                    w.inner_radius * 1e3
                ),
            ));
        }
        if let Some(core) = &case.core {
            if winding_overlaps_core(w, &core.shape, core.centre) {
                return Err(fault(
                    key("inner_radius"),
                    format!("winding '{}' overlaps the core", w.name),
                ));
            }
        }
        for (j, other) in case.windings.iter().enumerate().take(i) {
            if rects_overlap(rect_of(w), rect_of(other)) {
                return Err(fault(
                    key("centre"),
                    format!(
                        "winding '{}' overlaps winding '{}' (winding[{}])",
                        w.name,
                        other.name,
                        j + 1
                    ),
                ));
            }
        }
    }
    let src = case.source_radius();
    if let Some(ro) = case.surroundings_radius {
        if ro < MIN_SURROUNDINGS_FACTOR * src {
            return Err(fault(
                "surroundings.radius".into(),
                format!(
                    "{} mm is too small: the core and windings reach {} mm from the origin and the surroundings must reach at least {}× that",
                    ro * 1e3,
                    src * 1e3,
                    MIN_SURROUNDINGS_FACTOR
                ),
            ));
        }
    }
    Ok(())
}

/// [r_min, r_max, z_min, z_max]
type Rect = [f64; 4];

fn rect_of(w: &Winding) -> Rect {
    [
        w.inner_radius,
        w.outer_radius,
        w.centre - 0.5 * w.length,
        w.centre + 0.5 * w.length,
    ]
}

/// Open interiors intersect (touching edges is allowed and common).
fn rects_overlap(a: Rect, b: Rect) -> bool {
    a[0] < b[1] && b[0] < a[1] && a[2] < b[3] && b[2] < a[3]
}

fn winding_overlaps_core(w: &Winding, shape: &CoreShape, centre: f64) -> bool {
    let wr = rect_of(w);
    let (rad, hl) = (shape.radius(), shape.half_length());
    match *shape {
        CoreShape::Rod { .. } => rects_overlap(wr, [0.0, rad, centre - hl, centre + hl]),
        CoreShape::Tube { bore, .. } => {
            rects_overlap(wr, [0.5 * bore, rad, centre - hl, centre + hl])
        }
        CoreShape::Sphere { .. } | CoreShape::Spheroid { .. } => {
            // Nearest point of the rectangle to the ellipse centre in scaled coordinates;
            // a winding merely touching a curved surface is refused too (a leave-a-gap rule
            // that keeps the mesher away from tangent contacts).
            let r = 0.0f64.clamp(wr[0], wr[1]);
            let z = centre.clamp(wr[2], wr[3]);
            (r / rad).powi(2) + ((z - centre) / hl).powi(2) <= 1.0 + 1e-9
        }
    }
}
