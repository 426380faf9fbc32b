//! Comparisons: one room traced under several reflection laws and several
//! candidate surface treatments, with Monte Carlo standard errors, every
//! difference in just noticeable differences, a verdict per receiver,
//! parameter and band, and the s-only envelope.
//!
//! Flow: a comparison file ([`file`], checked and resolved by [`plan`]) →
//! every run traced in batches with common random numbers ([`engine`]) →
//! differences and verdicts ([`verdict`]) → the document ([`document`],
//! written as `comparison.json`, with [`csv`] tables derived from it) → the
//! HTML report ([`crate::report::html`]). [`reproduce`] re-runs a recorded
//! document and checks its numbers.
//!
#![doc = include_str!("FORMAT.md")]

pub mod csv;
pub mod document;
pub mod engine;
pub mod error;
pub mod file;

pub mod plan;
pub mod provenance;
pub mod reproduce;
pub mod verdict;

use crate::report::ReportError;
use std::path::{Path, PathBuf};
use std::time::Instant;

pub use crate::metrics::Parameter;
pub use document::{build_document, ComparisonDocument};
pub use engine::{trace_run, RunOutcome};
pub use error::CompareError;
pub use plan::{load_comparison, ComparisonPlan, EstimatorChoice, Overrides, RunRole, RunSpec};
pub use verdict::{Difference, Verdict};

/// The JSON schema of `comparison.json` (draft 2020-12).
pub const SCHEMA: &str = include_str!("comparison.schema.json");

/// File names written into the output folder.
pub const JSON_FILE: &str = "comparison.json";
/// Values table.
pub const CSV_FILE: &str = "comparison.csv";
/// Verdicts table.
pub const VERDICTS_FILE: &str = "verdicts.csv";

/// Progress of a comparison, for a command's progress bar.
pub trait Progress: Sync {
    /// A run starts.
    fn run_started(&self, run: &RunSpec, index: usize, of: usize);
    /// `rays` more ray passes are done.
    fn rays_done(&self, rays: usize);
}

/// Reports nothing.
pub struct Silent;

impl Progress for Silent {
    fn run_started(&self, _run: &RunSpec, _index: usize, _of: usize) {}
    fn rays_done(&self, _rays: usize) {}
}

/// Traces every run of `plan` and builds the document; `record_dir` is the
/// folder `comparison.json` will be written to (inputs are recorded relative
/// to it). Returns the document and the traced runs (their pooled echograms
/// and decay curves feed the charts).
pub fn run_comparison(
    plan: &ComparisonPlan,
    record_dir: Option<&Path>,
    progress: &dyn Progress,
) -> Result<(ComparisonDocument, Vec<RunOutcome>), CompareError> {
    let started = Instant::now();
    let inputs = provenance::record_inputs(&plan.inputs, record_dir)?;
    let runs = plan.runs();
    let mut outcomes = Vec::with_capacity(runs.len());
    for (i, run) in runs.iter().enumerate() {
        progress.run_started(run, i, runs.len());
        outcomes.push(trace_run(plan, run, &|n| progress.rays_done(n))?);
    }
    let doc = build_document(plan, &outcomes, inputs, started.elapsed().as_secs_f64());
    Ok((doc, outcomes))
}

/// Writes `comparison.json`, `comparison.csv` and `verdicts.csv` into `dir`
/// (each atomically); returns their paths.
pub fn write_tables(dir: &Path, doc: &ComparisonDocument) -> Result<Vec<PathBuf>, CompareError> {
    let json_path = dir.join(JSON_FILE);
    let mut text = serde_json::to_string_pretty(doc).map_err(|source| ReportError::Json {
        path: json_path.clone(),
        source,
    })?;
    text.push('\n');
    let files = [
        (json_path, text),
        (dir.join(CSV_FILE), csv::values_csv(doc)),
        (dir.join(VERDICTS_FILE), csv::verdicts_csv(doc)),
    ];
    let mut written = Vec::new();
    for (path, text) in files {
        crate::output::write_atomic(&path, text.as_bytes()).map_err(|source| ReportError::Io {
            path: path.clone(),
            source,
        })?;
        written.push(path);
    }
    Ok(written)
}
