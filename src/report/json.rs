//! `result.json`: the room estimates, every setting used, run statistics and
//! the receivers with their ISO 3382-1 parameters per band, in one
//! self-describing document.

use std::collections::BTreeMap;

use glam::DVec3;
use serde::Serialize;

use crate::bands::Bands;
use crate::room::{estimates, Room};
use crate::trace::{Roulette, TraceOptions, TraceResult};

use super::csv::{column_prefix, EchogramKind};
use super::parameters::{run_parameters, PairParameters, PARAMETERS_CSV_FILE};
use crate::metrics::{Averages, BandParameters, Parameter};

/// The note every result carries.
pub const ADVISORY: &str = "Results are advisory: a geometric model with stated assumptions. Local codes, standards and licensed professional practice decide.";

/// Converts the first `n` band values, undefined ones (NaN, ±∞) to `None`.
fn per_band(v: &Bands, n: usize) -> Vec<Option<f64>> {
    v.as_slice(n)
        .iter()
        .map(|&x| x.is_finite().then_some(x))
        .collect()
}

fn finite(x: f64) -> Option<f64> {
    x.is_finite().then_some(x)
}

/// Room section.
#[derive(Debug, Serialize)]
pub struct RoomReport {
    /// Room name.
    pub name: String,
    /// Room file, empty for rooms built in code.
    pub file: String,
    /// Volume, m³ (None if undefined, e.g. an open model).
    pub volume_m3: Option<f64>,
    /// Surface area, m².
    pub area_m2: f64,
    /// 4V/S, m.
    pub mean_free_path_m: Option<f64>,
    /// Sabine estimate per band, s.
    pub sabine_s: Vec<Option<f64>>,
    /// Eyring estimate per band, s.
    pub eyring_s: Vec<Option<f64>>,
    /// Whether the model is declared open.
    pub open: bool,
    /// Triangles traced.
    pub triangles: usize,
}

/// Settings section: everything the run used.
#[derive(Debug, Serialize)]
pub struct SettingsReport {
    /// Reflection law.
    pub law: String,
    /// Receiver estimator and its settings (`kind`: `exact-early`, `next-event` or `sphere`).
    pub estimator: crate::trace::Estimator,
    /// Materials traced with the fallback law instead, with the reason.
    pub law_fallbacks: Vec<String>,
    /// Rays per source (all batches together).
    pub rays: usize,
    /// Batches the rays were traced in (disjoint streams); the standard
    /// errors come from their spread.
    pub batches: usize,
    /// How the standard errors were formed.
    pub standard_errors: &'static str,
    /// Seed.
    pub seed: u64,
    /// Band centres, Hz.
    pub bands_hz: Vec<u32>,
    /// Bin width, s.
    pub bin_s: f64,
    /// Echogram length, s.
    pub duration_s: f64,
    /// Speed of sound, m/s.
    pub speed_of_sound_m_s: f64,
    /// Whether air absorption acted.
    pub air_absorption: bool,
    /// Air attenuation per band, dB/km (zeros when off).
    pub air_attenuation_db_per_km: Vec<f64>,
    /// Air temperature, °C.
    pub temperature_c: f64,
    /// Relative humidity, %.
    pub humidity_pct: f64,
    /// Ambient pressure, kPa.
    pub pressure_kpa: f64,
    /// Russian roulette, if on.
    pub roulette: Option<Roulette>,
    /// Rays per parallel chunk (fixed; results do not depend on threads).
    pub rays_per_chunk: usize,
}

/// Stats section.
#[derive(Debug, Serialize)]
pub struct StatsReport {
    /// Rays per pass over all sources and batches (every band gets this many).
    pub rays: u64,
    /// Batches pooled.
    pub batches: usize,
    /// Tracing passes: one per group of bands that share rays.
    pub passes: usize,
    /// Segments traced (all passes).
    pub segments: u64,
    /// Wall reflections.
    pub reflections: u64,
    /// Mean traced wall-to-wall path, m.
    pub traced_mean_free_path_m: Option<f64>,
    /// Rays that left the model.
    pub lost_rays: u64,
    /// Lost rays ÷ rays.
    pub lost_fraction: f64,
    /// Rays stopped by roulette.
    pub roulette_stopped_rays: u64,
    /// Energy per band the lost rays took with them, J (summed over sources).
    pub lost_energy_j: Vec<Option<f64>>,
    /// Energy per band still travelling at the end, J (summed over sources).
    pub energy_at_end_j: Vec<Option<f64>>,
    /// Wall-clock time, s.
    pub wall_time_s: f64,
}

/// How `standard_errors` in `result.json` are formed.
pub const STANDARD_ERROR_METHOD: &str = "delete-one jackknife over the batches: se² = (B − 1)/B Σ (θ_(b) − θ̄)², θ_(b) the parameter of the pool without batch b (Efron & Tibshirani 1993, ch. 11); none for one batch";

/// One band of a pair's ISO 3382-1 parameters: exactly the fields of
/// `parameters.csv`, `null` where undefined with the reason in `undefined`.
#[derive(Debug, Serialize)]
pub struct BandReport {
    /// Nominal octave-band centre, Hz.
    pub band_hz: u32,
    /// Early decay time, s.
    #[serde(rename = "EDT_s")]
    pub edt_s: Option<f64>,
    /// Reverberation time from −5 to −25 dB, s.
    #[serde(rename = "T20_s")]
    pub t20_s: Option<f64>,
    /// Reverberation time from −5 to −35 dB, s.
    #[serde(rename = "T30_s")]
    pub t30_s: Option<f64>,
    /// Clarity, 50 ms limit, dB.
    #[serde(rename = "C50_db")]
    pub c50_db: Option<f64>,
    /// Clarity, 80 ms limit, dB.
    #[serde(rename = "C80_db")]
    pub c80_db: Option<f64>,
    /// Definition, 50 ms limit (ratio 0–1).
    #[serde(rename = "D50")]
    pub d50: Option<f64>,
    /// Centre time, s.
    #[serde(rename = "Ts_s")]
    pub ts_s: Option<f64>,
    /// Strength G, dB re the same source in a free field at 10 m.
    #[serde(rename = "G_db")]
    pub g_db: Option<f64>,
    /// Early lateral energy fraction J_LF (ratio 0–1).
    #[serde(rename = "JLF")]
    pub jlf: Option<f64>,
    /// Why each `null` value is undefined, keyed by field name.
    pub undefined: BTreeMap<String, String>,
    /// Standard error of each value over the batches, same unit, keyed by
    /// field name (absent for one batch or an undefined value).
    #[serde(skip_serializing_if = "BTreeMap::is_empty")]
    pub standard_errors: BTreeMap<String, f64>,
}

impl BandReport {
    /// The report fields of computed band parameters.
    #[must_use]
    pub fn from_parameters(b: &BandParameters) -> Self {
        Self {
            band_hz: b.band_hz,
            edt_s: b.edt_s,
            t20_s: b.t20_s,
            t30_s: b.t30_s,
            c50_db: b.c50_db,
            c80_db: b.c80_db,
            d50: b.d50,
            ts_s: b.ts_s,
            g_db: b.g_db,
            jlf: b.jlf,
            undefined: b.undefined.clone(),
            standard_errors: BTreeMap::new(),
        }
    }
}

/// The standard errors of `p` in `slot`, keyed by field name.
fn standard_error_map(p: &PairParameters, slot: usize) -> BTreeMap<String, f64> {
    Parameter::ALL
        .into_iter()
        .filter_map(|q| Some((q.key().to_string(), p.standard_error(q, slot)?)))
        .collect()
}

/// One receiver as heard from one source. `receivers` holds one entry per
/// source–receiver pair, source-major (the order of `pairs` and of the
/// echogram columns); with a single source that is one entry per receiver.
#[derive(Debug, Serialize)]
pub struct ReceiverReport {
    /// Name.
    pub name: String,
    /// Source these parameters belong to.
    pub source: String,
    /// Centre, m.
    pub position: DVec3,
    /// Detection radius, m.
    pub radius_m: f64,
    /// Where the radius came from.
    pub radius_from: &'static str,
    /// ISO 3382-1 parameters per band, t = 0 at the direct sound d / c.
    pub bands: Vec<BandReport>,
    /// Single-number means: EDT, T20, T30, C50, C80, D50, Ts and G over
    /// 500–1000 Hz, JLF over 125–1000 Hz (ISO 3382-1:2009, Table A.1).
    pub averages: Averages,
    /// Standard errors of the single-number means over the batches, keyed
    /// by field name (absent for one batch).
    #[serde(skip_serializing_if = "BTreeMap::is_empty")]
    pub averages_standard_errors: BTreeMap<String, f64>,
    /// Notes on this pair: a blocked direct sound, doubtful fits per band.
    pub notes: Vec<String>,
}

/// One source.
#[derive(Debug, Serialize)]
pub struct SourceReport {
    /// Name.
    pub name: String,
    /// Position, m.
    pub position: DVec3,
}

/// One source–receiver pair.
#[derive(Debug, Serialize)]
pub struct PairReport {
    /// Source name.
    pub source: String,
    /// Receiver name.
    pub receiver: String,
    /// Prefix of this pair's columns in the echogram tables.
    pub columns: String,
    /// Distance, m.
    pub distance_m: f64,
    /// Direct-sound delay, s.
    pub direct_time_s: f64,
    /// Whether the direct path is free.
    pub direct_visible: bool,
    /// Lateral axis of the lateral echogram (unit vector).
    pub lateral_axis: DVec3,
    /// Sum of the echogram per band, J/m².
    pub total_fluence_j_per_m2: Vec<Option<f64>>,
    /// Strength G per band of the traced echogram alone, dB: 10 lg(4π · 100 m²
    /// · total) (ISO 3382-1, A.2.1). `receivers[].bands[].G_db` adds the
    /// continuation of the decay past the echogram's end and is the value to use.
    pub strength_db: Vec<Option<f64>>,
}

/// The whole `result.json`.
#[derive(Debug, Serialize)]
pub struct RunReport {
    /// Program and version.
    pub program: String,
    /// The build that computed the numbers (commit, target, compiler, profile).
    pub build: crate::build_info::BuildInfo,
    /// The advisory note.
    pub advisory: &'static str,
    /// Room estimates.
    pub room: RoomReport,
    /// Settings used.
    pub settings: SettingsReport,
    /// Run statistics.
    pub stats: StatsReport,
    /// Sources.
    pub sources: Vec<SourceReport>,
    /// Receivers with their parameters: one entry per source–receiver pair,
    /// source-major (one per receiver with a single source).
    pub receivers: Vec<ReceiverReport>,
    /// Pairs, source-major, in the column order of the echogram tables.
    pub pairs: Vec<PairReport>,
    /// Echogram files: energy, then lateral.
    pub echogram_files: [&'static str; 2],
    /// The table of parameters per pair and band.
    pub parameters_file: &'static str,
    /// Warnings of the loader and the run.
    pub warnings: Vec<String>,
}

impl RunReport {
    /// Collects the report of one run, computing the parameters of every pair;
    /// `warnings` are the loader's plus the run's.
    #[must_use]
    pub fn new(
        room: &Room,
        options: &TraceOptions,
        result: &TraceResult,
        warnings: Vec<String>,
    ) -> Self {
        Self::with_parameters(room, options, result, &run_parameters(result), warnings)
    }

    /// As [`RunReport::new`] with the parameters already computed
    /// ([`run_parameters`], one entry per pair in `result.echograms` order).
    #[must_use]
    pub fn with_parameters(
        room: &Room,
        options: &TraceOptions,
        result: &TraceResult,
        parameters: &[PairParameters],
        warnings: Vec<String>,
    ) -> Self {
        let n = result.bands.len();
        let volume = estimates::volume_m3(room);
        let volume_ok = volume.is_finite() && volume > 0.0 && !room.triangles.is_empty();
        let db_per_km = 10.0 * std::f64::consts::E.log10() * 1e3;
        let air = &room.settings.air;
        RunReport {
            program: format!("polaray {}", env!("CARGO_PKG_VERSION")),
            build: crate::build_info::BUILD,
            advisory: ADVISORY,
            room: RoomReport {
                name: room.name.clone(),
                file: room.file.display().to_string(),
                volume_m3: volume_ok.then_some(volume),
                area_m2: estimates::area_m2(room),
                mean_free_path_m: volume_ok
                    .then(|| finite(estimates::mean_free_path_m(room)))
                    .flatten(),
                sabine_s: if volume_ok {
                    per_band(&estimates::sabine_s(room), n)
                } else {
                    vec![None; n]
                },
                eyring_s: if volume_ok {
                    per_band(&estimates::eyring_s(room), n)
                } else {
                    vec![None; n]
                },
                open: room.settings.open,
                triangles: room.triangles.len(),
            },
            settings: SettingsReport {
                law: options.law.name().into(),
                estimator: options.estimator,
                law_fallbacks: result.fallbacks.clone(),
                rays: options.rays,
                batches: result.stats.batches,
                standard_errors: STANDARD_ERROR_METHOD,
                seed: options.seed,
                bands_hz: result.bands.centres_hz().to_vec(),
                bin_s: result.bin_s,
                duration_s: result.duration_s,
                speed_of_sound_m_s: result.speed_of_sound_m_s,
                air_absorption: room.settings.air_absorption,
                air_attenuation_db_per_km: result
                    .air_attenuation_per_m
                    .as_slice(n)
                    .iter()
                    .map(|m| m * db_per_km)
                    .collect(),
                temperature_c: air.temperature_c,
                humidity_pct: air.humidity_pct,
                pressure_kpa: air.pressure_kpa,
                roulette: options.roulette,
                rays_per_chunk: crate::trace::RAYS_PER_CHUNK,
            },
            stats: StatsReport {
                rays: result.stats.rays,
                batches: result.stats.batches,
                passes: result.stats.passes,
                segments: result.stats.segments,
                reflections: result.stats.reflections,
                traced_mean_free_path_m: result.stats.traced_mean_free_path_m,
                lost_rays: result.stats.lost_rays,
                lost_fraction: result.stats.lost_fraction(),
                roulette_stopped_rays: result.stats.roulette_stopped_rays,
                lost_energy_j: per_band(&result.stats.lost_energy_j, n),
                energy_at_end_j: per_band(&result.stats.energy_at_end_j, n),
                wall_time_s: result.stats.wall_time_s,
            },
            sources: result
                .sources
                .iter()
                .map(|s| SourceReport {
                    name: s.name.clone(),
                    position: s.position,
                })
                .collect(),
            receivers: parameters
                .iter()
                .map(|p| {
                    let r = &result.receivers[p.receiver];
                    let mut notes = p.notes.clone();
                    for b in &p.bands {
                        notes.extend(b.warnings.iter().map(|w| format!("{} Hz: {w}", b.band_hz)));
                    }
                    ReceiverReport {
                        name: r.name.clone(),
                        source: result.sources[p.source].name.clone(),
                        position: r.position,
                        radius_m: r.radius_m,
                        radius_from: if r.radius_is_default {
                            "default rule: sqrt(10 V / (pi N c bin)), clamped to 0.1..1 m"
                        } else {
                            "room file or options"
                        },
                        bands: p
                            .bands
                            .iter()
                            .enumerate()
                            .map(|(slot, b)| BandReport {
                                standard_errors: standard_error_map(p, slot),
                                ..BandReport::from_parameters(b)
                            })
                            .collect(),
                        averages: p.averages.clone(),
                        averages_standard_errors: standard_error_map(p, p.bands.len()),
                        notes,
                    }
                })
                .collect(),
            pairs: result
                .echograms
                .iter()
                .map(|p| {
                    let total = p.echogram.total();
                    let g = total.map(|e| 10.0 * (4.0 * std::f64::consts::PI * 100.0 * e).log10());
                    PairReport {
                        source: result.sources[p.source].name.clone(),
                        receiver: result.receivers[p.receiver].name.clone(),
                        columns: column_prefix(result, p.source, p.receiver),
                        distance_m: p.distance_m,
                        direct_time_s: p.direct_time_s,
                        direct_visible: p.direct_visible,
                        lateral_axis: p.lateral_axis,
                        total_fluence_j_per_m2: per_band(&total, n),
                        strength_db: per_band(&g, n),
                    }
                })
                .collect(),
            echogram_files: [
                EchogramKind::Energy.file_name(),
                EchogramKind::Lateral.file_name(),
            ],
            parameters_file: PARAMETERS_CSV_FILE,
            warnings,
        }
    }
}

/// `result.json` text, pretty-printed.
pub fn result_json(report: &RunReport) -> Result<String, serde_json::Error> {
    serde_json::to_string_pretty(report)
}
