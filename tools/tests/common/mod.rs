//! Shared helpers of the command-line tests: run the real `axicore` binary, make a scratch
//! directory. No outside check lives here.
#![allow(dead_code)]

use std::path::PathBuf;
use std::process::Command;

/// Runs `axicore` with `args`: (exit code, standard output, standard error).
pub fn axicore(args: &[&str]) -> (i32, String, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_axicore"))
        .args(args)
        .output()
        .expect("run axicore");
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

/// A fresh, empty directory `axicore-{prefix}-{name}-{pid}` under the system's temporary one.
pub fn scratch_dir(prefix: &str, name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("axicore-{prefix}-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}
