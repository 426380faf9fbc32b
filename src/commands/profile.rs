//! `polaray profile`: predict the polar response of a surface profile and
//! write it as a polar data file.

use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::Context;

use polaray::polar::PolarFile;
use polaray::profile::predict::rounded;
use polaray::profile::{load_spec, predict};

/// Options of `polaray profile`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Profile specification (TOML, see src/profile/FORMAT.md).
    pub file: PathBuf,
    /// Polar data file to write (TOML).
    #[arg(long)]
    pub out: PathBuf,
    /// Also draw polar plots into this folder.
    #[arg(long)]
    pub plots: Option<PathBuf>,
}

/// Runs the command.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let spec = load_spec(&args.file)?;
    let prediction = predict(&spec).with_context(|| args.file.display().to_string())?;
    let text = toml::to_string(&rounded(&prediction.polar, 7))
        .with_context(|| format!("{}: cannot serialize the polar data", args.out.display()))?;
    polaray::output::write_atomic(&args.out, text.as_bytes())
        .with_context(|| format!("{}: cannot write the polar data", args.out.display()))?;

    // Summary.
    let gon = &spec.goniometer;
    let bands: Vec<String> = spec
        .bands
        .centres_hz
        .iter()
        .map(|b| format!("{b}"))
        .collect();
    let incidences: Vec<String> = gon.incidence_deg.iter().map(|a| format!("{a}°")).collect();
    let first = prediction.polar.responses.first();
    outln!("{}: {}", args.file.display(), spec.name);
    outln!(
        "  sample {:.3} m{}, source {} m, receivers {} m ({} per response)",
        prediction.polar.geometry.sample_width_m,
        prediction
            .polar
            .geometry
            .sample_depth_m
            .map(|d| format!(" × {d:.3} m"))
            .unwrap_or_default(),
        gon.source_distance_m,
        gon.receiver_distance_m,
        first.map_or(0, |r| r.receiver_deg.len())
    );
    outln!("  bands (Hz): {}", bands.join(", "));
    outln!("  incidences: {}", incidences.join(", "));
    outln!(
        "  surface elements per band: {}",
        prediction
            .elements_per_band
            .iter()
            .map(ToString::to_string)
            .collect::<Vec<_>>()
            .join(", ")
    );
    outln!(
        "  wrote {} ({} responses)",
        args.out.display(),
        prediction.polar.responses.len()
    );
    for w in &prediction.warnings {
        eprintln!("warning: {}: {w}", args.file.display());
    }
    if let Some(dir) = &args.plots {
        write_plots(&prediction.polar, dir)?;
    }
    Ok(ExitCode::SUCCESS)
}

/// Draws the polar and bound charts of a predicted file into `dir`, with the
/// same chart code as `polaray polar`.
fn write_plots(polar: &PolarFile, dir: &Path) -> anyhow::Result<()> {
    let files = super::polar::write_file_charts(polar, dir)?;
    outln!("wrote {} charts to {}", files.len(), dir.display());
    Ok(())
}
