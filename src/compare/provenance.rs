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
    /// Absolute path when the comparison ran.
    pub absolute_path: String,
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

/// Hashes every input file.
pub fn record_inputs(inputs: &[InputFile]) -> Result<Vec<FileRecord>, CompareError> {
    inputs
        .iter()
        .map(|f| {
            let io = |source| ReportError::Io {
                path: f.path.clone(),
                source,
            };
            let sha256 = hash_file(&f.path).map_err(io)?;
            let absolute: PathBuf = std::fs::canonicalize(&f.path).map_err(io)?;
            Ok(FileRecord {
                role: f.role.to_string(),
                path: f.path.to_string_lossy().into_owned(),
                absolute_path: absolute.to_string_lossy().into_owned(),
                sha256,
            })
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sha256_of_abc_matches_the_standard_test_vector() {
        // FIPS 180-2, Appendix B.1: SHA-256("abc").
        assert_eq!(
            sha256_hex(b"abc"),
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
    }
}
