//! `polaray analyze`: ISO 3382-1 parameters of a measured impulse response (WAV).

use std::fmt::Write as _;
use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::Context;
use serde::Serialize;

use polaray::bands::{BandSet, DEFAULT_BANDS_HZ};
use polaray::metrics::{self, Averages, DecayFits, DecayPanel, MeasuredBand};
use polaray::output::write_atomic;

/// Options of `polaray analyze`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Impulse response: WAV, mono or first channel, 16/24/32-bit integer or 32-bit float.
    pub file: PathBuf,
    /// Write the results as JSON to this file.
    #[arg(long, value_name = "FILE")]
    pub json: Option<PathBuf>,
    /// Write decay-curve charts (PNG) into this folder.
    #[arg(long, value_name = "DIR")]
    pub out: Option<PathBuf>,
    /// Octave bands in Hz, comma-separated (default 125 to 4000).
    #[arg(long, value_delimiter = ',', value_name = "HZ,HZ,...")]
    pub bands: Option<Vec<u32>>,
}

/// One band of the JSON output.
#[derive(Serialize)]
struct BandJson<'a> {
    band_hz: u32,
    #[serde(rename = "EDT_s")]
    edt_s: Option<f64>,
    #[serde(rename = "T20_s")]
    t20_s: Option<f64>,
    #[serde(rename = "T30_s")]
    t30_s: Option<f64>,
    #[serde(rename = "C50_db")]
    c50_db: Option<f64>,
    #[serde(rename = "C80_db")]
    c80_db: Option<f64>,
    #[serde(rename = "D50")]
    d50: Option<f64>,
    #[serde(rename = "Ts_s")]
    ts_s: Option<f64>,
    noise_floor_db: Option<f64>,
    floor_db: Option<f64>,
    crossing_s: Option<f64>,
    curvature_percent: Option<f64>,
    undefined: &'a std::collections::BTreeMap<String, String>,
    warnings: &'a [String],
    fits: &'a DecayFits,
}

/// The JSON document.
#[derive(Serialize)]
struct ReportJson<'a> {
    file: String,
    sample_rate_hz: f64,
    onset_s: f64,
    bands: Vec<BandJson<'a>>,
    averages: &'a Averages,
}

fn band_json<'a>(b: &'a MeasuredBand, onset_s: f64, fs: f64) -> BandJson<'a> {
    let p = &b.parameters;
    BandJson {
        band_hz: p.band_hz,
        edt_s: p.edt_s,
        t20_s: p.t20_s,
        t30_s: p.t30_s,
        c50_db: p.c50_db,
        c80_db: p.c80_db,
        d50: p.d50,
        ts_s: p.ts_s,
        noise_floor_db: b.noise_floor_db,
        floor_db: p.floor_db,
        crossing_s: b
            .noise
            .as_ref()
            .map(|n| onset_s + n.crossing_index as f64 / fs),
        curvature_percent: p.curvature_percent,
        undefined: &p.undefined,
        warnings: &p.warnings,
        fits: &p.fits,
    }
}

fn cell(v: Option<f64>, scale: f64, decimals: usize) -> String {
    v.map_or_else(
        || "—".to_string(),
        |x| format!("{:.*}", decimals, x * scale),
    )
}

/// Runs the command.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let bands_hz = args
        .bands
        .clone()
        .unwrap_or_else(|| DEFAULT_BANDS_HZ.to_vec());
    let set = BandSet::new(&bands_hz).with_context(|| format!("--bands {bands_hz:?}"))?;
    let ir = metrics::read_wav(&args.file)?;
    let analysis =
        metrics::analyse_impulse_response(&ir.samples, ir.sample_rate_hz, set.centres_hz())
            .with_context(|| format!("{}", args.file.display()))?;

    // Table.
    let mut text = String::new();
    let _ = writeln!(
        text,
        "{}: {} Hz, {:.3} s{}, direct sound at {:.1} ms",
        args.file.display(),
        ir.sample_rate_hz,
        ir.samples.len() as f64 / ir.sample_rate_hz,
        if ir.channels > 1 {
            format!(", first of {} channels", ir.channels)
        } else {
            String::new()
        },
        analysis.onset_s * 1e3
    );
    let _ = writeln!(
        text,
        "{:>6} {:>7} {:>7} {:>7} {:>7} {:>7} {:>6} {:>7} {:>7}",
        "band", "EDT", "T20", "T30", "C50", "C80", "D50", "Ts", "noise"
    );
    let _ = writeln!(
        text,
        "{:>6} {:>7} {:>7} {:>7} {:>7} {:>7} {:>6} {:>7} {:>7}",
        "Hz", "s", "s", "s", "dB", "dB", "", "ms", "dB"
    );
    for b in &analysis.bands {
        let p = &b.parameters;
        let _ = writeln!(
            text,
            "{:>6} {:>7} {:>7} {:>7} {:>7} {:>7} {:>6} {:>7} {:>7}",
            p.band_hz,
            cell(p.edt_s, 1.0, 2),
            cell(p.t20_s, 1.0, 2),
            cell(p.t30_s, 1.0, 2),
            cell(p.c50_db, 1.0, 1),
            cell(p.c80_db, 1.0, 1),
            cell(p.d50, 1.0, 2),
            cell(p.ts_s, 1e3, 0),
            cell(b.noise_floor_db, 1.0, 1),
        );
    }
    let a = &analysis.averages;
    let _ = writeln!(
        text,
        "{:>6} {:>7} {:>7} {:>7} {:>7} {:>7} {:>6} {:>7}",
        "mean",
        cell(a.edt_s, 1.0, 2),
        cell(a.t20_s, 1.0, 2),
        cell(a.t30_s, 1.0, 2),
        cell(a.c50_db, 1.0, 1),
        cell(a.c80_db, 1.0, 1),
        cell(a.d50, 1.0, 2),
        cell(a.ts_s, 1e3, 0),
    );
    let _ = writeln!(
        text,
        "mean: 500 and 1000 Hz (ISO 3382-1:2009 Table A.1); noise: background re band peak"
    );
    for b in &analysis.bands {
        let p = &b.parameters;
        for (name, why) in &p.undefined {
            if name != "G_db" && name != "JLF" {
                let _ = writeln!(text, "  {} Hz {name} undefined: {why}", p.band_hz);
            }
        }
        for w in &p.warnings {
            let _ = writeln!(text, "  {} Hz warning: {w}", p.band_hz);
        }
    }
    out!("{text}");

    if let Some(json_path) = &args.json {
        let doc = ReportJson {
            file: args.file.display().to_string(),
            sample_rate_hz: analysis.sample_rate_hz,
            onset_s: analysis.onset_s,
            bands: analysis
                .bands
                .iter()
                .map(|b| band_json(b, analysis.onset_s, analysis.sample_rate_hz))
                .collect(),
            averages: &analysis.averages,
        };
        let bytes = serde_json::to_vec_pretty(&doc)?;
        write_atomic(json_path, &bytes)
            .with_context(|| format!("{}: cannot write the JSON results", json_path.display()))?;
        outln!("wrote {}", json_path.display());
    }
    if let Some(dir) = &args.out {
        let panels: Vec<DecayPanel<'_>> = analysis
            .bands
            .iter()
            .map(|b| DecayPanel::from_band(&b.parameters))
            .collect();
        let stem = args
            .file
            .file_stem()
            .map_or_else(|| "ir".into(), |s| s.to_string_lossy().into_owned());
        let path = dir.join(format!("{stem}-decay.png"));
        metrics::write_decay_chart(
            &path,
            &format!("Decay curves: {}", args.file.display()),
            &panels,
        )?;
        outln!("wrote {}", path.display());
    }
    Ok(ExitCode::SUCCESS)
}
