//! The moment–current curve: a sequence of operating points at rising current, each Newton
//! solve starting from the previous field (continuation), on one mesh.
//!
//! Every winding's current is scaled by the same factor, so the first winding goes from 0 to
//! the requested current. What the curve says:
//! * the **knee**: the first current at which the incremental moment per ampere dm/dI (from
//!   the tangent operator at each step) has fallen to half of the largest value met on the
//!   ramp so far. It holds for laws whose permeability first rises with field (steels), where
//!   the slope at zero current is not the largest;
//! * the **line knee**: where the moment falls 10 % below the straight line of the
//!   zero-current slope, reported only where that slope is the ramp's largest (a curve that
//!   only bends down), as otherwise the curve runs above that line first;
//! * the **saturation onset**: the current at which the corner-excluded peak |B| in the core
//!   reaches 90 % of B_sat, and where.
//!
//! Each is interpolated linearly between the two steps that bracket it, so it moves with the
//! step count only by that interpolation's error.

use axicore_solver::locate::Locator;
use axicore_solver::post::dipole;
use axicore_solver::Model;
use serde::Serialize;

use crate::case::Case;
use crate::operating_point::{self, axial_position_words, SATURATED_FRACTION_OF_BSAT};
use crate::pipeline::{discretise, RunError};

/// The line-knee criterion: the moment is this fraction of the zero-current straight line.
pub const KNEE_RATIO: f64 = 0.9;

/// The knee criterion: dm/dI is this fraction of the largest dm/dI met on the ramp.
pub const KNEE_SLOPE_RATIO: f64 = 0.5;

/// The zero-current slope counts as the ramp's largest within this relative margin.
const SLOPE_AT_ZERO_IS_LARGEST: f64 = 1e-3;

/// One point of the curve.
#[allow(non_snake_case)]
#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct RampRow {
    /// Current of the first winding, A.
    pub current_A: f64,
    /// Total moment, A·m².
    pub dipole_moment_Am2: f64,
    /// Moment of the core magnetisation, A·m².
    pub core_dipole_moment_Am2: f64,
    /// Moment with the core ÷ the windings' own moment (in air).
    pub moment_gain: Option<f64>,
    /// Small-signal dm/dI at this current, A·m²/A.
    pub incremental_moment_Am2_per_A: f64,
    /// Corner-excluded peak |B| in the core, T.
    pub peak_core_b_T: Option<f64>,
    /// Volume fraction of the core above 90 % of B_sat.
    pub saturated_fraction: Option<f64>,
    /// dΨ/dI of the first winding, H.
    pub incremental_inductance_H: f64,
    /// Ψ/I of the first winding, H (None with a background field, whose flux is not the
    /// winding's doing).
    pub secant_inductance_H: Option<f64>,
    /// Newton iterations of this step (0 when linear).
    pub newton_iterations: usize,
}

/// Where the core first reaches 90 % of B_sat on the ramp.
#[allow(non_snake_case)]
#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct SaturationOnset {
    /// Current of the first winding, A (interpolated between steps).
    pub current_A: f64,
    /// Where, in words.
    pub place: String,
    /// Where, (r, z) in m: the peak of the first step at or past the onset.
    pub at_m: [f64; 2],
}

/// The whole curve and what it says.
#[allow(non_snake_case)]
#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct RampResult {
    /// Case title.
    pub title: String,
    /// Moment at zero current (from a background field), A·m².
    pub zero_current_moment_Am2: f64,
    /// Small-signal moment per ampere at zero current, A·m²/A.
    pub low_current_slope_Am2_per_A: f64,
    /// Largest small-signal moment per ampere on the ramp, A·m²/A, and the current there, A.
    pub max_incremental_moment_Am2_per_A: (f64, f64),
    /// Where dm/dI has fallen to half its largest value so far, A (None: not reached).
    pub knee_current_A: Option<f64>,
    /// Where the moment is 90 % of the zero-current line, A; None where not reached or not
    /// meaningful (the zero-current slope is not the ramp's largest).
    pub line_knee_current_A: Option<f64>,
    /// Whether the zero-current slope is the ramp's largest (the line knee is meaningful).
    pub slope_largest_at_zero: bool,
    /// Where the corner-excluded peak |B| reaches 90 % of B_sat (None: not on this ramp).
    pub saturation_onset: Option<SaturationOnset>,
    /// The points.
    pub rows: Vec<RampRow>,
    /// Mesh nodes.
    pub nodes: usize,
}

/// Solves the curve for `steps` equal current steps from 0 to `to` (A, first winding; a
/// magnitude: the sign of the case's current sets the direction).
pub fn ramp(case: &Case, to: f64, steps: usize) -> Result<RampResult, RunError> {
    ramp_observed(case, to, steps, &mut |_| {})
}

/// As [`ramp`], calling `on_step` with the number of steps done after each (for progress
/// display; it cannot change the result).
pub fn ramp_observed(
    case: &Case,
    to: f64,
    steps: usize,
    on_step: &mut dyn FnMut(usize),
) -> Result<RampResult, RunError> {
    let i_case = case.windings.first().map_or(0.0, |w| w.current);
    let d = discretise(case)?;
    let nodes = d.problem.mesh.nodes.len();
    let model = Model::new(d.problem)?;
    let op = if model.is_linear() {
        Some(model.linear_operator()?)
    } else {
        None
    };
    let locator = Locator::new(model.mesh());

    // Zero current: the background alone (zero field without one); the small-signal slope
    // there from the tangent (the linear operator for linear cores).
    let zero_j = vec![0.0; model.mesh().triangles.len()];
    let (sol0, _) = operating_point::solve_field(
        &model,
        op.as_ref(),
        &zero_j,
        case.background_b,
        None,
        &case.newton,
    )?;
    let m0: f64 = dipole::source_moments(&model, &sol0, &zero_j)
        .iter()
        .map(|p| p.current + p.magnetization)
        .sum();
    let unit = operating_point::currents(&model, case, 1.0 / i_case);
    let response = match &op {
        Some(op) => op.current_response(&unit),
        None => {
            let t = model.tangent_at(&sol0, &model.fixed_values())?;
            model.tangent_response(&t, &unit)
        }
    };
    let slope = dipole::incremental_moment(&model, &sol0, &response, &unit);

    let sat0 = operating_point::core_saturation(&model, case, &locator, &sol0);
    let mut peaks = vec![(0.0, sat0.peak)];
    let mut rows = Vec::with_capacity(steps);
    let mut prev = Some(sol0);
    for k in 1..=steps {
        // `to` is a magnitude; the ramp runs in the direction of the case's own current.
        let current = i_case.signum() * to.abs() * k as f64 / steps as f64;
        let scale = current / i_case;
        let j = operating_point::currents(&model, case, scale);
        let (sol, newton, tangent) = operating_point::solve_field_with_tangent(
            &model,
            op.as_ref(),
            &j,
            case.background_b,
            prev.as_ref(),
            &case.newton,
        )?;
        let fig = operating_point::figures(
            &model,
            op.as_ref(),
            tangent.as_ref(),
            case,
            &locator,
            &sol,
            &j,
            scale,
        )?;
        peaks.push((current, fig.peak));
        rows.push(RampRow {
            current_A: current,
            dipole_moment_Am2: fig.total,
            core_dipole_moment_Am2: fig.core,
            moment_gain: fig.gain,
            incremental_moment_Am2_per_A: fig.incremental_moment_per_a.unwrap_or(0.0),
            peak_core_b_T: fig.peak.map(|p| p.b),
            saturated_fraction: fig.saturated_fraction,
            incremental_inductance_H: fig.incremental_inductance.first().map_or(0.0, |r| r[0]),
            secant_inductance_H: (case.background_b == 0.0)
                .then(|| fig.own_flux_linkage.first().map_or(0.0, |p| p / current)),
            newton_iterations: newton.map_or(0, |n| n.iterations),
        });
        prev = Some(sol);
        on_step(k);
    }
    let curve: Vec<[f64; 3]> = std::iter::once([0.0, m0, slope])
        .chain(rows.iter().map(|r| {
            [
                r.current_A,
                r.dipole_moment_Am2,
                r.incremental_moment_Am2_per_A,
            ]
        }))
        .collect();
    let max_slope = curve
        .iter()
        .map(|p| (p[0], p[2]))
        .fold(
            (0.0, 0.0),
            |a: (f64, f64), b| if b.1.abs() > a.1.abs() { b } else { a },
        );
    let largest_at_zero = slope.abs() >= (1.0 - SLOPE_AT_ZERO_IS_LARGEST) * max_slope.1.abs();
    let onset = sat0.b_sat.and_then(|bs| {
        saturation_onset(&peaks, SATURATED_FRACTION_OF_BSAT * bs).map(|(i, at)| SaturationOnset {
            current_A: i,
            place: axial_position_words(case, at).into(),
            at_m: at,
        })
    });
    Ok(RampResult {
        title: case.title.clone(),
        zero_current_moment_Am2: m0,
        low_current_slope_Am2_per_A: slope,
        max_incremental_moment_Am2_per_A: (max_slope.1, max_slope.0),
        knee_current_A: knee(&curve),
        line_knee_current_A: largest_at_zero
            .then(|| line_knee(&rows, m0, slope))
            .flatten(),
        slope_largest_at_zero: largest_at_zero,
        saturation_onset: onset,
        rows,
        nodes,
    })
}

/// First current where dm/dI has fallen to [`KNEE_SLOPE_RATIO`] of the largest slope met up
/// to there. `curve` holds [current, moment, dm/dI] per step; between two steps the moment is
/// the cubic Hermite interpolant of those values (its slope a quadratic), which uses the
/// tangent slopes the ramp computes anyway and keeps the knee within a small fraction of a
/// step of where a finer ramp puts it.
pub fn knee(curve: &[[f64; 3]]) -> Option<f64> {
    let mut largest = 0.0f64;
    for w in curve.windows(2) {
        let ([i0, m0, s0], [i1, m1, s1]) = (w[0], w[1]);
        largest = largest.max(s0.abs()).max(s1.abs());
        let target = KNEE_SLOPE_RATIO * largest;
        if s1.abs() > target {
            continue;
        }
        let h = i1 - i0;
        // dm/dI(t) = a t² + b t + c on t ∈ [0, 1] (Hermite basis derivatives ÷ h).
        let sign = s0.signum();
        let (s0, s1, dm) = (sign * s0, sign * s1, sign * (m1 - m0) / h);
        let a = 6.0 * (-dm) + 3.0 * s0 + 3.0 * s1;
        let b = 6.0 * dm - 4.0 * s0 - 2.0 * s1;
        let c = s0 - target;
        let t = first_root_in_unit(a, b, c).unwrap_or(if s0 > s1 {
            (s0 - target) / (s0 - s1)
        } else {
            1.0
        });
        return Some(i0 + h * t);
    }
    None
}

/// Smallest root of a t² + b t + c in [0, 1], if any.
fn first_root_in_unit(a: f64, b: f64, c: f64) -> Option<f64> {
    let scale = a.abs().max(b.abs()).max(c.abs());
    let roots: Vec<f64> = if a.abs() <= 1e-12 * scale {
        if b == 0.0 {
            vec![]
        } else {
            vec![-c / b]
        }
    } else {
        let disc = b * b - 4.0 * a * c;
        if disc < 0.0 {
            vec![]
        } else {
            // The stable pair of roots (no cancellation in −b ± √disc).
            let q = -0.5 * (b + b.signum() * disc.sqrt());
            if q == 0.0 {
                vec![0.0]
            } else {
                vec![q / a, c / q]
            }
        }
    };
    roots
        .into_iter()
        .filter(|t| (-1e-12..=1.0 + 1e-12).contains(t))
        .map(|t| t.clamp(0.0, 1.0))
        .min_by(|x, y| x.total_cmp(y))
}

/// First current at which the peak |B| (current, peak) reaches `threshold`, interpolated
/// linearly between the bracketing steps, with the peak's place at the step past it.
pub fn saturation_onset(
    peaks: &[(f64, Option<axicore_solver::post::peak::Peak>)],
    threshold: f64,
) -> Option<(f64, [f64; 2])> {
    let b = |p: &Option<axicore_solver::post::peak::Peak>| p.map_or(0.0, |p| p.b);
    if let Some((i, Some(p))) = peaks.first() {
        if p.b >= threshold {
            return Some((*i, p.at));
        }
    }
    peaks.windows(2).find_map(|w| {
        let ((i0, p0), (i1, p1)) = (&w[0], &w[1]);
        let (b0, b1) = (b(p0), b(p1));
        (b1 >= threshold && b0 < threshold).then(|| {
            let at = p1.map_or([f64::NAN; 2], |p| p.at);
            (i0 + (i1 - i0) * (threshold - b0) / (b1 - b0), at)
        })
    })
}

/// First current where (m − m0)/(slope·I) falls to [`KNEE_RATIO`] (the line knee), interpolated linearly
/// between the two steps that bracket it (the ratio is 1 at zero current by definition).
pub fn line_knee(rows: &[RampRow], m0: f64, slope: f64) -> Option<f64> {
    let ratio = |r: &RampRow| (r.dipole_moment_Am2 - m0) / (slope * r.current_A);
    let mut last: Option<(f64, f64)> = Some((0.0, 1.0));
    for r in rows {
        let q = ratio(r);
        if q <= KNEE_RATIO {
            return Some(match last {
                Some((i0, q0)) if q0 > q => i0 + (r.current_A - i0) * (q0 - KNEE_RATIO) / (q0 - q),
                _ => r.current_A,
            });
        }
        last = Some((r.current_A, q));
    }
    None
}
