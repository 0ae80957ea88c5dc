//! Error control by the degree: solve at p = p_min, p_min + 1, … on one mesh until the
//! dipole moment's estimated relative error is below a tolerance.
//!
//! The estimate comes from the p-sequence itself. Where convergence is exponential the
//! error e_p = m − m_p falls by a nearly constant ratio ρ per degree, and so do the
//! differences d_p = m_p − m_{p−1}; then e_p = Σ_{k>p} d_k ≈ |d_p| ρ/(1 − ρ). The ratio is
//! fitted from the last differences (not assumed): the larger of the last two ratios, tripled as a
//! margin against convergence that slows down, since a bound is what the user needs (doubled,
//! the estimate fell 7 % short once, on the torquer rod at 1e-6). At least three degrees are
//! solved before an estimate exists, and a tripled ratio of 1 or more (no convergence yet)
//! gives none — unless the differences have flattened far below the tolerance (see
//! [`estimate_for`]). Where the error changes sign (the last two differences do), the estimate
//! is at least twice the last difference.
//!
//! Saturating materials go through Newton's method with p-continuation: the first degree
//! starts from the linear field at initial permeability, each next one from the field of the
//! degree below (hierarchical basis: its coefficients carry over, see [`super::prolong`]);
//! the Newton iterations of every degree are reported.

use super::curved_edges::CurvedEdge;
use super::model::{HpModel, HpSolution};
use crate::error::SolverError;
use crate::nonlinear::NewtonSettings;
use crate::problem::Problem;

/// Relative round-off floor of the estimate: below it the differences are noise.
const ROUND_OFF: f64 = 4e-15;

/// One degree of the sequence.
#[derive(Debug, Clone, PartialEq)]
pub struct DegreeStep {
    /// Polynomial degree p (uniform over the mesh).
    pub degree: u32,
    /// Global equations after condensation.
    pub equations: usize,
    /// Unknowns before condensation.
    pub unknowns: usize,
    /// Dipole moment, A·m² (the exterior's dipole coefficient when the problem has the exact
    /// exterior, else the sources').
    pub moment: f64,
    /// The other route's moment (sources), A·m².
    pub check: f64,
    /// Estimated relative error of `moment`, once three degrees are solved and they converge.
    pub estimate: Option<f64>,
    /// Fitted ratio ρ of successive differences.
    pub ratio: Option<f64>,
    /// Newton iterations of this degree (0 when every material is linear).
    pub newton_iterations: usize,
}

/// The outcome of raising the degree.
#[derive(Debug, Clone, PartialEq)]
pub struct DegreeRun {
    /// Every degree solved, in order.
    pub steps: Vec<DegreeStep>,
    /// Whether the last estimate is at most the tolerance.
    pub reached: bool,
}

impl DegreeRun {
    /// The last step (the result).
    pub fn last(&self) -> &DegreeStep {
        self.steps.last().expect("at least one degree is solved")
    }
}

/// Estimated relative error of the last moment in `moments` (one per degree, in order) and
/// the fitted ratio, or None while fewer than three degrees are known or they do not converge.
pub fn estimate(moments: &[f64]) -> Option<(f64, f64)> {
    let n = moments.len();
    if n < 3 {
        return None;
    }
    let d: Vec<f64> = moments.windows(2).map(|w| (w[1] - w[0]).abs()).collect();
    let scale = moments[n - 1].abs().max(f64::MIN_POSITIVE);
    let floor = ROUND_OFF * scale;
    let last = d[d.len() - 1];
    if last <= floor && d[d.len() - 2] <= floor {
        return Some((ROUND_OFF, 0.0));
    }
    let ratio_at = |k: usize| {
        if d[k - 1] > floor {
            d[k] / d[k - 1]
        } else {
            1.0
        }
    };
    let mut rho = ratio_at(d.len() - 1);
    if d.len() >= 3 {
        // The larger of the last two ratios: a sequence that dips and then catches up must
        // not pass for converged (the geometric mean of the two let a γ = 316 magnet's Nf
        // through at an estimate of 8.4e-4 with a true error of 1.5e-3).
        rho = rho.max(ratio_at(d.len() - 2));
    }
    let margin = 3.0 * rho;
    if margin >= 1.0 {
        return None;
    }
    let mut err = (last.max(floor) * margin / (1.0 - margin)).max(floor);
    // An error that changes sign: the last difference spans the error on both sides, and a
    // small ratio says nothing (a magnetized spheroid's Nf crossed zero at p = 4, then sat at
    // 8.4e-7 at p = 5, where the ratio 0.004 claimed 1.3e-8). Then the estimate is twice the
    // last difference itself.
    let signed = |k: usize| moments[k + 1] - moments[k];
    if signed(n - 2) * signed(n - 3) < 0.0 && last > floor {
        err = err.max(2.0 * last);
    }
    Some((err / scale, rho))
}

/// Differences this far below the tolerance (relative), twice in a row, count as converged
/// when their ratio gives no estimate: the sequence has reached the noise of its own
/// arithmetic (stagnation detection, common practice). Seen on uniformly magnetized rods of
/// L/D ≥ 280, whose demagnetizing fields are 1e-3 … 1e-7 of the magnetization: differences of
/// 1e-12 that no longer shrink.
const PLATEAU: f64 = 1e-2;

/// As [`estimate`], with a plateau rule for sequences at their noise level: when the ratio
/// gives no estimate but the last two relative differences are both below
/// [`PLATEAU`] × `tolerance`, the estimate is ten times the larger of them (the ratio then
/// reported as NaN).
pub fn estimate_for(values: &[f64], tolerance: f64) -> Option<(f64, f64)> {
    if let Some(e) = estimate(values) {
        return Some(e);
    }
    let n = values.len();
    if n < 3 {
        return None;
    }
    let scale = values[n - 1].abs().max(f64::MIN_POSITIVE);
    let d1 = (values[n - 1] - values[n - 2]).abs() / scale;
    let d2 = (values[n - 2] - values[n - 3]).abs() / scale;
    let worst = d1.max(d2);
    (worst <= PLATEAU * tolerance).then_some((10.0 * worst.max(ROUND_OFF), f64::NAN))
}

/// Solves `problem` at degrees p_min … p_max on its mesh (curved edges `curved`) until the
/// estimated relative error of the moment is at most `tolerance`; saturating materials with
/// Newton's default settings.
pub fn raise_degree(
    problem: &Problem,
    curved: &[CurvedEdge],
    tolerance: f64,
    p_min: u32,
    p_max: u32,
) -> Result<DegreeRun, SolverError> {
    raise_degree_with(
        problem,
        curved,
        tolerance,
        p_min,
        p_max,
        &NewtonSettings::default(),
    )
}

/// As [`raise_degree`], with Newton's `settings` for saturating materials (p-continuation:
/// each degree starts from the one below). A degree whose Newton iteration does not converge
/// ends the run with [`SolverError::NotConverged`].
pub fn raise_degree_with(
    problem: &Problem,
    curved: &[CurvedEdge],
    tolerance: f64,
    p_min: u32,
    p_max: u32,
    settings: &NewtonSettings,
) -> Result<DegreeRun, SolverError> {
    raise_degree_keeping_field(problem, curved, tolerance, p_min, p_max, settings)
        .map(|(run, _, _)| run)
}

/// As [`raise_degree_with`], also returning the last degree's model and solved field (for
/// maps and point values of the result).
pub fn raise_degree_keeping_field(
    problem: &Problem,
    curved: &[CurvedEdge],
    tolerance: f64,
    p_min: u32,
    p_max: u32,
    settings: &NewtonSettings,
) -> Result<(DegreeRun, HpModel, HpSolution), SolverError> {
    let nt = problem.mesh.triangles.len();
    let linear = problem.regions.iter().all(|r| r.material.is_linear());
    let mut steps: Vec<DegreeStep> = Vec::new();
    let mut moments = Vec::new();
    let mut previous: Option<(HpModel, HpSolution)> = None;
    for p in p_min..=p_max {
        let model = HpModel::new(problem.clone(), &vec![p; nt], curved.to_vec())?;
        let (sol, newton_iterations) = if linear {
            (model.solve_linear()?, 0)
        } else {
            let start = previous.as_ref().map(|(m, s)| (m, s));
            let (sol, report) = model.solve_nonlinear(settings, start)?;
            (sol, report.iterations)
        };
        let check = model.source_moment(&sol)?;
        let moment = model.exterior_moment(&sol).unwrap_or(check);
        moments.push(moment);
        let est = estimate_for(&moments, tolerance);
        steps.push(DegreeStep {
            degree: p,
            equations: model.equations(),
            unknowns: model.unknowns(),
            moment,
            check,
            estimate: est.map(|e| e.0),
            ratio: est.map(|e| e.1),
            newton_iterations,
        });
        let reached = est.is_some_and(|(e, _)| e <= tolerance);
        if reached || p == p_max {
            return Ok((DegreeRun { steps, reached }, model, sol));
        }
        previous = Some((model, sol));
    }
    Err(SolverError::ElementDegree {
        degree: p_min as usize,
        max: p_max as usize,
    })
}

/// One degree of a run toward several goals.
#[derive(Debug, Clone, PartialEq)]
pub struct GoalStep {
    /// Polynomial degree p.
    pub degree: u32,
    /// Global equations after condensation.
    pub equations: usize,
    /// Unknowns before condensation.
    pub unknowns: usize,
    /// The goals' values at this degree.
    pub values: Vec<f64>,
    /// Each goal's estimated relative error (see [`estimate`]).
    pub estimates: Vec<Option<f64>>,
}

/// The outcome of raising the degree toward several goals, with what the caller derived from
/// the last solution.
#[derive(Debug, Clone, PartialEq)]
pub struct GoalRun<T> {
    /// Every degree solved, in order.
    pub steps: Vec<GoalStep>,
    /// Whether every goal's last estimate is at most the tolerance.
    pub reached: bool,
    /// The caller's data from the last degree's solution.
    pub last: T,
}

/// As [`raise_degree`] for goals of the caller's choosing: `goals` returns, per solved degree,
/// the goal values and data of its own (kept from the last degree); the degree rises until
/// every goal's estimated relative error is at most `tolerance`.
pub fn raise_degree_to_goals<T>(
    problem: &Problem,
    curved: &[CurvedEdge],
    tolerance: f64,
    p_min: u32,
    p_max: u32,
    goals: impl Fn(&HpModel, &super::model::HpSolution) -> Result<(Vec<f64>, T), SolverError>,
) -> Result<GoalRun<T>, SolverError> {
    let nt = problem.mesh.triangles.len();
    let mut steps: Vec<GoalStep> = Vec::new();
    let mut history: Vec<Vec<f64>> = Vec::new();
    let mut last = None;
    for p in p_min..=p_max {
        let model = HpModel::new(problem.clone(), &vec![p; nt], curved.to_vec())?;
        let sol = model.solve_linear()?;
        let (values, data) = goals(&model, &sol)?;
        if history.is_empty() {
            history = vec![Vec::new(); values.len()];
        }
        for (h, &v) in history.iter_mut().zip(&values) {
            h.push(v);
        }
        let estimates: Vec<Option<f64>> = history
            .iter()
            .map(|h| estimate_for(h, tolerance).map(|e| e.0))
            .collect();
        let done = estimates.iter().all(|e| e.is_some_and(|e| e <= tolerance));
        steps.push(GoalStep {
            degree: p,
            equations: model.equations(),
            unknowns: model.unknowns(),
            values,
            estimates,
        });
        last = Some(data);
        if done {
            return Ok(GoalRun {
                steps,
                reached: true,
                last: last.expect("set above"),
            });
        }
    }
    Ok(GoalRun {
        steps,
        reached: false,
        last: last.ok_or(SolverError::ElementDegree {
            degree: p_min as usize,
            max: p_max as usize,
        })?,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_geometric_sequence_is_estimated_within_a_factor_of_four_from_above() {
        // m_p = 1 + 0.3·0.05^p: e_p = 0.3·0.05^p exactly; the tripled ratio bounds it by
        // 0.15/0.85 against 0.05/0.95, a factor 3.4.
        let m: Vec<f64> = (2..7).map(|p| 1.0 + 0.3 * 0.05f64.powi(p)).collect();
        for n in 3..=m.len() {
            let (est, rho) = estimate(&m[..n]).unwrap();
            let truth = 0.3 * 0.05f64.powi(n as i32 + 1) / m[n - 1];
            assert!((rho - 0.05).abs() < 1e-6, "{rho}");
            assert!(est >= truth && est <= 4.0 * truth, "{est} vs {truth}");
        }
    }

    #[test]
    fn no_estimate_before_three_degrees_or_without_convergence() {
        assert!(estimate(&[1.0, 1.1]).is_none());
        // Differences 0.1, 0.08: ratio 0.8, tripled past 1.
        assert!(estimate(&[1.0, 1.1, 1.18]).is_none());
    }

    #[test]
    fn an_error_that_changes_sign_is_estimated_by_the_last_difference() {
        // e_p: −3.25e-3, −2.67e-4, +1.92e-6, +8.43e-7 (a spheroid's Nf, p = 2…5): the last
        // difference −1.08e-6 changes sign against +2.69e-4, so the estimate is 2.16e-6 and
        // bounds the true 8.43e-7.
        let m: Vec<f64> = [-3.25e-3, -2.67e-4, 1.92e-6, 8.43e-7]
            .iter()
            .map(|e| 1.0 + e)
            .collect();
        let (est, _) = estimate(&m).unwrap();
        assert!(
            est >= 8.43e-7 && (est - 2.0 * 1.077e-6).abs() < 1e-9,
            "{est}"
        );
    }

    #[test]
    fn a_noisy_plateau_far_below_the_tolerance_counts_as_converged() {
        // Differences of 1e-12 that do not shrink: no ratio estimate, but 1e-12 ≪ 1e-3.
        let m = [1.0, 1.0 + 1e-12, 1.0 - 1e-12, 1.0 + 0.5e-12];
        assert!(estimate(&m).is_none());
        let (est, rho) = estimate_for(&m, 1e-3).unwrap();
        assert!(rho.is_nan() && (est - 2e-11).abs() < 1e-12, "{est}");
        // Not when the tolerance is tighter than a hundred times the differences.
        assert!(estimate_for(&m, 1e-11).is_none());
    }

    #[test]
    fn a_sequence_at_round_off_has_the_round_off_estimate() {
        let (est, _) = estimate(&[2.0, 2.0, 2.0]).unwrap();
        assert_eq!(est, ROUND_OFF);
    }
}
