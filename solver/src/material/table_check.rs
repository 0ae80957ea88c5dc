//! The checks of B–H table points before a law is built from them: each fault names the point
//! (numbered from 1 as given) and, where one column alone is at fault, the column.

use super::MAX_MU_R;
use crate::constants::MU0;
use crate::error::SolverError;

/// Relative slack in the μr ≥ 1 checks, so that round-off in tabulated deep-saturation points
/// (B = Js + μ0 H exactly) is not rejected.
const VACUUM_SLACK: f64 = 1e-9;

/// Largest differential relative permeability of a table segment: on a steep (square-loop)
/// digitised curve it runs several times the secant maximum (1.2e7 seen against a secant μr
/// below 1e7), so the bound is looser.
const MAX_SEGMENT_MU_R: f64 = 1e9;
/// Largest H (A/m) and B (T) of a table point.
const MAX_H: f64 = 1e12;
const MAX_B: f64 = 1e3;
/// Smallest nonzero H (A/m) and B (T) of a table point: a point at (1e-300 A/m, 1e-300 T)
/// made the tangent singular (the cubic coefficients, ∝ 1/ΔB², overflow).
const MIN_H: f64 = 1e-9;
const MIN_B: f64 = 1e-12;

/// A column of a B–H table.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BhColumn {
    /// Field strength H, A/m (the first column of a CSV, `h` in a case file).
    H,
    /// Flux density B, T (the second column, `b`).
    B,
}

/// What is wrong with a B–H table, and where, so that a caller can name its own key or line.
#[derive(Debug, Clone, PartialEq)]
pub struct BhTableFault {
    /// The point at fault, numbered from 1 as given (None: the table as a whole).
    pub point: Option<usize>,
    /// The column at fault, when one column alone is (a value that does not increase).
    pub column: Option<BhColumn>,
    /// The whole fault as one phrase, naming the point and its values.
    pub message: String,
}

impl std::fmt::Display for BhTableFault {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.message)
    }
}

/// Checks B–H points `[H in A/m, B in T]` as they would be given to [`super::BhTable::new`],
/// reporting the point and column at fault.
pub fn check_bh_points(points: &[[f64; 2]]) -> Result<(), BhTableFault> {
    if points.len() < 3 {
        let n = points.len();
        return Err(BhTableFault {
            point: None,
            column: None,
            message: format!(
                "a B–H table needs at least 3 points besides the origin (0, 0), got {n}"
            ),
        });
    }
    for (i, &[h, b]) in points.iter().enumerate() {
        let prev = i.checked_sub(1).map(|j| (j, points[j]));
        if let Some((column, why)) = point_problem(h, b, prev) {
            // Numbered from 1, as the case file's h[1], b[1] and the CSV's data rows.
            let at = format!(
                "B–H point {} (H = {} A/m, B = {} T)",
                i + 1,
                short(h),
                short(b)
            );
            return Err(BhTableFault {
                point: Some(i + 1),
                column,
                message: format!("{at}: {why}"),
            });
        }
    }
    Ok(())
}

/// Checks the points as given (indices are the caller's) before the origin is added.
pub(super) fn validate(points: &[[f64; 2]]) -> Result<(), SolverError> {
    check_bh_points(points).map_err(|f| SolverError::BadMaterial(f.message))
}

/// `v` for a message, to 7 significant digits: plain between 1e-3 and 1e6, else in exponent
/// form (not 300 digits).
fn short(v: f64) -> String {
    let s = format!("{v:.6e}");
    // Round to 7 significant digits, then print the shortest form of that value.
    let r: f64 = s.parse().unwrap_or(v);
    if r == 0.0 || (1e-3..1e6).contains(&r.abs()) {
        format!("{r}")
    } else {
        format!("{r:e}")
    }
}

/// What is wrong with point `[h, b]` given its predecessor, if anything, and in which column.
fn point_problem(
    h: f64,
    b: f64,
    prev: Option<(usize, [f64; 2])>,
) -> Option<(Option<BhColumn>, String)> {
    both(point_alone(h, b)).or_else(|| {
        let (j, [hp, bp]) = prev?;
        step_problem(h, b, j, hp, bp)
    })
}

fn both(why: Option<String>) -> Option<(Option<BhColumn>, String)> {
    why.map(|w| (None, w))
}

/// Faults of a point by itself.
fn point_alone(h: f64, b: f64) -> Option<String> {
    if !h.is_finite() || !b.is_finite() {
        return Some("values are not finite".into());
    }
    if h < 0.0 || b < 0.0 {
        return Some("H and B must be ≥ 0 (the law is of |B|)".into());
    }
    if h == 0.0 && b != 0.0 {
        return Some("B must be 0 at H = 0 (no remanence: the law passes the origin)".into());
    }
    if b < MU0 * h * (1.0 - VACUUM_SLACK) {
        return Some(format!(
            "relative permeability B/(μ0 H) = {} < 1",
            short(b / (MU0 * h))
        ));
    }
    if h > MAX_H || b > MAX_B {
        return Some(format!("above the supported {MAX_H:e} A/m or {MAX_B:e} T"));
    }
    if h != 0.0 && (h < MIN_H || b < MIN_B) {
        return Some(format!(
            "a nonzero point must reach {MIN_H:e} A/m and {MIN_B:e} T (below, the cubic pieces' \
             coefficients, ∝ 1/ΔB², overflow)"
        ));
    }
    if b > MAX_MU_R * MU0 * h {
        return Some(format!(
            "relative permeability B/(μ0 H) = {} is above the supported {MAX_MU_R:e}",
            short(b / (MU0 * h))
        ));
    }
    None
}

/// Faults of the step from point `j` (0-based) at `[hp, bp]` to `[h, b]`.
fn step_problem(h: f64, b: f64, j: usize, hp: f64, bp: f64) -> Option<(Option<BhColumn>, String)> {
    if h <= hp {
        let why = format!(
            "H must increase strictly (point {}: {} A/m)",
            j + 1,
            short(hp)
        );
        return Some((Some(BhColumn::H), why));
    }
    if b <= bp {
        let why = format!(
            "B must increase strictly (point {}: {} T)",
            j + 1,
            short(bp)
        );
        return Some((Some(BhColumn::B), why));
    }
    if b - bp > MAX_SEGMENT_MU_R * MU0 * (h - hp) {
        let mu_diff = (b - bp) / (MU0 * (h - hp));
        return both(Some(format!(
            "ΔB/(μ0 ΔH) = {} from point {} is above the supported {MAX_SEGMENT_MU_R:e}",
            short(mu_diff),
            j + 1
        )));
    }
    if b - bp < MU0 * (h - hp) * (1.0 - VACUUM_SLACK) {
        let mu_diff = (b - bp) / (MU0 * (h - hp));
        return both(Some(format!(
            "ΔB/(μ0 ΔH) = {} < 1 from point {}",
            short(mu_diff),
            j + 1
        )));
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_value_that_does_not_increase_names_its_column_and_point() {
        let h_back = [[100.0, 0.5], [90.0, 0.8], [1e3, 1.2]];
        let f = check_bh_points(&h_back).unwrap_err();
        assert_eq!((f.point, f.column), (Some(2), Some(BhColumn::H)), "{f}");
        let b_back = [[100.0, 0.5], [200.0, 0.8], [1e3, 0.7]];
        let f = check_bh_points(&b_back).unwrap_err();
        assert_eq!((f.point, f.column), (Some(3), Some(BhColumn::B)), "{f}");
        assert!(f.message.contains("B must increase strictly"), "{f}");
        let below_vacuum = [[100.0, 0.5], [1e3, 0.5001], [1e4, 1.2]];
        let f = check_bh_points(&below_vacuum).unwrap_err();
        assert_eq!((f.point, f.column), (Some(2), None), "{f}");
    }
}
