//! Writing result files safely: a temporary name in the same folder, then an
//! atomic rename, so a crash never leaves a half-written result behind.

use std::fs;
use std::io::Write;
use std::path::Path;

/// Writes `bytes` to `path` through a temporary file in the same directory and
/// a rename. Creates the parent directory if needed.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> std::io::Result<()> {
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d,
        _ => Path::new("."),
    };
    fs::create_dir_all(dir)?;
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| "output".into());
    let tmp = dir.join(format!(".{name}.tmp-{}", std::process::id()));
    {
        let mut f = fs::File::create(&tmp)?;
        f.write_all(bytes)?;
        f.sync_all()?;
    }
    fs::rename(&tmp, path).inspect_err(|_| {
        let _ = fs::remove_file(&tmp);
    })
}

/// Path of a temporary sibling for writers that need a real file path (plot
/// backends); rename it into place with [`finish_atomic`].
#[must_use]
pub fn temp_sibling(path: &Path) -> std::path::PathBuf {
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| "output".into());
    // Keep the extension last so format-sniffing backends still work.
    path.with_file_name(format!(".tmp-{}-{name}", std::process::id()))
}

/// Renames a finished temporary sibling into place.
pub fn finish_atomic(tmp: &Path, path: &Path) -> std::io::Result<()> {
    fs::rename(tmp, path).inspect_err(|_| {
        let _ = fs::remove_file(tmp);
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn writes_and_replaces_without_leftovers() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("sub").join("a.json");
        write_atomic(&p, b"one").unwrap();
        write_atomic(&p, b"two").unwrap();
        assert_eq!(fs::read(&p).unwrap(), b"two");
        let entries: Vec<_> = fs::read_dir(p.parent().unwrap()).unwrap().collect();
        assert_eq!(entries.len(), 1, "temporary file left behind");
    }
}
