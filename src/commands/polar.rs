//! `polaray polar`: diffusion and scattering coefficients of polar data, the
//! bound that links them, polar charts; or the reverberation-chamber scattering
//! coefficient with `--chamber`.

use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::{bail, Context};

use polaray::output::write_atomic;
use polaray::polar::analysis::{analyze, receiver_directions, Analysis, ResponseCoefficients};
use polaray::polar::chamber::{chamber_coefficients, load_chamber_file, ChamberBand};
use polaray::polar::csv::load_polar_csv;
use polaray::polar::plot::{
    draw_bound_chart, draw_polar_chart, zone_interval_deg, BoundPoint, PolarChart, PolarCurve,
};
use polaray::polar::weights::IncidenceWeighting;
use polaray::polar::{load_polar_file, Arrangement, PolarResponse, ZoneRule};

/// Options of `polaray polar`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Polar data file: TOML (polaray polar format) or CSV (`angle_deg`, then one
    /// column of levels in dB per band, headed by the band in Hz).
    #[arg(required_unless_present = "chamber", conflicts_with = "chamber")]
    pub file: Option<PathBuf>,
    /// Reverberation-chamber file (ISO 17497-1, polaray format): print α_s, α_spec
    /// and the random-incidence scattering coefficient s per band.
    #[arg(long, value_name = "FILE")]
    pub chamber: Option<PathBuf>,
    /// Print the results as JSON on stdout instead of a table.
    #[arg(long)]
    pub json: bool,
    /// Folder for charts and the JSON summary (default: `<file stem>-polar/` in the current folder, as `run` and `compare` do).
    #[arg(long, value_name = "DIR")]
    pub out: Option<PathBuf>,
    /// Angle of incidence of CSV data, degrees from the normal.
    #[arg(long, allow_hyphen_values = true)]
    pub incidence_deg: Option<f64>,
    /// Specular zone = receivers within this many degrees of the mirror
    /// direction (edges included); replaces the zone of a TOML file.
    #[arg(long)]
    pub zone_half_width_deg: Option<f64>,
    /// Sample width for the image-source zone, m (with the two distances).
    #[arg(long)]
    pub sample_width_m: Option<f64>,
    /// Source distance from the sample centre, m.
    #[arg(long)]
    pub source_distance_m: Option<f64>,
    /// Receiver distance from the sample centre, m.
    #[arg(long)]
    pub receiver_distance_m: Option<f64>,
    /// Flat reference of CSV data, same layout and receivers (gives d_n).
    #[arg(long, value_name = "FILE")]
    pub reference: Option<PathBuf>,
    /// Weights of the angles of incidence in the random-incidence averages.
    #[arg(long, value_enum, default_value_t)]
    pub incidence_weighting: IncidenceWeighting,
    /// Level range of the polar charts, dB below the highest level.
    #[arg(long, default_value_t = DEFAULT_RANGE_DB)]
    pub range_db: f64,
}

/// Default level range of the polar charts, dB.
const DEFAULT_RANGE_DB: f64 = 40.0;

/// Runs the command.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    if let Some(chamber) = &args.chamber {
        return run_chamber(chamber, args.json);
    }
    let Some(file) = args.file.clone() else {
        bail!("give a polar data file, or --chamber FILE");
    };
    if !(args.range_db.is_finite() && args.range_db > 0.0) {
        bail!(
            "--range-db {} must be a positive level range in dB",
            args.range_db
        );
    }
    let input = read_input(&file, &args)?;
    let analysis = analyze(
        input.arrangement,
        &input.zone,
        &input.responses,
        args.incidence_weighting,
    )
    .with_context(|| file.display().to_string())?;
    let out_dir = args.out.clone().unwrap_or_else(|| default_out_dir(&file));
    let mut files = write_charts(&out_dir, &input, &analysis, args.range_db)?;
    let mut summary = Summary {
        file: file.display().to_string(),
        name: &input.name,
        arrangement: input.arrangement,
        zone: &input.zone,
        bands: &analysis.bands,
        random_incidence: RandomSummary {
            weighting: analysis.weighting,
            bands: &analysis.random_incidence,
        },
        warnings: &analysis.warnings,
        files: None,
    };
    let json_path = out_dir.join("coefficients.json");
    let text = serde_json::to_string_pretty(&summary)?;
    write_atomic(&json_path, text.as_bytes())
        .with_context(|| format!("{}: cannot write", json_path.display()))?;
    files.push(json_path);
    for w in &analysis.warnings {
        eprintln!("warning: {}: {w}", file.display());
    }
    if args.json {
        summary.files = Some(files.iter().map(|f| f.display().to_string()).collect());
        outln!("{}", serde_json::to_string_pretty(&summary)?);
    } else {
        out!("{}", table(&file, &input, &analysis));
        outln!("wrote {} files to {}", files.len(), out_dir.display());
    }
    Ok(ExitCode::SUCCESS)
}

/// Writes the polar charts (PNG and SVG per band and incidence) and the d-versus-s
/// bound charts of `data` into `dir`, with the zone its geometry implies and the
/// default level range; used by `polaray profile --plots`.
pub fn write_file_charts(
    data: &polaray::polar::PolarFile,
    dir: &Path,
) -> anyhow::Result<Vec<PathBuf>> {
    let input = Input {
        name: data.name.clone(),
        arrangement: data.geometry.arrangement,
        zone: ZoneRule::from_geometry(&data.geometry),
        responses: data.responses.clone(),
    };
    let analysis = analyze(
        input.arrangement,
        &input.zone,
        &input.responses,
        IncidenceWeighting::default(),
    )?;
    write_charts(dir, &input, &analysis, DEFAULT_RANGE_DB)
}

/// The JSON report: printed with `--json`, written as `coefficients.json`.
#[derive(serde::Serialize)]
struct Summary<'a> {
    file: String,
    name: &'a str,
    arrangement: Arrangement,
    zone: &'a ZoneRule,
    bands: &'a [ResponseCoefficients],
    random_incidence: RandomSummary<'a>,
    warnings: &'a [String],
    #[serde(skip_serializing_if = "Option::is_none")]
    files: Option<Vec<String>>,
}

/// Random-incidence part of the JSON report.
#[derive(serde::Serialize)]
struct RandomSummary<'a> {
    weighting: IncidenceWeighting,
    bands: &'a [polaray::polar::analysis::RandomIncidence],
}

/// Polar data ready for analysis, from either input form.
struct Input {
    name: String,
    arrangement: Arrangement,
    zone: ZoneRule,
    responses: Vec<PolarResponse>,
}

fn is_csv(path: &Path) -> bool {
    path.extension()
        .is_some_and(|e| e.to_string_lossy().eq_ignore_ascii_case("csv"))
}

fn default_out_dir(file: &Path) -> PathBuf {
    let stem = file
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "polar".into());
    PathBuf::from(format!("{stem}-polar"))
}

fn positive(name: &str, v: Option<f64>) -> anyhow::Result<Option<f64>> {
    match v {
        Some(x) if !(x.is_finite() && x > 0.0) => {
            bail!("{name} {x} must be a positive length in metres")
        }
        _ => Ok(v),
    }
}

fn read_input(file: &Path, args: &Args) -> anyhow::Result<Input> {
    if let Some(h) = args.zone_half_width_deg {
        if !(h.is_finite() && (0.0..=90.0).contains(&h)) {
            bail!("--zone-half-width-deg {h} must lie between 0 and 90 degrees");
        }
    }
    let width = positive("--sample-width-m", args.sample_width_m)?;
    let source = positive("--source-distance-m", args.source_distance_m)?;
    let receiver = positive("--receiver-distance-m", args.receiver_distance_m)?;
    let any_geometry = width.is_some() || source.is_some() || receiver.is_some();
    if args.zone_half_width_deg.is_some() && any_geometry {
        bail!("give either --zone-half-width-deg or the sample geometry (--sample-width-m, --source-distance-m, --receiver-distance-m), not both");
    }
    if is_csv(file) {
        let Some(incidence_deg) = args.incidence_deg else {
            bail!(
                "{}: CSV data need --incidence-deg, the angle of incidence in degrees",
                file.display()
            );
        };
        if !(incidence_deg.is_finite() && incidence_deg.abs() < 90.0) {
            bail!("--incidence-deg {incidence_deg} must lie strictly between -90 and 90 degrees");
        }
        let zone = match (args.zone_half_width_deg, width, source, receiver) {
            (Some(half_width_deg), ..) => ZoneRule::HalfWidth { half_width_deg },
            (None, Some(w), Some(s), Some(r)) => ZoneRule::Sample {
                sample_width_m: w,
                sample_depth_m: None,
                source_distance_m: s,
                receiver_distance_m: r,
            },
            _ => bail!(
                "{}: CSV data need the specular zone: --zone-half-width-deg, or all of --sample-width-m, --source-distance-m and --receiver-distance-m",
                file.display()
            ),
        };
        let csv = load_polar_csv(file)?;
        let reference = match &args.reference {
            Some(r) => Some(load_polar_csv(r)?),
            None => None,
        };
        let responses = csv
            .to_responses(incidence_deg, reference.as_ref())
            .map_err(|e| anyhow::anyhow!("{}: {e}", file.display()))?;
        let name = file
            .file_stem()
            .map(|s| s.to_string_lossy().into_owned())
            .unwrap_or_default();
        return Ok(Input {
            name,
            arrangement: Arrangement::Plane,
            zone,
            responses,
        });
    }
    if args.incidence_deg.is_some() {
        bail!(
            "--incidence-deg applies to CSV data only; a TOML file gives each response's incidence"
        );
    }
    if args.reference.is_some() {
        bail!("--reference applies to CSV data only; a TOML file gives reference_level_db in each response");
    }
    let data = load_polar_file(file)?;
    let mut zone = ZoneRule::from_geometry(&data.geometry);
    if let Some(half_width_deg) = args.zone_half_width_deg {
        zone = ZoneRule::HalfWidth { half_width_deg };
    } else if any_geometry {
        let g = &data.geometry;
        zone = ZoneRule::Sample {
            sample_width_m: width.unwrap_or(g.sample_width_m),
            sample_depth_m: g.sample_depth_m,
            source_distance_m: source.unwrap_or(g.source_distance_m),
            receiver_distance_m: receiver.unwrap_or(g.receiver_distance_m),
        };
    }
    Ok(Input {
        name: data.name,
        arrangement: data.geometry.arrangement,
        zone,
        responses: data.responses,
    })
}

/// A number for file names: `500`, `31.5`, `-30`.
fn tag(x: f64) -> String {
    let s = format!("{x:.1}");
    s.strip_suffix(".0").unwrap_or(&s).to_string()
}

fn incidence_tag(c: &ResponseCoefficients) -> String {
    match c.incidence_azimuth_deg {
        Some(a) => format!("inc{}-az{}", tag(c.incidence_deg), tag(a)),
        None => format!("inc{}", tag(c.incidence_deg)),
    }
}

/// The receivers of a response in the plane of incidence, as signed angles
/// (positive on the source side) with their indices.
fn in_plane(arrangement: Arrangement, r: &PolarResponse) -> Vec<(usize, f64)> {
    if arrangement == Arrangement::Plane {
        return r.receiver_deg.iter().copied().enumerate().collect();
    }
    // Normalize (θ, φ) to θ ≥ 0, then keep φ ≡ φ_s (positive) or φ_s + 180° (negative).
    let norm = |t: f64, a: f64| if t < 0.0 { (-t, a + 180.0) } else { (t, a) };
    let (_, src_az) = norm(r.incidence_deg, r.incidence_azimuth_deg.unwrap_or(0.0));
    let same = |a: f64, b: f64| ((a - b).rem_euclid(360.0)).min((b - a).rem_euclid(360.0)) < 1e-6;
    receiver_directions(r)
        .iter()
        .enumerate()
        .filter_map(|(i, d)| {
            let (t, a) = norm(d.polar_deg, d.azimuth_deg);
            if t < 1e-9 || same(a, src_az) {
                Some((i, t))
            } else if same(a, src_az + 180.0) {
                Some((i, -t))
            } else {
                None
            }
        })
        .collect()
}

fn find_response<'a>(
    responses: &'a [PolarResponse],
    c: &ResponseCoefficients,
) -> Option<&'a PolarResponse> {
    responses.iter().find(|r| {
        r.band_hz == c.band_hz
            && r.incidence_deg == c.incidence_deg
            && r.incidence_azimuth_deg == c.incidence_azimuth_deg
    })
}

fn write_charts(
    dir: &Path,
    input: &Input,
    analysis: &Analysis,
    range_db: f64,
) -> anyhow::Result<Vec<PathBuf>> {
    let mut files = Vec::new();
    for c in &analysis.bands {
        let Some(r) = find_response(&input.responses, c) else {
            continue;
        };
        let plane = in_plane(input.arrangement, r);
        if plane.len() < 2 {
            eprintln!(
                "warning: band {} Hz, incidence {}°: fewer than 2 receivers in the plane of incidence; no polar chart",
                c.band_hz, c.incidence_deg
            );
            continue;
        }
        let angles: Vec<f64> = plane.iter().map(|p| p.1).collect();
        let pick = |v: &[f64]| plane.iter().map(|p| v[p.0]).collect::<Vec<f64>>();
        let zone_flags: Vec<bool> = plane.iter().map(|p| c.in_zone[p.0]).collect();
        let mut curves = vec![PolarCurve {
            label: format!("sample: d = {:.2}, s_zone = {:.2}", c.d, c.s_zone),
            angle_deg: angles.clone(),
            level_db: pick(&r.level_db),
            dashed: false,
        }];
        if let Some(reference) = &r.reference_level_db {
            curves.push(PolarCurve {
                label: match c.d_ref {
                    Some(d) => format!("flat reference: d = {d:.2}"),
                    None => "flat reference".into(),
                },
                angle_deg: angles.clone(),
                level_db: pick(reference),
                dashed: true,
            });
        }
        let source_deg = if input.arrangement == Arrangement::Plane {
            c.incidence_deg
        } else {
            c.incidence_deg.abs()
        };
        let chart = PolarChart {
            title: format!(
                "{}: {} Hz, incidence {}°",
                input.name,
                tag(c.band_hz),
                tag(c.incidence_deg)
            ),
            curves,
            zone_deg: zone_interval_deg(&angles, &zone_flags),
            incidence_deg: Some(source_deg),
            range_db,
        };
        for ext in ["png", "svg"] {
            let path = dir.join(format!(
                "polar-{}hz-{}.{ext}",
                tag(c.band_hz),
                incidence_tag(c)
            ));
            draw_polar_chart(&path, &chart)?;
            files.push(path);
        }
    }
    // One bound chart per incidence (and zone), every band's point on it.
    let mut groups: Vec<(String, Vec<&ResponseCoefficients>)> = Vec::new();
    for c in &analysis.bands {
        let key = incidence_tag(c);
        match groups
            .iter_mut()
            .find(|(k, g)| *k == key && g[0].zone_size == c.zone_size)
        {
            Some((_, g)) => g.push(c),
            None => groups.push((key, vec![c])),
        }
    }
    let mut used: Vec<String> = Vec::new();
    for (key, group) in groups {
        if group[0].zone_size.check().is_err() {
            continue;
        }
        let n = used.iter().filter(|k| **k == key).count();
        used.push(key.clone());
        let stem = if n == 0 {
            format!("bound-{key}")
        } else {
            format!("bound-{key}-{}", n + 1)
        };
        let points: Vec<BoundPoint> = group
            .iter()
            .map(|c| BoundPoint {
                label: format!("{} Hz", tag(c.band_hz)),
                s: c.s_zone,
                d: c.d,
            })
            .collect();
        let title = format!(
            "{}: diffusion against scattering, incidence {}°",
            input.name,
            tag(group[0].incidence_deg)
        );
        for ext in ["png", "svg"] {
            let path = dir.join(format!("{stem}.{ext}"));
            draw_bound_chart(&path, &title, &group[0].zone_size, &points)?;
            files.push(path);
        }
    }
    Ok(files)
}

fn opt(v: Option<f64>) -> String {
    v.map_or_else(|| "-".to_string(), |x| format!("{x:.3}"))
}

fn table(file: &Path, input: &Input, a: &Analysis) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "{} ({})", input.name, file.display());
    let _ = writeln!(s, "{}", input.zone.describe());
    let _ = writeln!(
        s,
        "Per band at the angle of incidence shown. s_zone: energy outside the specular zone / total; \
         s_corr: correlation scattering coefficient; d, d_n: diffusion coefficient, normalized; \
         d_max: largest d possible at this s_zone with M receivers, M_s in the zone. '-' = not available."
    );
    let _ = writeln!(
        s,
        "{:>8} {:>10} {:>4} {:>4} {:>7} {:>7} {:>7} {:>7} {:>7} {:>8}",
        "band_hz", "incidence", "M", "M_s", "s_zone", "s_corr", "d", "d_n", "d_max", "d/d_max"
    );
    for c in &a.bands {
        let inc = match c.incidence_azimuth_deg {
            Some(az) => format!("{}°/{}°", tag(c.incidence_deg), tag(az)),
            None => format!("{}°", tag(c.incidence_deg)),
        };
        let _ = writeln!(
            s,
            "{:>8} {:>10} {:>4} {:>4} {:>7.3} {:>7} {:>7.3} {:>7} {:>7} {:>8}",
            tag(c.band_hz),
            inc,
            c.receivers,
            c.zone_receivers,
            c.s_zone,
            opt(c.s_corr),
            c.d,
            opt(c.d_n),
            opt(c.d_max),
            opt(c.d_ratio),
        );
    }
    if a.random_incidence.is_empty() {
        let _ = writeln!(
            s,
            "\nRandom incidence: not formed, the data hold one angle of incidence only"
        );
        return s;
    }
    let _ = writeln!(
        s,
        "\nRandom incidence (weighting: {}):",
        a.weighting.label()
    );
    let _ = writeln!(
        s,
        "{:>8} {:>7} {:>7} {:>7} {:>7}  weights",
        "band_hz", "s_zone", "s_corr", "d", "d_n"
    );
    for r in &a.random_incidence {
        let weights: Vec<String> = r
            .incidence_weights
            .iter()
            .map(|w| format!("{}°: {:.3}", tag(w.incidence_deg), w.weight))
            .collect();
        let _ = writeln!(
            s,
            "{:>8} {:>7.3} {:>7} {:>7.3} {:>7}  {}",
            tag(r.band_hz),
            r.s_zone,
            opt(r.s_corr),
            r.d,
            opt(r.d_n),
            weights.join(", ")
        );
    }
    s
}

fn run_chamber(path: &Path, json: bool) -> anyhow::Result<ExitCode> {
    let file = load_chamber_file(path)?;
    let bands = chamber_coefficients(&file);
    let warnings: Vec<String> = bands
        .iter()
        .filter_map(|b| match b.s {
            None => Some(format!("band {} Hz: α_s = 1, s is undefined", tag(b.band_hz))),
            Some(s) if !(0.0..=1.0).contains(&s) => Some(format!(
                "band {} Hz: s = {s:.3} lies outside 0–1; check the reverberation times (reported as computed)",
                tag(b.band_hz)
            )),
            _ => None,
        })
        .collect();
    for w in &warnings {
        eprintln!("warning: {}: {w}", path.display());
    }
    if json {
        let out = serde_json::json!({
            "file": path.display().to_string(),
            "name": file.name,
            "volume_m3": file.volume_m3,
            "sample_area_m2": file.sample_area_m2,
            "bands": bands,
            "warnings": warnings,
        });
        outln!("{}", serde_json::to_string_pretty(&out)?);
    } else {
        out!("{}", chamber_table(path, &file.name, &bands));
    }
    Ok(ExitCode::SUCCESS)
}

fn chamber_table(path: &Path, name: &str, bands: &[ChamberBand]) -> String {
    let mut s = String::new();
    let _ = writeln!(
        s,
        "{name} ({}): reverberation-chamber method, ISO 17497-1",
        path.display()
    );
    let _ = writeln!(
        s,
        "alpha_s: random-incidence absorption; alpha_spec: specular absorption; s: random-incidence scattering coefficient"
    );
    let _ = writeln!(
        s,
        "{:>8} {:>8} {:>10} {:>7}",
        "band_hz", "alpha_s", "alpha_spec", "s"
    );
    for b in bands {
        let _ = writeln!(
            s,
            "{:>8} {:>8.3} {:>10.3} {:>7}",
            tag(b.band_hz),
            b.alpha_s,
            b.alpha_spec,
            opt(b.s)
        );
    }
    s
}
