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

fn temp_name(path: &Path) -> PathBuf {
    let mut s = path.as_os_str().to_owned();
    s.push(format!(".tmp{}", std::process::id()));
    PathBuf::from(s)
}
