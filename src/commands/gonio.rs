//! `polaray gonio`: measure a material's reflection law on the virtual goniometer.

use std::fmt::Write as _;
use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::{bail, Context};
use serde::Serialize;

use polaray::bands::BandSet;
use polaray::gonio::{self, ArcGeometry, GonioReport, GonioRequest};
use std::str::FromStr;

use polaray::gonio::CrossAxisView;
use polaray::law::{LawKind, ReflectionLaw};
use polaray::room::Material;

/// Options of `polaray gonio`.
#[derive(Debug, clap::Args)]
#[command(group(clap::ArgGroup::new("source").required(true).args(["room", "material_file"])))]
pub struct Args {
    /// Room file (TOML) holding the material; use with --material.
    #[arg(long, requires = "material")]
    pub room: Option<PathBuf>,
    /// Name of the material in the room file.
    #[arg(long)]
    pub material: Option<String>,
    /// A one-material TOML file (bands_hz, absorption, scattering; optional
    /// diffusion and polar).
    #[arg(long, conflicts_with = "room")]
    pub material_file: Option<PathBuf>,
    /// Reflection law to measure.
    #[arg(long, value_parser = clap::builder::PossibleValuesParser::new(LawKind::NAME_LIST))]
    pub law: String,
    /// Source angle from the normal, degrees (the mirror receiver is at minus this).
    #[arg(long, default_value_t = 0.0, allow_negative_numbers = true)]
    pub incidence_deg: f64,
    /// Reflections to fire.
    #[arg(long, default_value_t = 1_000_000)]
    pub samples: u64,
    /// Seed of the random streams.
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Sample width across the measurement plane, m [default: the material's
    /// goniometer, else 1.5].
    #[arg(long)]
    pub sample_width_m: Option<f64>,
    /// Source distance from the sample centre, m [default: the material's
    /// goniometer, else 10].
    #[arg(long)]
    pub source_distance_m: Option<f64>,
    /// Receiver distance from the sample centre, m [default: the material's
    /// goniometer, else 5].
    #[arg(long)]
    pub receiver_distance_m: Option<f64>,
    /// The material is an extruded (1D) profile: build its law as for a
    /// surface with a profile axis and measure across the extrusion axis.
    #[arg(long)]
    pub extruded: bool,
    /// Integrate the law's eval over each receiver instead of firing samples
    /// (noise-free; tests the law's eval, not its sampling).
    #[arg(long)]
    pub quadrature: bool,
    /// Print the result as JSON on stdout instead of a table.
    #[arg(long)]
    pub json: bool,
    /// Also write the virtual measurement as a polar data file (TOML) that
    /// `polaray polar` and the `polar` law read.
    #[arg(long)]
    pub out: Option<PathBuf>,
    /// Draw the polar charts and the d-against-s chart into this folder (the
    /// charts of `polaray polar`).
    #[arg(long, value_name = "DIR")]
    pub plots: Option<PathBuf>,
}

#[derive(Serialize)]
struct Output<'a> {
    material: &'a str,
    /// Measured across the extrusion axis of a 1D profile.
    extruded: bool,
    adjustments: &'a [String],
    #[serde(flatten)]
    report: &'a GonioReport,
}

fn load_material(args: &Args) -> anyhow::Result<(Material, BandSet)> {
    if let Some(file) = &args.material_file {
        let m = gonio::load_material_file(file)?;
        return Ok((m.material, m.bands));
    }
    let (Some(room), Some(name)) = (&args.room, &args.material) else {
        bail!("give --material-file FILE, or --room ROOM with --material NAME");
    };
    let loaded = polaray::room::load_room(room)?;
    let room_data = loaded.room;
    match room_data.materials.iter().find(|m| &m.name == name) {
        Some(m) => Ok((m.clone(), room_data.settings.bands.clone())),
        None => {
            let names: Vec<&str> = room_data
                .materials
                .iter()
                .map(|m| m.name.as_str())
                .collect();
            bail!(
                "{}: no material named '{name}'; the room has: {}",
                room.display(),
                names.join(", ")
            )
        }
    }
}

/// Runs the command.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let (material, bands) = load_material(&args)?;
    // The same factory as the tracer, all bands on one law instance (a single
    // reflection has no compounding weight noise). Polar data are used as the
    // tracer uses them on a surface without a profile axis (rotationally
    // symmetric), or with --extruded as on one with an axis, measured across it.
    let kind = LawKind::from_str(&args.law)?;
    if args.extruded && args.quadrature && kind == LawKind::Polar {
        bail!(
            "--quadrature integrates a density per steradian, which the extruded polar law \
             does not have (it scatters on a cone); fire samples instead (drop --quadrature)"
        );
    }
    let all: Vec<usize> = (0..bands.len()).collect();
    let (law, adjustments): (Box<dyn ReflectionLaw>, Vec<String>) =
        kind.build(&material, &bands, &all, args.extruded)?;
    for a in &adjustments {
        eprintln!("warning: {a}");
    }
    let view;
    let measured: &dyn ReflectionLaw = if args.extruded {
        view = CrossAxisView::new(law.as_ref());
        &view
    } else {
        law.as_ref()
    };
    let request = GonioRequest {
        geometry: {
            // The material's own goniometer (what its d means), unless overridden.
            let base = material
                .goniometer
                .as_ref()
                .map_or_else(ArcGeometry::default, ArcGeometry::from);
            ArcGeometry {
                sample_width_m: args.sample_width_m.unwrap_or(base.sample_width_m),
                source_distance_m: args.source_distance_m.unwrap_or(base.source_distance_m),
                receiver_distance_m: args.receiver_distance_m.unwrap_or(base.receiver_distance_m),
                ..base
            }
        },
        incidence_deg: args.incidence_deg,
        bands_hz: bands.centres_hz().to_vec(),
    };
    let report = if args.quadrature {
        gonio::measure_by_quadrature(measured, &request, 60)?
    } else {
        gonio::measure(measured, &request, args.samples, args.seed)?
    };
    if let Some(dir) = &args.plots {
        let file = gonio::to_polar_file(&report, &material.name);
        let written = super::polar::write_file_charts(&file, dir)
            .with_context(|| format!("{}: cannot draw the charts", dir.display()))?;
        if !args.json {
            outln!("wrote {} charts to {}", written.len(), dir.display());
        }
    }
    if let Some(out) = &args.out {
        let file = gonio::to_polar_file(&report, &material.name);
        let text = toml::to_string(&file)
            .with_context(|| format!("{}: cannot write the polar file", out.display()))?;
        polaray::output::write_atomic(out, text.as_bytes())
            .with_context(|| format!("{}: cannot write the polar file", out.display()))?;
    }
    if args.json {
        let output = Output {
            material: &material.name,
            extruded: args.extruded,
            adjustments: &adjustments,
            report: &report,
        };
        outln!("{}", serde_json::to_string_pretty(&output)?);
    } else {
        if args.extruded {
            outln!("Extruded profile: law built as for a surface with a profile axis, arc across the axis.");
        }
        out!("{}", table(&material.name, &report));
    }
    Ok(ExitCode::SUCCESS)
}

fn opt(v: Option<f64>, digits: usize) -> String {
    v.map_or_else(|| "-".into(), |x| format!("{x:.digits$}"))
}

fn table(material: &str, r: &GonioReport) -> String {
    let mut t = String::new();
    let zone: Vec<String> = r
        .receiver_deg
        .iter()
        .zip(&r.zone)
        .filter(|(_, &z)| z)
        .map(|(d, _)| format!("{d:.0}"))
        .collect();
    let _ = writeln!(
        t,
        "Virtual goniometer: material '{material}', law '{}', incidence {:.1}°, {}",
        r.law,
        r.incidence_deg,
        match (r.samples, r.seed) {
            (Some(n), Some(s)) => format!("{n} samples, seed {s}"),
            _ => r.method.clone(),
        }
    );
    let _ = writeln!(
        t,
        "Arc: {} receivers, specular zone {} (edges {:.1}° .. {:.1}°), sample {} m, distances {} m / {} m",
        r.receiver_deg.len(),
        zone.join(" "),
        r.zone_edges_deg.0,
        r.zone_edges_deg.1,
        r.geometry.sample_width_m,
        r.geometry.source_distance_m,
        r.geometry.receiver_distance_m
    );
    let _ = writeln!(t, "Note: {}.", r.mirror_representation);
    let _ = writeln!(t);
    let _ = writeln!(
        t,
        "{:>8}  {:>8}  {:>6}  {:>6}  {:>7}  {:>7}  {:>10}  {:>8}  {:>8}",
        "band Hz", "law s", "s_z", "d", "d_max", "d/d_max", "reflected", "mirror", "on arc"
    );
    for b in &r.bands {
        let refl = match b.balance.reflected_std_error {
            Some(se) => format!("{:.4}±{:.4}", b.balance.reflected, se),
            None => format!("{:.4}", b.balance.reflected),
        };
        let _ = writeln!(
            t,
            "{:>8}  {:>8}  {:>6.3}  {:>6}  {:>7}  {:>7}  {:>10}  {:>8.4}  {:>8.4}",
            b.band_hz,
            opt(b.law_scattering, 3),
            b.zone_ratio,
            opt(b.diffusion, 3),
            opt(b.diffusion_bound, 3),
            opt(b.diffusion_ratio, 3),
            refl,
            b.balance.mirror,
            b.balance.non_mirror_on_arc
        );
    }
    let _ = writeln!(t);
    let _ = writeln!(t, "Levels, dB re the total reflected energy:");
    let _ = write!(t, "{:>8}", "deg");
    for b in &r.bands {
        let _ = write!(t, "  {:>7}", b.band_hz);
    }
    let _ = writeln!(t);
    for (i, deg) in r.receiver_deg.iter().enumerate() {
        let mark = if r.zone[i] { "*" } else { " " };
        let _ = write!(t, "{deg:>7.0}{mark}");
        for b in &r.bands {
            let _ = write!(t, "  {:>7.1}", b.level_db[i]);
        }
        let _ = writeln!(t);
    }
    let _ = writeln!(t, "(* specular zone)");
    t
}
