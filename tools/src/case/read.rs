//! Reading input files safely: regular files of bounded size only.

use std::path::Path;

/// Largest case or B–H file read, bytes (a 5000-point table is ~100 kB).
const MAX_INPUT_BYTES: u64 = 16 << 20;

/// The text of a regular file of at most [`MAX_INPUT_BYTES`]. Why the checks: a named pipe
/// blocked the read for ever and `/dev/zero` filled the memory until the process was killed.
pub(super) fn read_text(path: &Path) -> Result<String, String> {
    use std::io::Read;
    let meta = std::fs::metadata(path).map_err(|e| e.to_string())?;
    if !meta.is_file() {
        return Err("not a regular file".into());
    }
    let mut bytes = Vec::new();
    std::fs::File::open(path)
        .and_then(|f| f.take(MAX_INPUT_BYTES + 1).read_to_end(&mut bytes))
        .map_err(|e| e.to_string())?;
    if bytes.len() as u64 > MAX_INPUT_BYTES {
        return Err(format!("larger than {} MiB", MAX_INPUT_BYTES >> 20));
    }
    String::from_utf8(bytes).map_err(|_| "stream did not contain valid UTF-8".into())
}

/// The text of an input file (a case or a sweep's shard) with the checks of [`read_text`];
/// the error names the file.
pub fn read_case_text(path: &Path) -> Result<String, super::CaseError> {
    read_text(path).map_err(|reason| super::CaseError::Read {
        file: path.display().to_string(),
        reason,
    })
}
