//! `axicore demag`: the demagnetization study over a grid of core proportions and
//! susceptibilities (on the sweep engine: resumable, parallel, shardable), or the verdict for
//! the core of one case; `--from` renders the JSON table and plots of a finished (or merged)
//! study file.

use std::path::{Path, PathBuf};

use clap::Args;

use super::args::{self, case_name};
use super::failure::EXIT_OK;
use super::{emit, Failure};
use crate::case::{read_case_file, CoreShape};
use crate::demag::table::{read_study, StudyRow};
use crate::output;
use crate::pipeline::{run, RunOptions};
use crate::progress::Progress;
use crate::study::demag::{self as study, DemagStudy, Elements, Family};
use crate::study::grid::{self, Axis};
use crate::study::sweep::Sweep;
use crate::study::sweep_file::partial_path;

/// Options of `axicore demag`.
#[derive(Args, Debug)]
pub struct DemagArgs {
    /// A case file: study its core (its own proportions, at χ = 0 and at the susceptibility
    /// of its operating point) instead of the grid.
    case: Option<PathBuf>,
    /// Length/diameter values "FROM..TO:N[:log]" (default 0.1..1000:13:log).
    #[arg(long, value_name = "FROM..TO:N[:log]")]
    gamma: Option<String>,
    /// Susceptibilities χ = μr − 1, "v1,v2,…", items may be ranges "FROM..TO:N[:log]"
    /// (0 = a uniformly magnetized core; default 0,1..1e6:7:log).
    #[arg(long, value_name = "v1,v2,…")]
    chi: Option<String>,
    /// Bore/diameter ratios "v1,v2,…" (0 = solid rod; above 0 a tube): a third axis.
    #[arg(long, value_name = "v1,v2,…")]
    bore: Option<String>,
    /// Study spheroids of axis ratio γ instead of cylinders (their closed form is exact: a
    /// check of the method).
    #[arg(long)]
    spheroids: bool,
    /// Estimated relative error asked of each point's moment and mid-plane flux (χ > 0) or
    /// of its demagnetizing fields (χ = 0).
    #[arg(long, value_name = "REL", default_value_t = 1e-3)]
    tolerance: f64,
    /// Flag formulas whose factor is off by more than this (relative, beyond the error bar).
    #[arg(long, value_name = "REL", default_value_t = 0.05)]
    threshold: f64,
    /// Elements: "hp" (hierarchical, degree raised to the tolerance; default) or
    /// "second-order" (refined in h from --fineness, up to --max-nodes).
    #[arg(long, value_name = "KIND", default_value = "hp")]
    elements: String,
    /// Mesh fineness of each point's first level (second-order elements).
    #[arg(long, value_name = "F", default_value_t = 1.0)]
    fineness: f64,
    /// Node cap per point: a point that would need more stops there with its error bar and
    /// `tolerance_reached` false (uniformly magnetized slender rods need very fine meshes
    /// for Nf, a small difference of two nearly equal fields).
    #[arg(long, value_name = "N", default_value_t = 400_000)]
    max_nodes: usize,
    /// The study's CSV file (a sweep file: rows go to FILE.partial as points finish; a
    /// rerun resumes).
    #[arg(long, value_name = "FILE")]
    out: Option<PathBuf>,
    /// Render a finished study file (from `--out` or `axicore merge`) instead of solving.
    #[arg(long, value_name = "FILE", conflicts_with_all = ["case", "out", "shard", "gamma", "chi", "bore", "spheroids", "tolerance", "fineness", "elements", "max_nodes", "jobs"])]
    from: Option<PathBuf>,
    /// JSON table of the finished study.
    #[arg(long, value_name = "FILE")]
    json: Option<PathBuf>,
    /// Directory for the SVG plots of the finished study (factor curves, deviation maps).
    #[arg(long, value_name = "DIR")]
    plots: Option<PathBuf>,
    /// Susceptibilities drawn in the factor plots (default: every χ of the study).
    #[arg(long, value_name = "v1,v2,…")]
    plot_chi: Option<String>,
    /// Points solved at a time.
    #[arg(long, default_value_t = 1)]
    jobs: usize,
    /// Compute only shard K of N; join shards with `axicore merge`, render with `--from`.
    #[arg(long, value_name = "K/N")]
    shard: Option<String>,
}

/// A list of numbers "v1,v2,…" whose items may also be ranges "FROM..TO:N[:log]", e.g.
/// "0,1..1e6:7:log".
fn list_axis(key: &str, text: &str) -> Result<Axis, Failure> {
    let fault = |why: String| Failure::input(format!("--{}: {why}", key.replace('_', "-")));
    let mut values = Vec::new();
    for item in text.split(',').map(str::trim).filter(|i| !i.is_empty()) {
        if item.contains("..") {
            let range = grid::parse_range(&format!("{key}={item}"))
                .map_err(|e| fault(e.replacen("--vary: ", "", 1)))?;
            values.extend(range.values);
        } else {
            let x: f64 = item
                .parse()
                .map_err(|_| fault(format!("'{item}' is not a number")))?;
            values.push(toml::Value::Float(x));
        }
    }
    if values.is_empty() {
        return Err(fault(format!("'{text}' lists no values")));
    }
    Ok(Axis {
        key: key.to_string(),
        values,
    })
}

fn check_positive(what: &str, x: f64, upper: f64) -> Result<(), Failure> {
    if x.is_finite() && x > 0.0 && x < upper {
        Ok(())
    } else {
        Err(Failure::input(format!(
            "--{what}: {x} must be above 0 and below {upper}"
        )))
    }
}

/// Runs `axicore demag`.
pub fn demag(a: DemagArgs, quiet: bool) -> Result<u8, Failure> {
    check_positive("tolerance", a.tolerance, 1.0)?;
    check_positive("threshold", a.threshold, 10.0)?;
    if !(a.fineness.is_finite() && a.fineness > 0.0 && a.fineness <= 50.0) {
        return Err(Failure::input(format!(
            "--fineness: {} must be above 0 and at most 50",
            a.fineness
        )));
    }
    if !(100..=1_000_000_000).contains(&a.max_nodes) {
        return Err(Failure::input(format!(
            "--max-nodes: {} must be from 100 to 1000000000",
            a.max_nodes
        )));
    }
    if !(1..=args::MAX_THREADS).contains(&a.jobs) {
        return Err(Failure::input(format!(
            "--jobs: {} must be from 1 to {}",
            a.jobs,
            args::MAX_THREADS
        )));
    }
    let plot_chi = a
        .plot_chi
        .as_deref()
        .map(|t| list_axis("plot-chi", t))
        .transpose()?;
    let mut outputs: Vec<(&str, &Path)> = Vec::new();
    for (name, p) in [("--out", &a.out), ("--json", &a.json)] {
        if let Some(p) = p {
            outputs.push((name, p.as_path()));
        }
    }
    args::check_outputs(&outputs, a.case.as_deref().or(a.from.as_deref()))?;
    if let Some(dir) = &a.plots {
        if !dir.is_dir() {
            return Err(Failure::input(format!(
                "--plots: {} is not a directory",
                dir.display()
            )));
        }
    }
    let study = DemagStudy {
        family: if a.spheroids {
            Family::Spheroid
        } else {
            Family::Cylinder
        },
        tolerance: a.tolerance,
        threshold: a.threshold,
        fineness: a.fineness,
        max_nodes: a.max_nodes,
        elements: match a.elements.as_str() {
            "hp" => Elements::Hierarchical,
            "second-order" => Elements::SecondOrder,
            other => {
                return Err(Failure::input(format!(
                    "--elements: '{other}' must be hp or second-order"
                )))
            }
        },
    };
    if let Some(from) = &a.from {
        let text = crate::case::read_case_text(from).map_err(|e| Failure::input(e.to_string()))?;
        // The flags are set anew at this run's threshold, so counts, maps and flags agree.
        let rows = read_study(&text, a.threshold)
            .map_err(|e| Failure::input(format!("{}: {e}", from.display())))?;
        if let Some(ax) = &plot_chi {
            check_plot_chi(ax, rows.iter().map(|r| r.chi))?;
        }
        return render(&rows, &a, plot_chi.as_ref(), a.threshold);
    }
    let axes = match &a.case {
        Some(path) => case_axes(path, &a)?,
        None => grid_axes(&a, study.family)?,
    };
    if let (Some(ax), None) = (&plot_chi, &a.case) {
        let chis = axes[1].values.iter().filter_map(toml::Value::as_float);
        check_plot_chi(ax, chis)?;
    }
    let shard = a
        .shard
        .as_deref()
        .map(super::sweep::parse_shard)
        .transpose()?;
    let sweep = Sweep {
        axes,
        study: &study,
        shard,
    };
    let out = match &a.out {
        Some(p) => p.clone(),
        None if a.case.is_some() => {
            // One case's verdict needs no file: rows go to a private temporary directory.
            let dir = tempfile::tempdir().map_err(Failure::other)?;
            let out = dir.path().join("verdict.csv");
            let code = run_and_render(&sweep, &out, &a, plot_chi.as_ref(), quiet);
            drop(dir);
            return code;
        }
        None => {
            return Err(Failure::input(
                "demag: give --out FILE.csv for the study's table",
            ))
        }
    };
    run_and_render(&sweep, &out, &a, plot_chi.as_ref(), quiet)
}

fn run_and_render(
    sweep: &Sweep<'_>,
    out: &Path,
    a: &DemagArgs,
    plot_chi: Option<&Axis>,
    quiet: bool,
) -> Result<u8, Failure> {
    let outcome = {
        let bar = Progress::new(Some(sweep.indices().len() as u64), "demag", quiet);
        sweep.run(out, a.jobs, &|done| bar.set(done as u64))
    }
    .map_err(Failure::other)?;
    // A shard's rows are rendered only once the shards are merged (`--from`).
    let rows = match sweep.shard {
        None => read_study(&String::from_utf8_lossy(&outcome.bytes), a.threshold)
            .map_err(Failure::other)?,
        Some(_) => Vec::new(),
    };
    if a.out.is_some() {
        output::write_all(&[(out.to_path_buf(), outcome.bytes.clone())]).map_err(Failure::other)?;
        let _ = std::fs::remove_file(partial_path(out));
    }
    if sweep.shard.is_none() {
        render(&rows, a, plot_chi, a.threshold)?;
    } else if a.json.is_some() || a.plots.is_some() {
        eprintln!("axicore: note: --json and --plots are written from the merged study (axicore demag --from)");
    }
    let short = rows
        .iter()
        .filter(|r| r.status.starts_with("ok") && !r.tolerance_reached)
        .count();
    if short > 0 {
        eprintln!(
            "axicore: warning: {short} of {} points stopped at the node cap before the tolerance (tolerance_reached false; their error bars say how well they are known)",
            rows.len()
        );
    }
    Ok(super::sweep::finished(a.out.as_deref(), &outcome))
}

/// Every `--plot-chi` value must be a χ of the study.
fn check_plot_chi(ax: &Axis, chis: impl Iterator<Item = f64>) -> Result<(), Failure> {
    let chis: Vec<f64> = chis.collect();
    for v in ax.values.iter().filter_map(toml::Value::as_float) {
        if !chis.contains(&v) {
            return Err(Failure::input(format!(
                "--plot-chi: {v} is not a χ of the study"
            )));
        }
    }
    Ok(())
}

/// The grid's axes from the options (defaults: the study's own grid), every value checked.
fn grid_axes(a: &DemagArgs, family: Family) -> Result<Vec<Axis>, Failure> {
    let mut axes = study::default_axes();
    if let Some(g) = &a.gamma {
        axes[0] = grid::parse_range(&format!("{}={g}", study::GAMMA))
            .map_err(|e| Failure::input(e.replace("--vary", "--gamma")))?;
    }
    if let Some(c) = &a.chi {
        axes[1] = list_axis(study::CHI, c)?;
    }
    if let Some(b) = &a.bore {
        axes.push(list_axis(study::BETA, b)?);
    }
    for axis in &axes {
        let option = match axis.key.as_str() {
            study::GAMMA => "--gamma",
            study::CHI => "--chi",
            _ => "--bore",
        };
        for v in &axis.values {
            let x = v.as_float().unwrap_or(f64::NAN);
            study::check_value(family, &axis.key, x)
                .map_err(|e| Failure::input(format!("{option}: {e}")))?;
        }
    }
    let points = grid::point_count(&axes);
    if points > 1_000_000 {
        return Err(Failure::input(format!(
            "demag: {points} points is more than 1 000 000"
        )));
    }
    Ok(axes)
}

/// The axes of one case's core: its proportions at χ = 0 and at the susceptibility of its
/// operating point (the volume-mean secant value ⟨B_z⟩/(μ0⟨H_z⟩) − 1, exact μr − 1 for a
/// linear core).
fn case_axes(path: &Path, a: &DemagArgs) -> Result<Vec<Axis>, Failure> {
    if a.gamma.is_some() || a.chi.is_some() || a.bore.is_some() || a.spheroids {
        return Err(Failure::input(
            "demag: with a case file the core's own proportions and material are studied (drop --gamma, --chi, --bore, --spheroids)",
        ));
    }
    let file = case_name(Some(path));
    let case = read_case_file(path).map_err(|e| Failure::input(e.to_string()))?;
    let core = case
        .core
        .as_ref()
        .ok_or_else(|| Failure::input(format!("{file}: [core]: the case has no core to study")))?;
    let (gamma, beta, spheroid) = match core.shape {
        CoreShape::Rod { length, diameter } => (length / diameter, 0.0, false),
        CoreShape::Tube {
            length,
            diameter,
            bore,
        } => (length / diameter, bore / diameter, false),
        CoreShape::Sphere { .. } => (1.0, 0.0, true),
        CoreShape::Spheroid { length, diameter } => (length / diameter, 0.0, true),
    };
    if spheroid {
        return Err(Failure::input(format!(
            "{file}: [core] shape: the study of a case's core covers rods and tubes; a spheroid's factor is Osborn's closed form (use --spheroids for the grid)"
        )));
    }
    let outcome = run(&case, &RunOptions::default())
        .map_err(|e| super::failure::run_failure(e, &case, &file))?;
    let r = outcome
        .report
        .core
        .ok_or_else(|| Failure::other("no core in the report"))?;
    let chi_op = r.average_b_z_T / (axicore_solver::MU0 * r.average_h_z_A_per_m) - 1.0;
    let mut chis = vec![0.0];
    if chi_op.is_finite() && chi_op > 1e-9 {
        chis.push(chi_op);
    }
    let num = |x: f64| toml::Value::Float(x);
    let mut axes = vec![
        Axis {
            key: study::GAMMA.into(),
            values: vec![num(gamma)],
        },
        study::chi_axis(&chis),
    ];
    if beta > 0.0 {
        axes.push(Axis {
            key: study::BETA.into(),
            values: vec![num(beta)],
        });
    }
    emit(&format!(
        "{file}: core L/D {gamma:.4}{}, susceptibility at the operating point {chi_op:.5e}\n",
        if beta > 0.0 {
            format!(", bore/D {beta:.4}")
        } else {
            String::new()
        }
    ));
    Ok(axes)
}

/// Writes the JSON table and plots of a finished study and prints its table.
fn render(
    rows: &[StudyRow],
    a: &DemagArgs,
    plot_chi: Option<&Axis>,
    threshold: f64,
) -> Result<u8, Failure> {
    let mut files: Vec<(PathBuf, Vec<u8>)> = Vec::new();
    if let Some(j) = &a.json {
        let v = crate::report::demag::study_json(rows, threshold);
        files.push((
            j.clone(),
            (serde_json::to_string_pretty(&v).map_err(Failure::other)? + "\n").into_bytes(),
        ));
    }
    if let Some(dir) = &a.plots {
        let chis: Option<Vec<f64>> =
            plot_chi.map(|ax| ax.values.iter().filter_map(toml::Value::as_float).collect());
        for (name, svg) in crate::plot::demag::study_plots(rows, chis.as_deref(), threshold)
            .map_err(Failure::other)?
        {
            files.push((dir.join(name), svg.into_bytes()));
        }
    }
    if !files.is_empty() {
        output::write_all(&files).map_err(Failure::other)?;
    }
    emit(&crate::report::demag::study_text(rows, threshold));
    Ok(EXIT_OK)
}
