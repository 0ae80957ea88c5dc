//! Field samples along a straight line, for CSV export.

use crate::error::SolverError;
use crate::locate::Locator;
use crate::mesh::Point;
use crate::solution::{PointField, Solution};
use crate::solve::Model;

/// `n` ≥ 2 evenly spaced samples from `from` to `to` (both included).
pub fn sample_line(
    model: &Model,
    sol: &Solution,
    locator: &Locator,
    from: Point,
    to: Point,
    n: usize,
) -> Result<Vec<PointField>, SolverError> {
    let n = n.max(2);
    (0..n)
        .map(|i| {
            let t = i as f64 / (n - 1) as f64;
            let p = [
                from[0] + t * (to[0] - from[0]),
                from[1] + t * (to[1] - from[1]),
            ];
            sol.at_point(model, locator, p)
        })
        .collect()
}
