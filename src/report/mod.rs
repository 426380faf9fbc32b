//! Writers for trace results: `result.json`, the echogram CSV files, the
//! echogram plots, the ISO 3382-1 parameter table `parameters.csv` and the
//! decay-curve plots. Tracing ([`crate::trace`]) never writes; these functions
//! only turn a [`TraceResult`](crate::trace::TraceResult) into files, each
//! through [`crate::output`] so a crash leaves no half-written file.

pub mod batches;
mod csv;
pub mod grouped_warnings;
pub mod html;
mod json;
mod parameters;
mod plot;
pub mod precision;

use std::path::PathBuf;

pub use csv::{column_prefix, echogram_csv, EchogramKind};
pub use json::{result_json, BandReport, ReceiverReport, RunReport, ADVISORY};
pub use parameters::{
    decay_plot_file_name, pair_parameters, pair_parameters_with, parameters_csv, run_parameters,
    write_decay_plot, PairParameters, PARAMETERS_CSV_FILE, PARAMETERS_CSV_HEADER,
};
pub use plot::{plot_file_name, write_echogram_plot};

/// A result file that could not be written.
#[derive(Debug, thiserror::Error)]
pub enum ReportError {
    /// Writing failed.
    #[error("cannot write {}: {source}; check that the folder is writable and the disk not full", .path.display())]
    Io {
        /// The file.
        path: PathBuf,
        /// The cause.
        source: std::io::Error,
    },
    /// Drawing a chart failed.
    #[error("cannot draw {}: {message}", .path.display())]
    Plot {
        /// The file.
        path: PathBuf,
        /// What the plotting library said.
        message: String,
    },
    /// Serializing failed (a bug: every value is serializable).
    #[error("cannot serialize {}: {source}", .path.display())]
    Json {
        /// The file.
        path: PathBuf,
        /// The cause.
        source: serde_json::Error,
    },
}

/// A name made safe for file names on every common file system: letters,
/// digits, `-`, `_` and `.` kept, everything else `_`; empty becomes `room`.
#[must_use]
pub fn file_safe(name: &str) -> String {
    let s: String = name
        .trim()
        .chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || "-_.".contains(c) {
                c
            } else {
                '_'
            }
        })
        .collect();
    let s = s.trim_start_matches('.').to_string();
    if s.is_empty() {
        "room".into()
    } else {
        s
    }
}

/// Writes `result.json`, `echograms.csv`, `echograms-lateral.csv`, one
/// echogram chart per pair, `parameters.csv` and one decay-curve chart per
/// pair into `dir` (created if needed); returns the paths written, in that
/// order. Computes the parameters itself; see [`write_run_with_parameters`].
pub fn write_run(
    dir: &std::path::Path,
    room: &crate::room::Room,
    options: &crate::trace::TraceOptions,
    result: &crate::trace::TraceResult,
    warnings: Vec<String>,
) -> Result<Vec<PathBuf>, ReportError> {
    let parameters = run_parameters(result);
    write_run_with_parameters(dir, room, options, result, &parameters, warnings)
}

/// As [`write_run`], with the parameters of every pair already computed by
/// [`run_parameters`] (so a caller that also prints them computes them once).
pub fn write_run_with_parameters(
    dir: &std::path::Path,
    room: &crate::room::Room,
    options: &crate::trace::TraceOptions,
    result: &crate::trace::TraceResult,
    parameters: &[PairParameters],
    warnings: Vec<String>,
) -> Result<Vec<PathBuf>, ReportError> {
    let io = |path: &std::path::Path| {
        let path = path.to_path_buf();
        move |source| ReportError::Io { path, source }
    };
    let mut written = Vec::new();
    let json_path = dir.join("result.json");
    let report = RunReport::with_parameters(room, options, result, parameters, warnings);
    let text = result_json(&report).map_err(|source| ReportError::Json {
        path: json_path.clone(),
        source,
    })?;
    crate::output::write_atomic(&json_path, text.as_bytes()).map_err(io(&json_path))?;
    written.push(json_path);
    for kind in [EchogramKind::Energy, EchogramKind::Lateral] {
        let path = dir.join(kind.file_name());
        crate::output::write_atomic(&path, echogram_csv(result, kind).as_bytes())
            .map_err(io(&path))?;
        written.push(path);
    }
    for p in &result.echograms {
        let path = dir.join(plot_file_name(result, p.source, p.receiver));
        write_echogram_plot(result, p.source, p.receiver, &path)?;
        written.push(path);
    }
    let csv_path = dir.join(PARAMETERS_CSV_FILE);
    crate::output::write_atomic(&csv_path, parameters_csv(result, parameters).as_bytes())
        .map_err(io(&csv_path))?;
    written.push(csv_path);
    for p in parameters {
        let path = dir.join(decay_plot_file_name(result, p.source, p.receiver));
        write_decay_plot(result, p, &path)?;
        written.push(path);
    }
    Ok(written)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn file_safe_replaces_separators_and_dots_at_start() {
        assert_eq!(file_safe("Hall A/B: v2"), "Hall_A_B__v2");
        assert_eq!(file_safe("../x"), "_x");
        assert_eq!(file_safe("  "), "room");
    }
}
