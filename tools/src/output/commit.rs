//! Writing a run's outputs all-or-nothing.
//!
//! Every output is written to its own temporary beside its target and flushed to disk; only
//! when all are complete are they renamed onto their targets, one after another, under the
//! lock that the signal handler needs too (so a signal cannot fall between two renames). A
//! target that existed is first hard-linked to a hidden backup, so that a rename failing after
//! others succeeded can put the earlier targets back as they were.

use std::io::{self, Write};
use std::path::{Path, PathBuf};

use super::check::{inspect, Existing};
use super::{cleanup, temp};

/// A point of the write where a test can make it fail.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Step {
    /// Before writing the contents of output `k`.
    Write(usize),
    /// Before renaming output `k` onto its target.
    Rename(usize),
}

/// Environment variable that makes a run wait, temporaries written and nothing renamed, until
/// it is signalled (at most [`HOLD_SECONDS`]): the seam through which the tests interrupt a
/// run while it writes. Nothing else reads it.
pub(crate) const HOLD_VARIABLE: &str = "AXICORE_TEST_HOLD_OUTPUTS";
const HOLD_SECONDS: u64 = 30;

/// Writes each (path, bytes) pair as described in the module documentation; `fault` is
/// asked before each step and an error from it is handled as a real one.
pub(crate) fn write_all_with(
    files: &[(PathBuf, Vec<u8>)],
    fault: &mut dyn FnMut(Step) -> io::Result<()>,
) -> Result<(), String> {
    let cannot = |path: &Path, why: String| format!("{}: cannot write: {why}", path.display());
    let mut temps = Vec::with_capacity(files.len());
    for (k, (path, bytes)) in files.iter().enumerate() {
        let existing = inspect(path).map_err(|w| format!("{}: {w}", path.display()))?;
        let mut t = temp::create_beside(path, existing.metadata())
            .map_err(|e| cannot(path, e.to_string()))?;
        fault(Step::Write(k))
            .and_then(|()| t.file.write_all(bytes))
            .and_then(|()| t.file.sync_all())
            .map_err(|e| cannot(path, e.to_string()))?;
        temps.push(t);
    }
    if std::env::var_os(HOLD_VARIABLE).is_some() {
        eprintln!(
            "axicore: {HOLD_VARIABLE}: {} temporaries written, waiting",
            temps.len()
        );
        std::thread::sleep(std::time::Duration::from_secs(HOLD_SECONDS));
    }
    let mut live = cleanup::registry();
    let result = rename_all(files, &mut temps, &mut live, fault);
    drop(live);
    // Temporaries not renamed are removed here, after the registry's lock was released.
    drop(temps);
    result
}

/// Renames every temporary onto its target, or none: on a failure, targets already replaced
/// are restored from their backups (or removed, if they were new).
fn rename_all(
    files: &[(PathBuf, Vec<u8>)],
    temps: &mut [temp::Temp],
    live: &mut Vec<PathBuf>,
    fault: &mut dyn FnMut(Step) -> io::Result<()>,
) -> Result<(), String> {
    // Looked at again: the targets may have changed while the run wrote.
    let mut backups = Vec::with_capacity(files.len());
    for (path, _) in files {
        match inspect(path) {
            Ok(Existing::Absent) => backups.push(None),
            // Without a backup (a filesystem without hard links) a failure of a later rename
            // cannot restore this target; the later renames are unlikely to fail, as the same
            // checks passed for them a moment ago.
            Ok(Existing::Regular(_)) => backups.push(Some(temp::backup_of(path).ok())),
            Err(why) => return Err(format!("{}: {why}", path.display())),
        }
    }
    for k in 0..files.len() {
        let path = &files[k].0;
        if let Err(e) = fault(Step::Rename(k)).and_then(|()| std::fs::rename(&temps[k].path, path))
        {
            let mut message = format!("{}: cannot write: {e}", path.display());
            for j in (0..k).rev() {
                let target = &files[j].0;
                let undone = match backups[j].take() {
                    None => std::fs::remove_file(target),
                    Some(Some(b)) => b.persist(target).map_err(|e| e.error),
                    Some(None) => Err(io::Error::other("no backup could be made")),
                };
                if let Err(e) = undone {
                    message += &format!(
                        "; {} was replaced and could not be restored ({e})",
                        target.display()
                    );
                }
            }
            return Err(message);
        }
        temps[k].renamed = true;
        cleanup::forget(live, &temps[k].path);
    }
    // The backups are removed as they drop; the renames are made durable.
    drop(backups);
    let mut synced: Vec<&Path> = Vec::new();
    for (path, _) in files {
        let dir = temp::directory_of(path);
        if !synced.contains(&dir) {
            if let Ok(d) = std::fs::File::open(dir) {
                let _ = d.sync_all();
            }
            synced.push(dir);
        }
    }
    Ok(())
}
