//! Arguments shared by several commands: the case to load, points and lines, thread counts.

use std::path::{Path, PathBuf};

use super::Failure;
use crate::case::{parse_case, read_case_file, Case};
use crate::units::{self, Dimension};
use crate::{EXAMPLE_CASE, EXAMPLE_NAME};

/// Largest `--threads` accepted. (A pool larger than this only costs start-up time: 1024
/// threads take ~6 s on the example, against 0.2 s for 2.)
pub const MAX_THREADS: usize = 1024;

/// How a case is named in messages.
pub fn case_name(case: Option<&Path>) -> String {
    case.map_or(EXAMPLE_NAME.to_string(), |p| p.display().to_string())
}

/// Reads and validates the case file, or the built-in example without one.
pub fn load(case: Option<&Path>) -> Result<Case, Failure> {
    match case {
        Some(p) => read_case_file(p).map_err(|e| Failure::input(e.to_string())),
        None => parse_case(EXAMPLE_CASE, EXAMPLE_NAME).map_err(|e| Failure::input(e.to_string())),
    }
}

/// Parses "R,Z" (lengths with units; plain numbers are metres) for the option `what`.
pub fn parse_point(text: &str, what: &str) -> Result<[f64; 2], Failure> {
    let mut parts = text.split(',');
    let (Some(r), Some(z), None) = (parts.next(), parts.next(), parts.next()) else {
        return Err(Failure::input(format!("{what}: '{text}' must be R,Z")));
    };
    let parse = |t| {
        units::parse_supported(t, Dimension::Length)
            .map_err(|e| Failure::input(format!("{what}: {e}")))
    };
    let (r, z) = (parse(r)?, parse(z)?);
    if r < 0.0 {
        return Err(Failure::input(format!(
            "{what}: r = {r} m must not be negative"
        )));
    }
    Ok([r, z])
}

/// Parses "R0,Z0:R1,Z1:N" for `--line`.
pub fn parse_line(text: &str) -> Result<([f64; 2], [f64; 2], usize), Failure> {
    let parts: Vec<&str> = text.split(':').collect();
    let [a, b, n] = parts[..] else {
        return Err(Failure::input(format!(
            "--line: '{text}' must be R0,Z0:R1,Z1:N"
        )));
    };
    let n: usize = n
        .trim()
        .parse()
        .ok()
        .filter(|&n| (2..=1_000_000).contains(&n))
        .ok_or_else(|| {
            Failure::input(format!(
                "--line: sample count '{n}' must be an integer from 2 to 1000000"
            ))
        })?;
    Ok((parse_point(a, "--line")?, parse_point(b, "--line")?, n))
}

/// Runs `work` on a pool of `threads` workers (the global pool, all cores, without).
pub fn with_threads<T: Send>(
    threads: Option<usize>,
    work: impl FnOnce() -> T + Send,
) -> Result<T, Failure> {
    match threads {
        Some(n) if !(1..=MAX_THREADS).contains(&n) => Err(Failure::input(format!(
            "--threads: {n} must be from 1 to {MAX_THREADS}"
        ))),
        Some(n) => Ok(rayon::ThreadPoolBuilder::new()
            .num_threads(n)
            .build()
            .map_err(Failure::other)?
            .install(work)),
        None => Ok(work()),
    }
}

/// The (option, path) pairs of the outputs that were asked for.
pub fn outputs<'a>(asked: &[(&'a str, &'a Option<PathBuf>)]) -> Vec<(&'a str, &'a Path)> {
    asked
        .iter()
        .filter_map(|(o, p)| p.as_deref().map(|p| (*o, p)))
        .collect()
}

/// Checks the outputs before any work: the paths are safe to write
/// ([`crate::output::check_paths`]), and each extension fits its option (a legacy `.vtk`
/// name for a `.vtu` map is refused with the name to use).
pub fn check_outputs(outputs: &[(&str, &Path)], input: Option<&Path>) -> Result<(), Failure> {
    crate::output::check_paths(outputs, input).map_err(Failure::input)?;
    for &(option, path) in outputs {
        let expected: &[&str] = match option {
            "--vtk" => &["vtu"],
            "--csv" | "--out" => &["csv"],
            "--json" => &["json"],
            "--picture" => &["png", "svg"],
            _ => &["svg"],
        };
        crate::output_names::check_extension(option, path, expected).map_err(Failure::input)?;
    }
    Ok(())
}
