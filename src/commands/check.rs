//! `polaray check`: load a room file and report its geometry, areas,
//! reverberation estimates and every warning or problem.

use std::fmt::Write as _;
use std::path::PathBuf;
use std::process::ExitCode;

use serde::Serialize;

use polaray::room::{estimates, load_room, LoadedRoom};

/// Options of `polaray check`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Room file (TOML).
    pub room: PathBuf,
    /// Print the report as JSON on stdout instead of text.
    #[arg(long)]
    pub json: bool,
}

/// Area of one material or group, m².
#[derive(Debug, Serialize)]
struct NamedArea {
    name: String,
    area_m2: f64,
}

/// A source or receiver.
#[derive(Debug, Serialize)]
struct Placement {
    name: String,
    position_m: [f64; 3],
    #[serde(skip_serializing_if = "Option::is_none")]
    radius_m: Option<f64>,
}

/// Everything `check` reports, the JSON form and the source of the text form.
#[derive(Debug, Serialize)]
struct Report {
    file: String,
    ok: bool,
    #[serde(skip_serializing_if = "Option::is_none")]
    room: Option<RoomSummary>,
    warnings: Vec<String>,
    problems: Vec<String>,
}

#[derive(Debug, Serialize)]
struct RoomSummary {
    name: String,
    surfaces: usize,
    triangles: usize,
    open: bool,
    volume_m3: f64,
    area_m2: f64,
    mean_free_path_m: f64,
    area_by_material_m2: Vec<NamedArea>,
    area_by_group_m2: Vec<NamedArea>,
    bands_hz: Vec<u32>,
    mean_absorption: Vec<f64>,
    air_attenuation_per_m: Vec<f64>,
    /// `None` where the estimate is undefined (e.g. no absorption at all).
    sabine_s: Vec<Option<f64>>,
    eyring_s: Vec<Option<f64>>,
    duration_s: f64,
    duration_is_default: bool,
    rays: usize,
    sources: Vec<Placement>,
    receivers: Vec<Placement>,
}

/// What `run --law bounded` would change in each material's diffusion data
/// (the same law construction, so `check` and `run` say the same): a d
/// below the least even response the law gives for its s is raised, one
/// just above what it can reach is lowered. Materials without diffusion
/// data have nothing to adjust; data the law refuses are already problems.
fn bounded_law_adjustments(room: &polaray::room::Room) -> Vec<String> {
    let bands = &room.settings.bands;
    let all: Vec<usize> = (0..bands.len()).collect();
    room.materials
        .iter()
        .filter(|m| m.diffusion.is_some())
        .filter_map(|m| {
            polaray::law::LawKind::Bounded
                .build(m, bands, &all, false)
                .ok()
        })
        .flat_map(|(_, warnings)| warnings)
        .map(|w| format!("under `--law bounded`: {w}"))
        .collect()
}

fn summarize(loaded: &LoadedRoom) -> RoomSummary {
    let room = &loaded.room;
    let n = room.settings.bands.len();
    let area = estimates::area_m2(room);
    let by_material = estimates::area_by_material_m2(room);
    let mut groups: Vec<NamedArea> = Vec::new();
    for s in &room.surfaces {
        match groups.iter_mut().find(|g| g.name == s.group) {
            Some(g) => g.area_m2 += s.area_m2,
            None => groups.push(NamedArea {
                name: s.group.clone(),
                area_m2: s.area_m2,
            }),
        }
    }
    let finite = |x: f64| x.is_finite().then_some(x);
    let absorption = estimates::absorption_area_m2(room);
    let to_array = |p: glam::DVec3| [p.x, p.y, p.z];
    RoomSummary {
        name: room.name.clone(),
        surfaces: room.surfaces.len(),
        triangles: room.triangles.len(),
        open: room.settings.open,
        volume_m3: estimates::volume_m3(room),
        area_m2: area,
        mean_free_path_m: estimates::mean_free_path_m(room),
        area_by_material_m2: room
            .materials
            .iter()
            .zip(by_material)
            .map(|(m, a)| NamedArea {
                name: m.name.clone(),
                area_m2: a,
            })
            .collect(),
        area_by_group_m2: groups,
        bands_hz: room.settings.bands.centres_hz().to_vec(),
        mean_absorption: (0..n).map(|b| absorption[b] / area).collect(),
        air_attenuation_per_m: estimates::air_attenuation_per_m(room).as_slice(n).to_vec(),
        sabine_s: estimates::sabine_s(room)
            .as_slice(n)
            .iter()
            .map(|&t| finite(t))
            .collect(),
        eyring_s: estimates::eyring_s(room)
            .as_slice(n)
            .iter()
            .map(|&t| finite(t))
            .collect(),
        duration_s: room
            .settings
            .duration_s
            .unwrap_or_else(|| estimates::default_duration_s(room)),
        duration_is_default: room.settings.duration_s.is_none(),
        rays: room.settings.rays,
        sources: room
            .sources
            .iter()
            .map(|s| Placement {
                name: s.name.clone(),
                position_m: to_array(s.position),
                radius_m: None,
            })
            .collect(),
        receivers: room
            .receivers
            .iter()
            .map(|r| Placement {
                name: r.name.clone(),
                position_m: to_array(r.position),
                radius_m: r.radius_m,
            })
            .collect(),
    }
}

/// Runs the command: exit 0 when the room is usable (warnings allowed),
/// an error naming the file and every problem otherwise.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let file = args.room.display().to_string();
    match load_room(&args.room) {
        Ok(loaded) => {
            let mut warnings = loaded.warnings.clone();
            warnings.extend(bounded_law_adjustments(&loaded.room));
            let report = Report {
                file,
                ok: true,
                room: Some(summarize(&loaded)),
                warnings,
                problems: Vec::new(),
            };
            if args.json {
                outln!("{}", serde_json::to_string_pretty(&report)?);
            } else {
                out!("{}", render_text(&report));
            }
            Ok(ExitCode::SUCCESS)
        }
        Err(err) => {
            if args.json {
                let report = Report {
                    file,
                    ok: false,
                    room: None,
                    warnings: Vec::new(),
                    problems: err.problems.clone(),
                };
                outln!("{}", serde_json::to_string_pretty(&report)?);
            }
            let count = err.problems.len();
            let mut message = format!(
                "{}: {count} problem{} found",
                err.file.display(),
                if count == 1 { "" } else { "s" }
            );
            for p in &err.problems {
                message.push_str("\n  - ");
                message.push_str(&p.replace('\n', "\n    "));
            }
            Err(anyhow::anyhow!(message))
        }
    }
}

/// The text form of a successful report.
fn render_text(report: &Report) -> String {
    let mut out = String::new();
    let Some(r) = &report.room else {
        return out;
    };
    let w = &mut out;
    let _ = writeln!(w, "room check · {}", r.name);
    let _ = writeln!(w, "  file            {}", report.file);
    let _ = writeln!(
        w,
        "  geometry        {} surfaces, {} triangles, {}",
        r.surfaces,
        r.triangles,
        if r.open { "open model" } else { "closed" }
    );
    let _ = writeln!(w, "  volume          {:.3} m³", r.volume_m3);
    let _ = writeln!(w, "  surface area    {:.3} m²", r.area_m2);
    let _ = writeln!(w, "  mean free path  {:.3} m (4V/S)", r.mean_free_path_m);

    let _ = writeln!(w);
    let _ = writeln!(
        w,
        "  {:<26}{:>12}{:>9}",
        "area by material", "m²", "share %"
    );
    for m in &r.area_by_material_m2 {
        let _ = writeln!(
            w,
            "    {:<24}{:>12.3}{:>9.1}",
            m.name,
            m.area_m2,
            100.0 * m.area_m2 / r.area_m2
        );
    }
    if r.area_by_group_m2.len() > 1 {
        let _ = writeln!(w, "  {:<26}{:>12}{:>9}", "area by group", "m²", "share %");
        for g in &r.area_by_group_m2 {
            let _ = writeln!(
                w,
                "    {:<24}{:>12.3}{:>9.1}",
                g.name,
                g.area_m2,
                100.0 * g.area_m2 / r.area_m2
            );
        }
    }

    let _ = writeln!(w);
    let _ = writeln!(
        w,
        "  diffuse-field estimates (Kuttruff), air absorption {}",
        if r.air_attenuation_per_m.iter().any(|&m| m > 0.0) {
            "included"
        } else {
            "off"
        }
    );
    let row = |label: &str, cells: Vec<String>| {
        let mut line = format!("    {label:<22}");
        for c in cells {
            let _ = write!(line, "{c:>9}");
        }
        line
    };
    let opt = |t: &Option<f64>| t.map_or("—".to_string(), |t| format!("{t:.2}"));
    let _ = writeln!(
        w,
        "{}",
        row("band, Hz", r.bands_hz.iter().map(u32::to_string).collect())
    );
    let _ = writeln!(
        w,
        "{}",
        row(
            "mean absorption",
            r.mean_absorption
                .iter()
                .map(|a| format!("{a:.3}"))
                .collect()
        )
    );
    let _ = writeln!(
        w,
        "{}",
        row(
            "air, 1/km",
            r.air_attenuation_per_m
                .iter()
                .map(|m| format!("{:.2}", m * 1000.0))
                .collect()
        )
    );
    let _ = writeln!(
        w,
        "{}",
        row("Sabine T, s", r.sabine_s.iter().map(opt).collect())
    );
    let _ = writeln!(
        w,
        "{}",
        row("Eyring T, s", r.eyring_s.iter().map(opt).collect())
    );
    let _ = writeln!(
        w,
        "  echogram length {:.3} s{}, {} rays per source",
        r.duration_s,
        if r.duration_is_default {
            " (default: 1.5 × longest Eyring estimate)"
        } else {
            ""
        },
        r.rays
    );

    let _ = writeln!(w);
    let _ = writeln!(w, "  placements, m");
    let place = |kind: &str, p: &Placement| {
        let radius = p
            .radius_m
            .map_or(String::new(), |r| format!("  radius {r:.2}"));
        format!(
            "    {kind:<9}{:<16}({:8.3}, {:8.3}, {:8.3}){radius}",
            p.name, p.position_m[0], p.position_m[1], p.position_m[2]
        )
    };
    for s in &r.sources {
        let _ = writeln!(w, "{}", place("source", s));
    }
    for rc in &r.receivers {
        let _ = writeln!(w, "{}", place("receiver", rc));
    }

    let _ = writeln!(w);
    if report.warnings.is_empty() {
        let _ = writeln!(w, "  no warnings");
    } else {
        let _ = writeln!(w, "  warnings ({})", report.warnings.len());
        for warning in &report.warnings {
            let _ = writeln!(w, "    ! {warning}");
        }
    }
    out
}
