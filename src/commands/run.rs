//! `polaray run`: trace a room and write its echograms, statistics and charts.

use std::io::IsTerminal;
use std::path::PathBuf;
use std::process::ExitCode;
use std::str::FromStr;

use anyhow::Context;
use indicatif::{ProgressBar, ProgressStyle};

use polaray::law::LawKind;
use polaray::report;
use polaray::room::{self, estimates};
use polaray::trace::{self, TraceOptions, TraceResult};

/// Options of `polaray run`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Room file (TOML).
    pub room: PathBuf,
    /// Reflection law for every surface.
    #[arg(long, default_value = "split", value_parser = clap::builder::PossibleValuesParser::new(LawKind::NAME_LIST))]
    pub law: String,
    /// Law for materials that lack the data `--law` needs (no polar file, no
    /// diffusion); without it such a material is an error. Each fallback is listed.
    #[arg(long, value_name = "LAW", value_parser = clap::builder::PossibleValuesParser::new(LawKind::NAME_LIST))]
    pub fallback: Option<String>,
    /// Rays per source (default: the room file's `rays`).
    #[arg(long)]
    pub rays: Option<usize>,
    /// Seed of the random streams (default: the room file's `seed`).
    #[arg(long)]
    pub seed: Option<u64>,
    /// Output folder (default: `<room name>-results`).
    #[arg(long)]
    pub out: Option<PathBuf>,
    /// No progress bar.
    #[arg(long)]
    pub quiet: bool,
}

/// Runs the command.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let loaded = room::load_room(&args.room)?;
    let room = loaded.room;
    for w in &loaded.warnings {
        eprintln!("warning: {w}");
    }
    let law = LawKind::from_str(&args.law)?;
    let mut options = TraceOptions::from_room(&room, law);
    options.fallback = args
        .fallback
        .as_deref()
        .map(LawKind::from_str)
        .transpose()?;
    if let Some(r) = args.rays {
        options.rays = r;
    }
    if let Some(s) = args.seed {
        options.seed = s;
    }
    let out = args
        .out
        .unwrap_or_else(|| PathBuf::from(format!("{}-results", report::file_safe(&room.name))));

    let passes = options.law.band_groups(&room).len() as u64;
    let total_rays = options.rays as u64 * room.sources.len() as u64 * passes;
    let show = !args.quiet && std::io::stderr().is_terminal() && std::io::stdout().is_terminal();
    let bar = if show {
        let pb = ProgressBar::new(total_rays);
        if let Ok(style) =
            ProgressStyle::with_template("tracing {bar:40} {pos}/{len} rays, {eta} left")
        {
            pb.set_style(style);
        }
        pb
    } else {
        ProgressBar::hidden()
    };
    let result = trace::run_with_progress(&room, &options, &|n| bar.inc(n as u64))
        .with_context(|| format!("{}: cannot trace", args.room.display()))?;
    bar.finish_and_clear();

    let mut warnings = loaded.warnings.clone();
    warnings.extend(result.warnings.iter().cloned());
    for f in &result.fallbacks {
        eprintln!("fallback: {f}");
    }
    for w in &result.warnings {
        eprintln!("warning: {w}");
    }
    let written = report::write_run(&out, &room, &options, &result, warnings)?;
    print_summary(&room, &options, &result, &out, written.len());
    Ok(ExitCode::SUCCESS)
}

/// The stdout summary: what was traced, how it went, strength per band.
fn print_summary(
    room: &room::Room,
    options: &TraceOptions,
    result: &TraceResult,
    out: &std::path::Path,
    files: usize,
) {
    let s = &result.stats;
    println!(
        "{} · law {} · {} rays per source · seed {}",
        room.name, options.law, options.rays, options.seed
    );
    let volume = estimates::volume_m3(room);
    print!(
        "  room: V {volume:.1} m³, S {:.1} m², 4V/S {:.2} m",
        estimates::area_m2(room),
        estimates::mean_free_path_m(room)
    );
    match s.traced_mean_free_path_m {
        Some(m) => println!(" (traced {m:.2} m)"),
        None => println!(),
    }
    println!(
        "  traced: {} segments, {} lost rays, {:.2} s wall time, {:.2} s echograms in {:.1} ms bins",
        s.segments,
        s.lost_rays,
        s.wall_time_s,
        result.duration_s,
        result.bin_s * 1e3
    );
    let bands = result.bands.centres_hz();
    let header: String = bands
        .iter()
        .map(|hz| format!("{:>8}", format!("{hz} Hz")))
        .collect();
    println!("  strength G (dB)      {header}");
    for p in &result.echograms {
        let name = report::column_prefix(result, p.source, p.receiver);
        let total = p.echogram.total();
        let row: String = (0..bands.len())
            .map(|b| {
                format!(
                    "{:>8.1}",
                    10.0 * (4.0 * std::f64::consts::PI * 100.0 * total[b]).log10()
                )
            })
            .collect();
        let r = &result.receivers[p.receiver];
        println!("  {:<12} r {:>4.2} m {row}", name, r.radius_m);
    }
    println!("  wrote {files} files to {}", out.display());
    println!("  {}", report::ADVISORY);
}
