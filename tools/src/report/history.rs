//! The refinement history of an error-controlled solve, as a text table.

use crate::accuracy::{History, Stop};

/// The history table with a first line saying whether the tolerance was met.
pub fn history_text(c: &History, tolerance: f64) -> String {
    let mut s = if c.stop == Stop::ZeroMoment {
        "Error control: the moment is exactly zero (nothing drives the field); a relative error \
         is undefined, refinement stopped\n"
            .to_string()
    } else {
        format!(
        "Error control: estimated relative error of the dipole {:.2e} ({} the tolerance {tolerance:.1e})\n",
        c.estimated_relative_error,
        match c.stop {
            Stop::Tolerance => "within",
            Stop::NodeCap => "NOT within — the node cap stopped refinement;",
            Stop::TimeCap => "NOT within — the time cap stopped refinement;",
            Stop::ZeroMoment => "",
            Stop::MeshUnchanged =>
                "NOT within — adaptive refinement left the mesh unchanged;",
        }
        )
    };
    s.push_str("  level      nodes   unknowns     dipole/A·m²   est. rel. error  order  Newton\n");
    for (k, l) in c.levels.iter().enumerate() {
        s.push_str(&format!(
            "  {:>5} {:>10} {:>10} {:>15.9e} {:>16} {:>6} {:>7}\n",
            k,
            l.nodes,
            l.unknowns,
            l.dipole_moment_Am2,
            l.estimated_relative_error
                .map_or("-".into(), |e| format!("{e:.2e}")),
            l.order.map_or("-".into(), |p| format!("{p:.2}")),
            l.newton_iterations
        ));
    }
    s.push('\n');
    s
}
