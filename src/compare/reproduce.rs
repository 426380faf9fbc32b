//! A reviewer's re-run: read a `comparison.json`, find its comparison file,
//! check every input against the recorded SHA-256, re-run with the recorded
//! settings and compare the numbers bit for bit.

use std::path::{Path, PathBuf};

use serde_json::Value;

use super::document::FORMAT;
use super::error::CompareError;
use super::plan::Overrides;
use super::provenance::FileRecord;

/// What a recorded comparison says about how it ran.
#[derive(Clone, Debug)]
pub struct Record {
    /// The whole document as read.
    pub document: Value,
    /// The comparison file to re-run.
    pub comparison_file: PathBuf,
    /// Command-line settings of the recorded run.
    pub overrides: Overrides,
    /// Recorded inputs with their hashes.
    pub inputs: Vec<FileRecord>,
    /// polaray version that wrote it.
    pub polaray_version: String,
}

/// Sections whose numbers a re-run must reproduce exactly.
pub const REPRODUCED_SECTIONS: [&str; 4] = ["settings", "runs", "spreads", "envelope"];

/// Reads `json` (a `comparison.json`); the comparison file is `file` when
/// given, else the recorded path, else the path recorded relative to the
/// folder of `json`.
pub fn read_record(json: &Path, file: Option<&Path>) -> Result<Record, CompareError> {
    let fail = |message: String| CompareError::Reproduce {
        file: json.to_path_buf(),
        message,
    };
    let text = std::fs::read_to_string(json).map_err(|e| {
        fail(format!(
            "cannot read it: {}",
            crate::messages::io_problem(&e)
        ))
    })?;
    let document: Value =
        serde_json::from_str(&text).map_err(|e| fail(format!("not valid JSON: {e}")))?;
    if document.get("format").and_then(Value::as_str) != Some(FORMAT) {
        return Err(fail(format!(
            "not a comparison result (its `format` is not \"{FORMAT}\")"
        )));
    }
    let provenance = document
        .get("provenance")
        .ok_or_else(|| fail("it has no `provenance` section".into()))?;
    let inputs: Vec<FileRecord> =
        serde_json::from_value(provenance.get("inputs").cloned().unwrap_or(Value::Null))
            .map_err(|e| fail(format!("`provenance.inputs` is unreadable: {e}")))?;
    let overrides: Overrides =
        serde_json::from_value(provenance.get("overrides").cloned().unwrap_or(Value::Null))
            .map_err(|e| fail(format!("`provenance.overrides` is unreadable: {e}")))?;
    let polaray_version = provenance
        .get("polaray_version")
        .and_then(Value::as_str)
        .unwrap_or("unknown")
        .to_string();
    let comparison_file = match file {
        Some(f) => f.to_path_buf(),
        None => {
            let recorded = inputs
                .iter()
                .find(|f| f.role == "comparison")
                .ok_or_else(|| fail("`provenance.inputs` names no comparison file".into()))?;
            let beside_record = recorded
                .from_record
                .as_ref()
                .map(|rel| json.parent().unwrap_or_else(|| Path::new("")).join(rel));
            std::iter::once(PathBuf::from(&recorded.path))
                .chain(beside_record.clone())
                .find(|p| p.is_file())
                .ok_or_else(|| {
                    let also = beside_record
                        .map(|p| format!(" nor at {}", p.display()))
                        .unwrap_or_default();
                    fail(format!(
                        "the comparison file is neither at {}{also}; give its path: polaray compare FILE --reproduce {}",
                        recorded.path,
                        json.display()
                    ))
                })?
        }
    };
    Ok(Record {
        document,
        comparison_file,
        overrides,
        inputs,
        polaray_version,
    })
}

/// Checks that the files a re-run reads are those recorded: the same roles
/// with the same SHA-256. Returns one message per difference.
#[must_use]
pub fn input_differences(recorded: &[FileRecord], now: &[FileRecord]) -> Vec<String> {
    let name = |p: &str| {
        Path::new(p)
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_default()
    };
    let mut out = Vec::new();
    for r in recorded {
        if now.iter().any(|n| n.role == r.role && n.sha256 == r.sha256) {
            continue;
        }
        match now
            .iter()
            .find(|n| n.role == r.role && name(&n.path) == name(&r.path))
        {
            Some(n) => out.push(format!(
                "the {} file {} has changed since the comparison ran: SHA-256 {} recorded, {} now",
                r.role, n.path, r.sha256, n.sha256
            )),
            None => out.push(format!(
                "the re-run does not read the {} file {} (SHA-256 {}) that the comparison read",
                r.role, r.path, r.sha256
            )),
        }
    }
    for n in now {
        if !recorded
            .iter()
            .any(|r| r.role == n.role && r.sha256 == n.sha256)
            && !recorded
                .iter()
                .any(|r| r.role == n.role && name(&r.path) == name(&n.path))
        {
            out.push(format!(
                "the re-run reads the {} file {} that the comparison did not read",
                n.role, n.path
            ));
        }
    }
    out
}

/// Compares the numbers of [`REPRODUCED_SECTIONS`] in two documents. Returns
/// how many numbers were compared and where they differ (JSON pointers).
#[must_use]
pub fn number_differences(recorded: &Value, now: &Value) -> (usize, Vec<String>) {
    let mut count = 0;
    let mut diffs = Vec::new();
    for section in REPRODUCED_SECTIONS {
        walk(
            recorded.get(section).unwrap_or(&Value::Null),
            now.get(section).unwrap_or(&Value::Null),
            &format!("/{section}"),
            &mut count,
            &mut diffs,
        );
    }
    (count, diffs)
}

/// Keys whose values are not compared ([`walk`]).
const IGNORED_KEY: &str = "warnings";

fn walk(a: &Value, b: &Value, at: &str, count: &mut usize, diffs: &mut Vec<String>) {
    match (a, b) {
        (Value::Object(x), Value::Object(y)) => {
            for (k, v) in x {
                // Warnings are messages, not results, and name files as the
                // working folder spells them: a re-run from elsewhere words
                // them differently with the same numbers.
                if k == IGNORED_KEY {
                    continue;
                }
                let path = format!("{at}/{k}");
                match y.get(k) {
                    Some(w) => walk(v, w, &path, count, diffs),
                    None => diffs.push(format!("{path}: missing in the re-run")),
                }
            }
            for k in y
                .keys()
                .filter(|k| !x.contains_key(*k) && k.as_str() != IGNORED_KEY)
            {
                diffs.push(format!("{at}/{k}: new in the re-run"));
            }
        }
        (Value::Array(x), Value::Array(y)) => {
            if x.len() != y.len() {
                diffs.push(format!(
                    "{at}: {} entries recorded, {} now",
                    x.len(),
                    y.len()
                ));
            }
            for (i, (v, w)) in x.iter().zip(y).enumerate() {
                walk(v, w, &format!("{at}/{i}"), count, diffs);
            }
        }
        (Value::Number(x), Value::Number(y)) => {
            *count += 1;
            // Bit for bit: both were written in shortest round-trip form.
            if x.as_f64().map(f64::to_bits) != y.as_f64().map(f64::to_bits) {
                diffs.push(format!("{at}: {x} recorded, {y} now"));
            }
        }
        _ => {
            if a != b {
                diffs.push(format!("{at}: {a} recorded, {b} now"));
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    #[test]
    fn numbers_are_compared_bit_for_bit_and_counted() {
        let a = json!({"runs": [{"x": 0.1, "y": [1, 2]}], "settings": {"k": 2.0}});
        let mut b = a.clone();
        assert_eq!(number_differences(&a, &b), (4, vec![]));
        b["runs"][0]["x"] = json!(0.1 + 1e-16);
        let (n, d) = number_differences(&a, &b);
        assert_eq!(n, 4);
        assert_eq!(d.len(), 1, "{d:?}");
        assert!(d[0].starts_with("/runs/0/x"), "{d:?}");
    }
}
