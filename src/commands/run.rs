//! `polaray run`: trace a room and write its echograms, ISO 3382-1 parameters,
//! statistics and charts.

use std::io::IsTerminal;
use std::path::PathBuf;
use std::process::ExitCode;
use std::str::FromStr;

use anyhow::Context;
use indicatif::{ProgressBar, ProgressStyle};

use polaray::law::LawKind;
use polaray::metrics::{self, Parameter};
use polaray::report::{self, batches, precision};
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
    /// Batches the rays are traced in (disjoint random streams); each
    /// parameter's standard error comes from their spread. The rays must
    /// split evenly; 1 traces in one piece, without standard errors.
    #[arg(long, default_value_t = polaray::compare::plan::DEFAULT_BATCHES)]
    pub batches: usize,
    /// How receivers collect the reflected sound: `exact-early` (the
    /// default: early mirror paths evaluated exactly as image sources,
    /// stratified start directions, a detection sphere that grows late in the
    /// decay), `next-event` (the same plus next-event estimation at every
    /// reflection; slower, see DEVELOPERS.md) or `sphere` (detection spheres
    /// only, the reference).
    #[arg(long, default_value = "exact-early", value_parser = polaray::trace::ESTIMATOR_NAMES)]
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
    options.estimator = trace::Estimator::from_name(&args.estimator)
        .ok_or_else(|| anyhow::anyhow!("unknown estimator `{}`", args.estimator))?;
    let out = args
        .out
        .unwrap_or_else(|| PathBuf::from(format!("{}-results", report::file_safe(&room.name))));

    if args.batches == 0
        || options.rays < args.batches
        || !options.rays.is_multiple_of(args.batches)
    {
        anyhow::bail!(
            "{}: {} rays per source do not split into {} equal batches; give --rays as a multiple of {} (e.g. {}) or another --batches",
            args.room.display(),
            options.rays,
            args.batches,
            args.batches.max(1),
            options.rays.max(1).div_ceil(args.batches.max(1)) * args.batches.max(1)
        );
    }
    let mut batch_options = options.clone();
    batch_options.rays = options.rays / args.batches;

    let passes = options.law.band_groups(&room).len() as u64;
    let total_ray_passes = options.rays as u64 * room.sources.len() as u64 * passes;
    let show = !args.quiet && std::io::stderr().is_terminal() && std::io::stdout().is_terminal();
    let bar = if show {
        let pb = ProgressBar::new(total_ray_passes);
        if let Ok(style) =
            ProgressStyle::with_template("tracing {bar:40} {percent:>3} % of {msg}, {eta} left")
        {
            pb.set_style(style);
        }
        pb.set_message(match passes {
            1 => format!("{} rays per source", options.rays),
            p => format!("{} rays per source in {p} band passes", options.rays),
        });
        pb
    } else {
        ProgressBar::hidden()
    };
    let batches = trace::run_batches(&room, &batch_options, args.batches, &|n| bar.inc(n as u64))
        .with_context(|| format!("{}: cannot trace", args.room.display()))?;
    bar.finish_and_clear();
    let Some(result) = trace::pool(&batches) else {
        anyhow::bail!("{}: no batch was traced", args.room.display());
    };

    let mut warnings = loaded.warnings.clone();
    warnings.extend(result.warnings.iter().cloned());
    for f in &result.fallbacks {
        eprintln!("fallback: {f}");
    }
    for w in &result.warnings {
        eprintln!("warning: {w}");
    }
    let mut parameters = report::run_parameters(&result);
    if batches.len() > 1 {
        for (k, p) in parameters.iter_mut().enumerate() {
            let delete_one = batches::delete_one_tables(&batches, k);
            p.standard_errors = batches::ValueTable::standard_errors(&delete_one);
        }
    }
    let single_numbers = has_single_numbers(&result);
    let mut precision = Vec::new();
    for p in &parameters {
        let imprecise = precision::imprecise_values(&result, p, single_numbers);
        let name = report::column_prefix(&result, p.source, p.receiver);
        let radius_is_default = result.receivers[p.receiver].radius_is_default;
        precision.extend(precision::precision_warning(
            &name,
            &imprecise,
            options.rays,
            args.batches,
            radius_is_default,
        ));
    }
    for w in &precision {
        eprintln!("warning: {w}");
    }
    warnings.extend(precision);
    let written =
        report::write_run_with_parameters(&out, &room, &options, &result, &parameters, warnings)?;
    print_summary(&room, &options, &result);
    print_parameters(&result, &parameters);
    outln!("  wrote {} files to {}", written.len(), out.display());
    outln!("  {}", report::ADVISORY);
    Ok(ExitCode::SUCCESS)
}

/// The stdout summary: what was traced and how it went.
fn print_summary(room: &room::Room, options: &TraceOptions, result: &TraceResult) {
    let s = &result.stats;
    outln!(
        "{} · law {} · {} rays per source in {} batches · seed {} · estimator {}",
        room.name,
        options.law,
        options.rays,
        s.batches,
        options.seed,
        options.estimator.name()
    );
    let volume = estimates::volume_m3(room);
    out!(
        "  room: V {volume:.1} m³, S {:.1} m², 4V/S {:.2} m",
        estimates::area_m2(room),
        estimates::mean_free_path_m(room)
    );
    match s.traced_mean_free_path_m {
        Some(m) => outln!(" (traced {m:.2} m)"),
        None => outln!(),
    }
    outln!(
        "  traced: {} segments, {} lost rays, {:.2} s wall time, {:.2} s echograms in {:.1} ms bins",
        s.segments,
        s.lost_rays,
        s.wall_time_s,
        result.duration_s,
        result.bin_s * 1e3
    );
}

/// Whether the single-number means can be formed: 500 and 1000 Hz traced.
fn has_single_numbers(result: &TraceResult) -> bool {
    let centres = result.bands.centres_hz();
    metrics::averages::MID_BANDS_HZ
        .iter()
        .all(|hz| centres.contains(hz))
}

/// The parameters of the console table, in column order.
const TABLE: [Parameter; 6] = [
    Parameter::T30,
    Parameter::Edt,
    Parameter::C80,
    Parameter::D50,
    Parameter::G,
    Parameter::Jlf,
];

/// A table cell: value ± standard error in the display unit, `–` where
/// undefined, `±?` where batches were traced but some delete-one pool has
/// no value (so no standard error can be formed).
fn cell(parameter: Parameter, value: Option<f64>, se: Option<f64>, batched: bool) -> String {
    let (scale, _) = parameter.display_unit();
    let d = parameter.display_decimals();
    match (value, se) {
        (None, _) => "–".to_string(),
        (Some(v), None) if batched => format!("{:.d$}±?", v * scale),
        (Some(v), None) => format!("{:.d$}", v * scale),
        (Some(v), Some(e)) => format!("{:.d$}±{:.d$}", v * scale, e * scale),
    }
}

/// The parameter table: one row of single-number means per pair when the
/// 500 and 1000 Hz bands were traced, else one row per pair and band; each
/// value with its standard error over the batches; the notes of each pair
/// (e.g. a blocked direct sound) follow.
fn print_parameters(result: &TraceResult, parameters: &[report::PairParameters]) {
    let means = has_single_numbers(result);
    if means {
        outln!(
            "  parameters ± standard error, means over 500–1000 Hz (JLF 125–1000 Hz); per band in parameters.csv"
        );
    } else {
        outln!(
            "  parameters ± standard error per band (500 and 1000 Hz not both traced, so no means)"
        );
    }
    let mut rows: Vec<(String, Vec<String>)> = Vec::new();
    for p in parameters {
        let batched = p.standard_errors.is_some();
        let name = report::column_prefix(result, p.source, p.receiver);
        if means {
            let slot = p.bands.len();
            let cells = TABLE
                .iter()
                .map(|&q| {
                    cell(
                        q,
                        q.of_averages(&p.averages),
                        p.standard_error(q, slot),
                        batched,
                    )
                })
                .collect();
            rows.push((name, cells));
        } else {
            for (slot, b) in p.bands.iter().enumerate() {
                let cells = TABLE
                    .iter()
                    .map(|&q| cell(q, q.of_band(b), p.standard_error(q, slot), batched))
                    .collect();
                rows.push((format!("{name} {}", b.band_hz), cells));
            }
        }
    }
    let headings: Vec<String> = TABLE
        .iter()
        .map(|q| match q.display_unit().1 {
            "" => q.short().to_string(),
            unit => format!("{} {unit}", q.short()),
        })
        .collect();
    let name_width = rows
        .iter()
        .map(|(n, _)| n.chars().count())
        .chain(["receiver".len()])
        .max()
        .unwrap_or(8)
        + 2;
    let widths: Vec<usize> = (0..TABLE.len())
        .map(|c| {
            rows.iter()
                .map(|(_, cells)| cells[c].chars().count())
                .chain([headings[c].chars().count()])
                .max()
                .unwrap_or(4)
                + 2
        })
        .collect();
    let line = |name: &str, cells: &[String]| {
        let mut out = format!("  {name}{}", " ".repeat(name_width - name.chars().count()));
        for (c, text) in cells.iter().enumerate() {
            out.push_str(&" ".repeat(widths[c] - text.chars().count()));
            out.push_str(text);
        }
        outln!("{out}");
    };
    line("receiver", &headings);
    for (name, cells) in &rows {
        line(name, cells);
    }
    if rows
        .iter()
        .any(|(_, cells)| cells.iter().any(|c| c.ends_with("±?")))
    {
        outln!("  ±?: the value is undefined without some batch, so it has no standard error (too noisy to trust)");
    }
    for p in parameters {
        for n in &p.notes {
            let name = report::column_prefix(result, p.source, p.receiver);
            outln!("  note: {name}: {n}");
        }
    }
}
