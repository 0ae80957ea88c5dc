//! The demagnetization study's table as text and JSON.

use serde_json::{json, Value};

use crate::demag::formulas::Formula;
use crate::demag::table::StudyRow;

/// A factor with its error bar, e.g. "0.04119 ± 3e-6".
fn with_bar(x: Option<f64>, e: Option<f64>) -> String {
    match (x, e) {
        (Some(x), Some(e)) => format!("{x:.5e} ± {e:.1e}"),
        (Some(x), None) => format!("{x:.5e} ± ?"),
        _ => "—".into(),
    }
}

/// The study as a text table (one line per point), then per formula where it holds.
pub fn study_text(rows: &[StudyRow], threshold: f64) -> String {
    let mut s = String::new();
    s.push_str(&format!(
        "{:>10} {:>9} {:>5}  {:>22}  {:>22}",
        "L/D", "chi", "bore", "Nm", "Nf"
    ));
    for f in Formula::ALL {
        s.push_str(&format!(" {:>11}", f.name()));
    }
    s.push('\n');
    for r in rows {
        s.push_str(&format!(
            "{:>10.4} {:>9.3e} {:>5.2}  {:>22}  {:>22}",
            r.gamma,
            r.chi,
            r.bore_ratio,
            with_bar(r.nm, r.nm_error),
            with_bar(r.nf, r.nf_error)
        ));
        if !r.status.starts_with("ok") {
            s.push_str(&format!("  {}\n", r.status));
            continue;
        }
        s.push(if r.tolerance_reached { ' ' } else { '†' });
        for f in Formula::ALL {
            let cell = r
                .formulas
                .iter()
                .find(|c| c.formula == f)
                .map_or("—".to_string(), |c| {
                    let dev = if f.targets_fluxmetric() {
                        c.vs_nf
                    } else {
                        c.vs_nm
                    };
                    format!("{:+.1}%{}", 100.0 * dev, if c.flagged { "*" } else { " " })
                });
            s.push_str(&format!(" {cell:>11}"));
        }
        s.push('\n');
    }
    s.push_str(&format!(
        "Formula columns: N_formula/N_solved − 1 (against Nf for {}, Nm otherwise); * beyond {:.0} % after the solution's error bar; † the point stopped before the tolerance (node cap); ± ? no estimate.\n",
        Formula::FerriteFit.name(),
        100.0 * threshold
    ));
    for f in Formula::ALL {
        let (mut held, mut all) = (0, 0);
        for r in rows {
            if let Some(c) = r.formulas.iter().find(|c| c.formula == f) {
                all += 1;
                held += usize::from(!c.flagged);
            }
        }
        if all > 0 {
            s.push_str(&format!(
                "  {:<40} within {:.0} % at {held} of {all} points\n",
                f.label(),
                100.0 * threshold
            ));
        }
    }
    s.push_str(
        "Estimates from an axisymmetric field model: confirm critical designs by measurement.\n",
    );
    s
}

/// The study as JSON: the definitions, then one record per point.
pub fn study_json(rows: &[StudyRow], threshold: f64) -> Value {
    json!({
        "definitions": {
            "Nm": "magnetometric factor: -<H_z>/<M_z> over the core volume; Nm = V H0/m - 1/chi for chi > 0",
            "Nf": "fluxmetric factor: the same over the mid-plane cross-section; Nf = H0/<M>_mid - 1/chi",
            "chi_0": "chi = 0 points are cores with a prescribed uniform magnetization",
            "errors": "absolute, propagated from the estimated relative errors of the moment and mid-plane flux (chi > 0) or of the demagnetizing fields (chi = 0)",
            "vs_Nm": "N_formula/Nm - 1",
            "vs_Nf": "N_formula/Nf - 1",
            "moment": "moment with the formula's apparent susceptibility chi/(1 + chi N) over the solved moment, minus 1",
            "flagged": "the deviation of the factor the formula is meant for exceeds the threshold beyond the error bar",
        },
        "threshold": threshold,
        "points": rows,
    })
}
