//! Temporary files beside their targets.
//!
//! Created with `O_CREAT | O_EXCL` (the `tempfile` crate) under a random name in the target's
//! own directory: an existing entry of that name — a file, or a link planted by someone who
//! can write there — makes the creation fail and retry under another name, so a temporary is
//! never a link and never someone else's file. Being in the target's directory, the final
//! rename is within one directory, which POSIX makes atomic.

use std::ffi::{OsStr, OsString};
use std::fs::{File, Metadata, Permissions};
use std::io;
use std::os::unix::ffi::{OsStrExt, OsStringExt};
use std::os::unix::fs::{MetadataExt, PermissionsExt};
use std::path::{Path, PathBuf};

use super::cleanup;

/// Random characters in a temporary's name (62 symbols each: about 71 bits).
const RANDOM_CHARS: usize = 12;
/// At most this many bytes of the target's name go into a temporary's name, so that the
/// temporary of a long name stays within the usual 255-byte limit of one name.
const NAME_BYTES: usize = 64;

/// A temporary file: removed (and taken off the registry) when dropped unless it was renamed.
pub(crate) struct Temp {
    /// The open file, written through this handle only.
    pub(crate) file: File,
    /// Where it lies.
    pub(crate) path: PathBuf,
    /// Set once it has been renamed onto its target.
    pub(crate) renamed: bool,
}

impl Drop for Temp {
    fn drop(&mut self) {
        if !self.renamed {
            let mut live = cleanup::registry();
            let _ = std::fs::remove_file(&self.path);
            cleanup::forget(&mut live, &self.path);
        }
    }
}

/// The directory an output path lies in (`.` for a bare file name).
pub(crate) fn directory_of(target: &Path) -> &Path {
    match target.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    }
}

/// The start of the hidden names `.NAME.XXXXXXXXXXXX.tmp` given to temporaries of `target`.
fn prefix_for(target: &Path) -> OsString {
    let name = target.file_name().map(|n| n.as_bytes()).unwrap_or(b"out");
    let mut bytes = b".".to_vec();
    bytes.extend_from_slice(&name[..name.len().min(NAME_BYTES)]);
    bytes.push(b'.');
    OsString::from_vec(bytes)
}

fn builder(prefix: &OsStr, random_chars: usize) -> tempfile::Builder<'_, 'static> {
    let mut b = tempfile::Builder::new();
    b.prefix(prefix).rand_bytes(random_chars).suffix(".tmp");
    b
}

/// Creates a temporary beside `target`, registered for removal on a signal.
///
/// Its mode is what `File::create` would give: the permission bits of the file it replaces
/// (`existing`, with its owner where the process may set it), or 0o666 less the umask for a
/// new file. (tempfile's own default, 0o600, would make a plot unreadable to a group that
/// could read the file it replaced.)
pub(crate) fn create_beside(target: &Path, existing: Option<&Metadata>) -> io::Result<Temp> {
    create_named(target, existing, RANDOM_CHARS)
}

/// [`create_beside`] with `random_chars` random characters in the name (0 in a test makes the
/// name predictable, to plant something there).
pub(crate) fn create_named(
    target: &Path,
    existing: Option<&Metadata>,
    random_chars: usize,
) -> io::Result<Temp> {
    let dir = directory_of(target);
    let prefix = prefix_for(target);
    let mut builder = builder(&prefix, random_chars);
    builder.permissions(Permissions::from_mode(0o666));
    let mut live = cleanup::registry();
    let (file, path) = builder
        .tempfile_in(dir)
        .map_err(plain)?
        .keep()
        .map_err(|e| e.error)?;
    live.push(path.clone());
    drop(live);
    let temp = Temp {
        file,
        path,
        renamed: false,
    };
    if let Some(m) = existing {
        if m.uid() != temp.file.metadata()?.uid() || m.gid() != temp.file.metadata()?.gid() {
            // Only root may give a file away; for anyone else this fails and the new file is
            // theirs, as it would be had they deleted and recreated it.
            let _ = std::os::unix::fs::fchown(&temp.file, Some(m.uid()), Some(m.gid()));
        }
        // Not the set-id or sticky bits: a copied set-uid bit on new contents is a hazard.
        temp.file
            .set_permissions(Permissions::from_mode(m.mode() & 0o777))?;
    }
    Ok(temp)
}

/// The operating system's error without tempfile's note of the random path it tried: the
/// message names the output and its directory, not a name the user never gave.
fn plain(e: io::Error) -> io::Error {
    // tempfile appends ` at path "…"` to the message and keeps no other way to the cause.
    let text = e.to_string();
    match text.rsplit_once(" at path ") {
        Some((cause, _)) => io::Error::new(e.kind(), cause),
        None => e,
    }
}

/// Creates and at once removes a temporary in `dir`: proof that a file can be created there
/// (the directory exists, is writable, the filesystem is not read-only or full of names).
pub(crate) fn probe(dir: &Path) -> io::Result<()> {
    create_beside(&dir.join("axicore-probe"), None).map(drop)
}

/// A hard link to `target` under a fresh random name beside it, removed when dropped: the
/// old contents, kept until every output of a run is in place.
pub(crate) fn backup_of(target: &Path) -> io::Result<tempfile::TempPath> {
    let prefix = prefix_for(target);
    // `make_in` retries under another name when the name exists, as for a temporary.
    let named = builder(&prefix, RANDOM_CHARS)
        .make_in(directory_of(target), |p| std::fs::hard_link(target, p))
        .map_err(plain)?;
    Ok(named.into_temp_path())
}
