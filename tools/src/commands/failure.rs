//! A failed command with its exit code, and how run errors map onto exit codes.

use axicore_mesher::MeshError;
use axicore_solver::SolverError;

use crate::case::Case;
use crate::pipeline::RunError;

/// Exit code: success.
pub const EXIT_OK: u8 = 0;
/// Exit code: a failure that is not the input's fault (a write error, an internal fault).
pub const EXIT_FAILURE: u8 = 1;
/// Exit code: bad input (case file, B–H file, option or output path); nothing is written.
pub const EXIT_BAD_INPUT: u8 = 2;
/// Exit code: the nonlinear solve did not converge; nothing is printed as a result.
pub const EXIT_NOT_CONVERGED: u8 = 3;
/// Exit code: `--tolerance` was not reached (a cap stopped refinement); the result is printed
/// and written, flagged as short of the tolerance.
pub const EXIT_TOLERANCE_MISSED: u8 = 4;
/// Exit code: a sweep finished, but some of its points failed (their rows say why).
pub const EXIT_POINTS_FAILED: u8 = 5;

/// A failure with its exit code and one-line message.
#[derive(Debug)]
pub struct Failure {
    /// Process exit code.
    pub code: u8,
    /// One line, without the "axicore: error:" prefix.
    pub message: String,
}

impl Failure {
    /// A bad-input failure (exit code 2).
    pub fn input(message: impl Into<String>) -> Self {
        Self {
            code: EXIT_BAD_INPUT,
            message: message.into(),
        }
    }

    /// Any other failure (exit code 1).
    pub fn other(message: impl std::fmt::Display) -> Self {
        Self {
            code: EXIT_FAILURE,
            message: message.to_string(),
        }
    }
}

/// Exit code and message of a failed run of `case` from `file`: 2 for input faults (a probe
/// outside the mesh, a case the mesher cannot meet), 3 for a nonlinear solve that did not
/// converge, 1 otherwise.
pub fn run_failure(e: RunError, case: &Case, file: &str) -> Failure {
    if let RunError::Mesh(MeshError::TooManyNodes { limit, .. }) = &e {
        // Almost always a size given without its unit (plain numbers are metres) or a
        // fineness far too high: an input fault, named by the likeliest key.
        return Failure::input(case.explain_too_many_nodes(file, *limit));
    }
    if let RunError::Mesh(m) = &e {
        // The case passed validation, so its proportions are what the mesher cannot meet
        // (e.g. a 100 m × 1 µm spheroid: its tip is sharper than any triangle allows).
        return Failure::input(format!(
            "{file}: core and winding geometry: cannot be meshed: {m}; check the proportions of the core and windings (and mesh.angle_floor)"
        ));
    }
    let code = match &e {
        RunError::Probe { .. } => EXIT_BAD_INPUT,
        RunError::Solve(SolverError::NotConverged { .. }) => EXIT_NOT_CONVERGED,
        _ => EXIT_FAILURE,
    };
    Failure {
        code,
        message: e.to_string(),
    }
}
