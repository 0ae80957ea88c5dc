//! One case, end to end: mesh, solve, post-process. A pure function of the case and options,
//! so sweeps can run each solve anywhere and get bitwise the same numbers.

use std::time::Instant;

use axicore_mesher::{build_mesh, MeshError, NodeKind};
use axicore_solver::exterior::ExactExterior;
use axicore_solver::locate::Locator;
use axicore_solver::post::indicator::{self, ElementIndicator};
use axicore_solver::post::{dipole, energy, flux, probe};
use axicore_solver::quadratic;
use axicore_solver::{FeMesh, Model, Problem, RegionProps, Solution, SolverError};

use crate::case::{Case, Edge};
use crate::geometry::{self, winding_tag, AIR_TAG, CORE_TAG};
use crate::operating_point;
use crate::report::{CoreReport, MeshReport, PointReport, Report, Timings, WindingReport};

/// What to compute beyond the standard report.
#[derive(Debug, Clone, Default)]
pub struct RunOptions {
    /// Points (r, z) in m where B and H are reported.
    pub points: Vec<[f64; 2]>,
    /// A line (from, to, samples) to sample into CSV.
    pub line: Option<([f64; 2], [f64; 2], usize)>,
    /// Produce the VTK file contents.
    pub vtk: bool,
    /// Compute per-element error indicators (for adaptive refinement).
    pub indicators: bool,
    /// Extra refinement points (location, size in m), e.g. from a previous level's indicators.
    pub refine_at: Vec<([f64; 2], f64)>,
    /// Keep the solved field in the outcome (to start a finer level from).
    pub keep_field: bool,
    /// Produce a field-map picture (PNG or SVG bytes) with these options.
    pub picture: Option<crate::plot::field_map::FieldMapOptions>,
}

/// Everything a run produces.
#[derive(Debug)]
pub struct Outcome {
    /// Numbers for the summary and JSON.
    pub report: Report,
    /// CSV text of the line samples, if asked.
    pub line_csv: Option<String>,
    /// VTK (.vtu) bytes, if asked.
    pub vtk: Option<Vec<u8>>,
    /// Field-map picture bytes (PNG or SVG), if asked.
    pub picture: Option<Vec<u8>>,
    /// Per-element error indicators, if asked.
    pub indicators: Option<Vec<ElementIndicator>>,
    /// The solved field with its model, if asked (`RunOptions::keep_field`), to start the next
    /// refinement level from.
    pub field: Option<FieldSnapshot>,
}

/// A solved field kept for evaluation on another mesh.
#[derive(Debug)]
pub struct FieldSnapshot {
    model: Model,
    sol: Solution,
    locator: Locator,
}

impl FieldSnapshot {
    /// The field-map picture of this field (PNG or SVG bytes).
    pub fn picture(
        &self,
        case: &Case,
        opts: &crate::plot::field_map::FieldMapOptions,
    ) -> Result<Vec<u8>, RunError> {
        Ok(crate::plot::field_map_case::render_case(
            &self.model,
            &self.sol,
            case,
            opts,
        )?)
    }

    /// The reaction potential (total A_φ minus the background's B0 r/2) at `p`, Wb/m; None
    /// outside the mesh.
    pub fn reaction_a_at(&self, p: [f64; 2]) -> Option<f64> {
        self.sol
            .b_at_point(&self.model, &self.locator, p)
            .ok()
            .map(|(_, a, _)| a - 0.5 * self.sol.b0 * p[0])
    }
}

/// Why a run failed after the case was accepted.
#[derive(Debug, thiserror::Error)]
pub enum RunError {
    /// Meshing failed.
    #[error("meshing failed: {0}")]
    Mesh(#[from] MeshError),
    /// The field solve or post-processing failed.
    #[error("solve failed: {0}")]
    Solve(#[from] SolverError),
    /// The field-map picture could not be drawn.
    #[error("--picture: {0}")]
    Picture(#[from] crate::plot::field_map::FieldMapError),
    /// A probe point or line lies outside the meshed region.
    #[error("{option}: {source} (meshed surroundings radius {surroundings_radius_m:.4} m)")]
    Probe {
        /// The command-line option that asked for the point (`--point`, `--line`).
        option: &'static str,
        /// What went wrong.
        source: SolverError,
        /// Radius of the meshed surroundings, m.
        surroundings_radius_m: f64,
    },
}

/// The built mesh converted for the solver, with its Dirichlet data.
pub struct Discretised {
    /// Mesher output (kept for statistics).
    pub mesh: axicore_mesher::Mesh,
    /// The problem handed to the solver.
    pub problem: Problem,
}

/// Meshes the case and poses the field problem (no solve).
pub fn discretise(case: &Case) -> Result<Discretised, RunError> {
    discretise_refined(case, &[])
}

/// As [`discretise`], with extra refinement points (location, size in m).
pub fn discretise_refined(
    case: &Case,
    refine_at: &[([f64; 2], f64)],
) -> Result<Discretised, RunError> {
    let mut spec = geometry::mesh_spec(case);
    if !refine_at.is_empty() {
        spec.refinements.push(axicore_mesher::Refinement::Cloud {
            points: refine_at.to_vec(),
        });
    }
    pose(case, mesh_of(case, &spec)?)
}

/// The mesh of `spec` (the mesh of `case` or a variant of it), within the case's node cap.
pub fn mesh_of(
    case: &Case,
    spec: &axicore_mesher::MeshSpec,
) -> Result<axicore_mesher::Mesh, RunError> {
    let limit = case.mesh.max_nodes;
    Ok(build_mesh(spec).map_err(|e| match e {
        MeshError::TooManyNodes { reached, .. } => MeshError::TooManyNodes { limit, reached },
        other => other,
    })?)
}

/// Poses the field problem of `case` on its `mesh` (regions, second order where the case asks,
/// Dirichlet data, the exact exterior).
pub fn pose(case: &Case, mesh: axicore_mesher::Mesh) -> Result<Discretised, RunError> {
    let limit = case.mesh.max_nodes;
    let mut regions = vec![RegionProps::air(); 2 + case.windings.len()];
    if let Some(core) = &case.core {
        regions[CORE_TAG as usize].material = core.material.clone();
        regions[CORE_TAG as usize].polarization = core.polarization();
    }
    for (k, w) in case.windings.iter().enumerate() {
        regions[winding_tag(k) as usize].current_density = w.current_density();
    }
    let ro = case.effective_surroundings_radius();
    let first = FeMesh {
        nodes: mesh.nodes.clone(),
        triangles: mesh.triangles.clone(),
        tags: mesh.tags.clone(),
        mid: Vec::new(),
    };
    let mut kinds = mesh.node_kinds.clone();
    let fe_mesh = if case.mesh.order == 2 {
        let (fe, added) =
            quadratic::elevate(&first, &outlines(case, ro), case.mesh.angle_floor_deg);
        for (k, m) in added.iter().enumerate() {
            let parent = m.parents.map(|p| mesh.node_kinds[p as usize]);
            let kind = if fe.nodes[mesh.nodes.len() + k][0] == 0.0 {
                NodeKind::Axis
            } else if m.on_boundary && parent.iter().all(|k| *k != NodeKind::Interior) {
                NodeKind::Outer
            } else {
                NodeKind::Interior
            };
            kinds.push(kind);
        }
        if fe.nodes.len() > limit {
            return Err(RunError::Mesh(MeshError::TooManyNodes {
                limit,
                reached: fe.nodes.len(),
            }));
        }
        fe
    } else {
        first
    };
    // A = 0 on the axis. On the outer arc either the exact exterior or the
    // reaction part vanishes, so A = B0 r/2 there (the solver adds the background exactly).
    let outer: Vec<u32> = kinds
        .iter()
        .enumerate()
        .filter(|(_, k)| **k == NodeKind::Outer)
        .map(|(i, _)| i as u32)
        .collect();
    let fixed = kinds
        .iter()
        .enumerate()
        .filter_map(|(i, kind)| match kind {
            NodeKind::Axis => Some((i as u32, 0.0)),
            NodeKind::Outer if case.edge == Edge::Fixed => Some((i as u32, 0.0)),
            _ => None,
        })
        .collect();
    let exact_exterior = (case.edge == Edge::Exact).then(|| ExactExterior {
        radius: ro,
        modes: exterior_modes(ro / case.source_radius(), outer.len()),
        nodes: outer,
    });
    let problem = Problem {
        mesh: fe_mesh,
        regions,
        fixed,
        background_b: case.background_b,
        exact_exterior,
    };
    Ok(Discretised { mesh, problem })
}

/// The curved outlines second-order elements follow: a sphere or spheroid core, and the outer
/// sphere of radius `ro` that bounds the surroundings.
pub fn outlines(case: &Case, ro: f64) -> Vec<quadratic::Outline> {
    let mut out = vec![quadratic::Outline::Ellipse {
        centre_z: 0.0,
        semi_r: ro,
        semi_z: ro,
    }];
    if let Some(core) = &case.core {
        if let crate::case::CoreShape::Sphere { .. } | crate::case::CoreShape::Spheroid { .. } =
            core.shape
        {
            out.push(quadratic::Outline::Ellipse {
                centre_z: core.centre,
                semi_r: core.shape.radius(),
                semi_z: core.shape.half_length(),
            });
        }
    }
    out
}

/// Smallest angle (degrees) and largest aspect ratio of the straight triangles through the
/// corners of `mesh` (for second order: after the corners moved onto curved outlines).
pub fn corner_quality(mesh: &FeMesh) -> (f64, f64) {
    let mut min_angle = f64::INFINITY;
    let mut max_aspect: f64 = 0.0;
    for t in 0..mesh.triangles.len() {
        let [a, b, c] = mesh.corners(t);
        for angle in axicore_mesher::triangle_angles(a, b, c) {
            min_angle = min_angle.min(angle);
        }
        max_aspect = max_aspect.max(axicore_mesher::aspect_ratio(a, b, c));
    }
    (min_angle.to_degrees(), max_aspect)
}

/// Whether `p` lies within two element sizes of the axis (size: longest edge of the element
/// holding it).
fn near_axis(model: &Model, locator: &Locator, p: [f64; 2]) -> bool {
    locator
        .find(model.mesh(), p)
        .is_some_and(|(e, _)| p[0] < 2.0 * model.mesh().longest_edge(e))
}

/// Multipole modes for the exact exterior: enough that the first mode left out decays below
/// 1e-12 of the dipole's share, (r_sources/R0)^n < 1e-12, but no more than half the nodes on
/// the arc can resolve.
fn exterior_modes(radius_ratio: f64, arc_nodes: usize) -> usize {
    let wanted = (12.0 / radius_ratio.max(1.01).log10()).ceil() as usize;
    wanted.clamp(4, 80).min((arc_nodes / 2).max(4))
}

/// Runs a case.
pub fn run(case: &Case, opts: &RunOptions) -> Result<Outcome, RunError> {
    run_from(case, opts, None)
}

/// Runs a case; a saturating core's Newton iteration starts from `start` (a solved field on
/// another mesh of the same case, interpolated to this one) instead of the linear first guess.
pub fn run_from(
    case: &Case,
    opts: &RunOptions,
    start: Option<&FieldSnapshot>,
) -> Result<Outcome, RunError> {
    let t0 = Instant::now();
    let Discretised { mesh, problem } = discretise_refined(case, &opts.refine_at)?;
    let mut stats = mesh.stats();
    (stats.min_angle_deg, stats.max_aspect_ratio) = corner_quality(&problem.mesh);
    let t_mesh = t0.elapsed().as_secs_f64();

    let t1 = Instant::now();
    let model = Model::new(problem)?;
    let op = if model.is_linear() {
        Some(model.linear_operator()?)
    } else {
        None
    };
    let t_factor = t1.elapsed().as_secs_f64();

    let t2 = Instant::now();
    let j_full = operating_point::currents(&model, case, 1.0);
    let start = match (start, &op) {
        (Some(prev), None) => Some(Solution {
            a: model
                .mesh()
                .nodes
                .iter()
                .map(|&p| prev.reaction_a_at(p).unwrap_or(0.0))
                .collect(),
            b0: case.background_b,
        }),
        _ => None,
    };
    let (sol, newton, tangent) = operating_point::solve_field_with_tangent(
        &model,
        op.as_ref(),
        &j_full,
        case.background_b,
        start.as_ref(),
        &case.newton,
    )?;
    let t_solve = t2.elapsed().as_secs_f64();

    let t3 = Instant::now();
    let locator = Locator::new(model.mesh());
    let fig = operating_point::figures(
        &model,
        op.as_ref(),
        tangent.as_ref(),
        case,
        &locator,
        &sol,
        &j_full,
        1.0,
    )?;
    let total = fig.total;
    let ro = case.effective_surroundings_radius();
    let rb = geometry::ball_radius(case);
    let shell = (case.edge == Edge::Fixed).then_some(ro);
    let ball = dipole::ball_moment(&model, &sol, &locator, rb, case.background_b, shell)?;
    let difference = if total != 0.0 {
        (ball - total).abs() / total.abs()
    } else {
        (ball - total).abs()
    };
    let nw = case.windings.len();
    let b0 = case.background_b;
    let windings: Vec<WindingReport> = case
        .windings
        .iter()
        .enumerate()
        .map(|(i, w)| {
            let background = fig.flux_linkage[i] - fig.own_flux_linkage[i];
            WindingReport {
                name: w.name.clone(),
                turns: w.turns,
                current_A: w.current,
                air_moment_Am2: w.air_moment(),
                current_density_A_per_mm2: w.current_density() * 1e-6,
                flux_linkage_Wb: fig.flux_linkage[i],
                own_flux_linkage_Wb: fig.own_flux_linkage[i],
                background_flux_linkage_Wb: (b0 != 0.0).then_some(background),
                incremental_inductance_H: Some(fig.incremental_inductance[i][i]),
                secant_inductance_H: (w.current != 0.0)
                    .then(|| fig.own_flux_linkage[i] / w.current),
                sensitivity_V_per_T_Hz: (b0 != 0.0)
                    .then(|| 2.0 * std::f64::consts::PI * background / b0),
            }
        })
        .collect();
    let inductance_matrix = (nw > 0).then(|| fig.incremental_inductance.clone());

    let b_origin = sol.b_recovered(&model, &locator, [0.0, 0.0])?.2[1];
    // The applied field (core replaced by vacuum) for the apparent permeability: one more
    // numeric factorisation on the same pattern when windings drive the core.
    // A background alone applies the uniform B0 exactly; windings need the solve.
    let apparent = match &case.core {
        Some(_) if fig.winding != 0.0 => {
            let applied = model.applied_field(&j_full, b0)?;
            let h = crate::apparent::core_average_bz(&model, &applied) / axicore_solver::MU0;
            crate::apparent::apparent(&model, case, &sol, h)
        }
        Some(_) if b0 != 0.0 => {
            crate::apparent::apparent(&model, case, &sol, b0 / axicore_solver::MU0)
        }
        // Nothing applied (a magnet alone, or no current): ⟨B_z⟩ without a permeability.
        Some(_) => crate::apparent::apparent(&model, case, &sol, 0.0),
        None => None,
    };
    let averages = case
        .core
        .as_ref()
        .map(|c| crate::demag::averages::core_averages(&model, &sol, &locator, c, fig.core))
        .transpose()?;
    let demag_factors =
        crate::demag::case::case_factors(case, &model, op.as_ref(), &locator, averages.as_ref())?;
    let core = case.core.as_ref().map(|c| {
        let centre_r = match c.shape {
            crate::case::CoreShape::Tube { bore, diameter, .. } => 0.25 * (bore + diameter),
            _ => 0.0,
        };
        let centre = sol
            .b_recovered(&model, &locator, [centre_r, c.centre])
            .map(|(_, _, b)| b)
            .unwrap_or([f64::NAN; 2]);
        let n_ell = crate::apparent::ellipsoid_factor(crate::apparent::aspect_ratio(&c.shape));

        let mu_i = c.material.initial_mu_r();
        CoreReport {
            shape: c.shape.to_string(),
            material: c.material_name.clone(),
            initial_mu_r: mu_i,
            saturation_b_T: fig.b_sat,
            prescribed_magnetization_A_per_m: c.magnetization,
            recoil_mu_r: c.magnetization.map(|_| mu_i),
            volume_m3: flux::region_volume(&model, CORE_TAG),
            exact_volume_m3: c.shape.volume(),
            b_centre_T: centre[0].hypot(centre[1]),
            b_centre_at_m: [centre_r, c.centre],
            max_b_T: fig.peak.map(|p| p.b),
            max_b_at_m: fig.peak.map(|p| p.at),
            max_b_corner_exclusion_m: fig.corner_exclusion,
            max_b_over_saturation: fig.b_sat.zip(fig.peak).map(|(bs, p)| p.b / bs),
            saturated_fraction: fig.saturated_fraction,
            peak_location: fig
                .peak
                .map(|p| operating_point::axial_position_words(case, p.at).to_string()),
            length_over_diameter: crate::apparent::aspect_ratio(&c.shape),
            average_b_z_T: averages.as_ref().map_or(f64::NAN, |a| a.b_z),
            average_h_z_A_per_m: averages.as_ref().map_or(f64::NAN, |a| a.h_z()),
            mid_plane_flux_Wb: averages.as_ref().map_or(f64::NAN, |a| a.mid_flux),
            mid_plane_area_m2: averages.as_ref().map_or(f64::NAN, |a| a.mid_area),
            demagnetizing_factors: demag_factors.clone(),
            applied_h_average_A_per_m: apparent.map_or(0.0, |a| a.applied_h_avg),
            apparent_permeability: apparent.and_then(|a| a.mu_app),
            ellipsoid_demagnetizing_factor: n_ell,
            ellipsoid_apparent_permeability: axicore_formulas::apparent_permeability(mu_i, n_ell),
            effective_demagnetizing_factor: apparent.and_then(|a| a.effective_n),
        }
    });
    let flux_concentration = core
        .as_ref()
        .filter(|_| b0 != 0.0)
        .map(|c| c.b_centre_T / b0.abs());
    let case_cautions = crate::report::case_cautions(case, core.as_ref(), &windings);
    let points = opts
        .points
        .iter()
        .map(|&p| {
            let mut report = sol
                .at_point(&model, &locator, p)
                .map(PointReport::from)
                .map_err(|source| RunError::Probe {
                    option: "--point",
                    source,
                    surroundings_radius_m: ro,
                })?;
            report.low_accuracy_near_axis =
                case.core.is_some() && report.region == AIR_TAG && near_axis(&model, &locator, p);
            Ok(report)
        })
        .collect::<Result<Vec<_>, RunError>>()?;
    let line_csv = match opts.line {
        Some((from, to, n)) => {
            let samples =
                probe::sample_line(&model, &sol, &locator, from, to, n).map_err(|source| {
                    RunError::Probe {
                        option: "--line",
                        source,
                        surroundings_radius_m: ro,
                    }
                })?;
            Some(crate::report::line_csv(&samples))
        }
        None => None,
    };
    let vtk = if opts.vtk {
        Some(crate::vtk_map::field_vtu(
            case,
            &model,
            &sol,
            &j_full,
            operating_point::SATURATED_FRACTION_OF_BSAT,
        )?)
    } else {
        None
    };
    let picture = match &opts.picture {
        Some(p) => Some(crate::plot::field_map_case::render_case(
            &model, &sol, case, p,
        )?),
        None => None,
    };
    let w_energy = energy::energy(&model, &sol);
    let indicators = if opts.indicators {
        Some(indicator::goal_indicators(&model, &sol, &locator)?)
    } else {
        None
    };
    let t_post = t3.elapsed().as_secs_f64();

    let per_tag = |tag: u32| {
        stats
            .triangles_per_tag
            .iter()
            .find(|(t, _)| *t == tag)
            .map_or(0, |(_, n)| *n)
    };
    let report = Report {
        title: case.title.clone(),
        dipole_moment_Am2: total,
        core_dipole_moment_Am2: fig.core,
        winding_dipole_moment_Am2: fig.winding,
        dipole_check_Am2: ball,
        dipole_estimator_difference: difference,
        moment_gain: if case.core.is_some() { fig.gain } else { None },
        b_origin_T: b_origin,
        inductance_H: windings.first().and_then(|w| w.incremental_inductance_H),
        secant_inductance_H: windings
            .first()
            .filter(|_| b0 == 0.0)
            .and_then(|w| w.secant_inductance_H),
        flux_concentration,
        case_cautions,
        converged: true,
        newton_iterations: newton.as_ref().map_or(0, |n| n.iterations),
        newton_start_iterations: newton.as_ref().map_or(0, |n| n.start_iterations),
        newton_local_iterations: newton.as_ref().map_or(0, |n| n.local_iterations),
        residual_history: newton.as_ref().map(|n| n.residual_history.clone()),
        inductance_matrix_H: inductance_matrix,
        energy_J: w_energy,
        max_core_b_T: core.as_ref().and_then(|c| c.max_b_T),
        background_b_T: case.background_b,
        surroundings_radius_m: ro,
        ball_radius_m: rb,
        nodes: model.mesh().nodes.len(),
        triangles: stats.triangles,
        unknowns: model.unknowns(),
        mesh: MeshReport {
            triangles_air: per_tag(AIR_TAG),
            triangles_core: per_tag(CORE_TAG),
            triangles_windings: (0..nw).map(|k| per_tag(winding_tag(k))).collect(),
            smallest_angle_deg: stats.min_angle_deg,
            max_aspect_ratio: stats.max_aspect_ratio,
        },
        core,
        windings,
        points,
        timings_s: Timings {
            mesh: t_mesh,
            assemble_factor: t_factor,
            solve: t_solve,
            post: t_post,
        },
    };
    drop(tangent);
    drop(op);
    let field = opts.keep_field.then_some(FieldSnapshot {
        model,
        sol,
        locator,
    });
    Ok(Outcome {
        report,
        line_csv,
        vtk,
        picture,
        indicators,
        field,
    })
}
