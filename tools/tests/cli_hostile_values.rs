//! Robustness sweep: every value of a case (and of two permanent-magnet cases, whose keys
//! cannot join a saturating core) replaced by each of a set of hostile values (wrong
//! types, wrong units, signs, zero, non-finite, absurd magnitudes, non-ASCII digits). Whatever
//! is written, `axicore solve` must end with exit code 0 (a result), 2 (bad input: one line
//! naming the file and a key, no output files) or 3 (no convergence, no output files) — never
//! a panic or exit code 1. The contract is the project's input rule (README, "Bad input");
//! the sweep itself is common practice for command-line tools (a poor man's fuzzer: it found
//! five faults that reached the mesher or solver unnamed — absurd lengths, positions, turns ×
//! current and permeabilities — now refused by key in `cli_bad_input`).

use std::process::Command;

/// A small case touching every section, on a coarse first-order mesh to keep runs short.
const BASE: &str = r#"title = "sweep"
[core]
shape = "tube"
length = "40 mm"
diameter = "8 mm"
bore = "3 mm"
centre = "1 mm"
[core.law]
kind = "knee"
saturation = "1.5 T"
initial_mu_r = 3000
max_mu_r = 20000
[[winding]]
name = "a"
turns = 300
current = "0.2 A"
inner_radius = "4.5 mm"
outer_radius = "6 mm"
length = "30 mm"
centre = "0 mm"
[background]
b_axial = "50 uT"
[surroundings]
edge = "fixed"
radius = "0.5 m"
[mesh]
fineness = 0.3
order = 1
angle_floor = 25
max_nodes = 200000
corner_layers = 2
[solver]
max_iterations = 30
"#;

/// A permanent-magnet core (a linear recoil law with a prescribed magnetization) inside a
/// winding: its keys cannot join `BASE`, whose core saturates.
const MAGNET: &str = r#"title = "magnet sweep"
[core]
shape = "rod"
length = "20 mm"
diameter = "10 mm"
magnetization = "800 kA/m"
mu_r = 1.05
[[winding]]
turns = 100
current = "0.5 A"
inner_radius = "6 mm"
outer_radius = "7 mm"
length = "15 mm"
[mesh]
fineness = 0.3
order = 1
"#;

/// The magnet's polarization instead of its magnetization (at most one of the two).
const POLARIZED: &str = r#"title = "magnet sweep"
[core]
shape = "rod"
length = "20 mm"
diameter = "10 mm"
polarization = "-1.1 T"
[mesh]
fineness = 0.3
order = 1
"#;

/// Every line of each case is swept once: a line already swept in an earlier case is skipped.
const BASES: [&str; 3] = [BASE, MAGNET, POLARIZED];

const HOSTILE: [&str; 16] = [
    r#""""#,
    r#""-1 mm""#,
    "0",
    "-3",
    "nan",
    r#""inf mm""#,
    r#""1e308 mm""#,
    r#""1e-300 mm""#,
    "1e308",
    "1e-300",
    r#""5 T""#,
    r#""abc""#,
    "true",
    "[1, 2]",
    r#""７ mm""#,
    r#""70 mm mm""#,
];

#[test]
fn every_value_replaced_by_a_hostile_one_ends_in_a_result_or_a_named_fault() {
    let dir = std::env::temp_dir().join(format!("axicore-sweep-{}", std::process::id()));
    let mut runs = 0;
    let mut swept: Vec<&str> = Vec::new();
    for base in BASES {
        sweep(base, &dir, &mut swept, &mut runs);
    }
    let _ = std::fs::remove_dir_all(&dir);
    assert!(runs > 300, "{runs} runs");
}

/// Replaces each line of `base` not in `swept` by every hostile value in turn and checks the
/// outcome; counts the runs.
fn sweep<'a>(base: &'a str, dir: &std::path::Path, swept: &mut Vec<&'a str>, runs: &mut usize) {
    let lines: Vec<&str> = base.lines().collect();
    for (i, line) in lines.iter().enumerate() {
        let Some((key, _)) = line.split_once(" = ") else {
            continue;
        };
        if swept.contains(line) {
            continue;
        }
        swept.push(line);
        for value in HOSTILE {
            let _ = std::fs::remove_dir_all(dir);
            std::fs::create_dir_all(dir).unwrap();
            let mut case: Vec<String> = lines.iter().map(|l| l.to_string()).collect();
            case[i] = format!("{key} = {value}");
            let file = dir.join("case.toml");
            std::fs::write(&file, case.join("\n")).unwrap();
            let vtk = dir.join("out.vtu");
            let out = Command::new(env!("CARGO_BIN_EXE_axicore"))
                .args(["solve", file.to_str().unwrap(), "--json", "--vtk"])
                .arg(&vtk)
                .output()
                .unwrap();
            *runs += 1;
            let code = out.status.code().unwrap_or(-1);
            let err = String::from_utf8_lossy(&out.stderr);
            let what = format!("{key} = {value}: exit {code}, stderr {err}");
            assert!(matches!(code, 0 | 2 | 3), "{what}");
            assert!(!err.contains("panicked"), "{what}");
            let files = std::fs::read_dir(dir).unwrap().count();
            match code {
                0 => {
                    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
                    let m = json["dipole_moment_Am2"].as_f64().unwrap();
                    assert!(m.is_finite(), "{what}: dipole {m}");
                    assert!(vtk.exists(), "{what}: no VTK file");
                }
                _ => assert_eq!(files, 1, "{what}: output files written"),
            }
            if code == 2 {
                assert_eq!(err.trim().lines().count(), 1, "{what}");
                // "axicore: error: FILE: KEY: FAULT" (a TOML syntax fault names line and column).
                let named = err.contains("case.toml: ")
                    && (err.matches(": ").count() >= 3 || err.contains("line "));
                assert!(named, "{what}");
            }
        }
    }
}
