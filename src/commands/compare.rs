//! `polaray compare`: one room under several reflection laws and surface
//! treatments, with standard errors, differences in JNDs, verdicts, the s-only
//! envelope, and a self-contained HTML report; or, with `--reproduce`, a
//! reviewer's re-run of a recorded comparison.

use std::io::IsTerminal;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::Context;
use indicatif::{ProgressBar, ProgressStyle};

use polaray::compare::document::ComparisonDocument;
use polaray::compare::{
    self, load_comparison, provenance, reproduce, CompareError, ComparisonPlan, EstimatorChoice,
    Overrides, Progress, RunSpec, Verdict,
};
use polaray::report::{self, html};

/// Options of `polaray compare`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Comparison file (TOML); see src/compare/FORMAT.md.
    #[arg(required_unless_present = "reproduce")]
    pub file: Option<PathBuf>,
    /// Output folder (default: `<file name>-results`).
    #[arg(long)]
    pub out: Option<PathBuf>,
    /// Rays per source over all batches, instead of the file's.
    #[arg(long, conflicts_with = "reproduce")]
    pub rays: Option<usize>,
    /// Batches, instead of the file's.
    #[arg(long, conflicts_with = "reproduce")]
    pub batches: Option<usize>,
    /// Seed, instead of the file's.
    #[arg(long, conflicts_with = "reproduce")]
    pub seed: Option<u64>,
    /// Receiver estimator, instead of the file's: `exact-early` (the
    /// default: exact early mirror paths, stratified starts, a growing late
    /// sphere), `next-event` (plus next-event scoring; slower) or `sphere`
    /// (detection spheres only, the reference). See DEVELOPERS.md.
    #[arg(long, value_enum, conflicts_with = "reproduce")]
    pub estimator: Option<EstimatorChoice>,
    /// Re-run the comparison recorded in this comparison.json (its inputs
    /// must match the recorded SHA-256) and check that every number is
    /// reproduced bit for bit; writes files only with --out.
    #[arg(long, value_name = "JSON")]
    pub reproduce: Option<PathBuf>,
    /// No progress bar.
    #[arg(long)]
    pub quiet: bool,
}

/// A progress bar over all ray passes, hidden when quiet or not on a terminal.
struct Bar(ProgressBar);

impl Progress for Bar {
    fn run_started(&self, run: &RunSpec, index: usize, of: usize) {
        self.0
            .set_message(format!("run {}/{of}: {}", index + 1, run.id));
    }
    fn rays_done(&self, rays: usize) {
        self.0.inc(rays as u64);
    }
}

fn bar(plan: &ComparisonPlan, quiet: bool) -> Bar {
    let show = !quiet && std::io::stderr().is_terminal();
    if !show {
        return Bar(ProgressBar::hidden());
    }
    let pb = ProgressBar::new(plan.total_ray_passes());
    if let Ok(style) =
        ProgressStyle::with_template("tracing {bar:30} {percent:>3}%, {eta} left · {msg}")
    {
        pb.set_style(style);
    }
    Bar(pb)
}

/// Runs the command.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    if let Some(json) = &args.reproduce {
        return reproduce_run(json, args.file.as_deref(), args.out.as_deref(), args.quiet);
    }
    let Some(file) = &args.file else {
        anyhow::bail!("give a comparison file, or --reproduce comparison.json");
    };
    let overrides = Overrides {
        rays: args.rays,
        batches: args.batches,
        seed: args.seed,
        estimator: args.estimator,
    };
    let plan = load_comparison(file, overrides)?;
    for w in &plan.warnings {
        eprintln!("warning: {w}");
    }
    let out = args.out.clone().unwrap_or_else(|| {
        let stem = file
            .file_stem()
            .map(|s| s.to_string_lossy().into_owned())
            .unwrap_or_else(|| "comparison".into());
        PathBuf::from(format!("{}-results", report::file_safe(&stem)))
    });
    print_plan(&plan);
    let progress = bar(&plan, args.quiet);
    let (doc, outcomes) = compare::run_comparison(&plan, Some(&out), &progress)
        .with_context(|| format!("{}: comparison failed", file.display()))?;
    progress.0.finish_and_clear();
    let traced = &doc.warnings[plan.warnings.len().min(doc.warnings.len())..];
    for w in report::grouped_warnings::group_by_band(traced) {
        eprintln!("warning: {w}");
    }
    let written = write_all(&out, &doc, &outcomes)?;
    print_summary(&doc);
    outln!(
        "  traced {} runs in {:.1} s; wrote {} files to {}",
        doc.runs.len(),
        doc.timings.total_s,
        written,
        out.display()
    );
    for c in &doc.cautions {
        outln!("  {c}");
    }
    Ok(ExitCode::SUCCESS)
}

/// Writes the tables, the report and the PNG charts; returns how many files.
fn write_all(
    out: &Path,
    doc: &ComparisonDocument,
    outcomes: &[compare::RunOutcome],
) -> Result<usize, CompareError> {
    let mut n = compare::write_tables(out, doc)?.len();
    n += html::write_report(out, doc, outcomes)?.len();
    Ok(n)
}

fn print_plan(plan: &ComparisonPlan) {
    outln!(
        "{} · room {} · {} runs · {} rays per source in {} batches · seed {} · estimator {}",
        plan.name,
        plan.room.name,
        plan.runs().len(),
        plan.rays_per_source,
        plan.batches,
        plan.seed,
        plan.estimator.name()
    );
    if let Some(note) = &plan.envelope_note {
        outln!("  no s-only envelope: {note}");
    }
}

/// Counts of verdicts per group, single-number values only.
fn print_summary(doc: &ComparisonDocument) {
    outln!("  verdicts on single-number values (robust / within noise / sensitive / n.a.):");
    for s in &doc.spreads {
        let mut counts = [0usize; 4];
        for row in s.rows.iter().filter(|r| r.band_hz.is_none()) {
            let i = Verdict::ALL
                .iter()
                .position(|&v| v == row.verdict)
                .unwrap_or(3);
            counts[i] += 1;
        }
        outln!(
            "  {:<44} {:>3} / {:>3} / {:>3} / {:>3}",
            s.id,
            counts[0],
            counts[1],
            counts[2],
            counts[3]
        );
    }
}

/// `--reproduce`: check inputs, re-run, compare numbers.
fn reproduce_run(
    json: &Path,
    file: Option<&Path>,
    out: Option<&Path>,
    quiet: bool,
) -> anyhow::Result<ExitCode> {
    let record = reproduce::read_record(json, file)?;
    let plan = load_comparison(&record.comparison_file, record.overrides)?;
    let now = provenance::record_inputs(&plan.inputs, None)?;
    let changed = reproduce::input_differences(&record.inputs, &now);
    if !changed.is_empty() {
        return Err(CompareError::Reproduce {
            file: json.to_path_buf(),
            message: format!(
                "the inputs differ from those recorded, so the numbers cannot be reproduced:\n  {}",
                changed.join("\n  ")
            ),
        }
        .into());
    }
    if record.polaray_version != env!("CARGO_PKG_VERSION") {
        eprintln!(
            "warning: the comparison was written by polaray {}, this is {}; numbers may differ",
            record.polaray_version,
            env!("CARGO_PKG_VERSION")
        );
    }
    outln!(
        "re-running {} (inputs match their recorded SHA-256)",
        record.comparison_file.display()
    );
    let progress = bar(&plan, quiet);
    let (doc, outcomes) = compare::run_comparison(&plan, out, &progress)?;
    progress.0.finish_and_clear();
    if let Some(out) = out {
        let n = write_all(out, &doc, &outcomes)?;
        outln!("  wrote {n} files to {}", out.display());
    }
    let now = serde_json::to_value(&doc).context("cannot serialize the re-run")?;
    let (count, diffs) = reproduce::number_differences(&record.document, &now);
    if diffs.is_empty() {
        outln!("  reproduced: all {count} numbers identical, bit for bit");
        Ok(ExitCode::SUCCESS)
    } else {
        outln!(
            "  NOT reproduced: {} of {count} numbers differ; the first ones:",
            diffs.len()
        );
        for d in diffs.iter().take(12) {
            outln!("    {d}");
        }
        Ok(ExitCode::FAILURE)
    }
}
