//! `comparison.json`: every run's parameters with standard errors, every
//! difference in JNDs, the verdicts, the envelope and the provenance, in one
//! document; `comparison.schema.json` beside this file describes it. CSV
//! tables and the HTML report are derived from it.

use std::collections::BTreeMap;

use serde::Serialize;

use super::engine::{PairOutcome, RunOutcome, RunStats};
use super::plan::{ComparisonPlan, EnvelopeMaterial, Overrides, RunRole};
use super::provenance::FileRecord;
use super::verdict::{deciding, difference, Difference, Verdict};
use crate::metrics::Parameter;
use crate::metrics::{Jnd, JND_TABLE};
use crate::trace::{Roulette, RAYS_PER_CHUNK};

/// Value of the `format` field.
pub const FORMAT: &str = "polaray comparison";
/// Version of the document layout; raised when fields change meaning.
pub const FORMAT_VERSION: u32 = 1;

/// The cautions every comparison carries.
pub const CAUTIONS: [&str; 4] = [
    "Results are advisory: a geometric model with stated assumptions. Local codes, standards and licensed professional practice decide.",
    "Geometric acoustics ignores wave effects that dominate at low frequencies (below the room's Schroeder frequency) and near edges: treat the 125 and 250 Hz bands with care.",
    "Scattering coefficients are random-incidence values and diffusion coefficients normal-incidence ones; predicted polar data carry the limits of the prediction method.",
    "A verdict says whether the traced treatments differ by more than one just noticeable difference; it is not a statement about any real room or product.",
];

/// The whole document.
#[derive(Clone, Debug, Serialize)]
pub struct ComparisonDocument {
    /// Always [`FORMAT`].
    pub format: String,
    /// [`FORMAT_VERSION`].
    pub format_version: u32,
    /// Title.
    pub name: String,
    /// The cautions ([`CAUTIONS`]).
    pub cautions: Vec<String>,
    /// Where the numbers come from.
    pub provenance: Provenance,
    /// Every setting used.
    pub settings: Settings,
    /// How verdicts follow from the numbers.
    pub verdict_rule: VerdictRule,
    /// The JND table used.
    pub jnds: Vec<Jnd>,
    /// Every material of the comparison.
    pub materials: Vec<MaterialRecord>,
    /// The variants.
    pub variants: Vec<VariantRecord>,
    /// Every run's parameters.
    pub runs: Vec<RunRecord>,
    /// Groups of runs whose spread is judged.
    pub spreads: Vec<Spread>,
    /// The s-only envelope.
    pub envelope: EnvelopeRecord,
    /// Warnings, each naming the item.
    pub warnings: Vec<String>,
    /// Wall-clock times: the only values that change between identical runs.
    pub timings: Timings,
}

/// Provenance: enough to re-run the comparison and check the inputs.
#[derive(Clone, Debug, Serialize)]
pub struct Provenance {
    /// polaray version that wrote the document.
    pub polaray_version: String,
    /// The build that computed the numbers (commit, target, compiler, profile).
    pub build: crate::build_info::BuildInfo,
    /// Every input file with its SHA-256 (the comparison file first).
    pub inputs: Vec<FileRecord>,
    /// Settings given on the command line over the file's.
    pub overrides: Overrides,
    /// The command that reproduces the numbers.
    pub reproduce_command: String,
}

/// A source as traced.
#[derive(Clone, Debug, Serialize)]
pub struct SourceRecord {
    /// Name.
    pub name: String,
    /// Position, m.
    pub position_m: [f64; 3],
}

/// A receiver as traced.
#[derive(Clone, Debug, Serialize)]
pub struct ReceiverRecord {
    /// Name.
    pub name: String,
    /// Centre, m.
    pub position_m: [f64; 3],
    /// Detection radius, m.
    pub radius_m: Option<f64>,
}

/// Every setting of the comparison.
#[derive(Clone, Debug, Serialize)]
pub struct Settings {
    /// Room name.
    pub room: String,
    /// Laws compared.
    pub laws: Vec<String>,
    /// Fallback law.
    pub fallback: Option<String>,
    /// Rays per source over all batches.
    pub rays_per_source: usize,
    /// Batches.
    pub batches: usize,
    /// Rays per source in one batch.
    pub rays_per_batch: usize,
    /// Seed.
    pub seed: u64,
    /// Which stream every ray uses.
    pub stream_rule: String,
    /// Sources traced.
    pub sources: Vec<SourceRecord>,
    /// Receivers traced.
    pub receivers: Vec<ReceiverRecord>,
    /// Band centres, Hz.
    pub bands_hz: Vec<u32>,
    /// Band of the echogram and decay charts, Hz.
    pub plot_band_hz: u32,
    /// Echogram length, s.
    pub duration_s: f64,
    /// Echogram bin width, s.
    pub bin_s: f64,
    /// Speed of sound, m/s.
    pub speed_of_sound_m_s: f64,
    /// Whether air absorption acts.
    pub air_absorption: bool,
    /// Air temperature, °C.
    pub temperature_c: f64,
    /// Relative humidity, %.
    pub humidity_pct: f64,
    /// Ambient pressure, kPa.
    pub pressure_kpa: f64,
    /// Russian roulette.
    pub roulette: Option<Roulette>,
    /// Rays per parallel chunk.
    pub rays_per_chunk: usize,
    /// Parameters judged.
    pub parameters: Vec<Parameter>,
    /// k of the verdict rule.
    pub noise_factor: f64,
    /// Receiver estimator and its settings.
    pub estimator: crate::trace::Estimator,
    /// What the single-number values average.
    pub single_number: String,
}

/// One verdict and its rule.
#[derive(Clone, Debug, Serialize)]
pub struct VerdictText {
    /// The verdict key.
    pub verdict: Verdict,
    /// Words shown in reports.
    pub label: String,
    /// When it applies.
    pub rule: String,
}

/// The verdict rule in words.
#[derive(Clone, Debug, Serialize)]
pub struct VerdictRule {
    /// k.
    pub noise_factor: f64,
    /// Definition of S.
    pub spread: String,
    /// Definition of N.
    pub noise: String,
    /// Every verdict.
    pub verdicts: Vec<VerdictText>,
    /// How several runs are judged.
    pub several_runs: String,
    /// How standard errors are found.
    pub standard_errors: String,
}

/// A material of the comparison.
#[derive(Clone, Debug, Serialize)]
pub struct MaterialRecord {
    /// Name.
    pub name: String,
    /// `room` or `comparison`: which file defines it.
    pub defined_in: String,
    /// Variants whose surfaces use it.
    pub used_by: Vec<String>,
    /// Absorption per band.
    pub absorption: Vec<f64>,
    /// Scattering coefficient per band.
    pub scattering: Vec<f64>,
    /// Diffusion coefficient per band, if given.
    pub diffusion: Option<Vec<f64>>,
    /// Polar data file, if given.
    pub polar_file: Option<String>,
    /// Whether the envelope treats it as known by s alone.
    pub s_only: bool,
}

/// A variant.
#[derive(Clone, Debug, Serialize)]
pub struct VariantRecord {
    /// Name.
    pub name: String,
    /// Surface group → material.
    pub replace: BTreeMap<String, String>,
}

/// A value with its standard error.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Estimate {
    /// Band centre, Hz; `null` for the single-number value.
    pub band_hz: Option<u32>,
    /// Pooled value (in the parameter's unit), `null` where undefined.
    pub value: Option<f64>,
    /// Delete-one jackknife standard error over the batches.
    pub se: Option<f64>,
    /// Why the value is undefined, when it is.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub undefined: Option<String>,
}

/// One parameter of a pair.
#[derive(Clone, Debug, Serialize)]
pub struct ParameterRecord {
    /// Parameter key.
    pub parameter: Parameter,
    /// Per band, in band order.
    pub per_band: Vec<Estimate>,
    /// Single-number value.
    pub single_number: Estimate,
}

/// One pair of a run.
#[derive(Clone, Debug, Serialize)]
pub struct PairRecord {
    /// Source name.
    pub source: String,
    /// Receiver name.
    pub receiver: String,
    /// Notes (e.g. a blocked direct sound).
    pub notes: Vec<String>,
    /// All nine parameters.
    pub parameters: Vec<ParameterRecord>,
}

/// One run.
#[derive(Clone, Debug, Serialize)]
pub struct RunRecord {
    /// Unique id.
    pub id: String,
    /// Variant name.
    pub variant: String,
    /// Law.
    pub law: String,
    /// Role.
    pub role: RunRole,
    /// Materials traced with the fallback law.
    pub fallbacks: Vec<String>,
    /// Warnings of the tracer.
    pub warnings: Vec<String>,
    /// Counters.
    pub stats: RunStats,
    /// Pairs, source-major.
    pub pairs: Vec<PairRecord>,
}

/// One judged entry: a pair, a parameter, a band or the single number.
#[derive(Clone, Debug, Serialize)]
pub struct SpreadRow {
    /// Source name.
    pub source: String,
    /// Receiver name.
    pub receiver: String,
    /// Parameter key.
    pub parameter: Parameter,
    /// Band centre, Hz; `null` for the single-number value.
    pub band_hz: Option<u32>,
    /// Verdict of the group.
    pub verdict: Verdict,
    /// Index into `differences` of the pair that decides it.
    pub deciding: usize,
    /// Every pairwise difference, in run order.
    pub differences: Vec<Difference>,
}

/// What a spread group compares.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum SpreadKind {
    /// One variant under every law.
    Laws,
    /// Every variant under one law.
    Variants,
    /// The two ends of the s-only envelope.
    Envelope,
}

/// A group of runs whose spread is judged.
#[derive(Clone, Debug, Serialize)]
pub struct Spread {
    /// Unique id.
    pub id: String,
    /// What is compared.
    pub kind: SpreadKind,
    /// The question it answers.
    pub question: String,
    /// Run ids, in order.
    pub runs: Vec<String>,
    /// Judged entries.
    pub rows: Vec<SpreadRow>,
}

/// The s-only envelope.
#[derive(Clone, Debug, Serialize)]
pub struct EnvelopeRecord {
    /// Variant it runs on; `null` without an envelope.
    pub variant: Option<String>,
    /// Why there is none.
    pub note: Option<String>,
    /// The materials known by s alone, with the reachable d per band.
    pub materials: Vec<EnvelopeMaterial>,
    /// Id of its spread group.
    pub spread: Option<String>,
}

/// Wall-clock time of one run.
#[derive(Clone, Debug, Serialize)]
pub struct RunTiming {
    /// Run id.
    pub id: String,
    /// Seconds.
    pub wall_s: f64,
}

/// Wall-clock times.
#[derive(Clone, Debug, Serialize)]
pub struct Timings {
    /// Whole comparison, s.
    pub total_s: f64,
    /// Per run.
    pub runs: Vec<RunTiming>,
}

/// Builds the document from the plan, the traced runs and the hashed inputs.
#[must_use]
pub fn build_document(
    plan: &ComparisonPlan,
    outcomes: &[RunOutcome],
    inputs: Vec<FileRecord>,
    total_s: f64,
) -> ComparisonDocument {
    let room = &plan.room;
    let bands_hz = room.settings.bands.centres_hz().to_vec();
    let k = plan.noise_factor;
    let envelope_materials: Vec<&str> = plan
        .envelope
        .as_ref()
        .map(|e| e.materials.iter().map(|m| m.name.as_str()).collect())
        .unwrap_or_default();

    let settings = Settings {
        room: room.name.clone(),
        laws: plan.laws.iter().map(|l| l.name().to_string()).collect(),
        fallback: plan.fallback.map(|l| l.name().to_string()),
        rays_per_source: plan.rays_per_source,
        batches: plan.batches,
        rays_per_batch: plan.rays_per_batch(),
        seed: plan.seed,
        stream_rule: "in batch b of every run, ray i of source s (counted from 0) draws only from the random stream (seed, b·n·S + s·n + i), n rays per source per batch, S sources: every run traces the same rays batch by batch (common random numbers)".into(),
        sources: room
            .sources
            .iter()
            .map(|s| SourceRecord {
                name: s.name.clone(),
                position_m: s.position.to_array(),
            })
            .collect(),
        receivers: room
            .receivers
            .iter()
            .map(|r| ReceiverRecord {
                name: r.name.clone(),
                position_m: r.position.to_array(),
                radius_m: r.radius_m,
            })
            .collect(),
        bands_hz: bands_hz.clone(),
        plot_band_hz: plan.plot_band_hz,
        duration_s: plan.duration_s,
        bin_s: plan.bin_s,
        speed_of_sound_m_s: room.settings.air.speed_of_sound_m_s(),
        air_absorption: room.settings.air_absorption,
        temperature_c: room.settings.air.temperature_c,
        humidity_pct: room.settings.air.humidity_pct,
        pressure_kpa: room.settings.air.pressure_kpa,
        roulette: Some(Roulette::default()),
        rays_per_chunk: RAYS_PER_CHUNK,
        parameters: plan.parameters.clone(),
        noise_factor: k,
        estimator: plan.estimator,
        single_number: "arithmetic mean over 500 and 1000 Hz (J_LF: 125 to 1000 Hz), ISO 3382-1:2009 Table A.1".into(),
    };

    let verdict_rule = VerdictRule {
        noise_factor: k,
        spread: "S = |difference| / JND; for EDT, T20 and T30 the JND is 5 % of the mean of the two values compared".into(),
        noise: format!("N = {k:.3} × standard error of the difference / JND"),
        verdicts: Verdict::ALL
            .iter()
            .map(|&v| VerdictText {
                verdict: v,
                label: v.label().into(),
                rule: v.rule_text(k),
            })
            .collect(),
        several_runs: "With more than two runs every pair is judged; a sensitive pair decides (the one with the largest S), else the group is robust only when every pair is, else within noise; the deciding pair is named".into(),
        standard_errors: "Parameters come from the pooled echogram (mean of the batches); standard errors from the delete-one jackknife over the batches, se² = (B − 1)/B Σ (θ_(b) − θ̄)²; for a difference, from the paired delete-one differences (same rays in both runs)".into(),
    };

    let materials = material_records(plan, &envelope_materials);
    let variants = plan
        .variants
        .iter()
        .map(|v| VariantRecord {
            name: v.name.clone(),
            replace: v.replace.clone(),
        })
        .collect();
    let runs = outcomes
        .iter()
        .map(|o| run_record(plan, o, &bands_hz))
        .collect();
    let spreads = spreads(plan, outcomes, &bands_hz);
    let envelope = EnvelopeRecord {
        variant: plan
            .envelope
            .as_ref()
            .map(|e| plan.variants[e.variant].name.clone()),
        note: plan.envelope_note.clone(),
        materials: plan
            .envelope
            .as_ref()
            .map(|e| e.materials.clone())
            .unwrap_or_default(),
        spread: plan.envelope.as_ref().map(|_| "envelope".to_string()),
    };
    let mut warnings = plan.warnings.clone();
    warnings.extend(run_warnings(outcomes));
    ComparisonDocument {
        format: FORMAT.into(),
        format_version: FORMAT_VERSION,
        name: plan.name.clone(),
        cautions: CAUTIONS.iter().map(|s| s.to_string()).collect(),
        provenance: Provenance {
            polaray_version: env!("CARGO_PKG_VERSION").into(),
            build: crate::build_info::BUILD,
            inputs,
            overrides: plan.overrides,
            reproduce_command: "polaray compare --reproduce comparison.json".into(),
        },
        settings,
        verdict_rule,
        jnds: JND_TABLE.to_vec(),
        materials,
        variants,
        runs,
        spreads,
        envelope,
        warnings,
        timings: Timings {
            total_s,
            runs: outcomes
                .iter()
                .map(|o| RunTiming {
                    id: o.spec.id.clone(),
                    wall_s: o.wall_time_s,
                })
                .collect(),
        },
    }
}

/// The warnings and fallback notes of the runs, each once, with the runs
/// that gave it (in run order).
#[must_use]
pub fn run_warnings(outcomes: &[RunOutcome]) -> Vec<String> {
    let mut seen: Vec<(String, Vec<String>)> = Vec::new();
    for o in outcomes {
        for w in o.warnings.iter().chain(&o.fallbacks) {
            match seen.iter_mut().find(|(m, _)| m == w) {
                Some((_, runs)) => runs.push(o.spec.id.clone()),
                None => seen.push((w.clone(), vec![o.spec.id.clone()])),
            }
        }
    }
    seen.into_iter()
        .map(|(m, runs)| {
            if runs.len() == outcomes.len() {
                format!("{m} (every run)")
            } else {
                format!("{m} (runs: {})", runs.join("; "))
            }
        })
        .collect()
}

/// Every material some variant uses, room materials first.
fn material_records(plan: &ComparisonPlan, envelope: &[&str]) -> Vec<MaterialRecord> {
    let n = plan.room.settings.bands.len();
    let mut out: Vec<MaterialRecord> = Vec::new();
    for v in &plan.variants {
        for s in &v.room.surfaces {
            let m = &v.room.materials[s.material];
            if let Some(r) = out.iter_mut().find(|r| r.name == m.name) {
                if !r.used_by.contains(&v.name) {
                    r.used_by.push(v.name.clone());
                }
                continue;
            }
            let from_comparison = plan.comparison_materials.iter().any(|c| c.name == m.name);
            out.push(MaterialRecord {
                name: m.name.clone(),
                defined_in: if from_comparison {
                    "comparison"
                } else {
                    "room"
                }
                .into(),
                used_by: vec![v.name.clone()],
                absorption: m.absorption.as_slice(n).to_vec(),
                scattering: m.scattering.as_slice(n).to_vec(),
                diffusion: m.diffusion.map(|d| d.as_slice(n).to_vec()),
                polar_file: m
                    .polar_file
                    .as_ref()
                    .map(|p| p.to_string_lossy().into_owned()),
                s_only: envelope.contains(&m.name.as_str()),
            });
        }
    }
    out
}

fn estimate(pair: &PairOutcome, p: Parameter, slot: usize, band_hz: Option<u32>) -> Estimate {
    let value = pair.values.get(p, slot);
    Estimate {
        band_hz,
        value,
        se: value.and(crate::metrics::jackknife_se(&pair.delete_one_of(p, slot))),
        undefined: value
            .is_none()
            .then(|| pair.undefined_reason(p, slot))
            .flatten(),
    }
}

fn run_record(plan: &ComparisonPlan, o: &RunOutcome, bands_hz: &[u32]) -> RunRecord {
    let nb = bands_hz.len();
    RunRecord {
        id: o.spec.id.clone(),
        variant: plan.variants[o.spec.variant].name.clone(),
        law: o.spec.law.name().into(),
        role: o.spec.role,
        fallbacks: o.fallbacks.clone(),
        warnings: o.warnings.clone(),
        stats: o.stats.clone(),
        pairs: o
            .pairs
            .iter()
            .map(|pair| PairRecord {
                source: pair.source.clone(),
                receiver: pair.receiver.clone(),
                notes: pair.pooled.notes.clone(),
                parameters: Parameter::ALL
                    .iter()
                    .map(|&p| ParameterRecord {
                        parameter: p,
                        per_band: (0..nb)
                            .map(|b| estimate(pair, p, b, Some(bands_hz[b])))
                            .collect(),
                        single_number: estimate(pair, p, nb, None),
                    })
                    .collect(),
            })
            .collect(),
    }
}

/// The groups of runs to judge: each variant across laws, each law across
/// variants, the envelope's two ends.
fn spreads(plan: &ComparisonPlan, outcomes: &[RunOutcome], bands_hz: &[u32]) -> Vec<Spread> {
    let mut out = Vec::new();
    let treatment = |v: usize, law: crate::law::LawKind| {
        outcomes
            .iter()
            .find(|o| o.spec.role == RunRole::Treatment && o.spec.variant == v && o.spec.law == law)
    };
    if plan.laws.len() >= 2 {
        for (v, variant) in plan.variants.iter().enumerate() {
            let group: Vec<&RunOutcome> =
                plan.laws.iter().filter_map(|&l| treatment(v, l)).collect();
            out.push(spread(
                plan,
                format!("laws: {}", variant.name),
                SpreadKind::Laws,
                format!(
                    "Does the scattering treatment change the result for {}?",
                    variant.name
                ),
                &group,
                bands_hz,
            ));
        }
    }
    if plan.variants.len() >= 2 {
        for &law in &plan.laws {
            let group: Vec<&RunOutcome> = (0..plan.variants.len())
                .filter_map(|v| treatment(v, law))
                .collect();
            out.push(spread(
                plan,
                format!("variants: {law}"),
                SpreadKind::Variants,
                format!("Does the choice of variant change the result under the {law} law?"),
                &group,
                bands_hz,
            ));
        }
    }
    let ends: Vec<&RunOutcome> = outcomes
        .iter()
        .filter(|o| o.spec.role != RunRole::Treatment)
        .collect();
    if ends.len() == 2 {
        out.push(spread(
            plan,
            "envelope".into(),
            SpreadKind::Envelope,
            "How far apart can the results be when the surfaces known only by s spread their scattered energy least or most evenly?".into(),
            &ends,
            bands_hz,
        ));
    }
    out
}

fn spread(
    plan: &ComparisonPlan,
    id: String,
    kind: SpreadKind,
    question: String,
    group: &[&RunOutcome],
    bands_hz: &[u32],
) -> Spread {
    let nb = bands_hz.len();
    let mut rows = Vec::new();
    let pairs = group.first().map_or(0, |o| o.pairs.len());
    for k in 0..pairs {
        for &p in &plan.parameters {
            #[allow(clippy::needless_range_loop)] // slot nb is the single number, past the bands
            for slot in 0..=nb {
                let mut differences = Vec::new();
                for i in 0..group.len() {
                    for j in i + 1..group.len() {
                        let (a, b) = (&group[i].pairs[k], &group[j].pairs[k]);
                        differences.push(difference(
                            &group[i].spec.id,
                            &group[j].spec.id,
                            a.values.get(p, slot),
                            b.values.get(p, slot),
                            &a.delete_one_of(p, slot),
                            &b.delete_one_of(p, slot),
                            p.jnd(),
                            plan.noise_factor,
                        ));
                    }
                }
                let (verdict, deciding) = deciding(&differences).unwrap_or((Verdict::Undefined, 0));
                let pair = &group[0].pairs[k];
                rows.push(SpreadRow {
                    source: pair.source.clone(),
                    receiver: pair.receiver.clone(),
                    parameter: p,
                    band_hz: (slot < nb).then(|| bands_hz[slot]),
                    verdict,
                    deciding,
                    differences,
                });
            }
        }
    }
    Spread {
        id,
        kind,
        question,
        runs: group.iter().map(|o| o.spec.id.clone()).collect(),
        rows,
    }
}
