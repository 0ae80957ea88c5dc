//! The sweep's CSV file of our own: a comment line identifying the sweep, a header naming each
//! column with its unit, one row per point. Rows are appended to `FILE.partial` as points
//! finish (so a killed sweep resumes), then written sorted to `FILE` (the same bytes whatever
//! the order of completion, the number of jobs, shards or resumptions).

use std::collections::BTreeMap;
use std::io::Write;
use std::path::{Path, PathBuf};

/// What identifies a sweep: its fingerprint, point count and shard (K of N, from 1).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SweepId {
    /// FNV-1a hash of the case text, axes and options.
    pub fingerprint: u64,
    /// Points of the whole grid.
    pub points: usize,
    /// (K, N) for a shard; None for the whole sweep.
    pub shard: Option<(usize, usize)>,
}

impl SweepId {
    /// The first line of the file.
    pub fn line(&self) -> String {
        let shard = self
            .shard
            .map_or(String::new(), |(k, n)| format!(" shard={k}/{n}"));
        format!(
            "# axicore sweep fingerprint={:016x} points={}{shard}\n",
            self.fingerprint, self.points
        )
    }

    /// Reads the first line back.
    pub fn parse(line: &str) -> Option<Self> {
        let rest = line.strip_prefix("# axicore sweep ")?;
        let mut id = SweepId {
            fingerprint: 0,
            points: 0,
            shard: None,
        };
        let mut seen = (false, false);
        for field in rest.split_whitespace() {
            let (k, v) = field.split_once('=')?;
            match k {
                "fingerprint" => {
                    id.fingerprint = u64::from_str_radix(v, 16).ok()?;
                    seen.0 = true;
                }
                "points" => {
                    id.points = v.parse().ok()?;
                    seen.1 = true;
                }
                "shard" => {
                    let (a, b) = v.split_once('/')?;
                    id.shard = Some((a.parse().ok()?, b.parse().ok()?));
                }
                _ => return None,
            }
        }
        (seen.0 && seen.1).then_some(id)
    }
}

/// FNV-1a, 64 bit (Fowler, Noll & Vo; the published offset basis and prime): a stable hash
/// of the sweep's definition, the same on every machine and Rust version.
pub fn fnv1a(bytes: &[u8]) -> u64 {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for &b in bytes {
        h ^= u64::from(b);
        h = h.wrapping_mul(0x0000_0100_0000_01b3);
    }
    h
}

/// The partial file beside `out`.
pub fn partial_path(out: &Path) -> PathBuf {
    let mut s = out.as_os_str().to_owned();
    s.push(".partial");
    PathBuf::from(s)
}

/// A sweep file's rows by point index (complete lines only), after checking its first two
/// lines are `id` and `header`; None when the file belongs to another sweep.
pub fn read_rows(text: &str, id: &SweepId, header: &str) -> Option<BTreeMap<usize, String>> {
    let mut lines = text.split_inclusive('\n');
    if lines.next()? != id.line() || lines.next()? != header {
        return None;
    }
    let mut rows = BTreeMap::new();
    for line in lines {
        // A line without its newline was torn by a kill: it is computed again.
        if !line.ends_with('\n') {
            break;
        }
        let index: usize = line.split(',').next()?.parse().ok()?;
        rows.insert(index, line.to_string());
    }
    Some(rows)
}

/// The whole file: identification, header, rows in index order.
pub fn file_bytes(id: &SweepId, header: &str, rows: &BTreeMap<usize, String>) -> Vec<u8> {
    let mut s = id.line() + header;
    for row in rows.values() {
        s.push_str(row);
    }
    s.into_bytes()
}

/// Appends rows to the partial file, each flushed as it is written.
pub struct Appender {
    file: std::fs::File,
}

impl Appender {
    /// Opens `path` for appending, writing the identification and header into a new file;
    /// refuses anything but a regular file (a planted link or device is never written through).
    pub fn open(
        path: &Path,
        id: &SweepId,
        header: &str,
        keep: &BTreeMap<usize, String>,
    ) -> std::io::Result<Self> {
        if let Ok(meta) = std::fs::symlink_metadata(path) {
            if !meta.file_type().is_file() {
                return Err(std::io::Error::other("exists and is not a regular file"));
            }
        }
        // Rewritten whole, so a torn last line of an earlier run is dropped.
        let mut file = std::fs::File::create(path)?;
        file.write_all(&file_bytes(id, header, keep))?;
        file.sync_data()?;
        Ok(Self { file })
    }

    /// Writes one row and flushes it to disk.
    pub fn push(&mut self, row: &str) -> std::io::Result<()> {
        self.file.write_all(row.as_bytes())?;
        self.file.sync_data()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fnv1a_matches_the_published_test_vectors() {
        // FNV-1a test vectors for "" and "a" (Fowler, Noll & Vo; IETF draft-eastlake-fnv) [from memory].
        assert_eq!(fnv1a(b""), 0xcbf29ce484222325);
        assert_eq!(fnv1a(b"a"), 0xaf63dc4c8601ec8c);
    }

    #[test]
    fn identification_round_trips_and_torn_lines_are_dropped() {
        let id = SweepId {
            fingerprint: 0xabc,
            points: 4,
            shard: Some((2, 3)),
        };
        assert_eq!(SweepId::parse(id.line().trim_end()), Some(id.clone()));
        let header = "index,x\n";
        let text = format!("{}{header}3,a\n1,b\n2,c", id.line());
        let rows = read_rows(&text, &id, header).unwrap();
        assert_eq!(rows.keys().copied().collect::<Vec<_>>(), [1, 3]);
        let other = SweepId { shard: None, ..id };
        assert!(read_rows(&text, &other, header).is_none());
    }
}
