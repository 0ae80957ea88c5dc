//! The results of a run: a serialisable record, a human-readable summary and CSV.

use std::fmt::Write as _;

use axicore_solver::PointField;
use serde::Serialize;

/// Every number a run reports (SI units, named in the keys).
#[allow(non_snake_case)]
#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct Report {
    /// Case title.
    pub title: String,
    /// Total axial dipole moment (currents + magnetisation), A·m².
    pub dipole_moment_Am2: f64,
    /// Moment of the core's magnetisation, A·m².
    pub core_dipole_moment_Am2: f64,
    /// Moment of the winding currents, A·m² (equals their moment in air).
    pub winding_dipole_moment_Am2: f64,
    /// The same moment from the ball identity on the field, A·m².
    pub dipole_check_Am2: f64,
    /// |check − moment| / |moment|.
    pub dipole_estimator_difference: f64,
    /// Moment of the windings with the core ÷ the same windings in air (no background field).
    pub apparent_gain: Option<f64>,
    /// B_z at r = 0, z = 0, T.
    pub b_origin_T: f64,
    /// Incremental (small-signal) self-inductance dΨ/dI of the first winding at the operating
    /// point, H (the inductance, for linear cores).
    pub inductance_H: Option<f64>,
    /// Apparent inductance Ψ/I of the first winding with every source on, H.
    pub apparent_inductance_H: Option<f64>,
    /// Whether the field solve converged (always true in a report: failures are errors).
    pub converged: bool,
    /// Newton iterations (0 for a linear solve).
    pub newton_iterations: usize,
    /// Newton iterations of the first-order solve a second-order one started from (0 if none).
    pub newton_start_iterations: usize,
    /// Local Newton iterations on the knee elements between global ones (first-order start
    /// included; 0 when no element sits on a knee).
    pub newton_local_iterations: usize,
    /// Relative residual before each Newton iteration and at the end (saturating cores only).
    pub residual_history: Option<Vec<f64>>,
    /// Incremental inductance matrix, H (row i, column k: dΨ_i/dI_k).
    pub inductance_matrix_H: Option<Vec<Vec<f64>>>,
    /// Stored field energy, J.
    pub energy_J: f64,
    /// Peak element-mean |B| in the core away from its sharp corners, T.
    pub max_core_b_T: Option<f64>,
    /// Uniform background B_z, T.
    pub background_b_T: f64,
    /// Radius of the meshed surroundings (`surroundings.radius`, given or automatic), m.
    pub surroundings_radius_m: f64,
    /// Radius of the ball used by the check estimator, m.
    pub ball_radius_m: f64,
    /// Mesh nodes.
    pub nodes: usize,
    /// Mesh triangles.
    pub triangles: usize,
    /// Free unknowns of the linear system.
    pub unknowns: usize,
    /// Mesh statistics.
    pub mesh: MeshReport,
    /// Core figures.
    pub core: Option<CoreReport>,
    /// Per-winding figures.
    pub windings: Vec<WindingReport>,
    /// Requested point probes.
    pub points: Vec<PointReport>,
    /// Wall-clock stage times, s (not part of the JSON unless asked; they vary run to run).
    #[serde(skip)]
    pub timings_s: Timings,
}

/// Mesh statistics.
#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct MeshReport {
    /// Triangles in air.
    pub triangles_air: usize,
    /// Triangles in the core.
    pub triangles_core: usize,
    /// Triangles in each winding.
    pub triangles_windings: Vec<usize>,
    /// Smallest triangle angle reached, degrees.
    pub smallest_angle_deg: f64,
    /// Largest aspect ratio (1 = equilateral).
    pub max_aspect_ratio: f64,
}

/// Core figures.
#[allow(non_snake_case)]
#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct CoreReport {
    /// Shape description.
    pub shape: String,
    /// Material name.
    pub material: String,
    /// Relative permeability at zero field.
    pub initial_mu_r: f64,
    /// Saturation flux density of the law (limit of B − μ0 H), T; None if linear.
    pub saturation_b_T: Option<f64>,
    /// Meshed volume, m³.
    pub volume_m3: f64,
    /// Exact volume of the shape, m³.
    pub exact_volume_m3: f64,
    /// |B| at the core centre (on the axis, or mid-wall for a tube), T.
    pub b_centre_T: f64,
    /// Where that was evaluated (r, z), m.
    pub b_centre_at_m: [f64; 2],
    /// Peak element-mean |B| outside the corner zones, T.
    pub max_b_T: Option<f64>,
    /// Centroid of the peak element (r, z), m.
    pub max_b_at_m: Option<[f64; 2]>,
    /// Radius of the excluded zone around each sharp corner, m.
    pub max_b_corner_exclusion_m: f64,
    /// Peak |B| over the saturation flux density.
    pub max_b_over_saturation: Option<f64>,
    /// Volume fraction of the core with |B| above 90 % of the saturation flux density.
    pub saturated_fraction: Option<f64>,
    /// Where the peak lies, in words: the core saturates first there.
    pub peak_location: Option<String>,
}

/// Per-winding figures.
#[allow(non_snake_case)]
#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct WindingReport {
    /// Name.
    pub name: String,
    /// Turns.
    pub turns: f64,
    /// Current, A.
    pub current_A: f64,
    /// Moment of this winding alone in air, A·m².
    pub air_moment_Am2: f64,
    /// Flux linkage in the full solve (all windings and background), Wb.
    pub flux_linkage_Wb: f64,
    /// Incremental self-inductance dΨ/dI at the operating point, H.
    pub self_inductance_H: Option<f64>,
    /// Apparent inductance Ψ/I, H (None at zero current).
    pub apparent_inductance_H: Option<f64>,
}

/// Field at a requested point.
#[allow(non_snake_case)]
#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct PointReport {
    /// Radius, m.
    pub r_m: f64,
    /// Axial position, m.
    pub z_m: f64,
    /// B_r, T.
    pub b_r_T: f64,
    /// B_z, T.
    pub b_z_T: f64,
    /// H_r, A/m.
    pub h_r_A_per_m: f64,
    /// H_z, A/m.
    pub h_z_A_per_m: f64,
    /// Relative permeability there.
    pub mu_r: f64,
    /// Region tag there.
    pub region: u32,
    /// In air within two element sizes of the axis with a core present, where first-order
    /// values are unreliable (README, "Point values").
    pub low_accuracy_near_axis: bool,
}

impl From<PointField> for PointReport {
    fn from(p: PointField) -> Self {
        Self {
            r_m: p.at[0],
            z_m: p.at[1],
            b_r_T: p.b[0],
            b_z_T: p.b[1],
            h_r_A_per_m: p.h[0],
            h_z_A_per_m: p.h[1],
            mu_r: p.mu_r,
            region: p.tag,
            low_accuracy_near_axis: false,
        }
    }
}

/// Wall-clock stage times in s.
#[derive(Debug, Clone, Copy, Default, Serialize, PartialEq)]
pub struct Timings {
    /// Meshing.
    pub mesh: f64,
    /// Geometry, pattern, symbolic analysis, assembly and factorisation.
    pub assemble_factor: f64,
    /// Triangular solves.
    pub solve: f64,
    /// Post-processing (and VTK encoding if asked).
    pub post: f64,
}

impl Timings {
    /// Sum of the stages, s.
    pub fn total(&self) -> f64 {
        self.mesh + self.assemble_factor + self.solve + self.post
    }
}

/// CSV of line samples: header with units, one row per sample.
pub fn line_csv(samples: &[PointField]) -> String {
    let mut s = String::from(
        "r_m,z_m,A_phi_Wb_per_m,B_r_T,B_z_T,B_magnitude_T,H_r_A_per_m,H_z_A_per_m,mu_r,region\n",
    );
    for p in samples {
        let _ = writeln!(
            s,
            "{:e},{:e},{:e},{:e},{:e},{:e},{:e},{:e},{:e},{}",
            p.at[0],
            p.at[1],
            p.a,
            p.b[0],
            p.b[1],
            p.b[0].hypot(p.b[1]),
            p.h[0],
            p.h[1],
            p.mu_r,
            p.tag
        );
    }
    s
}

/// Cautions printed with every summary.
pub const CAUTIONS: &str = "\
Cautions: these are model estimates (axisymmetric, single-valued B–H law: no hysteresis,
anisotropy, eddy currents or temperature effects; built-in material curves are typical
values, not data of your lot). Confirm by measurement before relying on them. Check winding
temperature rise and insulation limits separately. Flight hardware is subject to the
applicable standards and to qualified review.";

/// The human-readable summary.
pub fn summary(r: &Report, show_timings: bool) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "{}", r.title);
    let _ = writeln!(s, "{}", "=".repeat(r.title.chars().count().max(8)));
    if let Some(c) = &r.core {
        let _ = writeln!(
            s,
            "core      {} — {} (initial μr = {}{})",
            c.shape,
            c.material,
            (c.initial_mu_r * 1e6).round() / 1e6,
            c.saturation_b_T
                .map_or(String::new(), |b| format!(", saturation {b} T"))
        );
    } else {
        let _ = writeln!(s, "core      none (air-core)");
    }
    for w in &r.windings {
        let _ = writeln!(
            s,
            "winding   {}: {} turns at {} A",
            w.name, w.turns, w.current_A
        );
    }
    if r.background_b_T != 0.0 {
        let _ = writeln!(
            s,
            "field     uniform background B_z = {:.6e} T",
            r.background_b_T
        );
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "Dipole moment");
    let _ = writeln!(
        s,
        "  total                    {:>14.6e} A·m²",
        r.dipole_moment_Am2
    );
    let _ = writeln!(
        s,
        "  from winding currents    {:>14.6e} A·m²",
        r.winding_dipole_moment_Am2
    );
    let _ = writeln!(
        s,
        "  from core magnetisation  {:>14.6e} A·m²",
        r.core_dipole_moment_Am2
    );
    let _ = writeln!(
        s,
        "  field-route check        {:>14.6e} A·m²  (ball of radius {:.4} m; differs by {:.2e})",
        r.dipole_check_Am2, r.ball_radius_m, r.dipole_estimator_difference
    );
    match r.apparent_gain {
        Some(g) => {
            let _ = writeln!(
                s,
                "  apparent core gain       {:>14.6}    (windings with core ÷ windings in air)",
                g
            );
        }
        None => {
            let _ = writeln!(s, "  apparent core gain       n/a (no winding current)");
        }
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "Field");
    let _ = writeln!(s, "  B_z at the origin        {:>14.6e} T", r.b_origin_T);
    if let Some(c) = &r.core {
        let _ = writeln!(
            s,
            "  |B| at the core centre   {:>14.6e} T    at (r, z) = ({:.4}, {:.4}) m",
            c.b_centre_T, c.b_centre_at_m[0], c.b_centre_at_m[1]
        );
        if let (Some(b), Some(at)) = (c.max_b_T, c.max_b_at_m) {
            let _ = writeln!(
                s,
                "  peak |B| in the core     {:>14.6e} T    at (r, z) = ({:.4}, {:.4}) m, corners ±{:.2e} m excluded",
                b, at[0], at[1], c.max_b_corner_exclusion_m
            );
        }
        if let (Some(ratio), Some(frac), Some(place)) = (
            c.max_b_over_saturation,
            c.saturated_fraction,
            c.peak_location.as_ref(),
        ) {
            let _ = writeln!(
                s,
                "  saturation               peak |B| is {:.1} % of B_sat, in {place} (where the core saturates first)\n                           {:.1} % of the core volume above 90 % of B_sat",
                100.0 * ratio,
                100.0 * frac
            );
        }
    }
    let _ = writeln!(s, "  stored energy            {:>14.6e} J", r.energy_J);
    for w in &r.windings {
        let _ = writeln!(
            s,
            "  {}: flux linkage {:.6e} Wb, incremental inductance {}, apparent Ψ/I {}",
            w.name,
            w.flux_linkage_Wb,
            w.self_inductance_H
                .map_or("n/a".to_string(), |l| format!("{l:.6e} H")),
            w.apparent_inductance_H
                .map_or("n/a".to_string(), |l| format!("{l:.6e} H"))
        );
    }
    for p in &r.points {
        let _ = writeln!(
            s,
            "  at (r, z) = ({}, {}) m: B = ({:.6e}, {:.6e}) T, H = ({:.6e}, {:.6e}) A/m, μr = {:.6}{}",
            p.r_m,
            p.z_m,
            p.b_r_T,
            p.b_z_T,
            p.h_r_A_per_m,
            p.h_z_A_per_m,
            p.mu_r,
            if p.low_accuracy_near_axis {
                "  [near the axis beside a core: low accuracy, see README]"
            } else {
                ""
            }
        );
    }
    let _ = writeln!(s);
    if let Some(h) = &r.residual_history {
        let _ = writeln!(
            s,
            "Solver    Newton converged in {} iterations{}{}; relative residuals {}",
            r.newton_iterations,
            if r.newton_start_iterations > 0 {
                format!(
                    " (from a first-order start of {} iterations)",
                    r.newton_start_iterations
                )
            } else {
                String::new()
            },
            if r.newton_local_iterations > 0 {
                format!(
                    ", {} local ones on the knee elements",
                    r.newton_local_iterations
                )
            } else {
                String::new()
            },
            h.iter()
                .map(|v| format!("{v:.1e}"))
                .collect::<Vec<_>>()
                .join(" → ")
        );
    }
    let _ = writeln!(
        s,
        "Mesh      {} nodes, {} triangles (core {}, windings {}, air {}), {} unknowns",
        r.nodes,
        r.triangles,
        r.mesh.triangles_core,
        r.mesh.triangles_windings.iter().sum::<usize>(),
        r.mesh.triangles_air,
        r.unknowns
    );
    let _ = writeln!(
        s,
        "          smallest angle {:.1}°, worst aspect ratio {:.2}, surroundings radius {:.4} m",
        r.mesh.smallest_angle_deg, r.mesh.max_aspect_ratio, r.surroundings_radius_m
    );
    if show_timings {
        let t = &r.timings_s;
        let _ = writeln!(
            s,
            "Time      mesh {:.3} s, assemble+factor {:.3} s, solve {:.3} s, post {:.3} s, total {:.3} s",
            t.mesh, t.assemble_factor, t.solve, t.post, t.total()
        );
    }
    let _ = writeln!(s);
    s.push_str(CAUTIONS);
    s.push('\n');
    s
}
