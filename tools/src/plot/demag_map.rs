//! A deviation map: how far one formula's demagnetizing factor is from the field solution
//! over the (L/D, χ) grid of a study, as coloured cells (blue: the formula is low, red: high,
//! white: agrees), with the cells beyond the threshold outlined so the boundary of the region
//! where the formula holds reads as a contour.

use plotters::prelude::*;

use super::{ensure_font, FAMILY};
use crate::demag::formulas::Formula;
use crate::demag::table::{shape_of, shape_words, StudyRow};

/// Deviations are coloured up to ± this (relative); beyond it the colour is saturated.
const COLOUR_SPAN: f64 = 0.5;

/// Diverging colour for a relative deviation: white at 0, blue below, red above (linear in
/// the deviation up to ±[`COLOUR_SPAN`]).
fn diverging(d: f64) -> RGBColor {
    let t = (d / COLOUR_SPAN).clamp(-1.0, 1.0);
    let mix = |a: f64, b: f64, s: f64| (a + (b - a) * s).round() as u8;
    let (end, s) = if t < 0.0 {
        ((33.0, 102.0, 172.0), -t)
    } else {
        ((178.0, 24.0, 43.0), t)
    };
    RGBColor(
        mix(255.0, end.0, s),
        mix(255.0, end.1, s),
        mix(255.0, end.2, s),
    )
}

fn sorted_distinct(v: impl Iterator<Item = f64>) -> Vec<f64> {
    let mut out: Vec<f64> = v.collect();
    out.sort_by(f64::total_cmp);
    out.dedup();
    out
}

/// The map of `formula` at bore ratio `beta`; None when the formula applies at no point.
pub fn deviation_map_svg(
    rows: &[StudyRow],
    formula: Formula,
    beta: f64,
    threshold: f64,
) -> Result<Option<String>, String> {
    let rows_all = rows;
    let rows: Vec<&StudyRow> = rows.iter().filter(|r| r.bore_ratio == beta).collect();
    let gammas = sorted_distinct(rows.iter().map(|r| r.gamma));
    let chis = sorted_distinct(rows.iter().map(|r| r.chi));
    let cell = |gi: usize, ci: usize| {
        rows.iter()
            .find(|r| r.gamma == gammas[gi] && r.chi == chis[ci])
            .and_then(|r| r.formulas.iter().find(|c| c.formula == formula))
    };
    let any = (0..gammas.len()).any(|g| (0..chis.len()).any(|c| cell(g, c).is_some()));
    if !any {
        return Ok(None);
    }
    ensure_font().map_err(|e| e.to_string())?;
    let (w, h) = (960u32, 620u32);
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (w, h)).into_drawing_area();
        let err = |e: DrawingAreaErrorKind<_>| e.to_string();
        root.fill(&WHITE).map_err(err)?;
        let target = if formula.targets_fluxmetric() {
            "Nf"
        } else {
            "Nm"
        };
        let shape = shape_words(&shape_of(rows_all, beta), beta);
        let title = format!(
            "{}: N/{target} − 1 over L/D and χ ({shape}); thick line: the {:.0} % contour",
            formula.label(),
            100.0 * threshold
        );
        root.draw(&Text::new(
            title,
            (20, 12),
            (FAMILY, 17).into_font().color(&BLACK),
        ))
        .map_err(err)?;
        // Cells on an index grid: column k is the k-th γ, row j the j-th χ (χ = 0 first).
        let (left, top, right, bottom) = (90i32, 50i32, 820i32, 540i32);
        let nx = gammas.len() as i32;
        let ny = chis.len() as i32;
        let cw = (right - left) / nx;
        let ch = (bottom - top) / ny;
        let rect = |gi: i32, ci: i32| {
            let x0 = left + gi * cw;
            let y0 = bottom - (ci + 1) * ch;
            [(x0, y0), (x0 + cw, y0 + ch)]
        };
        for gi in 0..nx {
            for ci in 0..ny {
                let colour = match cell(gi as usize, ci as usize) {
                    Some(c) => {
                        let d = if formula.targets_fluxmetric() {
                            c.vs_nf
                        } else {
                            c.vs_nm
                        };
                        diverging(d)
                    }
                    None => RGBColor(225, 225, 225),
                };
                root.draw(&Rectangle::new(rect(gi, ci), colour.filled()))
                    .map_err(err)?;
            }
        }
        // The threshold contour: a thick line wherever a cell within the threshold meets one
        // beyond it (the boundary of the region where the formula holds).
        let flagged = |gi: i32, ci: i32| {
            (gi >= 0 && ci >= 0 && gi < nx && ci < ny)
                .then(|| cell(gi as usize, ci as usize).map(|c| c.flagged))
                .flatten()
        };
        for gi in 0..nx {
            for ci in 0..ny {
                let Some(here) = flagged(gi, ci) else {
                    continue;
                };
                let [(x0, y0), (x1, y1)] = rect(gi, ci);
                for (other, edge) in [
                    (flagged(gi + 1, ci), [(x1, y0), (x1, y1)]),
                    (flagged(gi, ci + 1), [(x0, y0), (x1, y0)]),
                ] {
                    if other.is_some_and(|o| o != here) {
                        root.draw(&PathElement::new(edge.to_vec(), BLACK.stroke_width(3)))
                            .map_err(err)?;
                    }
                }
            }
        }
        // Small grids carry the deviation in each cell.
        if nx <= 16 && ny <= 12 {
            let small = (FAMILY, 12).into_font().color(&BLACK);
            for gi in 0..nx {
                for ci in 0..ny {
                    if let Some(c) = cell(gi as usize, ci as usize) {
                        let d = if formula.targets_fluxmetric() {
                            c.vs_nf
                        } else {
                            c.vs_nm
                        };
                        let [(x0, y0), _] = rect(gi, ci);
                        let text = format!("{:+.1} %", 100.0 * d);
                        root.draw(&Text::new(
                            text,
                            (x0 + cw / 2 - 22, y0 + ch / 2 - 6),
                            small.clone(),
                        ))
                        .map_err(err)?;
                    }
                }
            }
        }
        let font = (FAMILY, 13).into_font().color(&BLACK);
        let every = ((nx as usize) / 12).max(1);
        for (gi, g) in gammas.iter().enumerate() {
            if gi % every == 0 {
                let x = left + gi as i32 * cw + cw / 2 - 14;
                root.draw(&Text::new(
                    crate::report::format::sig(*g, 3),
                    (x, bottom + 8),
                    font.clone(),
                ))
                .map_err(err)?;
            }
        }
        for (ci, c) in chis.iter().enumerate() {
            let y = bottom - ci as i32 * ch - ch / 2 - 7;
            let label = if *c == 0.0 {
                "0 (M fixed)".to_string()
            } else {
                crate::report::format::sig(*c, 3)
            };
            root.draw(&Text::new(label, (8, y), font.clone()))
                .map_err(err)?;
        }
        root.draw(&Text::new(
            "length / diameter γ",
            ((left + right) / 2 - 60, bottom + 30),
            font.clone(),
        ))
        .map_err(err)?;
        root.draw(&Text::new("χ", (40, top - 22), font.clone()))
            .map_err(err)?;
        // Colour bar: −50 % … +50 %; grey cells: the formula does not apply there.
        let (bx, bw) = (850, 24);
        let steps = 50;
        for k in 0..steps {
            let d = COLOUR_SPAN * (1.0 - 2.0 * k as f64 / (steps - 1) as f64);
            let y0 = top + k * (bottom - top) / steps;
            let y1 = top + (k + 1) * (bottom - top) / steps;
            root.draw(&Rectangle::new(
                [(bx, y0), (bx + bw, y1)],
                diverging(d).filled(),
            ))
            .map_err(err)?;
        }
        for (frac, text) in [(0.0, "≥ +50 %"), (0.5, "0"), (1.0, "≤ −50 %")] {
            let y = top + (frac * (bottom - top) as f64) as i32 - 6;
            root.draw(&Text::new(text, (bx + bw + 4, y), font.clone()))
                .map_err(err)?;
        }
        root.draw(&Text::new(
            "grey: outside the formula's range",
            (left, bottom + 52),
            font,
        ))
        .map_err(err)?;
        root.present().map_err(err)?;
    }
    Ok(Some(svg))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_colour_scale_is_white_at_zero_and_saturates_symmetrically() {
        assert_eq!(diverging(0.0), RGBColor(255, 255, 255));
        assert_eq!(diverging(-2.0), RGBColor(33, 102, 172));
        assert_eq!(diverging(2.0), RGBColor(178, 24, 43));
    }
}
