//! Shared helpers of the validation tests: run a case given as TOML text.
#![allow(dead_code)]

use axicore::case::parse_case;
use axicore::pipeline::{run, Outcome, RunOptions};

/// Parses and solves `toml`, panicking with the message on any failure (tests only).
pub fn solve(toml: &str, opts: &RunOptions) -> Outcome {
    let case = parse_case(toml, "test case").unwrap_or_else(|e| panic!("{e}"));
    run(&case, opts).unwrap_or_else(|e| panic!("{e}"))
}

/// Relative error of `got` against `want`.
pub fn rel(got: f64, want: f64) -> f64 {
    (got - want).abs() / want.abs()
}
