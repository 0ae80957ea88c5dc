//! A finished demagnetization study read back from its CSV file (the sweep file of our own
//! format), for the JSON table and the plots: the same records whether the file came from
//! one run or from merged shards.

use serde::Serialize;

use super::formulas::{relative_bar, Body, Deviation, Formula};

/// One point of a study.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StudyRow {
    /// Point index in the grid.
    pub index: usize,
    /// Length over diameter.
    pub gamma: f64,
    /// Susceptibility (0: prescribed magnetization).
    pub chi: f64,
    /// Bore over diameter (0 for rods and spheroids).
    pub bore_ratio: f64,
    /// `ok` or `failed: …`.
    pub status: String,
    /// `rod`, `tube` or `spheroid` (empty for a failed point).
    pub shape: String,
    /// Magnetometric factor and its estimated absolute error.
    pub nm: Option<f64>,
    /// Estimated absolute error of Nm.
    pub nm_error: Option<f64>,
    /// Fluxmetric factor.
    pub nf: Option<f64>,
    /// Estimated absolute error of Nf.
    pub nf_error: Option<f64>,
    /// Apparent susceptibility by the moment, χ/(1 + χ Nm).
    pub chi_app_moment: Option<f64>,
    /// Apparent susceptibility at the mid-plane, χ/(1 + χ Nf).
    pub chi_app_mid: Option<f64>,
    /// Whether the tolerance was met.
    pub tolerance_reached: bool,
    /// Unknowns of the finest level.
    pub unknowns: Option<usize>,
    /// The formulas that apply at this point.
    pub formulas: Vec<Deviation>,
}

/// The formulas' body for a row's shape.
pub fn body_of(shape: &str, gamma: f64, beta: f64) -> Body {
    match shape {
        "spheroid" => Body::Spheroid { gamma },
        _ if beta > 0.0 => Body::Tube { gamma, beta },
        _ => Body::Rod { gamma },
    }
}

/// How a family of rows is named in titles.
pub fn shape_words(shape: &str, beta: f64) -> String {
    match shape {
        "spheroid" => "spheroids (γ = axis ratio)".into(),
        _ if beta > 0.0 => format!("tubes, bore/D = {beta}"),
        _ => "solid rods".into(),
    }
}

/// The shape of the successful rows at bore ratio `beta` (all share one).
pub fn shape_of(rows: &[StudyRow], beta: f64) -> String {
    rows.iter()
        .find(|r| r.bore_ratio == beta && !r.shape.is_empty())
        .map_or("rod".into(), |r| r.shape.clone())
}

/// Splits one CSV line into cells (RFC 4180 quoting, as the sweep writes it).
pub fn split_csv(line: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut cell = String::new();
    let mut quoted = false;
    let mut chars = line.chars().peekable();
    while let Some(c) = chars.next() {
        match (c, quoted) {
            ('"', true) if chars.peek() == Some(&'"') => {
                cell.push('"');
                chars.next();
            }
            ('"', _) => quoted = !quoted,
            (',', false) => out.push(std::mem::take(&mut cell)),
            _ => cell.push(c),
        }
    }
    out.push(cell);
    out
}

/// Reads the rows of a finished study file, judging every formula's deviation at
/// `threshold` beyond the point's error bars (as the study itself flags them, so a file
/// rendered at another threshold is flagged consistently); the error names the line and the
/// fault.
pub fn read_study(text: &str, threshold: f64) -> Result<Vec<StudyRow>, String> {
    let mut lines = text.lines();
    let id = crate::study::sweep_file::SweepId::parse(lines.next().unwrap_or_default())
        .ok_or("not an axicore sweep file (first line)")?;
    if let Some((k, n)) = id.shard {
        return Err(format!(
            "shard {k}/{n} of a study: join the shards with `axicore merge` first"
        ));
    }
    let rows_in_file = text.lines().count().saturating_sub(2);
    if rows_in_file != id.points || !text.ends_with('\n') {
        return Err(format!(
            "holds {rows_in_file} of the study's {} points (unfinished?)",
            id.points
        ));
    }
    let header = split_csv(lines.next().ok_or("no header line")?);
    let col = |name: &str| header.iter().position(|h| h == name);
    let need = |name: &str| {
        col(name).ok_or_else(|| format!("no column '{name}': not a demagnetization study"))
    };
    let (gi, ci, si) = (need("gamma")?, need("chi")?, need("status")?);
    let bi = col("bore_ratio");
    let mut rows = Vec::new();
    for (k, line) in lines.enumerate() {
        let cells = split_csv(line);
        let at = |i: usize| cells.get(i).map(String::as_str).unwrap_or("");
        let f = |name: &str| col(name).and_then(|i| at(i).parse::<f64>().ok());
        let number = |i: usize| {
            at(i)
                .parse::<f64>()
                .map_err(|_| format!("line {}: '{}' is not a number", k + 3, at(i)))
        };
        let formulas = Formula::ALL
            .iter()
            .filter_map(|&fo| {
                let g = |c: &str| f(&format!("{}_{c}", fo.name()));
                Some(Deviation {
                    formula: fo,
                    n_for_nm: g("N_for_Nm")?,
                    n_for_nf: g("N_for_Nf")?,
                    vs_nm: g("vs_Nm")?,
                    vs_nf: g("vs_Nf")?,
                    moment: g("moment")?,
                    // Judged below, at the reader's threshold.
                    significant: 0.0,
                    flagged: false,
                })
            })
            .collect();
        rows.push(StudyRow {
            index: at(0)
                .parse()
                .map_err(|_| format!("line {}: bad index", k + 3))?,
            gamma: number(gi)?,
            chi: number(ci)?,
            bore_ratio: bi.map(number).transpose()?.unwrap_or(0.0),
            status: at(si).to_string(),
            shape: col("shape").map_or(String::new(), |i| at(i).to_string()),
            nm: f("Nm"),
            nm_error: f("Nm_error"),
            nf: f("Nf"),
            nf_error: f("Nf_error"),
            chi_app_moment: f("chi_app_moment"),
            chi_app_mid: f("chi_app_mid"),
            tolerance_reached: col("tolerance_reached").is_some_and(|i| at(i) == "true"),
            unknowns: col("unknowns").and_then(|i| at(i).parse().ok()),
            formulas,
        });
    }
    for r in &mut rows {
        let (bm, bf) = (
            r.nm.map_or(0.0, |n| relative_bar(n, r.nm_error)),
            r.nf.map_or(0.0, |n| relative_bar(n, r.nf_error)),
        );
        for d in &mut r.formulas {
            d.judge(bm, bf, threshold);
        }
    }
    Ok(rows)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn quoted_cells_keep_their_commas_and_quotes() {
        assert_eq!(
            split_csv("1,\"failed: a, \"\"b\"\"\",,x"),
            ["1", "failed: a, \"b\"", "", "x"]
        );
    }
}
