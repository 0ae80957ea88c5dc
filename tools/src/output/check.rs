//! What may stand at an output path, and the checks made before any work.

use std::fs::Metadata;
use std::os::unix::fs::{FileTypeExt, MetadataExt};
use std::path::{Path, PathBuf};

use super::temp;

/// What stands at an output path that may be replaced.
pub(crate) enum Existing {
    /// Nothing: the output will be a new file.
    Absent,
    /// A regular file that the output will replace, with its metadata.
    Regular(Metadata),
}

impl Existing {
    /// The metadata of the file to be replaced, if any.
    pub(crate) fn metadata(&self) -> Option<&Metadata> {
        match self {
            Existing::Absent => None,
            Existing::Regular(m) => Some(m),
        }
    }
}

/// Looks at `path` without following a link at its last component and says whether an output
/// may be put there; the error is the reason, for a one-line message.
///
/// Only a regular file is ever replaced. A symbolic link is refused, not followed: followed,
/// a link planted at an output name (or `/dev/stdout`, or a link into a system directory)
/// would turn one run into a write anywhere the user may write; replaced, the user's link
/// would silently become a file. A read-only file is refused too, although renaming over it
/// would succeed: someone made it so to keep it.
pub(crate) fn inspect(path: &Path) -> Result<Existing, String> {
    if path.file_name().is_none() {
        return Err("names no file (the path ends in '/', '.' or '..')".into());
    }
    let m = match std::fs::symlink_metadata(path) {
        Ok(m) => m,
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => return Ok(Existing::Absent),
        Err(e) => return Err(format!("cannot be examined: {e}")),
    };
    let t = m.file_type();
    let what = if t.is_symlink() {
        let to = std::fs::read_link(path)
            .map(|p| format!(" to {}", p.display()))
            .unwrap_or_default();
        return Err(format!(
            "is a symbolic link{to}; outputs neither follow nor replace links: \
             give the path of the file itself"
        ));
    } else if t.is_dir() {
        "a directory"
    } else if t.is_fifo() {
        "a named pipe (FIFO)"
    } else if t.is_char_device() {
        "a character device"
    } else if t.is_block_device() {
        "a block device"
    } else if t.is_socket() {
        "a socket"
    } else if t.is_file() {
        if m.permissions().readonly() {
            return Err(
                "is read-only; make it writable (chmod u+w) to replace it, or choose another name"
                    .into(),
            );
        }
        return Ok(Existing::Regular(m));
    } else {
        "not a regular file"
    };
    Err(format!(
        "is {what}; outputs are written only as regular files (choose a file name)"
    ))
}

/// Checks the output paths given with their options before any work is done, so that a bad
/// path costs nothing and leaves nothing: each must name a file in an existing directory in
/// which a file can be created (a probe file is created and removed at once), be absent or a
/// writable regular file (never a link, directory, device, FIFO or socket), appear once, and
/// not be the case file `input`. The error is one line naming the option and the path.
pub fn check_paths(outputs: &[(&str, &Path)], input: Option<&Path>) -> Result<(), String> {
    let input_id = input
        .and_then(|i| std::fs::metadata(i).ok())
        .map(|m| file_id(&m));
    let mut seen: Vec<(&str, PathBuf, Option<FileId>)> = Vec::new();
    let mut probed: Vec<PathBuf> = Vec::new();
    for &(option, path) in outputs {
        let fault = |why: &str| Err(format!("{option}: {}: {why}", path.display()));
        let dir = temp::directory_of(path);
        if !dir.is_dir() {
            return fault(&format!("directory {} does not exist", dir.display()));
        }
        let existing = match inspect(path) {
            Ok(e) => e,
            Err(why) => return fault(&why),
        };
        let id = existing.metadata().map(file_id);
        if id.is_some() && id == input_id {
            return fault("would overwrite the case file");
        }
        // Two spellings of one place (`a.csv`, `./a.csv`) or two links to one file.
        let real_dir = dir.canonicalize().unwrap_or_else(|_| dir.to_path_buf());
        let place = real_dir.join(path.file_name().unwrap_or_default());
        if let Some((other, _, _)) = seen
            .iter()
            .find(|(_, p, i)| *p == place || (id.is_some() && *i == id))
        {
            return fault(&format!("is also the {other} file"));
        }
        seen.push((option, place, id));
        if !probed.contains(&real_dir) {
            if let Err(e) = temp::probe(dir) {
                return fault(&format!(
                    "no file can be created in directory {}: {e}",
                    dir.display()
                ));
            }
            probed.push(real_dir);
        }
    }
    Ok(())
}

/// A file's identity: device and inode.
type FileId = (u64, u64);

fn file_id(m: &Metadata) -> FileId {
    (m.dev(), m.ino())
}
