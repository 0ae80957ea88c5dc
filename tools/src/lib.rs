//! The `axicore` program as a library: case files, the end-to-end pipeline and reports.
//!
//! The command line (`commands/`, one file per subcommand) is a thin layer over
//! [`pipeline::run`]; `report/` renders records as text, JSON and CSV, `plot/` draws charts.
#![forbid(unsafe_code)]
#![warn(missing_docs)]

pub mod accuracy;
pub mod apparent;
pub mod bh_csv;
pub mod case;
pub mod commands;
pub mod demag;
pub mod geometry;
pub mod hp_geometry;
pub mod operating_point;
pub mod output;
pub mod output_names;
pub mod pipeline;
pub mod plot;
pub mod progress;
pub mod ramp;

pub mod report;
pub mod slender;
pub mod study;
pub mod suggest;
pub mod units;
pub mod vtk_map;

/// The built-in example case (also saved as `cases/torquer-rod/case.toml`).
pub const EXAMPLE_CASE: &str = include_str!("../../cases/torquer-rod/case.toml");
/// Name under which the built-in example appears in messages.
pub const EXAMPLE_NAME: &str = "built-in example (cases/torquer-rod/case.toml)";
