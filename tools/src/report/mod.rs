//! The results of a run: a serialisable record, a human-readable summary and CSV.

mod cautions;
mod csv;
pub mod demag;
pub mod format;
mod history;
mod json;
mod ramp;
mod summary;

pub use cautions::{case_cautions, CURRENT_DENSITY_CAUTION_A_PER_MM2, LINEAR_CORE_CAUTION_T};
pub use csv::{line_csv, ramp_csv};
pub use history::history_text;
pub use json::{add_cautions, to_json};
pub use ramp::ramp_summary;
pub use summary::{summary, CAUTIONS};

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
    /// Moment gain: moment of the windings with the core ÷ the same windings in air (no
    /// background field); None without a core or without winding current.
    pub moment_gain: Option<f64>,
    /// B_z at r = 0, z = 0, T.
    pub b_origin_T: f64,
    /// Incremental (small-signal) self-inductance dΨ/dI of the first winding at the operating
    /// point, H (the inductance, for linear cores).
    pub inductance_H: Option<f64>,
    /// Secant inductance Ψ/I of the first winding, H; None with a background field (its flux
    /// is not the winding's doing) or without current.
    pub secant_inductance_H: Option<f64>,
    /// B_z at the core centre ÷ the background B0 (a search coil's flux concentration); None
    /// without a background field or a core.
    pub flux_concentration: Option<f64>,
    /// Cautions particular to this case (current density, a linear core driven past what a
    /// real material carries).
    pub case_cautions: Vec<String>,
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
    /// Stored field energy ∫ (∫ H·dB) dV from each law's zero-field state (B = J0 in a magnet;
    /// `axicore_solver::post::energy`), J.
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
    /// Prescribed uniform axial magnetization M0 of a permanent-magnet core, A/m (None for a
    /// soft core).
    pub prescribed_magnetization_A_per_m: Option<f64>,
    /// Recoil relative permeability of a permanent-magnet core (None for a soft core).
    pub recoil_mu_r: Option<f64>,
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
    /// Length over outer diameter.
    pub length_over_diameter: f64,
    /// ⟨B_z⟩ over the core volume, T.
    pub average_b_z_T: f64,
    /// ⟨H_z⟩ over the core volume (B/μ0 − M), A/m.
    pub average_h_z_A_per_m: f64,
    /// Flux through the core's mid-plane cross-section (disc, or annulus for a tube), Wb.
    pub mid_plane_flux_Wb: f64,
    /// Area of that cross-section, m².
    pub mid_plane_area_m2: f64,
    /// Magnetometric and fluxmetric demagnetizing factors of the core with the formulas'
    /// values (linear cores and a magnet alone; None for saturating cores).
    pub demagnetizing_factors: Option<crate::demag::case::CaseFactors>,
    /// ⟨H_z⟩ of the applied field (core replaced by vacuum) over the core volume, A/m.
    pub applied_h_average_A_per_m: f64,
    /// Apparent permeability ⟨B_z⟩/(μ0 ⟨H_app,z⟩) from the field solution; None without an
    /// applied field or for a permanent-magnet core (its ⟨B_z⟩ is mostly its own).
    pub apparent_permeability: Option<f64>,
    /// Demagnetizing factor of the ellipsoid of the same length/diameter (Osborn 1945).
    pub ellipsoid_demagnetizing_factor: f64,
    /// Textbook estimate μi/(1 + N(μi − 1)) with that factor and the initial μr.
    pub ellipsoid_apparent_permeability: f64,
    /// The N that reproduces the solved apparent permeability (linear cores).
    pub effective_demagnetizing_factor: Option<f64>,
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
    /// Current density over the winding section N·I/area, A/mm² (the copper's is higher
    /// by 1/packing factor).
    pub current_density_A_per_mm2: f64,
    /// Flux linkage in the full solve (all windings and background), Wb.
    pub flux_linkage_Wb: f64,
    /// The windings' own share of it (background removed), Wb.
    pub own_flux_linkage_Wb: f64,
    /// The background field's share, Wb (None without a background).
    pub background_flux_linkage_Wb: Option<f64>,
    /// Incremental self-inductance dΨ/dI at the operating point, H.
    pub incremental_inductance_H: Option<f64>,
    /// Secant inductance Ψ_own/I, H (None at zero current).
    pub secant_inductance_H: Option<f64>,
    /// Open-circuit sensitivity to the background field, 2π·Ψ_background/B0, V/(T·Hz): the
    /// EMF amplitude per tesla and hertz of a slow axial field (no eddy currents, below the
    /// winding's resonance); None without a background.
    pub sensitivity_V_per_T_Hz: Option<f64>,
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
