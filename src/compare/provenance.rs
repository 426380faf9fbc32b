//! Input files and their SHA-256 hashes, so a reviewer can check that a
//! re-run reads exactly the files the comparison read.

use crate::report::ReportError;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};

use super::error::CompareError;
use super::plan::InputFile;

/// One input file as recorded.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct FileRecord {
    /// `comparison`, `room`, `mesh` or `polar`.
    pub role: String,
    /// Path as the comparison resolved it (relative to the working folder when
    /// the comparison file was given so).
    pub path: String,
    /// Path relative to the folder `comparison.json` was written to, so a
    /// results folder moved together with its inputs still finds them; no
    /// absolute path is recorded. `None` when no folder was given.
    pub from_record: Option<String>,
    /// SHA-256 of the file's bytes, lowercase hex.
    pub sha256: String,
}

/// SHA-256 of `bytes`, lowercase hex.
#[must_use]
pub fn sha256_hex(bytes: &[u8]) -> String {
    let digest = Sha256::digest(bytes);
    let mut s = String::with_capacity(64);
    for b in digest {
        let _ = write!(s, "{b:02x}");
    }
    s
}

/// SHA-256 of the file at `path`.
pub fn hash_file(path: &Path) -> std::io::Result<String> {
    Ok(sha256_hex(&std::fs::read(path)?))
}

/// Hashes every input file; `record_dir` is the folder `comparison.json`
/// goes to, for [`FileRecord::from_record`].
pub fn record_inputs(
    inputs: &[InputFile],
    record_dir: Option<&Path>,
) -> Result<Vec<FileRecord>, CompareError> {
    inputs
        .iter()
        .map(|f| {
            let io = |source| ReportError::Io {
                path: f.path.clone(),
                source,
            };
            let sha256 = hash_file(&f.path).map_err(io)?;
            let from_record = record_dir
                .and_then(|dir| relative_path(dir, &f.path))
                .map(|p| p.to_string_lossy().into_owned());
            Ok(FileRecord {
                role: f.role.to_string(),
                path: f.path.to_string_lossy().into_owned(),
                from_record,
                sha256,
            })
        })
        .collect()
}

/// The path of `target` relative to the folder `from` (neither need exist;
/// both are made absolute against the working folder, `..` and `.` resolved
/// lexically). `None` when no working folder is known.
#[must_use]
pub fn relative_path(from: &Path, target: &Path) -> Option<PathBuf> {
    use std::path::Component;
    let absolute = |p: &Path| -> Option<Vec<std::ffi::OsString>> {
        let p = std::path::absolute(p).ok()?;
        let mut parts: Vec<std::ffi::OsString> = Vec::new();
        for c in p.components() {
            match c {
                Component::ParentDir => {
                    parts.pop();
                }
                Component::CurDir => {}
                other => parts.push(other.as_os_str().to_os_string()),
            }
        }
        Some(parts)
    };
    let (from, target) = (absolute(from)?, absolute(target)?);
    let common = from.iter().zip(&target).take_while(|(a, b)| a == b).count();
    let mut out = PathBuf::new();
    for _ in common..from.len() {
        out.push("..");
    }
    for part in &target[common..] {
        out.push(part);
    }
    Some(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn relative_paths_climb_out_of_the_record_folder() {
        let p = relative_path(
            Path::new("/work/x/rear-wall-results"),
            Path::new("/work/x/demo-rooms/rear-wall.compare.toml"),
        );
        assert_eq!(
            p,
            Some(PathBuf::from("../demo-rooms/rear-wall.compare.toml"))
        );
        let q = relative_path(Path::new("/a/b/./c/.."), Path::new("/a/b/f.toml"));
        assert_eq!(q, Some(PathBuf::from("f.toml")));
    }

    #[test]
    fn sha256_of_abc_matches_the_standard_test_vector() {
        // FIPS 180-2, Appendix B.1: SHA-256("abc").
        assert_eq!(
            sha256_hex(b"abc"),
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
    }
}
