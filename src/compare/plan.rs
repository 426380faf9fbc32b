//! From a comparison file to the list of runs: the room with the chosen
//! sources and receivers, one room per variant, the envelope rooms, and the
//! settings every run shares.

use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};
use std::str::FromStr;

use serde::Serialize;

use super::error::CompareError;
use super::file::ComparisonFile;
use super::verdict::default_noise_factor;
use crate::bands::Bands;
use crate::law::{material_arc, BoundedLaw, LawKind};
use crate::metrics::Parameter;
use crate::receiver::default_radius_m;
use crate::room::file::RoomFile;
use crate::room::inside::distance_to_triangle_m;
use crate::room::{estimates, load_room, material_from_table, Material, Room};
use crate::trace::{Estimator, Roulette, TraceOptions};

/// Batches when the comparison file gives none.
pub const DEFAULT_BATCHES: usize = 20;

/// Band of the echogram and decay charts when the file gives none, Hz.
pub const DEFAULT_PLOT_BAND_HZ: u32 = 1000;

/// Settings given on the command line over the file's (recorded in the provenance).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, serde::Deserialize)]
pub struct Overrides {
    /// Rays per source over all batches.
    pub rays: Option<usize>,
    /// Batches.
    pub batches: Option<usize>,
    /// Seed.
    pub seed: Option<u64>,
    /// Receiver estimator, instead of the file's.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub estimator: Option<EstimatorChoice>,
}

/// The receiver estimators by name, as comparison files and `--estimator` give them.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, serde::Deserialize, clap::ValueEnum)]
#[serde(rename_all = "kebab-case")]
pub enum EstimatorChoice {
    /// Exact early mirror paths, stratified starts and a growing late sphere
    /// (the default).
    ExactEarly,
    /// The same with next-event scoring at every reflection.
    NextEvent,
    /// Detection spheres (the reference).
    Sphere,
}

impl EstimatorChoice {
    /// The estimator with its default settings.
    #[must_use]
    pub fn estimator(self) -> Estimator {
        match self {
            Self::ExactEarly => Estimator::exact_early(),
            Self::NextEvent => Estimator::next_event(),
            Self::Sphere => Estimator::Sphere,
        }
    }
}

/// One configuration of the room: the variant's replacements applied.
#[derive(Clone, Debug)]
pub struct Variant {
    /// Name from the comparison file.
    pub name: String,
    /// Surface group → material name.
    pub replace: BTreeMap<String, String>,
    /// The room with the replacements made.
    pub room: Room,
}

/// What a run stands for.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum RunRole {
    /// A variant under one law.
    Treatment,
    /// The envelope variant, bounded law, s-only surfaces at their least even spread.
    EnvelopeLeastEven,
    /// The same at their most even spread (at the bound).
    EnvelopeMostEven,
}

/// One run of a comparison.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct RunSpec {
    /// Unique id, e.g. `A: flat panel / split`.
    pub id: String,
    /// Index into [`ComparisonPlan::variants`].
    pub variant: usize,
    /// Law.
    pub law: LawKind,
    /// Role.
    pub role: RunRole,
}

/// One band of an s-only material's envelope.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct EnvelopeBand {
    /// Band centre, Hz.
    pub band_hz: u32,
    /// The material's scattering coefficient.
    pub scattering: f64,
    /// Least even diffusion coefficient the bounded law reaches for this s.
    pub least_even: f64,
    /// Most even diffusion coefficient the bounded law reaches for this s.
    pub most_even: f64,
    /// The bound d_max(min(s, s*)) (reference.md §3).
    pub bound: f64,
}

/// An s-only material of the envelope.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct EnvelopeMaterial {
    /// Material name.
    pub name: String,
    /// Per band.
    pub bands: Vec<EnvelopeBand>,
}

/// The s-only envelope: two bounded-law runs of one variant.
#[derive(Clone, Debug)]
pub struct EnvelopePlan {
    /// Index into [`ComparisonPlan::variants`].
    pub variant: usize,
    /// The materials treated as known by s alone.
    pub materials: Vec<EnvelopeMaterial>,
    /// The variant's room with those materials at their least even d.
    pub least_even_room: Room,
    /// The same at their most even d.
    pub most_even_room: Room,
}

/// A file the comparison reads, for the provenance.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct InputFile {
    /// `comparison`, `room`, `mesh` or `polar`.
    pub role: &'static str,
    /// Path as resolved (relative to the working folder where given so).
    pub path: PathBuf,
}

/// Everything a comparison needs, checked.
#[derive(Clone, Debug)]
pub struct ComparisonPlan {
    /// The comparison file.
    pub file: PathBuf,
    /// Title.
    pub name: String,
    /// The room file.
    pub room_file: PathBuf,
    /// The room as loaded, with the chosen sources and receivers and fixed receiver radii.
    pub room: Room,
    /// Laws compared, in file order.
    pub laws: Vec<LawKind>,
    /// Fallback law.
    pub fallback: Option<LawKind>,
    /// Rays per source over all batches.
    pub rays_per_source: usize,
    /// Batches.
    pub batches: usize,
    /// Seed.
    pub seed: u64,
    /// Echogram length shared by every run, s.
    pub duration_s: f64,
    /// Echogram bin width, s.
    pub bin_s: f64,
    /// Parameters judged.
    pub parameters: Vec<Parameter>,
    /// k of the verdict rule.
    pub noise_factor: f64,
    /// Receiver estimator of every run.
    pub estimator: Estimator,
    /// Band of the echogram and decay charts, Hz.
    pub plot_band_hz: u32,
    /// Configurations, in file order (one "as in the room file" without variants).
    pub variants: Vec<Variant>,
    /// The envelope, if any surface is described by s alone.
    pub envelope: Option<EnvelopePlan>,
    /// Why there is no envelope, when there is none.
    pub envelope_note: Option<String>,
    /// Materials defined in the comparison file.
    pub comparison_materials: Vec<Material>,
    /// Every file read.
    pub inputs: Vec<InputFile>,
    /// Settings given on the command line.
    pub overrides: Overrides,
    /// Warnings found while loading, each naming the item.
    pub warnings: Vec<String>,
}

impl ComparisonPlan {
    /// Every run, in order: each variant under each law, then the envelope's two.
    #[must_use]
    pub fn runs(&self) -> Vec<RunSpec> {
        let mut runs = Vec::new();
        for (v, variant) in self.variants.iter().enumerate() {
            for &law in &self.laws {
                runs.push(RunSpec {
                    id: format!("{} / {law}", variant.name),
                    variant: v,
                    law,
                    role: RunRole::Treatment,
                });
            }
        }
        if let Some(e) = &self.envelope {
            let name = &self.variants[e.variant].name;
            for (role, end) in [
                (RunRole::EnvelopeLeastEven, "least even"),
                (RunRole::EnvelopeMostEven, "most even"),
            ] {
                runs.push(RunSpec {
                    id: format!("{name} / bounded, s-only surfaces {end}"),
                    variant: e.variant,
                    law: LawKind::Bounded,
                    role,
                });
            }
        }
        runs
    }

    /// The room a run traces.
    #[must_use]
    pub fn room_of(&self, run: &RunSpec) -> &Room {
        match (run.role, &self.envelope) {
            (RunRole::EnvelopeLeastEven, Some(e)) => &e.least_even_room,
            (RunRole::EnvelopeMostEven, Some(e)) => &e.most_even_room,
            _ => &self.variants[run.variant].room,
        }
    }

    /// Rays per source in one batch.
    #[must_use]
    pub fn rays_per_batch(&self) -> usize {
        self.rays_per_source / self.batches
    }

    /// Trace options of batch `batch` of `run`: the shared duration and bins,
    /// the batch's rays and its stream offset batch · rays per batch · sources.
    #[must_use]
    pub fn batch_options(&self, run: &RunSpec, batch: usize) -> TraceOptions {
        let n = self.rays_per_batch();
        let mut options = TraceOptions::from_room(self.room_of(run), run.law);
        options.fallback = self.fallback;
        options.rays = n;
        options.seed = self.seed;
        options.duration_s = self.duration_s;
        options.bin_s = self.bin_s;
        options.receiver_radius_m = None;
        options.roulette = Some(Roulette::default());
        options.first_ray = (batch * n * self.room.sources.len()) as u64;
        options.estimator = self.estimator;
        options
    }

    /// Ray passes of the whole comparison (rays × sources × band passes, all
    /// runs and batches), for progress bars.
    #[must_use]
    pub fn total_ray_passes(&self) -> u64 {
        self.runs()
            .iter()
            .map(|r| {
                let passes = r.law.band_groups(self.room_of(r)).len() as u64;
                self.rays_per_source as u64 * self.room.sources.len() as u64 * passes
            })
            .sum()
    }
}

/// Problems gathered while resolving a comparison file.
struct Problems(Vec<String>);

impl Problems {
    fn add(&mut self, p: String) {
        self.0.push(p);
    }
}

/// Names in the order of `all`, checking that each wanted one exists.
fn select(
    wanted: Option<&Vec<String>>,
    all: &[String],
    what: &str,
    problems: &mut Problems,
) -> Vec<bool> {
    let Some(wanted) = wanted else {
        return vec![true; all.len()];
    };
    let mut keep = vec![false; all.len()];
    let mut seen = BTreeSet::new();
    for (i, name) in wanted.iter().enumerate() {
        if !seen.insert(name) {
            problems.add(format!("{what}[{i}]: `{name}` is listed twice"));
        }
        match all.iter().position(|n| n == name) {
            Some(k) => keep[k] = true,
            None => problems.add(format!(
                "{what}[{i}]: the room has no {} named `{name}` (it has: {})",
                what.trim_end_matches('s'),
                all.join(", ")
            )),
        }
    }
    if wanted.is_empty() {
        problems.add(format!(
            "{what}: the list is empty; name at least one or leave it out to take all"
        ));
    }
    keep
}

/// Loads and checks a comparison file; `overrides` replace its rays, batches and seed.
pub fn load_comparison(path: &Path, overrides: Overrides) -> Result<ComparisonPlan, CompareError> {
    let fail = |problems: Vec<String>| CompareError::File {
        file: path.to_path_buf(),
        problems,
    };
    let text = std::fs::read_to_string(path).map_err(|e| {
        fail(vec![format!(
            "cannot read the comparison file: {}",
            crate::messages::io_problem(&e)
        )])
    })?;
    let spec: ComparisonFile =
        toml::from_str(&text).map_err(|e| fail(vec![crate::messages::toml_problem(&e)]))?;
    let dir = path.parent().unwrap_or(Path::new("")).to_path_buf();
    let mut problems = Problems(Vec::new());
    let mut warnings = Vec::new();

    // The room and the files it reads.
    let room_file = dir.join(&spec.room);
    let loaded = load_room(&room_file).map_err(|cause| CompareError::RoomOfComparison {
        file: path.to_path_buf(),
        cause,
    })?;
    warnings.extend(
        loaded
            .warnings
            .iter()
            .map(|w| format!("{}: {w}", room_file.display())),
    );
    let mut room = loaded.room;
    let mut inputs = vec![
        InputFile {
            role: "comparison",
            path: path.to_path_buf(),
        },
        InputFile {
            role: "room",
            path: room_file.clone(),
        },
    ];
    if let Some(mesh) = mesh_file(&room_file) {
        inputs.push(InputFile {
            role: "mesh",
            path: mesh,
        });
    }

    // Laws and fallback.
    let mut laws = Vec::new();
    for (i, name) in spec
        .laws
        .clone()
        .unwrap_or_else(|| LawKind::NAME_LIST.iter().map(|s| s.to_string()).collect())
        .iter()
        .enumerate()
    {
        match LawKind::from_str(name) {
            Ok(l) if laws.contains(&l) => {
                problems.add(format!("laws[{i}]: `{name}` is listed twice"))
            }
            Ok(l) => laws.push(l),
            Err(e) => problems.add(format!("laws[{i}]: {e}")),
        }
    }
    if laws.is_empty() && spec.laws.is_some() {
        problems.add("laws: the list is empty; name at least one law".into());
    }
    let fallback = match spec.fallback.as_deref().map(LawKind::from_str) {
        Some(Ok(l)) => Some(l),
        Some(Err(e)) => {
            problems.add(format!("fallback: {e}"));
            None
        }
        None => None,
    };

    // Rays, batches, seed.
    let batches = overrides
        .batches
        .or(spec.batches)
        .unwrap_or(DEFAULT_BATCHES);
    let rays_per_source = overrides.rays.or(spec.rays).unwrap_or(room.settings.rays);
    let seed = overrides.seed.or(spec.seed).unwrap_or(room.settings.seed);
    if batches < 2 {
        problems.add(format!(
            "batches: {batches} is too few; standard errors need at least 2 batches (20, the default, gives a stable one)"
        ));
    } else if rays_per_source < batches || !rays_per_source.is_multiple_of(batches) {
        problems.add(format!(
            "rays: {rays_per_source} rays per source do not split into {batches} equal batches; give a multiple of {batches}"
        ));
    }

    // Sources and receivers.
    let source_names: Vec<String> = room.sources.iter().map(|s| s.name.clone()).collect();
    let keep = select(
        spec.sources.as_ref(),
        &source_names,
        "sources",
        &mut problems,
    );
    let mut k = keep.iter();
    room.sources.retain(|_| *k.next().unwrap_or(&false));
    let receiver_names: Vec<String> = room.receivers.iter().map(|r| r.name.clone()).collect();
    let keep = select(
        spec.receivers.as_ref(),
        &receiver_names,
        "receivers",
        &mut problems,
    );
    let mut k = keep.iter();
    room.receivers.retain(|_| *k.next().unwrap_or(&false));

    // Parameters, noise factor, chart band.
    let mut parameters = Vec::new();
    match &spec.parameters {
        None => parameters.extend(Parameter::ALL),
        Some(list) => {
            for (i, name) in list.iter().enumerate() {
                match Parameter::from_name(name) {
                    Some(p) if parameters.contains(&p) => {
                        problems.add(format!("parameters[{i}]: `{name}` is listed twice"))
                    }
                    Some(p) => parameters.push(p),
                    None => problems.add(format!(
                        "parameters[{i}]: unknown parameter `{name}`; choose from {}",
                        Parameter::ALL.map(Parameter::short).join(", ")
                    )),
                }
            }
            if list.is_empty() {
                problems.add(
                    "parameters: the list is empty; name at least one or leave it out to take all"
                        .into(),
                );
            }
        }
    }
    parameters.sort();
    // Pairs per cell of the largest group: laws per variant, variants per
    // law, the envelope's two ends.
    let largest_group = laws.len().max(spec.variants.len()).max(2);
    let family = largest_group * (largest_group - 1) / 2;
    let noise_factor = spec
        .noise_factor
        .map(|r| r.0)
        .or_else(|| default_noise_factor(batches, family))
        .unwrap_or(f64::NAN);
    if !(noise_factor.is_finite() && noise_factor > 0.0) && spec.noise_factor.is_some() {
        problems.add(format!(
            "noise_factor: {noise_factor} must be a positive number of standard errors (2 is usual)"
        ));
    }
    let estimator = match (overrides.estimator, spec.estimator.as_deref()) {
        (Some(choice), _) => choice.estimator(),
        (None, None) => Estimator::default(),
        (None, Some(name)) => Estimator::from_name(name).unwrap_or_else(|| {
            problems.add(format!(
                "estimator: `{name}` is not one of: {}",
                crate::trace::ESTIMATOR_NAMES.join(", ")
            ));
            Estimator::default()
        }),
    };
    let centres = room.settings.bands.centres_hz().to_vec();
    let plot_band_hz = spec
        .plot_band_hz
        .unwrap_or(if centres.contains(&DEFAULT_PLOT_BAND_HZ) {
            DEFAULT_PLOT_BAND_HZ
        } else {
            centres[centres.len() / 2]
        });
    if !centres.contains(&plot_band_hz) {
        problems.add(format!(
            "plot_band_hz: {plot_band_hz} Hz is not a band of the room (bands: {:?})",
            centres
        ));
    }

    // Materials of the comparison file.
    let mut comparison_materials = Vec::new();
    for (name, table) in &spec.materials {
        if room.materials.iter().any(|m| &m.name == name) {
            problems.add(format!(
                "materials.{name}: the room file already defines a material of this name; give the comparison's material another name"
            ));
            continue;
        }
        match material_from_table(name, table, &room.settings.bands, &dir) {
            Ok((m, w)) => {
                warnings.extend(w.into_iter().map(|w| format!("{}: {w}", path.display())));
                comparison_materials.push(m);
            }
            Err(p) => {
                for p in p {
                    problems.add(p);
                }
            }
        }
    }

    // Variants.
    let groups: BTreeSet<String> = room.surfaces.iter().map(|s| s.group.clone()).collect();
    let mut variants = Vec::new();
    let mut used_materials = BTreeSet::new();
    if spec.variants.is_empty() {
        variants.push(Variant {
            name: "as in the room file".into(),
            replace: BTreeMap::new(),
            room: room.clone(),
        });
    }
    let mut names = BTreeSet::new();
    for (i, v) in spec.variants.iter().enumerate() {
        let item = format!("variants[{i}]");
        if v.name.trim().is_empty() {
            problems.add(format!("{item}.name: give the variant a name"));
        } else if !names.insert(v.name.clone()) {
            problems.add(format!(
                "{item}.name: `{}` is used by an earlier variant",
                v.name
            ));
        }
        let mut vroom = room.clone();
        for (group, material) in &v.replace {
            if !groups.contains(group) {
                problems.add(format!(
                    "{item}.replace: the room has no surface group `{group}` (groups: {})",
                    groups.iter().cloned().collect::<Vec<_>>().join(", ")
                ));
                continue;
            }
            let index = if let Some(k) = vroom.materials.iter().position(|m| &m.name == material) {
                k
            } else if let Some(m) = comparison_materials.iter().find(|m| &m.name == material) {
                vroom.materials.push(m.clone());
                vroom.materials.len() - 1
            } else {
                problems.add(format!(
                    "{item}.replace.{group}: material `{material}` is defined neither in the comparison file's [materials] nor in the room file"
                ));
                continue;
            };
            used_materials.insert(material.clone());
            for s in vroom.surfaces.iter_mut().filter(|s| &s.group == group) {
                s.material = index;
            }
        }
        variants.push(Variant {
            name: v.name.clone(),
            replace: v.replace.clone(),
            room: vroom,
        });
    }
    for m in &comparison_materials {
        if !used_materials.contains(&m.name) {
            warnings.push(format!(
                "{}: materials.{}: defined but no variant uses it",
                path.display(),
                m.name
            ));
        }
    }

    if !problems.0.is_empty() {
        return Err(fail(problems.0));
    }

    // One echogram length for every run: the room's, or the longest default.
    let duration_s = room.settings.duration_s.unwrap_or_else(|| {
        variants
            .iter()
            .map(|v| estimates::default_duration_s(&v.room))
            .fold(0.0, f64::max)
    });
    let bin_s = room.settings.bin_s;

    // Receivers without a radius get the default for the whole ray count, the
    // same in every batch (a batch's own count would give a wider sphere).
    let volume_m3 = estimates::volume_m3(&room);
    let speed_m_s = room.settings.air.speed_of_sound_m_s();
    let radius_m = default_radius_m(volume_m3, rays_per_source, speed_m_s, bin_s);
    for r in room.receivers.iter_mut().filter(|r| r.radius_m.is_none()) {
        r.radius_m = Some(radius_m);
        let nearest = room
            .triangles
            .iter()
            .map(|t| distance_to_triangle_m(r.position, &t.vertices))
            .fold(f64::INFINITY, f64::min);
        if nearest < radius_m {
            warnings.push(format!(
                "receiver `{}`: the default detection radius {radius_m:.2} m reaches a wall {nearest:.2} m from the centre, so the sphere counts too little energy; give `radius_m` in the room file",
                r.name
            ));
        }
    }
    for v in &mut variants {
        v.room.receivers = room.receivers.clone();
        v.room.sources = room.sources.clone();
    }

    // Every run's laws must build (a missing polar file or diffusion list is
    // found now, not after an hour of tracing).
    let all_bands: Vec<usize> = (0..room.settings.bands.len()).collect();
    for v in &variants {
        for &law in &laws {
            if let Err(e) = law.build_for_room(&v.room, &all_bands, fallback) {
                problems.add(format!("variant `{}`, law `{law}`: {e}", v.name));
            }
        }
    }

    // The envelope.
    let envelope_spec = spec.envelope.as_ref();
    let envelope_variant = match envelope_spec.and_then(|e| e.variant.as_ref()) {
        None => Some(0),
        Some(name) => {
            let found = variants.iter().position(|v| &v.name == name);
            if found.is_none() {
                problems.add(format!(
                    "envelope.variant: no variant is named `{name}` (variants: {})",
                    variants
                        .iter()
                        .map(|v| v.name.as_str())
                        .collect::<Vec<_>>()
                        .join(", ")
                ));
            }
            found
        }
    };
    let mut envelope = None;
    let mut envelope_note = None;
    if let Some(ev) = envelope_variant {
        let vroom = &variants[ev].room;
        let used: BTreeSet<usize> = vroom.surfaces.iter().map(|s| s.material).collect();
        let chosen: Vec<usize> = match envelope_spec.and_then(|e| e.materials.as_ref()) {
            None => used
                .iter()
                .copied()
                .filter(|&m| {
                    vroom.materials[m].diffusion.is_none()
                        && vroom.materials[m].polar_file.is_none()
                })
                .collect(),
            Some(list) => {
                let mut out = Vec::new();
                for (i, name) in list.iter().enumerate() {
                    match vroom.materials.iter().position(|m| &m.name == name) {
                        Some(m) if used.contains(&m) => {
                            if !out.contains(&m) {
                                out.push(m);
                            }
                        }
                        _ => problems.add(format!(
                            "envelope.materials[{i}]: no surface of variant `{}` uses a material `{name}`",
                            variants[ev].name
                        )),
                    }
                }
                out
            }
        };
        if chosen.is_empty() {
            envelope_note = Some(match envelope_spec.and_then(|e| e.materials.as_ref()) {
                Some(_) => "the comparison file lists no material for the envelope".to_string(),
                None => format!(
                    "no surface of variant `{}` is described by its scattering coefficient alone; list materials under [envelope] to treat them so",
                    variants[ev].name
                ),
            });
        } else {
            let mut low = vroom.clone();
            let mut high = vroom.clone();
            let mut materials = Vec::new();
            for &m in &chosen {
                let material = &vroom.materials[m];
                let mut bands = Vec::new();
                let (mut lo, mut hi) = (Bands::ZERO, Bands::ZERO);
                let arc = match material_arc(material) {
                    Ok(arc) => arc,
                    Err(e) => {
                        problems.add(format!("envelope: material `{}`: {e}", material.name));
                        continue;
                    }
                };
                for (b, &hz) in centres.iter().enumerate() {
                    let s = material.scattering[b];
                    match BoundedLaw::reachable_diffusion(s, &arc) {
                        Ok(r) => {
                            lo[b] = r.least_even;
                            hi[b] = r.most_even;
                            bands.push(EnvelopeBand {
                                band_hz: hz,
                                scattering: s,
                                least_even: r.least_even,
                                most_even: r.most_even,
                                bound: r.bound,
                            });
                        }
                        Err(e) => problems.add(format!(
                            "envelope: material `{}`, {hz} Hz: {e}",
                            material.name
                        )),
                    }
                }
                low.materials[m].diffusion = Some(lo);
                high.materials[m].diffusion = Some(hi);
                materials.push(EnvelopeMaterial {
                    name: material.name.clone(),
                    bands,
                });
            }
            for r in [&low, &high] {
                if let Err(e) = LawKind::Bounded.build_for_room(r, &all_bands, fallback) {
                    problems.add(format!("envelope (bounded law): {e}"));
                }
            }
            envelope = Some(EnvelopePlan {
                variant: ev,
                materials,
                least_even_room: low,
                most_even_room: high,
            });
        }
    }
    if !problems.0.is_empty() {
        return Err(fail(problems.0));
    }

    // Polar files any run reads.
    let mut polar: BTreeSet<PathBuf> = BTreeSet::new();
    for v in &variants {
        let used: BTreeSet<usize> = v.room.surfaces.iter().map(|s| s.material).collect();
        for m in used {
            if let Some(p) = &v.room.materials[m].polar_file {
                if p.is_file() {
                    polar.insert(p.clone());
                }
            }
        }
    }
    inputs.extend(polar.into_iter().map(|p| InputFile {
        role: "polar",
        path: p,
    }));

    let name = spec.name.clone().unwrap_or_else(|| {
        path.file_stem()
            .map(|s| s.to_string_lossy().into_owned())
            .unwrap_or_default()
    });
    Ok(ComparisonPlan {
        file: path.to_path_buf(),
        name,
        room_file,
        room,
        laws,
        fallback,
        rays_per_source,
        batches,
        seed,
        duration_s,
        bin_s,
        parameters,
        noise_factor,
        estimator,
        plot_band_hz,
        variants,
        envelope,
        envelope_note,
        comparison_materials,
        inputs,
        overrides,
        warnings,
    })
}

/// The OBJ file a room file's `[mesh]` names, if any (resolved relative to it).
fn mesh_file(room_file: &Path) -> Option<PathBuf> {
    let text = std::fs::read_to_string(room_file).ok()?;
    let file: RoomFile = toml::from_str(&text).ok()?;
    let mesh = file.mesh?;
    Some(room_file.parent().unwrap_or(Path::new("")).join(mesh.file))
}
