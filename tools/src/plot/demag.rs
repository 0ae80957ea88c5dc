//! The demagnetization study's pictures: Nm and Nf against L/D at chosen susceptibilities,
//! with the formulas drawn over them (one SVG per χ and bore ratio), and per formula a
//! deviation map over the (L/D, χ) grid ([`super::demag_map`]).

use super::{render_svg_stack, Chart, PlotError, Scale, Series};
use crate::demag::formulas::{formula_factors, Formula};
use crate::demag::table::{body_of, shape_of, shape_words, StudyRow};

/// Distinct values in first-seen order, compared exactly (they come from one grid).
fn distinct(values: impl Iterator<Item = f64>) -> Vec<f64> {
    let mut out: Vec<f64> = Vec::new();
    for v in values {
        if !out.contains(&v) {
            out.push(v);
        }
    }
    out
}

/// A χ or bore value as it goes into a file name: "0", "1e3", "0.5".
fn tag(x: f64) -> String {
    if x == 0.0 {
        "0".into()
    } else if x >= 1000.0 {
        format!("{x:e}")
    } else {
        format!("{x}")
    }
}

/// The formula curves of one factor over a fine γ grid spanning `lo..hi`.
fn formula_curves(lo: f64, hi: f64, shape: &str, beta: f64, fluxmetric: bool) -> Vec<Series> {
    let n = 121;
    Formula::ALL
        .iter()
        .filter_map(|&f| {
            let pts: Vec<(f64, f64)> = (0..n)
                .filter_map(|k| {
                    let g = lo * (hi / lo).powf(k as f64 / (n - 1) as f64);
                    let (a, b) = formula_factors(f, body_of(shape, g, beta))?;
                    let v = if fluxmetric { b } else { a };
                    (v.is_finite() && v > 0.0).then_some((g, v))
                })
                .collect();
            (pts.len() >= 2).then(|| Series::line(f.label(), pts).dashed())
        })
        .collect()
}

/// The factor plot of the rows at one χ and bore ratio: two panels (Nm above, Nf below).
pub fn factor_svg(rows: &[StudyRow], chi: f64, beta: f64) -> Result<String, PlotError> {
    let mut pts: Vec<&StudyRow> = rows
        .iter()
        .filter(|r| r.chi == chi && r.bore_ratio == beta && r.status.starts_with("ok"))
        .collect();
    pts.sort_by(|a, b| a.gamma.total_cmp(&b.gamma));
    let (lo, hi) = (
        pts.first().map_or(0.1, |r| r.gamma),
        pts.last().map_or(10.0, |r| r.gamma),
    );
    let kind = shape_of(rows, beta);
    let shape = shape_words(&kind, beta);
    let chi_text = if chi == 0.0 {
        "χ = 0 (uniformly magnetized)".to_string()
    } else {
        format!("χ = {chi:e}")
    };
    let panel = |fluxmetric: bool| {
        let fe: Vec<(f64, f64)> = pts
            .iter()
            .filter_map(|r| {
                let v = if fluxmetric { r.nf } else { r.nm }?;
                (v > 0.0).then_some((r.gamma, v))
            })
            .collect();
        let name = if fluxmetric {
            "fluxmetric Nf (mid-plane)"
        } else {
            "magnetometric Nm (volume)"
        };
        let mut series = vec![Series::line(format!("{name}, field solution"), fe).with_markers()];
        series.extend(formula_curves(lo, hi, &kind, beta, fluxmetric));
        Chart {
            title: format!("{name}: {shape}, {chi_text}"),
            x_label: "length / diameter γ".into(),
            y_label: "demagnetizing factor".into(),
            x_scale: Scale::Log10,
            y_scale: Scale::Log10,
            series,
            marks: Vec::new(),
        }
    };
    render_svg_stack(&[panel(false), panel(true)], 900, 1100)
}

/// Every picture of a finished study: (file name, SVG text). Factor plots at `chis` (every χ
/// of the study when None) for each bore ratio; a deviation map per formula and bore ratio
/// where the study spans at least two γ and two χ.
pub fn study_plots(
    rows: &[StudyRow],
    chis: Option<&[f64]>,
    threshold: f64,
) -> Result<Vec<(String, String)>, String> {
    let all_chi = distinct(rows.iter().map(|r| r.chi));
    let betas = distinct(rows.iter().map(|r| r.bore_ratio));
    let chis: Vec<f64> = chis.map_or(all_chi.clone(), <[f64]>::to_vec);
    let mut out = Vec::new();
    for &beta in &betas {
        let suffix = if beta > 0.0 {
            format!("-bore-{}", tag(beta))
        } else {
            String::new()
        };
        for &chi in &chis {
            if !all_chi.contains(&chi) {
                return Err(format!("--plot-chi: {chi} is not a χ of the study"));
            }
            let svg = factor_svg(rows, chi, beta).map_err(|e| e.to_string())?;
            out.push((format!("factors-chi-{}{suffix}.svg", tag(chi)), svg));
        }
        let gammas = distinct(
            rows.iter()
                .filter(|r| r.bore_ratio == beta)
                .map(|r| r.gamma),
        );
        if gammas.len() >= 2 && all_chi.len() >= 2 {
            for f in Formula::ALL {
                if let Some(svg) = super::demag_map::deviation_map_svg(rows, f, beta, threshold)? {
                    out.push((format!("deviation-{}{suffix}.svg", f.name()), svg));
                }
            }
        }
    }
    Ok(out)
}
