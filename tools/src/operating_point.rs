//! One operating point of a case: the field solve (linear or Newton) and the figures a
//! designer reads off it. Shared by `solve` (one point) and `ramp` (a sequence of points).

use axicore_solver::cholesky::SpdFactor;
use axicore_solver::locate::Locator;
use axicore_solver::post::{dipole, flux, peak, saturation};
use axicore_solver::{
    Excitation, LinearOperator, Model, NewtonReport, NewtonSettings, Solution, SolverError,
};

use crate::case::Case;
use crate::geometry::{self, winding_tag, CORE_TAG};

/// Threshold for "saturated": |B| above this fraction of the saturation flux density.
pub const SATURATED_FRACTION_OF_BSAT: f64 = 0.9;

/// Solves the field for per-element currents `currents` and background `b0`, with the model's
/// own magnets (a permanent-magnet core is part of every operating point): one linear solve
/// when every material is linear (with `op`), else Newton from `start` or the linear guess.
pub fn solve_field(
    model: &Model,
    op: Option<&LinearOperator<'_>>,
    currents: &[f64],
    b0: f64,
    start: Option<&Solution>,
    settings: &NewtonSettings,
) -> Result<(Solution, Option<NewtonReport>), SolverError> {
    solve_field_with_tangent(model, op, currents, b0, start, settings).map(|(s, r, _)| (s, r))
}

/// As [`solve_field`], also returning Newton's last factorised tangent (None when linear or
/// when no iteration was needed), to serve the small-signal figures without refactorising.
pub fn solve_field_with_tangent<'m>(
    model: &'m Model,
    op: Option<&LinearOperator<'_>>,
    currents: &[f64],
    b0: f64,
    start: Option<&Solution>,
    settings: &NewtonSettings,
) -> Result<(Solution, Option<NewtonReport>, Option<SpdFactor<'m>>), SolverError> {
    let fixed = model.fixed_values();
    let polarizations = model.problem_polarizations();
    let exc = Excitation {
        currents,
        polarizations: &polarizations,
        a_fixed: &fixed,
        b0,
    };
    match op {
        Some(op) => Ok((op.solve(exc), None, None)),
        None => {
            let (sol, rep, tangent) = model.solve_nonlinear_with_tangent(exc, start, settings)?;
            Ok((sol, Some(rep), tangent))
        }
    }
}

/// Per-element current densities of the case's windings scaled by `scale`.
pub fn currents(model: &Model, case: &Case, scale: f64) -> Vec<f64> {
    let mesh = model.mesh();
    (0..mesh.triangles.len())
        .map(|e| {
            let tag = mesh.tags[e];
            (0..case.windings.len())
                .find(|&k| winding_tag(k) == tag)
                .map_or(0.0, |k| scale * case.windings[k].current_density())
        })
        .collect()
}

/// Current densities of winding `k` alone at 1 A.
fn unit_currents(model: &Model, case: &Case, k: usize) -> Vec<f64> {
    let w = &case.windings[k];
    let j = w.turns / w.section_area();
    model
        .mesh()
        .tags
        .iter()
        .map(|&t| if t == winding_tag(k) { j } else { 0.0 })
        .collect()
}

/// Figures of one operating point.
#[derive(Debug, Clone)]
pub struct Figures {
    /// Total axial moment, A·m².
    pub total: f64,
    /// Moment of the core magnetisation, A·m².
    pub core: f64,
    /// Moment of the winding currents, A·m².
    pub winding: f64,
    /// Moment of the windings with the core ÷ in air (no background, no magnet's own moment).
    pub gain: Option<f64>,
    /// Flux linkage of each winding due to the windings alone (the background's and a
    /// magnet's share removed), Wb; equal to `flux_linkage` without either.
    pub own_flux_linkage: Vec<f64>,
    /// Flux linkage of each winding, Wb.
    pub flux_linkage: Vec<f64>,
    /// Incremental (small-signal) inductance matrix dΨ_i/dI_k at this point, H.
    pub incremental_inductance: Vec<Vec<f64>>,
    /// Corner-excluded peak of the recovered |B| in the core.
    pub peak: Option<peak::Peak>,
    /// Radius of the corner zones excluded from the peak, m.
    pub corner_exclusion: f64,
    /// Saturation flux density of the core material, T.
    pub b_sat: Option<f64>,
    /// Volume fraction of the core with |B| > 0.9 B_sat.
    pub saturated_fraction: Option<f64>,
    /// Small-signal dm/dI of the first winding's current with every winding scaled with it
    /// (their ratios fixed, as in a ramp), A·m²/A; None without a current in the first winding.
    pub incremental_moment_per_a: Option<f64>,
}

/// Computes the figures of a solved point. `scale` is the factor on the case's currents.
#[allow(clippy::too_many_arguments)]
pub fn figures(
    model: &Model,
    op: Option<&LinearOperator<'_>>,
    tangent: Option<&SpdFactor<'_>>,
    case: &Case,
    locator: &Locator,
    sol: &Solution,
    currents: &[f64],
    scale: f64,
) -> Result<Figures, SolverError> {
    let parts = dipole::source_moments(model, sol, currents);
    let winding: f64 = parts.iter().map(|p| p.current).sum();
    let core: f64 = parts.iter().map(|p| p.magnetization).sum();
    let total = winding + core;

    // The linear response to 1 A in each winding: the inductances, and for a linear model the
    // moment of the windings alone by superposition.
    let own;
    let tangent = match (op, tangent) {
        (Some(_), _) => None,
        (None, Some(t)) => Some(t),
        (None, None) => {
            own = model.tangent_at(sol, &model.fixed_values())?;
            Some(&own)
        }
    };
    let responses: Vec<(Vec<f64>, Solution)> = (0..case.windings.len())
        .map(|k| {
            let j = unit_currents(model, case, k);
            let s = match (op, &tangent) {
                (Some(op), _) => op.current_response(&j),
                (None, Some(t)) => model.tangent_response(t, &j),
                (None, None) => unreachable!("either a linear operator or a tangent"),
            };
            (j, s)
        })
        .collect();
    let linkage = |s: &Solution, i: usize| {
        let w = &case.windings[i];
        w.turns / w.section_area() * flux::region_integral_of_a(model, s, winding_tag(i))
    };
    let nw = case.windings.len();
    let incremental_inductance = (0..nw)
        .map(|i| (0..nw).map(|k| linkage(&responses[k].1, i)).collect())
        .collect();
    let flux_linkage: Vec<f64> = (0..nw).map(|i| linkage(sol, i)).collect();
    let i_first = case.windings.first().map_or(0.0, |w| w.current);
    let incremental_moment_per_a = (i_first != 0.0).then(|| {
        responses
            .iter()
            .zip(&case.windings)
            .map(|((j, s), w)| w.current / i_first * dipole::incremental_moment(model, sol, s, j))
            .sum()
    });

    // Without a background field or a magnet the windings are the only source, and the
    // solved field is their own; else their share comes from the responses (linear) or a
    // solve of the windings alone (saturating: such a model has no magnet, as a magnet's
    // law is linear).
    let own_field = case.background_b == 0.0 && !model.has_magnets();
    let mut own_alone = None;
    let gain = if winding == 0.0 {
        None
    } else if own_field {
        Some(total / winding)
    } else if let Some(_op) = op {
        let with_core: f64 = responses
            .iter()
            .enumerate()
            .map(|(k, (j, s))| {
                // The moment of a response field: (1/μ0 − ν) B in the core, without the
                // magnet's constant ν J0 that `source_moments` adds for a whole field.
                let m = dipole::incremental_moment(model, sol, s, j);
                m * case.windings[k].current * scale
            })
            .sum();
        Some(with_core / winding)
    } else {
        // Saturating core in a background field: solve the windings alone.
        let (alone, _) = solve_field(model, None, currents, 0.0, None, &case.newton)?;
        let m: f64 = dipole::source_moments(model, &alone, currents)
            .iter()
            .map(|p| p.current + p.magnetization)
            .sum();
        own_alone = Some(alone);
        Some(m / winding)
    };
    let own_flux_linkage = if own_field {
        flux_linkage.clone()
    } else if let Some(alone) = &own_alone {
        (0..nw).map(|i| linkage(alone, i)).collect()
    } else {
        // Linear core: superposition, Ψ_own = Σ_k L_ik I_k.
        (0..nw)
            .map(|i| {
                (0..nw)
                    .map(|k| linkage(&responses[k].1, i) * case.windings[k].current * scale)
                    .sum()
            })
            .collect()
    };

    let CoreSaturation {
        peak,
        corner_exclusion,
        b_sat,
        saturated_fraction,
    } = core_saturation(model, case, locator, sol);
    Ok(Figures {
        total,
        core,
        winding,
        gain,
        own_flux_linkage,
        flux_linkage,
        incremental_inductance,
        peak,
        corner_exclusion,
        b_sat,
        saturated_fraction,
        incremental_moment_per_a,
    })
}

/// How close the core is to saturation at a solved point.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CoreSaturation {
    /// Corner-excluded peak |B| in the core and where (None without a core).
    pub peak: Option<peak::Peak>,
    /// Radius of the zone excluded around each sharp core corner, m.
    pub corner_exclusion: f64,
    /// Saturation flux density of the core's law, T (None if linear).
    pub b_sat: Option<f64>,
    /// Volume fraction of the core with |B| > 0.9 B_sat.
    pub saturated_fraction: Option<f64>,
}

/// The core's peak |B| away from its sharp corners (whose field is singular: a raw maximum
/// there grows without bound under refinement) and its saturated volume fraction.
pub fn core_saturation(
    model: &Model,
    case: &Case,
    locator: &Locator,
    sol: &Solution,
) -> CoreSaturation {
    match &case.core {
        Some(c) => {
            let corners = geometry::core_corners(case);
            let exclusion = 0.1 * geometry::core_thickness(&c.shape);
            let b_sat = c.material.saturation_b();
            CoreSaturation {
                peak: peak::peak_b(model, sol, locator, CORE_TAG, &corners, exclusion),
                corner_exclusion: exclusion,
                b_sat,
                saturated_fraction: b_sat.map(|bs| {
                    saturation::fraction_above(
                        model,
                        sol,
                        CORE_TAG,
                        SATURATED_FRACTION_OF_BSAT * bs,
                    )
                }),
            }
        }
        None => CoreSaturation {
            peak: None,
            corner_exclusion: 0.0,
            b_sat: None,
            saturated_fraction: None,
        },
    }
}

/// Where in the core a point lies, in words: "middle", "towards an end", "end" by the axial
/// distance from the core centre relative to its half-length.
pub fn axial_position_words(case: &Case, at: [f64; 2]) -> &'static str {
    let Some(c) = &case.core else {
        return "outside the core";
    };
    let u = ((at[1] - c.centre) / c.shape.half_length()).abs();
    if u < 0.25 {
        "the middle of the core"
    } else if u < 0.75 {
        "between the middle and an end of the core"
    } else {
        "near an end of the core"
    }
}
