//! Output files that cannot hurt.
//!
//! * Before any work, [`check_paths`] refuses every output path that is not absent or a
//!   writable regular file — a directory, device, FIFO, socket or symbolic link is never
//!   opened, followed or replaced — and proves each output directory writable by creating and
//!   removing a probe file there.
//! * After the work, [`write_all`] writes each output to an exclusively created, randomly
//!   named temporary beside its target, flushes it to disk, and renames all of them only when
//!   all are complete; a failure at any step leaves every target as it was and no temporary.
//! * SIGINT, SIGTERM and SIGHUP remove the temporaries alive at that moment before the
//!   process ends as the signal would end it.
//!
//! What remains (Linux, POSIX filesystems): a process killed by SIGKILL or a power cut can
//! leave a hidden `.NAME.XXXXXXXXXXXX.tmp` beside a target, never a damaged target; an output
//! replacing a file gives it a new inode (hard links to the old file keep the old contents);
//! someone who can write in an output directory can still swap a target between the last
//! check and the rename, but a rename never opens or follows what it replaces, so they can
//! only have our file take the place of their own entry.

mod check;
mod cleanup;
mod commit;
mod temp;

use std::path::PathBuf;

pub use check::check_paths;

/// Writes each (path, bytes) pair all-or-nothing: on any failure every target stays as it was
/// and no temporary remains. The error is one line naming the path at fault.
pub fn write_all(files: &[(PathBuf, Vec<u8>)]) -> Result<(), String> {
    commit::write_all_with(files, &mut |_| Ok(()))
}

#[cfg(test)]
mod tests;
