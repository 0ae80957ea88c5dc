//! The sweep engine: every point of a grid over case keys solved as its own case, rows
//! appended as points finish, the sorted file written at the end; resumable and shardable.

use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::path::Path;
use std::sync::Mutex;

use rayon::prelude::*;
use toml::Table;

use super::grid::{self, Axis};
use super::sweep_file::{self, Appender, SweepId};
use crate::accuracy::{self, Caps, Refine};
use crate::case::parse_case;
use crate::pipeline::{run, RunOptions};

/// What a sweep computes at each point: a pure function from the point's axis values to the
/// quantity cells of its row.
pub trait PointStudy: Sync {
    /// Everything besides the axes that identifies the sweep (case text, options), hashed
    /// into its fingerprint.
    fn definition(&self) -> String;
    /// The quantity columns after the axes, comma-separated, `status` first.
    fn columns(&self) -> String;
    /// The quantity cells of the point with these axis values (after `status`, which is
    /// `ok`), or why the point failed.
    fn solve(&self, values: &[&toml::Value]) -> Result<String, String>;
}

/// A sweep to run: the grid, what each point computes, and the shard.
pub struct Sweep<'s> {
    /// The varied keys.
    pub axes: Vec<Axis>,
    /// What each point computes.
    pub study: &'s dyn PointStudy,
    /// (K, N): compute only the points i with i % N == K − 1.
    pub shard: Option<(usize, usize)>,
}

/// How a sweep ended.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SweepOutcome {
    /// The file's bytes (identification, header, sorted rows).
    pub bytes: Vec<u8>,
    /// Points of this run (shard) in all.
    pub points: usize,
    /// Points computed now (the rest came from the partial file).
    pub computed: usize,
    /// Points whose row says they failed.
    pub failed: usize,
}

/// The plain sweep over case keys: each point is the case file with the axes' keys set,
/// solved (to a tolerance if asked) like `axicore solve`.
#[derive(Debug, Clone)]
pub struct CaseKeys {
    /// The case file's path (names it in messages and resolves its relative B–H files).
    pub case_file: String,
    /// The case file's text.
    pub case_text: String,
    /// Refine each point to this estimated relative error of the moment.
    pub tolerance: Option<f64>,
}

/// Columns after the varied keys.
const QUANTITIES: &str = "status,dipole_moment_Am2,estimated_relative_error,moment_gain,apparent_permeability,inductance_H,max_core_b_T,newton_iterations";

/// The case text with the axes' keys set to `values`.
pub fn modified_case(text: &str, axes: &[Axis], values: &[&toml::Value]) -> Result<String, String> {
    let mut root: Table = text
        .parse()
        .map_err(|e: toml::de::Error| e.message().to_string())?;
    for (axis, v) in axes.iter().zip(values) {
        grid::set_key(&mut root, &axis.key, (*v).clone())?;
    }
    toml::to_string(&root).map_err(|e| e.to_string())
}

impl CaseKeys {
    fn solve_with(&self, axes: &[Axis], values: &[&toml::Value]) -> Result<String, String> {
        let text = modified_case(&self.case_text, axes, values)?;
        let case = parse_case(&text, &self.case_file).map_err(|e| e.to_string())?;
        let opts = RunOptions::default();
        let (report, estimate) = match self.tolerance {
            Some(t) => {
                let caps = Caps {
                    max_nodes: case.mesh.max_nodes,
                    max_seconds: None,
                };
                let c = accuracy::run_to_tolerance(&case, &opts, t, caps, Refine::Uniform)
                    .map_err(|e| e.to_string())?;
                (c.outcome.report, Some(c.history.estimated_relative_error))
            }
            None => (run(&case, &opts).map_err(|e| e.to_string())?.report, None),
        };
        let opt = |v: Option<f64>| v.map_or(String::new(), |x| format!("{x:.9e}"));
        Ok(format!(
            "{:.9e},{},{},{},{},{},{}",
            report.dipole_moment_Am2,
            opt(estimate),
            opt(report.moment_gain),
            opt(report.core.as_ref().and_then(|c| c.apparent_permeability)),
            opt(report.inductance_H),
            opt(report.max_core_b_T),
            report.newton_iterations
        ))
    }
}

/// The case-key sweep bound to its axes (the keys it sets are the axes themselves).
pub struct KeySweep {
    /// The case and options.
    pub keys: CaseKeys,
    /// The axes (also the sweep's).
    pub axes: Vec<Axis>,
}

impl PointStudy for KeySweep {
    fn definition(&self) -> String {
        format!(
            "{}\ntolerance={:?}",
            self.keys.case_text, self.keys.tolerance
        )
    }

    fn columns(&self) -> String {
        QUANTITIES.to_string()
    }

    fn solve(&self, values: &[&toml::Value]) -> Result<String, String> {
        self.keys.solve_with(&self.axes, values)
    }
}

impl Sweep<'_> {
    /// The identification of this sweep (and shard).
    pub fn id(&self) -> SweepId {
        let mut def = self.study.definition();
        for a in &self.axes {
            let _ = write!(def, "\n{}=", a.key);
            for v in &a.values {
                let _ = write!(def, "{}|", grid::cell(v));
            }
        }
        SweepId {
            fingerprint: sweep_file::fnv1a(def.as_bytes()),
            points: grid::point_count(&self.axes),
            shard: self.shard,
        }
    }

    /// The header row.
    pub fn header(&self) -> String {
        let keys: Vec<&str> = self.axes.iter().map(|a| a.key.as_str()).collect();
        format!("index,{},{}\n", keys.join(","), self.study.columns())
    }

    /// The indices this run computes.
    pub fn indices(&self) -> Vec<usize> {
        let n = grid::point_count(&self.axes);
        match self.shard {
            Some((k, of)) => (0..n).filter(|i| i % of == k - 1).collect(),
            None => (0..n).collect(),
        }
    }

    /// The row of point `index`: a failed point (a bad value, a solve that did not converge)
    /// is a row with its message, not an aborted sweep.
    pub fn row(&self, index: usize) -> String {
        let values = grid::point(&self.axes, index);
        let cells: Vec<String> = values.iter().map(|v| csv_cell(&grid::cell(v))).collect();
        let tail = match self.study.solve(&values) {
            Ok(q) => format!("ok,{q}"),
            Err(e) => {
                let empty = self.study.columns().matches(',').count();
                format!("{}{}", csv_cell(&format!("failed: {e}")), ",".repeat(empty))
            }
        };
        format!("{index},{},{tail}\n", cells.join(","))
    }

    /// Runs the sweep into `out` (rows appended to `out.partial` as they finish, resuming from
    /// it), `jobs` points at a time; `on_point` is called after each point (progress only).
    pub fn run(
        &self,
        out: &Path,
        jobs: usize,
        on_point: &(dyn Fn(usize) + Sync),
    ) -> Result<SweepOutcome, String> {
        let id = self.id();
        let header = self.header();
        let partial = sweep_file::partial_path(out);
        let done: BTreeMap<usize, String> = match std::fs::read_to_string(&partial) {
            Ok(text) => sweep_file::read_rows(&text, &id, &header).ok_or_else(|| {
                format!(
                    "{}: holds another sweep (other case, keys, values, tolerance or shard); remove it or choose another --out",
                    partial.display()
                )
            })?,
            Err(_) => BTreeMap::new(),
        };
        let wanted = self.indices();
        let pending: Vec<usize> = wanted
            .iter()
            .copied()
            .filter(|i| !done.contains_key(i))
            .collect();
        let appender = Appender::open(&partial, &id, &header, &done)
            .map_err(|e| format!("{}: cannot write: {e}", partial.display()))?;
        let appender = Mutex::new(appender);
        let rows = Mutex::new(done);
        let finished = std::sync::atomic::AtomicUsize::new(wanted.len() - pending.len());
        let work = |i: &usize| -> Result<(), String> {
            let row = self.row(*i);
            appender
                .lock()
                .map_err(|_| "a worker failed".to_string())?
                .push(&row)
                .map_err(|e| format!("{}: cannot write: {e}", partial.display()))?;
            rows.lock()
                .map_err(|_| "a worker failed".to_string())?
                .insert(*i, row);
            on_point(finished.fetch_add(1, std::sync::atomic::Ordering::Relaxed) + 1);
            Ok(())
        };
        if jobs > 1 {
            rayon::ThreadPoolBuilder::new()
                .num_threads(jobs)
                .build()
                .map_err(|e| e.to_string())?
                .install(|| pending.par_iter().try_for_each(work))?;
        } else {
            pending.iter().try_for_each(work)?;
        }
        let rows = rows
            .into_inner()
            .map_err(|_| "a worker failed".to_string())?;
        let status_column = 1 + self.axes.len();
        let failed = rows
            .values()
            .filter(|r| {
                r.split(',')
                    .nth(status_column)
                    .is_some_and(|c| c.trim_start_matches('"').starts_with("failed"))
            })
            .count();
        Ok(SweepOutcome {
            bytes: sweep_file::file_bytes(&id, &header, &rows),
            points: wanted.len(),
            computed: pending.len(),
            failed,
        })
    }
}

/// A CSV cell, quoted when it holds a comma, quote or newline (RFC 4180).
pub fn csv_cell(text: &str) -> String {
    if text.contains([',', '"', '\n', '\r']) {
        format!(
            "\"{}\"",
            text.replace('"', "\"\"").replace(['\n', '\r'], " ")
        )
    } else {
        text.to_string()
    }
}

/// Joins shard files (each a finished shard K of N of one sweep) into the file the unsharded
/// sweep writes; refuses shards of different sweeps, duplicates and missing shards.
pub fn merge(shards: &[(String, String)]) -> Result<Vec<u8>, String> {
    let mut first: Option<(SweepId, String)> = None;
    let mut seen = BTreeMap::new();
    let mut rows = BTreeMap::new();
    for (name, text) in shards {
        let mut lines = text.split_inclusive('\n');
        let id_line = lines.next().unwrap_or_default();
        let id = SweepId::parse(id_line.trim_end())
            .ok_or_else(|| format!("{name}: not an axicore sweep file"))?;
        let (k, n) = id
            .shard
            .ok_or_else(|| format!("{name}: a whole sweep, not a shard"))?;
        let header = lines.next().unwrap_or_default().to_string();
        let whole = SweepId {
            shard: None,
            ..id.clone()
        };
        match &first {
            None => first = Some((whole.clone(), header.clone())),
            Some((w, h)) if *w == whole && *h == header => {}
            Some(_) => return Err(format!("{name}: a shard of another sweep")),
        }
        if let Some(other) = seen.insert(k, (n, name.clone())) {
            return Err(format!("{name}: shard {k} is also {}", other.1));
        }
        if seen.values().any(|(m, _)| *m != n) {
            return Err(format!("{name}: shard {k}/{n} of a different split"));
        }
        let got = sweep_file::read_rows(text, &id, &header)
            .ok_or_else(|| format!("{name}: unreadable rows"))?;
        let expected = (0..id.points).filter(|i| i % n == k - 1).count();
        if got.len() != expected {
            return Err(format!(
                "{name}: shard {k}/{n} holds {} of its {expected} points (unfinished?)",
                got.len()
            ));
        }
        rows.extend(got);
    }
    let (whole, header) = first.ok_or("no shard files given")?;
    let n = seen.values().next().map_or(0, |(n, _)| *n);
    if let Some(missing) = (1..=n).find(|k| !seen.contains_key(k)) {
        return Err(format!("shard {missing}/{n} is missing"));
    }
    Ok(sweep_file::file_bytes(&whole, &header, &rows))
}
