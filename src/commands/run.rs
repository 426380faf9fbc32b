//! `polaray run`: trace a room and write its echograms, ISO 3382-1 parameters,
//! statistics and charts.

use std::io::IsTerminal;
use std::path::PathBuf;
use std::process::ExitCode;
use std::str::FromStr;

use anyhow::Context;
use indicatif::{ProgressBar, ProgressStyle};

use polaray::law::LawKind;
use polaray::metrics;
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
    /// How receivers collect the reflected sound: `sphere` (detection
    /// spheres, the default) or `next-event` (experimental: next-event
    /// estimation, exact early mirror paths, stratified start directions and
    /// a late detection sphere that grows; see DEVELOPERS.md for its cost).
    #[arg(long, default_value = "sphere", value_parser = ["sphere", "next-event"])]
    pub estimator: String,
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
    if args.estimator == "next-event" {
        options.estimator = trace::Estimator::NextEvent(trace::NextEventSettings::default());
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
    let parameters = report::run_parameters(&result);
    let written =
        report::write_run_with_parameters(&out, &room, &options, &result, &parameters, warnings)?;
    print_summary(&room, &options, &result);
    print_parameters(&result, &parameters);
    println!("  wrote {} files to {}", written.len(), out.display());
    println!("  {}", report::ADVISORY);
    Ok(ExitCode::SUCCESS)
}

/// The stdout summary: what was traced and how it went.
fn print_summary(room: &room::Room, options: &TraceOptions, result: &TraceResult) {
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
}

/// A table cell: the value scaled and rounded, `–` where undefined.
fn cell(v: Option<f64>, decimals: usize) -> String {
    v.map_or_else(|| "–".to_string(), |x| format!("{x:.decimals$}"))
}

/// One row of the parameter table: T30, EDT, C80, D50, G, JLF.
#[allow(clippy::too_many_arguments)]
fn row(
    label: &str,
    t30: Option<f64>,
    edt: Option<f64>,
    c80: Option<f64>,
    d50: Option<f64>,
    g: Option<f64>,
    jlf: Option<f64>,
) {
    println!(
        "  {label:<14}{:>7}{:>7}{:>8}{:>6}{:>7}{:>6}",
        cell(t30, 2),
        cell(edt, 2),
        cell(c80, 1),
        cell(d50, 2),
        cell(g, 1),
        cell(jlf, 2)
    );
}

/// The parameter table: one row of single-number means per pair when the
/// 500 and 1000 Hz bands were traced, else one row per pair and band; the
/// notes of each pair (e.g. a blocked direct sound) follow.
fn print_parameters(result: &TraceResult, parameters: &[report::PairParameters]) {
    let centres = result.bands.centres_hz();
    let means = metrics::averages::MID_BANDS_HZ
        .iter()
        .all(|hz| centres.contains(hz));
    if means {
        println!(
            "  parameters, means over 500–1000 Hz (JLF 125–1000 Hz); per band in parameters.csv"
        );
    } else {
        println!("  parameters per band (500 and 1000 Hz not both traced, so no means)");
    }
    println!(
        "  {:<14}{:>7}{:>7}{:>8}{:>6}{:>7}{:>6}",
        "receiver", "T30 s", "EDT s", "C80 dB", "D50", "G dB", "JLF"
    );
    for p in parameters {
        let name = report::column_prefix(result, p.source, p.receiver);
        if means {
            let a = &p.averages;
            row(&name, a.t30_s, a.edt_s, a.c80_db, a.d50, a.g_db, a.jlf);
        } else {
            for b in &p.bands {
                let label = format!("{name} {}", b.band_hz);
                row(&label, b.t30_s, b.edt_s, b.c80_db, b.d50, b.g_db, b.jlf);
            }
        }
    }
    for p in parameters {
        for n in &p.notes {
            let name = report::column_prefix(result, p.source, p.receiver);
            println!("  note: {name}: {n}");
        }
    }
}
