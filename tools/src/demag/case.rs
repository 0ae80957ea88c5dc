//! The demagnetizing factors of a case's own core, reported by `axicore solve`: read off the
//! solve itself when the case is a core alone in a uniform field or a magnet alone, else (a
//! linear core in windings) off one more right-hand side on the same factorised operator, the
//! core alone in a uniform axial field. Saturating cores have no single factor: their
//! study at their operating point's secant susceptibility is `axicore demag CASE`.

use axicore_solver::locate::Locator;
use axicore_solver::post::dipole;
use axicore_solver::{Excitation, LinearOperator, Model, Solution, SolverError, MU0};
use serde::Serialize;

use super::averages::{core_averages, CoreAverages};
use super::factors::{factors, Drive, Factors, SourceErrors};
use super::formulas::{deviations, Body, Deviation};
use crate::case::{Case, CoreShape};
use crate::geometry::CORE_TAG;

/// Deviations above this are flagged in the solve's report (the study's default).
pub const REPORT_THRESHOLD: f64 = 0.05;

/// Background of the companion solve, T (any value: the core is linear).
const COMPANION_B0: f64 = 1e-3;

/// A case's core factors with the formulas' values.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CaseFactors {
    /// How the factors were obtained, in words.
    pub from: String,
    /// Nm, Nf and the apparent susceptibilities (no error bars: `axicore demag CASE` gives
    /// them).
    pub factors: Factors,
    /// Each applicable formula against them.
    pub formulas: Vec<Deviation>,
}

/// The formulas' body for a core shape.
pub fn body_of(shape: &CoreShape) -> Body {
    match *shape {
        CoreShape::Rod { length, diameter } => Body::Rod {
            gamma: length / diameter,
        },
        CoreShape::Tube {
            length,
            diameter,
            bore,
        } => Body::Tube {
            gamma: length / diameter,
            beta: bore / diameter,
        },
        CoreShape::Sphere { .. } => Body::Spheroid { gamma: 1.0 },
        CoreShape::Spheroid { length, diameter } => Body::Spheroid {
            gamma: length / diameter,
        },
    }
}

/// The factors of `case`'s core from its solved field `sol` (with its core averages `avg`);
/// None when they are not defined (no core, a saturating core, a magnet with other sources).
pub fn case_factors(
    case: &Case,
    model: &Model,
    op: Option<&LinearOperator<'_>>,
    locator: &Locator,
    avg: Option<&CoreAverages>,
) -> Result<Option<CaseFactors>, SolverError> {
    let (Some(core), Some(avg)) = (case.core.as_ref(), avg) else {
        return Ok(None);
    };
    if !core.material.is_linear() {
        return Ok(None);
    }
    let alone = case.windings.is_empty();
    let mu_r = core.material.initial_mu_r();
    let chi = mu_r - 1.0;
    let (from, drive, averages): (&str, Drive, CoreAverages) = if core.magnetization.is_some() {
        if !(alone && case.background_b == 0.0 && mu_r == 1.0) {
            return Ok(None);
        }
        (
            "this solve: the magnet alone (χ = 0)",
            Drive::Magnetized,
            *avg,
        )
    } else if chi <= 0.0 {
        return Ok(None);
    } else if alone {
        let h0 = case.background_b / MU0;
        (
            "this solve: the core alone in the uniform background",
            Drive::Uniform { h0, chi },
            *avg,
        )
    } else {
        let Some(op) = op else { return Ok(None) };
        let cells = model.mesh().triangles.len();
        let zeros = vec![0.0; cells];
        let sol: Solution = op.solve(Excitation {
            currents: &zeros,
            polarizations: &zeros,
            a_fixed: &vec![0.0; model.mesh().nodes.len()],
            b0: COMPANION_B0,
        });
        let moment = dipole::source_moments(model, &sol, &zeros)
            .get(CORE_TAG as usize)
            .map_or(0.0, |m| m.magnetization);
        (
            "one more solve: the core alone in a uniform axial field (same mesh)",
            Drive::Uniform {
                h0: COMPANION_B0 / MU0,
                chi,
            },
            core_averages(model, &sol, locator, core, moment)?,
        )
    };
    let f = factors(drive, &averages, SourceErrors::default());
    // Nm = V H0/m − 1/χ magnifies the moment's relative error by (1 + χN)/(χN).
    let from = if f.chi > 0.0 && f.chi * f.nm < 0.1 {
        format!(
            "{from}; χ·Nm = {:.2e} is small, so the factors carry the moment's error times {:.0}",
            f.chi * f.nm,
            (1.0 + f.chi * f.nm) / (f.chi * f.nm)
        )
    } else {
        from.to_string()
    };
    Ok(Some(CaseFactors {
        from,
        formulas: deviations(body_of(&core.shape), &f, REPORT_THRESHOLD),
        factors: f,
    }))
}
