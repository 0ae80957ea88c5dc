//! The sweep engine through the binary: the file is the same bytes for any number of jobs,
//! for shards joined by `merge`, and after a kill and a resumption; a bad point is a row with
//! its message and its own exit code. No outside source: these are the engine's own promises
//! (README, "Sweeps").

mod common;

use std::path::{Path, PathBuf};

use common::axicore;
use std::process::Command;

/// A scratch directory with the built-in example on a coarse mesh as `case.toml`.
fn scratch(name: &str) -> PathBuf {
    let dir = common::scratch_dir("sweep", name);
    let (_, text, _) = axicore(&["example"]);
    let text = text.replacen("fineness = 1.0", "fineness = 0.4", 1);
    assert!(text.contains("fineness = 0.4"));
    std::fs::write(dir.join("case.toml"), text).unwrap();
    dir
}

fn p(dir: &Path, name: &str) -> String {
    dir.join(name).to_str().unwrap().to_string()
}

const GRID: [&str; 4] = [
    "--vary",
    "core.length=50mm..90mm:3",
    "--values",
    "winding.1.current=20mA,40mA",
];

fn sweep(dir: &Path, out: &str, extra: &[&str]) -> (i32, String, String) {
    let case = p(dir, "case.toml");
    let out = p(dir, out);
    let mut args = vec!["sweep", case.as_str()];
    args.extend(GRID);
    args.extend(["--out", out.as_str()]);
    args.extend(extra);
    axicore(&args)
}

#[test]
fn jobs_and_shards_give_the_bytes_of_the_plain_run() {
    let dir = scratch("shards");
    let (code, _, err) = sweep(&dir, "whole.csv", &[]);
    assert_eq!(code, 0, "{err}");
    let whole = std::fs::read(dir.join("whole.csv")).unwrap();
    assert_eq!(String::from_utf8_lossy(&whole).lines().count(), 2 + 6);
    let (code, _, err) = sweep(&dir, "jobs.csv", &["--jobs", "2"]);
    assert_eq!(code, 0, "{err}");
    assert_eq!(std::fs::read(dir.join("jobs.csv")).unwrap(), whole);
    for k in ["1/2", "2/2"] {
        let name = format!("shard{}.csv", &k[..1]);
        let (code, _, err) = sweep(&dir, &name, &["--shard", k]);
        assert_eq!(code, 0, "{err}");
    }
    let (code, _, err) = axicore(&[
        "merge",
        &p(&dir, "shard1.csv"),
        &p(&dir, "shard2.csv"),
        "--out",
        &p(&dir, "merged.csv"),
    ]);
    assert_eq!(code, 0, "{err}");
    assert_eq!(std::fs::read(dir.join("merged.csv")).unwrap(), whole);
    // A missing shard and a whole file are refused.
    let (code, _, err) = axicore(&["merge", &p(&dir, "shard1.csv"), "--out", &p(&dir, "m2.csv")]);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("2/2 is missing"), "{err}");
    let (code, _, err) = axicore(&[
        "merge",
        &p(&dir, "shard1.csv"),
        &p(&dir, "whole.csv"),
        "--out",
        &p(&dir, "m3.csv"),
    ]);
    assert_eq!(code, 2, "{err}");
    assert!(!dir.join("m2.csv").exists() && !dir.join("m3.csv").exists());
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_killed_sweep_resumes_to_the_same_bytes_computing_only_what_is_missing() {
    let dir = scratch("resume");
    let (code, _, err) = sweep(&dir, "whole.csv", &[]);
    assert_eq!(code, 0, "{err}");
    let whole = std::fs::read_to_string(dir.join("whole.csv")).unwrap();
    // A real kill: SIGKILL once the partial file holds a finished row.
    let case = p(&dir, "case.toml");
    let out = p(&dir, "killed.csv");
    let mut args = vec!["sweep", case.as_str()];
    args.extend(GRID);
    args.extend(["--out", out.as_str()]);
    let mut child = Command::new(env!("CARGO_BIN_EXE_axicore"))
        .args(&args)
        .spawn()
        .unwrap();
    let partial = dir.join("killed.csv.partial");
    let start = std::time::Instant::now();
    while std::fs::read_to_string(&partial).map_or(0, |t| t.lines().count()) < 3 {
        assert!(start.elapsed().as_secs() < 120, "no row written");
        std::thread::sleep(std::time::Duration::from_millis(20));
    }
    child.kill().unwrap();
    let _ = child.wait();
    assert!(!dir.join("killed.csv").exists());
    let (code, stdout, err) = axicore(&args);
    assert_eq!(code, 0, "{err}");
    assert_eq!(
        std::fs::read_to_string(dir.join("killed.csv")).unwrap(),
        whole
    );
    assert!(!partial.exists());
    assert!(!stdout.contains("(6 computed now"), "{stdout}");
    // A torn last line (a kill in mid-write) is dropped and its point computed again.
    let lines: Vec<&str> = whole.split_inclusive('\n').collect();
    let torn = format!("{}{}{}{}", lines[0], lines[1], lines[5], &lines[3][..6]);
    std::fs::write(dir.join("torn.csv.partial"), torn).unwrap();
    let (code, stdout, err) = sweep(&dir, "torn.csv", &[]);
    assert_eq!(code, 0, "{err}");
    assert!(stdout.contains("(5 computed now"), "{stdout}");
    assert_eq!(
        std::fs::read_to_string(dir.join("torn.csv")).unwrap(),
        whole
    );
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_bad_point_is_a_row_with_its_message_and_the_sweep_says_so() {
    let dir = scratch("bad");
    let case = p(&dir, "case.toml");
    let out = p(&dir, "bad.csv");
    let (code, _, err) = axicore(&[
        "sweep",
        &case,
        "--values",
        "core.length=60mm,-5mm",
        "--out",
        &out,
    ]);
    assert_eq!(code, 5, "{err}");
    assert!(err.contains("1 of 2 points failed"), "{err}");
    let text = std::fs::read_to_string(&out).unwrap();
    let rows: Vec<&str> = text.lines().skip(2).collect();
    assert!(rows[0].contains(",ok,"), "{text}");
    assert!(
        rows[1].contains("failed: ") && rows[1].contains("core.length"),
        "{text}"
    );
    // A partial file of another sweep is not mixed in.
    std::fs::write(
        dir.join("other.csv.partial"),
        "# axicore sweep fingerprint=0000000000000001 points=2\nindex\n",
    )
    .unwrap();
    let (code, _, err) = axicore(&[
        "sweep",
        &case,
        "--values",
        "core.length=60mm",
        "--out",
        &p(&dir, "other.csv"),
    ]);
    assert_eq!(code, 1, "{err}");
    assert!(err.contains("another sweep"), "{err}");
    let _ = std::fs::remove_dir_all(&dir);
}
