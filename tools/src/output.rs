//! Writing several output files all-or-nothing: every file goes to a temporary name first and
//! is renamed only when all were written.

use std::io::Write;
use std::path::{Path, PathBuf};

/// Writes each (path, bytes) pair; on any failure removes the temporaries and writes nothing.
pub fn write_all(files: &[(PathBuf, Vec<u8>)]) -> Result<(), String> {
    let mut temps: Vec<PathBuf> = Vec::new();
    let cleanup = |temps: &[PathBuf]| {
        for t in temps {
            let _ = std::fs::remove_file(t);
        }
    };
    for (path, bytes) in files {
        let tmp = temp_name(path);
        let res = std::fs::File::create(&tmp).and_then(|mut f| {
            f.write_all(bytes)?;
            f.sync_all()
        });
        temps.push(tmp);
        if let Err(e) = res {
            cleanup(&temps);
            return Err(format!("{}: cannot write: {e}", path.display()));
        }
    }
    for ((path, _), tmp) in files.iter().zip(&temps) {
        if let Err(e) = std::fs::rename(tmp, path) {
            cleanup(&temps);
            return Err(format!("{}: cannot write: {e}", path.display()));
        }
    }
    Ok(())
}

/// Checks the output paths given with their options before any work is done: each must lie in
/// an existing directory, not be a directory itself, appear once, and not be the case file
/// `input`. Why up front: a bad path found only when writing cost the whole solve and, with
/// several outputs, could leave the ones renamed before it (exit code 1).
pub fn check_paths(outputs: &[(&str, &Path)], input: Option<&Path>) -> Result<(), String> {
    let same = |a: &Path, b: &Path| match (a.canonicalize(), b.canonicalize()) {
        (Ok(x), Ok(y)) => x == y,
        _ => a == b,
    };
    for (k, &(option, path)) in outputs.iter().enumerate() {
        let fault = |why: &str| Err(format!("{option}: {}: {why}", path.display()));
        if path.is_dir() {
            return fault("is a directory");
        }
        let parent = path.parent().filter(|p| !p.as_os_str().is_empty());
        if let Some(dir) = parent {
            if !dir.is_dir() {
                return fault(&format!("directory {} does not exist", dir.display()));
            }
        }
        if input.is_some_and(|i| same(i, path)) {
            return fault("would overwrite the case file");
        }
        if let Some((other, _)) = outputs[..k].iter().find(|(_, p)| same(p, path)) {
            return fault(&format!("is also the {other} file"));
        }
    }
    Ok(())
}

fn temp_name(path: &Path) -> PathBuf {
    let mut s = path.as_os_str().to_owned();
    s.push(format!(".tmp{}", std::process::id()));
    PathBuf::from(s)
}
