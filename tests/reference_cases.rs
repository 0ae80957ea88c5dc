//! Regression over the reference geometries in `cases/`: every case must reproduce its
//! `baseline.json` (written by `tools/update_baselines.sh`).
//!
//! Source: none outside the project — the baselines are this program's own earlier results
//! (golden-file regression testing, common practice); the outside checks of the same physics
//! are the validation tests named in the README. What this guards
//! is that a change elsewhere does not move any reported number without anyone noticing: runs
//! are deterministic, so the numbers must agree to rounding (1e-12 relative) and the mesh sizes
//! exactly. A deliberate change of the numerics regenerates the baselines in the same commit.

use std::path::Path;

use axicore::case::read_case_file;
use axicore::pipeline::{run, RunOptions};

#[test]
fn every_reference_case_reproduces_its_baseline() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("cases");
    let mut dirs: Vec<_> = std::fs::read_dir(&root)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.join("case.toml").exists())
        .collect();
    dirs.sort();
    assert!(dirs.len() >= 5, "reference cases missing: {dirs:?}");
    let mut failures = Vec::new();
    for dir in &dirs {
        let case = read_case_file(&dir.join("case.toml")).unwrap_or_else(|e| panic!("{e}"));
        let baseline: serde_json::Value = serde_json::from_str(
            &std::fs::read_to_string(dir.join("baseline.json"))
                .unwrap_or_else(|e| panic!("{}: {e}", dir.display())),
        )
        .unwrap();
        let out = run(&case, &RunOptions::default()).unwrap_or_else(|e| panic!("{e}"));
        let got = serde_json::to_value(&out.report).unwrap();
        for (key, want) in baseline.as_object().unwrap() {
            let have = &got[key];
            let same = match (want.as_f64(), have.as_f64()) {
                (Some(w), Some(h)) => (w - h).abs() <= 1e-12 * w.abs().max(h.abs()),
                _ => want == have,
            };
            if !same {
                failures.push(format!(
                    "{}: {key} = {have}, baseline {want}",
                    dir.display()
                ));
            }
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}
