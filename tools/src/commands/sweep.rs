//! `axicore sweep` and `axicore merge`: a grid of solves over case keys, resumable, in
//! parallel or in shards, and the join of shard files.

use std::path::PathBuf;

use clap::Args;

use super::args::{self, case_name};
use super::failure::{EXIT_OK, EXIT_POINTS_FAILED};
use super::{emit, Failure};
use crate::case::read_case_text;
use crate::output;
use crate::progress::Progress;
use crate::study::grid;
use crate::study::sweep::{merge, CaseKeys, KeySweep, Sweep, SweepOutcome};
use crate::study::sweep_file::partial_path;

/// Options of `axicore sweep`.
#[derive(Args, Debug)]
pub struct SweepArgs {
    /// Case file (TOML) whose keys are varied.
    case: PathBuf,
    /// A key over a range, "KEY=FROM..TO:N" or "KEY=FROM..TO:N:log" (values with units, e.g.
    /// "core.length=50mm..100mm:6"); repeatable: the points are the grid product.
    #[arg(long, value_name = "KEY=FROM..TO:N[:log]")]
    vary: Vec<String>,
    /// A key over listed values, "KEY=v1,v2,…"; repeatable.
    #[arg(long, value_name = "KEY=v1,v2,…")]
    values: Vec<String>,
    /// The sweep's CSV file (rows go to FILE.partial as points finish; a rerun resumes).
    #[arg(long, value_name = "FILE")]
    out: PathBuf,
    /// Refine every point to this estimated relative error of the moment.
    #[arg(long, value_name = "REL")]
    tolerance: Option<f64>,
    /// Points solved at a time (one worker each).
    #[arg(long, default_value_t = 1)]
    jobs: usize,
    /// Compute only shard K of N (every N-th point, K from 1); join shards with `axicore merge`.
    #[arg(long, value_name = "K/N")]
    shard: Option<String>,
}

/// Options of `axicore merge`.
#[derive(Args, Debug)]
pub struct MergeArgs {
    /// Shard files of one sweep (from `axicore sweep --shard K/N`).
    shards: Vec<PathBuf>,
    /// The joined file: the bytes the unsharded sweep writes.
    #[arg(long, value_name = "FILE")]
    out: PathBuf,
}

pub(super) fn parse_shard(text: &str) -> Result<(usize, usize), Failure> {
    let fault = || Failure::input(format!("--shard: '{text}' must be K/N with 1 ≤ K ≤ N"));
    let (k, n) = text.split_once('/').ok_or_else(fault)?;
    let (k, n): (usize, usize) = (
        k.trim().parse().map_err(|_| fault())?,
        n.trim().parse().map_err(|_| fault())?,
    );
    (1..=n).contains(&k).then_some((k, n)).ok_or_else(fault)
}

/// Runs `axicore sweep`.
pub fn sweep(a: SweepArgs, quiet: bool) -> Result<u8, Failure> {
    let file = case_name(Some(&a.case));
    args::check_outputs(&[("--out", a.out.as_path())], Some(&a.case))?;
    let case_text = read_case_text(&a.case).map_err(|e| Failure::input(e.to_string()))?;
    // The case itself must be valid before any point is varied.
    crate::case::parse_case(&case_text, &file).map_err(|e| Failure::input(e.to_string()))?;
    let mut axes = Vec::new();
    for v in &a.vary {
        axes.push(grid::parse_range(v).map_err(Failure::input)?);
    }
    for v in &a.values {
        axes.push(grid::parse_list(v).map_err(Failure::input)?);
    }
    if axes.is_empty() {
        return Err(Failure::input(
            "sweep: give at least one --vary or --values",
        ));
    }
    if let Some(t) = a.tolerance {
        if !(t.is_finite() && t > 0.0 && t < 1.0) {
            return Err(Failure::input(format!(
                "--tolerance: {t} must be a relative error between 0 and 1"
            )));
        }
    }
    if !(1..=args::MAX_THREADS).contains(&a.jobs) {
        return Err(Failure::input(format!(
            "--jobs: {} must be from 1 to {}",
            a.jobs,
            args::MAX_THREADS
        )));
    }
    let shard = a.shard.as_deref().map(parse_shard).transpose()?;
    let points = grid::point_count(&axes);
    if points > 10_000_000 {
        return Err(Failure::input(format!(
            "sweep: {points} points is more than 10 000 000"
        )));
    }
    let study = KeySweep {
        keys: CaseKeys {
            case_file: file,
            case_text,
            tolerance: a.tolerance,
        },
        axes: axes.clone(),
    };
    let sweep = Sweep {
        axes,
        study: &study,
        shard,
    };
    let mut outcome = {
        let bar = Progress::new(Some(sweep.indices().len() as u64), "sweep", quiet);
        sweep.run(&a.out, a.jobs, &|done| bar.set(done as u64))
    }
    .map_err(Failure::other)?;
    let bytes = std::mem::take(&mut outcome.bytes);
    output::write_all(&[(a.out.clone(), bytes)]).map_err(Failure::other)?;
    let _ = std::fs::remove_file(partial_path(&a.out));
    Ok(finished(Some(&a.out), &outcome))
}

/// Says how a sweep (or study) run ended — its file's line when `out` is given, a warning
/// when points failed — and returns the exit code (5 when some points failed).
pub(super) fn finished(out: Option<&std::path::Path>, outcome: &SweepOutcome) -> u8 {
    if let Some(out) = out {
        emit(&format!(
            "{}: {} points ({} computed now, {} failed)\n",
            out.display(),
            outcome.points,
            outcome.computed,
            outcome.failed
        ));
    }
    if outcome.failed > 0 {
        eprintln!(
            "axicore: warning: {} of {} points failed (their rows say why); exit code {EXIT_POINTS_FAILED}",
            outcome.failed, outcome.points
        );
        return EXIT_POINTS_FAILED;
    }
    EXIT_OK
}

/// Runs `axicore merge`.
pub fn merge_shards(a: MergeArgs) -> Result<u8, Failure> {
    args::check_outputs(&[("--out", a.out.as_path())], None)?;
    let mut texts = Vec::new();
    for p in &a.shards {
        let text = read_case_text(p).map_err(|e| Failure::input(e.to_string()))?;
        texts.push((p.display().to_string(), text));
    }
    let bytes = merge(&texts).map_err(Failure::input)?;
    output::write_all(&[(a.out.clone(), bytes)]).map_err(Failure::other)?;
    emit(&format!(
        "{}: {} shards joined\n",
        a.out.display(),
        texts.len()
    ));
    Ok(EXIT_OK)
}
