//! File output of solved fields.

pub mod hp_map;
pub mod region_points;
pub mod vtk;
pub mod vtu;

use std::io::Write;
use std::path::Path;

/// Writes `bytes` to a temporary sibling of `path` and renames it into place, so readers never
/// see a partial file and a failure leaves no output.
pub fn atomic_write(path: &Path, bytes: &[u8]) -> std::io::Result<()> {
    let mut tmp = path.as_os_str().to_owned();
    tmp.push(format!(".tmp{}", std::process::id()));
    let tmp = std::path::PathBuf::from(tmp);
    let result = (|| {
        let mut f = std::fs::File::create(&tmp)?;
        f.write_all(bytes)?;
        f.sync_all()?;
        std::fs::rename(&tmp, path)
    })();
    if result.is_err() {
        let _ = std::fs::remove_file(&tmp);
    }
    result
}
