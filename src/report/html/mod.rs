//! The comparison report: one self-contained HTML page (inline SVG charts, no
//! scripts or fonts from the network), derived from the comparison document,
//! and the same charts as PNG files in `plots/`.
//!
//! The page holds, in order: the cautions; how to read the verdicts (the rule
//! and the JND table); one verdict table per judged group (receivers × the
//! single-number parameters, each cell showing the verdict with the spread S
//! and noise N it follows from, the per-band verdicts folded underneath);
//! per receiver the single-number values of every run with standard errors,
//! the echograms, the decay curves and the parameter bars per band; the
//! d-against-s chart and the polar responses of the treatments; the
//! provenance. A small inline script marks on `<body>` whether every chart
//! rendered (`data-charts`, `data-charts-ok`), for the browser test.

pub mod charts;
mod page;
mod summary;

use crate::report::ReportError;
use std::path::{Path, PathBuf};

use plotters::style::RGBColor;

use crate::compare::document::ComparisonDocument;
use crate::compare::{CompareError, Parameter, RunOutcome, RunRole};
use crate::law::{BoundedLaw, CalibrationArc};
use crate::metrics::strength::FREE_FIELD_FLUENCE_10M;
use crate::plot::series_colour;
use crate::polar::plot::{PolarChart, PolarCurve};
use crate::polar::{load_polar_file, ZoneSize};
use charts::{Bar, BarChart, Chart, ChartSpec, Line, LineChart, Panel, PlaneChart, PlaneMaterial};

/// The page's file name.
pub const REPORT_FILE: &str = "report.html";
/// Folder of the PNG charts.
pub const PLOTS_DIR: &str = "plots";

/// Echogram smoothing window, s: energy is summed over windows this long so
/// that several runs stay readable on one chart (common practice, no source).
const ECHOGRAM_WINDOW_S: f64 = 0.005;
/// Level range of echogram and decay charts, dB.
const RANGE_DB: f64 = 60.0;

/// How a run is drawn.
#[derive(Clone, Debug)]
pub struct RunStyle {
    /// Legend text.
    pub label: String,
    /// Colour.
    pub colour: RGBColor,
    /// Dashed lines (envelope runs).
    pub dashed: bool,
}

/// Mixes `c` toward black (f < 0) or white (f > 0) by |f|.
fn shade(c: RGBColor, f: f64) -> RGBColor {
    let t = f.abs().min(1.0);
    let target = if f < 0.0 { 0.0 } else { 255.0 };
    let mix = |v: u8| (f64::from(v) * (1.0 - t) + target * t).round() as u8;
    RGBColor(mix(c.0), mix(c.1), mix(c.2))
}

/// Colours: the law gives the hue, the variant its shade (darkest first);
/// the envelope's ends get brick and olive, dashed.
#[must_use]
pub fn run_styles(doc: &ComparisonDocument) -> Vec<RunStyle> {
    let nv = doc.variants.len().max(1);
    doc.runs
        .iter()
        .map(|r| match r.role {
            RunRole::Treatment => {
                let law = doc
                    .settings
                    .laws
                    .iter()
                    .position(|l| *l == r.law)
                    .unwrap_or(0);
                let v = doc
                    .variants
                    .iter()
                    .position(|v| v.name == r.variant)
                    .unwrap_or(0);
                let t = if nv == 1 {
                    0.0
                } else {
                    v as f64 / (nv - 1) as f64
                };
                let base = [series_colour(0), series_colour(1), series_colour(2)][law % 3];
                RunStyle {
                    label: if nv == 1 {
                        r.law.clone()
                    } else {
                        format!("{} · {}", r.variant, r.law)
                    },
                    colour: shade(base, -0.35 + 0.8 * t),
                    dashed: false,
                }
            }
            RunRole::EnvelopeLeastEven => RunStyle {
                label: "s-only surfaces least even (bounded)".into(),
                colour: series_colour(3),
                dashed: true,
            },
            RunRole::EnvelopeMostEven => RunStyle {
                label: "s-only surfaces most even (bounded)".into(),
                colour: series_colour(5),
                dashed: true,
            },
        })
        .collect()
}

/// Writes `report.html` and `plots/*.png` into `dir`; returns the paths written.
pub fn write_report(
    dir: &Path,
    doc: &ComparisonDocument,
    outcomes: &[RunOutcome],
) -> Result<Vec<PathBuf>, CompareError> {
    let charts = build_charts(doc, outcomes);
    let mut svgs = Vec::with_capacity(charts.len());
    let plots = dir.join(PLOTS_DIR);
    std::fs::create_dir_all(&plots).map_err(|source| ReportError::Io {
        path: plots.clone(),
        source,
    })?;
    let mut written = Vec::new();
    for c in &charts {
        let path = plots.join(format!("{}.png", c.name));
        let svg = c.to_svg().map_err(|message| ReportError::Plot {
            path: path.clone(),
            message,
        })?;
        svgs.push(svg);
        c.write_png(&path).map_err(|message| ReportError::Plot {
            path: path.clone(),
            message,
        })?;
        written.push(path);
    }
    let html = page::render(doc, &charts, &svgs);
    let path = dir.join(REPORT_FILE);
    crate::output::write_atomic(&path, html.as_bytes()).map_err(|source| ReportError::Io {
        path: path.clone(),
        source,
    })?;
    written.push(path);
    Ok(written)
}

/// File-name part for a pair: the receiver, prefixed by the source when there are several.
#[must_use]
pub fn pair_slug(doc: &ComparisonDocument, source: &str, receiver: &str) -> String {
    if doc.settings.sources.len() > 1 {
        crate::report::file_safe(&format!("{source}-{receiver}"))
    } else {
        crate::report::file_safe(receiver)
    }
}

/// Short band label: 125, 250, 500, 1k, 2k, 4k.
#[must_use]
pub fn band_label(hz: u32) -> String {
    if hz >= 1000 && hz.is_multiple_of(1000) {
        format!("{}k", hz / 1000)
    } else {
        hz.to_string()
    }
}

/// Every chart of the report, in page order: per pair the echograms, the
/// decay curves and one bar chart per parameter; then the d-against-s chart
/// and the polar charts.
#[must_use]
pub fn build_charts(doc: &ComparisonDocument, outcomes: &[RunOutcome]) -> Vec<Chart> {
    let styles = run_styles(doc);
    let mut charts = Vec::new();
    let bands = &doc.settings.bands_hz;
    let plot_band = bands
        .iter()
        .position(|&b| b == doc.settings.plot_band_hz)
        .unwrap_or(0);
    let pairs = outcomes.first().map_or(0, |o| o.pairs.len());
    for k in 0..pairs {
        let first = &outcomes[0].pairs[k];
        let slug = pair_slug(doc, &first.source, &first.receiver);
        let who = if doc.settings.sources.len() > 1 {
            format!("{} at {}", first.source, first.receiver)
        } else {
            first.receiver.clone()
        };
        charts.push(echogram_chart(
            doc, outcomes, &styles, k, plot_band, &slug, &who,
        ));
        charts.push(decay_chart(
            doc, outcomes, &styles, k, plot_band, &slug, &who,
        ));
        for &p in &doc.settings.parameters {
            charts.push(bar_chart(doc, &styles, k, p, &slug, &who));
        }
    }
    charts.push(plane_chart(doc));
    charts.extend(polar_charts(doc));
    charts
}

#[allow(clippy::too_many_arguments)]
fn echogram_chart(
    doc: &ComparisonDocument,
    outcomes: &[RunOutcome],
    styles: &[RunStyle],
    pair: usize,
    band: usize,
    slug: &str,
    who: &str,
) -> Chart {
    let bin_s = doc.settings.bin_s;
    let window = ((ECHOGRAM_WINDOW_S / bin_s).round() as usize).max(1);
    let level = |e: f64| 10.0 * (e / FREE_FIELD_FLUENCE_10M).log10();
    let mut panels: Vec<Panel> = Vec::new();
    let mut top = f64::NEG_INFINITY;
    for (i, (o, style)) in outcomes.iter().zip(styles).enumerate() {
        let e = &o.pairs[pair].echogram;
        let energy: Vec<f64> = e.energy.iter().map(|v| v[band]).collect();
        let start = e.first_nonzero_bin().unwrap_or(0);
        let points: Vec<(f64, f64)> = energy[start..]
            .chunks(window)
            .enumerate()
            .map(|(i, c)| {
                let t_ms = ((start + i * window) as f64 + 0.5 * c.len() as f64) * bin_s * 1e3;
                let sum: f64 = c.iter().sum();
                (
                    t_ms,
                    if sum > 0.0 {
                        level(sum)
                    } else {
                        f64::NEG_INFINITY
                    },
                )
            })
            .collect();
        top = points.iter().map(|p| p.1).fold(top, f64::max);
        let panel_title = match (o.spec.role, doc.runs.get(i)) {
            (RunRole::Treatment, Some(r)) => r.variant.clone(),
            _ => "s-only envelope (bounded law)".to_string(),
        };
        let line = Line {
            label: style.label.clone(),
            colour: style.colour,
            dashed: false,
            points,
        };
        match panels.iter_mut().find(|p| p.title == panel_title) {
            Some(p) => p.lines.push(line),
            None => panels.push(Panel {
                title: panel_title,
                lines: vec![line],
            }),
        }
    }
    let top = if top.is_finite() {
        (top / 10.0).ceil() * 10.0
    } else {
        0.0
    };
    let height = 120 + 230 * panels.len() as u32;
    Chart {
        name: format!("echograms-{slug}"),
        size: (1000, height),
        spec: ChartSpec::Lines(LineChart {
            title: format!(
                "{who}: echograms at {} Hz, energy per {:.0} ms",
                doc.settings.plot_band_hz,
                window as f64 * bin_s * 1e3
            ),
            x_desc: "time after emission (ms)".into(),
            y_desc: "level re free field at 10 m (dB)".into(),
            x_range: (0.0, doc.settings.duration_s * 1e3),
            y_range: (top - RANGE_DB, top),
            decimals: (0, 0),
            panels,
        }),
    }
}

#[allow(clippy::too_many_arguments)]
fn decay_chart(
    doc: &ComparisonDocument,
    outcomes: &[RunOutcome],
    styles: &[RunStyle],
    pair: usize,
    band: usize,
    slug: &str,
    who: &str,
) -> Chart {
    let mut lines = Vec::new();
    let mut end_s: f64 = 0.1;
    for (o, style) in outcomes.iter().zip(styles) {
        let Some(b) = o.pairs[pair].pooled.bands.get(band) else {
            continue;
        };
        // Thinned: a point every 3 ms or 0.3 dB is enough at chart scale.
        let mut points: Vec<(f64, f64)> = Vec::new();
        for (&t, &l) in b.decay.times_s.iter().zip(&b.decay.level_db) {
            if l < -RANGE_DB - 5.0 {
                points.push((t, l));
                break;
            }
            let keep = points
                .last()
                .is_none_or(|&(t0, l0)| t - t0 >= 0.003 || (l - l0).abs() >= 0.3);
            if keep {
                points.push((t, l));
            }
        }
        if let Some(&(t, _)) = points.last() {
            end_s = end_s.max(t);
        }
        lines.push(Line {
            label: style.label.clone(),
            colour: style.colour,
            dashed: style.dashed,
            points,
        });
    }
    Chart {
        name: format!("decay-{slug}"),
        size: (1000, 560),
        spec: ChartSpec::Lines(LineChart {
            title: format!(
                "{who}: Schroeder decay curves at {} Hz (t = 0 at the direct sound)",
                doc.settings.plot_band_hz
            ),
            x_desc: "time after the direct sound (s)".into(),
            y_desc: "level re total energy (dB)".into(),
            x_range: (0.0, end_s.min(doc.settings.duration_s)),
            y_range: (-RANGE_DB, 0.0),
            decimals: (1, 0),
            panels: vec![Panel {
                title: String::new(),
                lines,
            }],
        }),
    }
}

/// One JND in the parameter's unit at `value` (relative JNDs scale with it).
#[must_use]
pub fn jnd_at(p: Parameter, value: f64) -> Option<f64> {
    let j = p.jnd()?;
    let per_unit = j.in_jnds(value, value + 1.0);
    (per_unit.is_finite() && per_unit > 0.0).then(|| 1.0 / per_unit)
}

fn bar_chart(
    doc: &ComparisonDocument,
    styles: &[RunStyle],
    pair: usize,
    p: Parameter,
    slug: &str,
    who: &str,
) -> Chart {
    let (scale, unit) = p.display_unit();
    let k = doc.settings.noise_factor;
    let mut groups: Vec<String> = doc
        .settings
        .bands_hz
        .iter()
        .map(|&b| band_label(b))
        .collect();
    groups.push(format!("single ({})", p.single_number_bands()));
    let nb = doc.settings.bands_hz.len();
    let bars = (0..=nb)
        .map(|slot| {
            doc.runs
                .iter()
                .map(|r| {
                    let rec = r.pairs[pair].parameters.iter().find(|q| q.parameter == p)?;
                    let e = if slot < nb {
                        rec.per_band.get(slot)?
                    } else {
                        &rec.single_number
                    };
                    let v = e.value?;
                    Some(Bar {
                        value: v * scale,
                        noise: e.se.map(|s| k * s * scale),
                        half_jnd: jnd_at(p, v).map(|j| 0.5 * j * scale),
                    })
                })
                .collect()
        })
        .collect();
    let y_desc = if unit.is_empty() {
        p.short().to_string()
    } else {
        format!("{} ({unit})", p.short())
    };
    Chart {
        name: format!("bars-{slug}-{}", p.short()),
        size: (1000, 420),
        spec: ChartSpec::Bars(BarChart {
            title: format!(
                "{who}: {} per band · black: ±{k:.2} standard errors · grey: ±½ JND",
                p.short()
            ),
            y_desc,
            groups,
            series: styles.iter().map(|s| (s.label.clone(), s.colour)).collect(),
            bars,
        }),
    }
}

fn plane_chart(doc: &ComparisonDocument) -> Chart {
    let arc = CalibrationArc::standard();
    let zone = ZoneSize::equal_area(arc.receivers, arc.zone_receivers);
    let reachable = (0..=100)
        .filter_map(|i| {
            let s = f64::from(i) / 100.0;
            BoundedLaw::reachable_diffusion(s, &arc)
                .ok()
                .map(|r| (s, r.least_even, r.most_even))
        })
        .collect();
    let bands = &doc.settings.bands_hz;
    // Treatments (materials of the comparison file) take the first, strongest colours.
    let mut order: Vec<usize> = (0..doc.materials.len()).collect();
    order.sort_by_key(|&i| doc.materials[i].defined_in != "comparison");
    let materials = order
        .iter()
        .enumerate()
        .map(|(i, &m)| {
            let m = &doc.materials[m];
            let points = m
                .diffusion
                .as_ref()
                .map(|d| {
                    m.scattering
                        .iter()
                        .zip(d)
                        .zip(bands)
                        .map(|((&s, &d), &hz)| (s, d, band_label(hz)))
                        .collect()
                })
                .unwrap_or_default();
            let envelope = doc
                .envelope
                .materials
                .iter()
                .find(|e| e.name == m.name)
                .map(|e| {
                    e.bands
                        .iter()
                        .map(|b| (b.scattering, b.least_even, b.most_even))
                        .collect()
                })
                .unwrap_or_default();
            // Slate (series 4) draws the bound; past the palette, lighter shades.
            let k = i % 7;
            let base = series_colour(if k >= 4 { k + 1 } else { k });
            PlaneMaterial {
                label: if m.s_only {
                    format!("{} (s only)", m.name)
                } else {
                    m.name.clone()
                },
                colour: if i >= 7 { shade(base, 0.45) } else { base },
                points,
                labelled: m.defined_in == "comparison",
                envelope,
            }
        })
        .collect();
    Chart {
        name: "diffusion-against-scattering".into(),
        size: (1000, 700),
        spec: ChartSpec::Plane(PlaneChart {
            title: "Diffusion against scattering: every surface of the comparison".into(),
            zone,
            reachable,
            materials,
        }),
    }
}

/// Materials drawn as treatments: those the variants put in, with polar
/// data; without variants, every material with polar data.
fn treatments(doc: &ComparisonDocument) -> Vec<(String, String)> {
    let mut out: Vec<(String, String)> = Vec::new();
    for v in &doc.variants {
        for m in v.replace.values() {
            if let Some(rec) = doc.materials.iter().find(|r| &r.name == m) {
                if let Some(file) = &rec.polar_file {
                    if !out.iter().any(|(n, _)| n == m) {
                        out.push((format!("{} ({})", v.name, rec.name), file.clone()));
                    }
                }
            }
        }
    }
    if out.is_empty() {
        out = doc
            .materials
            .iter()
            .filter_map(|m| m.polar_file.clone().map(|f| (m.name.clone(), f)))
            .collect();
    }
    out
}

fn polar_charts(doc: &ComparisonDocument) -> Vec<Chart> {
    let loaded: Vec<(String, crate::polar::PolarFile)> = treatments(doc)
        .into_iter()
        .filter_map(|(label, file)| load_polar_file(Path::new(&file)).ok().map(|f| (label, f)))
        .collect();
    if loaded.is_empty() {
        return Vec::new();
    }
    let mut out = Vec::new();
    for &hz in &doc.settings.bands_hz {
        let mut curves = Vec::new();
        let mut incidence = None;
        for (label, file) in &loaded {
            // The in-plane response nearest normal incidence in this band.
            let best = file
                .responses
                .iter()
                .filter(|r| {
                    (r.band_hz - f64::from(hz)).abs() < 0.5 && r.receiver_azimuth_deg.is_none()
                })
                .min_by(|a, b| a.incidence_deg.abs().total_cmp(&b.incidence_deg.abs()));
            if let Some(r) = best {
                incidence.get_or_insert(r.incidence_deg);
                curves.push(PolarCurve {
                    label: label.clone(),
                    angle_deg: r.receiver_deg.clone(),
                    level_db: r.level_db.clone(),
                    dashed: false,
                });
            }
        }
        if curves.is_empty() {
            continue;
        }
        out.push(Chart {
            name: format!("polar-{hz}hz"),
            size: (900, 620),
            spec: ChartSpec::Polar(PolarChart {
                title: format!(
                    "Treatments at {hz} Hz, incidence {:.0}°",
                    incidence.unwrap_or(0.0)
                ),
                curves,
                zone_deg: None,
                incidence_deg: incidence,
                range_db: 40.0,
            }),
        });
    }
    out
}
