//! Setting up a run, tracing the chunks in parallel and merging them in order.

use std::f64::consts::PI;
use std::time::Instant;

use glam::DVec3;
use rayon::prelude::*;

use super::options::{Estimator, NextEventSettings, TraceError, TraceOptions};
use super::ray::{NextEventScene, NoLog, QueryLog, Scene, Tally, TriangleShading};
use super::result::{PairEchogram, ReceiverInfo, SourceInfo, TraceResult, TraceStats};
use super::specular::{self, Chain, SpecularPath};
use crate::accel::Bvh;
use crate::bands::Bands;
use crate::law::LawSet;
use crate::receiver::{
    default_radius_m, lateral_axis, ArrivalLog, DetectionSphere, DetectionVolume, Echogram,
    SphereSet,
};
use crate::room::inside::distance_to_triangle_m;
use crate::room::{estimates, Room};

/// Rays per chunk: the unit of parallel work and of in-order merging. Fixed,
/// so results do not depend on the thread count.
pub const RAYS_PER_CHUNK: usize = 512;

/// Lost-ray fraction above which a run warns.
const LOST_WARNING_FRACTION: f64 = 0.001;

/// Traces `room` with `options`; see the [module docs](super) for the method.
pub fn run(room: &Room, options: &TraceOptions) -> Result<TraceResult, TraceError> {
    run_with_progress(room, options, &|_| {})
}

/// As [`run`], calling `progress(rays)` after each chunk with the rays it traced
/// (from worker threads, in any order).
pub fn run_with_progress(
    room: &Room,
    options: &TraceOptions,
    progress: &(dyn Fn(usize) + Sync),
) -> Result<TraceResult, TraceError> {
    first_batch(run_logged::<NoLog>(
        room,
        options,
        &options.law,
        1,
        progress,
    ))
    .map(|(result, _)| result)
}

/// As [`run_with_progress`], with the laws given by `laws` (a user's own law,
/// for instance) instead of `options.law`; `options.fallback` is passed on.
pub fn run_with_laws(
    room: &Room,
    options: &TraceOptions,
    laws: &dyn LawSet,
    progress: &(dyn Fn(usize) + Sync),
) -> Result<TraceResult, TraceError> {
    first_batch(run_logged::<NoLog>(room, options, laws, 1, progress)).map(|(result, _)| result)
}

/// Traces `batches` batches of `options.rays` rays per source with one setup:
/// batch b uses the streams of a run with `first_ray` = `options.first_ray` +
/// b · rays · sources, so its result equals that run's, but the reflection
/// laws and the geometry are built once for all batches. Every result's
/// `wall_time_s` is that of the whole call. Zero batches give an empty list.
pub fn run_batches(
    room: &Room,
    options: &TraceOptions,
    batches: usize,
    progress: &(dyn Fn(usize) + Sync),
) -> Result<Vec<TraceResult>, TraceError> {
    run_logged::<NoLog>(room, options, &options.law, batches as u64, progress)
        .map(|all| all.into_iter().map(|(result, _)| result).collect())
}

/// The first batch of a one-batch call.
fn first_batch<T>(all: Result<Vec<T>, TraceError>) -> Result<T, TraceError> {
    all?.into_iter()
        .next()
        .ok_or_else(|| TraceError::Option("no batch was traced".into()))
}

/// As [`run`], also returning every closest-hit query the rays made (origin,
/// unit direction), in ray order: what a benchmark needs to time the bare BVH
/// on exactly the queries of a run. Memory: 48 bytes per traced segment.
pub fn run_recording_queries(
    room: &Room,
    options: &TraceOptions,
) -> Result<(TraceResult, Vec<(DVec3, DVec3)>), TraceError> {
    first_batch(run_logged::<Vec<(DVec3, DVec3)>>(
        room,
        options,
        &options.law,
        1,
        &|_| {},
    ))
}

/// The whole run in `batches` batches (see [`run_batches`]), each with a
/// query log per chunk concatenated in chunk order.
fn run_logged<L: QueryLog + Default + Send>(
    room: &Room,
    options: &TraceOptions,
    law_set: &dyn LawSet,
    batches: u64,
    progress: &(dyn Fn(usize) + Sync),
) -> Result<Vec<(TraceResult, L)>, TraceError> {
    let started = Instant::now();
    options.validate()?;
    if room.sources.is_empty() {
        return Err(TraceError::Missing {
            room: room.name.clone(),
            what: "sources",
        });
    }
    if room.receivers.is_empty() {
        return Err(TraceError::Missing {
            room: room.name.clone(),
            what: "receivers",
        });
    }
    let groups = law_set.band_groups(room);
    let bands = room.settings.bands.len();
    let speed_m_s = room.settings.air.speed_of_sound_m_s();
    let air_per_m = estimates::air_attenuation_per_m(room);
    let bins = options.bins();

    // Receivers: radius from the options, the room file, or the default rule.
    let volume_m3 = estimates::volume_m3(room);
    // The rule counts every ray that makes the pooled echogram: all batches.
    let pooled_rays = options.rays.saturating_mul(batches.max(1) as usize);
    let fallback_radius_m = default_radius_m(volume_m3, pooled_rays, speed_m_s, options.bin_s);
    let mut receivers = Vec::with_capacity(room.receivers.len());
    for r in &room.receivers {
        let (radius_m, radius_is_default) = match (options.receiver_radius_m, r.radius_m) {
            (Some(x), _) | (None, Some(x)) => (x, false),
            (None, None) => (fallback_radius_m, true),
        };
        if !(radius_m.is_finite() && radius_m > 0.0) {
            return Err(TraceError::Option(format!(
                "receiver `{}`: radius must be a positive number of metres, got {radius_m}",
                r.name
            )));
        }
        receivers.push(ReceiverInfo {
            name: r.name.clone(),
            position: r.position,
            radius_m,
            radius_is_default,
            late_radius_m: radius_m,
        });
    }
    let mut warnings = Vec::new();
    // A radius given in the room file was checked against the walls when the
    // room loaded; a default one is checked here, as a warning: a sphere cut
    // by a wall counts less than its volume (common practice, no source).
    for r in receivers.iter().filter(|r| r.radius_is_default) {
        if let Some((surface, distance_m)) = nearest_surface(room, r.position) {
            if distance_m < r.radius_m {
                warnings.push(format!(
                    "receiver `{}`: the default detection radius {:.2} m reaches surface `{surface}` ({distance_m:.2} m from the centre), so the sphere is cut by the wall and counts too little energy; give `radius_m` below {distance_m:.2} m in the room file",
                    r.name, r.radius_m
                ));
            }
        }
    }
    let sources: Vec<SourceInfo> = room
        .sources
        .iter()
        .map(|s| SourceInfo {
            name: s.name.clone(),
            position: s.position,
        })
        .collect();

    let bvh = Bvh::build(&room.triangles);
    let next_event = match options.estimator {
        Estimator::Sphere => None,
        Estimator::NextEvent(settings) => Some(prepare_next_event(
            room,
            options,
            &settings,
            &bvh,
            &sources,
            &mut receivers,
        )),
    };

    // Direct sound of every pair, from geometry and visibility.
    let mut pairs = Vec::with_capacity(sources.len() * receivers.len());
    for (si, s) in sources.iter().enumerate() {
        for (ri, r) in receivers.iter().enumerate() {
            let offset = r.position - s.position;
            let distance_m = offset.length();
            if distance_m == 0.0 {
                return Err(TraceError::Coincident {
                    receiver: r.name.clone(),
                    source_name: s.name.clone(),
                });
            }
            if distance_m <= r.radius_m {
                warnings.push(format!(
                    "receiver `{}` is {distance_m:.2} m from source `{}`, inside its own detection sphere (r = {:.2} m); reflections near the source are smeared",
                    r.name, s.name, r.radius_m
                ));
            }
            let direction = offset / distance_m;
            let axis = lateral_axis(s.position, r.position);
            let direct_visible = !bvh.occluded(s.position, direction, distance_m);
            let direct_time_s = distance_m / speed_m_s;
            let mut echogram = Echogram::new(bins, options.bin_s);
            if direct_visible {
                let mut fluence = Bands::ZERO;
                for b in 0..bands {
                    fluence[b] =
                        (-air_per_m[b] * distance_m).exp() / (4.0 * PI * distance_m * distance_m);
                }
                let cos = direction.dot(axis);
                echogram.add(direct_time_s, fluence, cos * cos);
            }
            pairs.push(PairEchogram {
                source: si,
                receiver: ri,
                echogram,
                direct_time_s,
                distance_m,
                direct_visible,
                lateral_axis: axis,
            });
        }
    }

    // One pass per band group (see `LawKind::band_groups`); ray i uses the
    // same stream in every pass (common random numbers across bands).
    let total_rays = options.rays as u64 * sources.len() as u64;
    let last = total_rays
        .checked_mul(batches)
        .and_then(|n| options.first_ray.checked_add(n));
    if last.is_none() {
        return Err(TraceError::Option(format!(
            "first ray {} plus {batches} batches of {total_rays} rays runs past the last stream index",
            options.first_ray
        )));
    }
    let mut traced: Vec<(Vec<PairEchogram>, Tally, L)> = (0..batches)
        .map(|_| (pairs.clone(), Tally::default(), L::default()))
        .collect();
    let mut fallbacks = Vec::new();
    for group in &groups {
        let laws = law_set.laws_for_room(room, group, options.fallback)?;
        for note in laws.fallbacks.iter().chain(&laws.warnings) {
            if !fallbacks.contains(note) && !warnings.contains(note) {
                if laws.fallbacks.contains(note) {
                    fallbacks.push(note.clone());
                } else {
                    warnings.push(note.clone());
                }
            }
        }
        let mut scene = build_scene(
            room, options, &bvh, laws, group, &sources, &receivers, &pairs, speed_m_s, air_per_m,
        );
        scene.next_event = next_event.as_ref().map(|(ne, _)| ne);
        for (b, (batch_pairs, tally, log)) in traced.iter_mut().enumerate() {
            scene.first_ray = options.first_ray + b as u64 * total_rays;
            if next_event.is_some() {
                scene.start_rotations = start_rotations(options, scene.first_ray, sources.len());
            }
            trace_pass(&scene, batch_pairs, tally, log, total_rays, progress);
            if let Some((_, paths)) = &next_event {
                specular::add_exact_paths(&scene, paths, batch_pairs);
            }
        }
    }
    let wall_time_s = started.elapsed().as_secs_f64();
    let lost_rays: u64 = traced.iter().map(|(_, t, _)| t.lost_rays).sum();
    warnings.extend(lost_ray_warning(
        room,
        lost_rays,
        total_rays * batches,
        groups.len(),
    ));
    Ok(traced
        .into_iter()
        .map(|(pairs, tally, log)| {
            let result = finish(
                room,
                options,
                &groups,
                total_rays,
                tally,
                pairs,
                &sources,
                &receivers,
                warnings.clone(),
                &fallbacks,
                speed_m_s,
                air_per_m,
                wall_time_s,
            );
            (result, log)
        })
        .collect())
}

/// Statistics, the lost-ray warning and the result of one batch.
#[allow(clippy::too_many_arguments)]
fn finish(
    room: &Room,
    options: &TraceOptions,
    groups: &[Vec<usize>],
    total_rays: u64,
    tally: Tally,
    pairs: Vec<PairEchogram>,
    sources: &[SourceInfo],
    receivers: &[ReceiverInfo],
    warnings: Vec<String>,
    fallbacks: &[String],
    speed_m_s: f64,
    air_per_m: Bands,
    wall_time_s: f64,
) -> TraceResult {
    let stats = TraceStats {
        rays: total_rays,
        batches: 1,
        passes: groups.len(),
        segments: tally.segments,
        reflections: tally.reflections,
        traced_mean_free_path_m: (tally.free_paths > 0)
            .then(|| tally.free_path_sum_m / tally.free_paths as f64),
        lost_rays: tally.lost_rays,
        roulette_stopped_rays: tally.roulette_stopped_rays,
        absorbed_rays: tally.absorbed_rays,
        lost_energy_j: tally.lost_energy_j,
        energy_at_end_j: tally.energy_at_end_j,
        wall_time_s,
    };
    TraceResult {
        bands: room.settings.bands.clone(),
        bin_s: options.bin_s,
        duration_s: options.duration_s,
        speed_of_sound_m_s: speed_m_s,
        air_attenuation_per_m: air_per_m,
        sources: sources.to_vec(),
        receivers: receivers.to_vec(),
        echograms: pairs,
        stats,
        warnings,
        fallbacks: fallbacks.to_vec(),
    }
}

/// The warning for many lost rays, over all batches: `lost` ray passes of
/// `rays` rays (all sources and batches) traced in `passes` band passes. The
/// count is in rays as the user asked for them; with several passes, the
/// mean over the passes.
fn lost_ray_warning(room: &Room, lost: u64, rays: u64, passes: usize) -> Option<String> {
    let passes = passes.max(1) as u64;
    let fraction = lost as f64 / (rays.max(1) * passes) as f64;
    if fraction <= LOST_WARNING_FRACTION {
        return None;
    }
    let what = if room.settings.open {
        "the model is open, so this is expected, but check that the openings are where you mean them"
    } else {
        "the room is meant to be closed, so the mesh leaks: look for gaps between surfaces or missing faces"
    };
    let count = if passes == 1 {
        format!("{lost} of {rays} rays")
    } else {
        format!(
            "on average {:.0} of {rays} rays in each of the {passes} band passes",
            lost as f64 / passes as f64
        )
    };
    Some(format!(
        "{count} ({:.2} %) left the room; {what}",
        100.0 * fraction
    ))
}

/// Label of the surface nearest to `point` and its distance, m (`None` without triangles).
fn nearest_surface(room: &Room, point: DVec3) -> Option<(&str, f64)> {
    room.triangles
        .iter()
        .map(|t| (t, distance_to_triangle_m(point, &t.vertices)))
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .map(|(t, d)| (room.surfaces[t.surface as usize].label.as_str(), d))
}

/// Traces every ray of one pass in fixed chunks, in waves, merging every
/// chunk in index order.
fn trace_pass<L: QueryLog + Default + Send>(
    scene: &Scene<'_>,
    pairs: &mut [PairEchogram],
    tally: &mut Tally,
    log: &mut L,
    total_rays: u64,
    progress: &(dyn Fn(usize) + Sync),
) {
    let chunk_count = total_rays.div_ceil(RAYS_PER_CHUNK as u64);
    let wave = (2 * rayon::current_num_threads()).max(1) as u64;
    let mut echograms: Vec<Echogram> = pairs
        .iter_mut()
        .map(|p| std::mem::replace(&mut p.echogram, Echogram::new(0, scene.bin_s)))
        .collect();
    let mut wave_start = 0;
    while wave_start < chunk_count {
        let wave_end = (wave_start + wave).min(chunk_count);
        let done: Vec<(ArrivalLog, Tally, L)> = (wave_start..wave_end)
            .into_par_iter()
            .map(|c| {
                let out = trace_chunk(scene, c, total_rays);
                let first = c * RAYS_PER_CHUNK as u64;
                progress(((first + RAYS_PER_CHUNK as u64).min(total_rays) - first) as usize);
                out
            })
            .collect();
        for (arrivals, t, chunk_log) in done {
            arrivals.merge_into(&mut echograms);
            tally.merge(&t);
            log.append(chunk_log);
        }
        wave_start = wave_end;
    }
    for (p, e) in pairs.iter_mut().zip(echograms) {
        p.echogram = e;
    }
}

/// Precomputes everything the rays of one pass share.
#[allow(clippy::too_many_arguments)]
fn build_scene<'a>(
    room: &Room,
    options: &TraceOptions,
    bvh: &'a Bvh,
    laws: crate::law::RoomLaws,
    group: &[usize],
    sources: &[SourceInfo],
    receivers: &[ReceiverInfo],
    pairs: &[PairEchogram],
    speed_m_s: f64,
    air_per_m: Bands,
) -> Scene<'a> {
    let bands = room.settings.bands.len();
    let shading = room
        .triangles
        .iter()
        .map(|t| {
            let (normal, axis) = triangle_axes(room, t);
            TriangleShading::new(
                normal,
                axis,
                laws.surface_law[t.surface as usize],
                t.surface,
            )
        })
        .collect();
    let mut start_weight = Bands::ZERO;
    for &b in group {
        start_weight[b] = 1.0 / options.rays as f64;
    }
    let air_min_per_m = air_per_m.0[..bands]
        .iter()
        .copied()
        .fold(f64::INFINITY, f64::min);
    // Every segment starts at a source or on a triangle (off it by far less than a metre).
    let reach_m = room
        .triangles
        .iter()
        .flat_map(|t| t.vertices)
        .chain(sources.iter().map(|s| s.position))
        .map(|p| p.abs().max_element())
        .fold(0.0, f64::max)
        + 1.0;
    let spheres: Vec<DetectionSphere> = receivers
        .iter()
        .map(|r| DetectionSphere::new(r.position, r.radius_m))
        .collect();
    Scene {
        bvh,
        shading,
        laws: laws.laws,
        group: group.to_vec(),
        seed: options.seed,
        first_ray: options.first_ray,
        rays_per_source: options.rays,
        start_weight,
        max_path_m: speed_m_s * options.duration_s,
        speed_m_s,
        bins: options.bins(),
        bin_s: options.bin_s,
        air_per_m,
        air_min_per_m,
        has_air: air_per_m.0.iter().any(|&m| m != 0.0),
        roulette: options.roulette,
        spheres: SphereSet::new(&spheres, reach_m),
        lateral_axes: pairs.iter().map(|p| p.lateral_axis).collect(),
        source_positions: sources.iter().map(|s| s.position).collect::<Vec<DVec3>>(),
        start_rotations: Vec::new(),
        next_event: None,
    }
}

/// Salt of the streams that draw each batch's rotation of the start directions.
const ROTATION_STREAM_SALT: u64 = 0x524F_5441_5445_5F53; // "ROTATE_S"

/// Per source, the random rotation of the stratified start directions of the
/// batch whose first stream index is `first_ray`: drawn from the stream of
/// (seed ⊕ salt, the source's first ray), so it depends on the batch and
/// the seed only, and batches are independent.
fn start_rotations(options: &TraceOptions, first_ray: u64, sources: usize) -> Vec<glam::DMat3> {
    (0..sources)
        .map(|s| {
            let mut rng = crate::random::Stream::new(
                options.seed ^ ROTATION_STREAM_SALT,
                first_ray + (s * options.rays) as u64,
            );
            let [a, b] = rng.uniform2();
            super::ray::uniform_rotation([a, b, rng.uniform()])
        })
        .collect()
}

/// A triangle's unit normal (its surface's where it is degenerate) and
/// extrusion axis: what its reflection frame is built from.
fn triangle_axes(room: &Room, t: &crate::room::Triangle) -> (DVec3, Option<DVec3>) {
    let surface = &room.surfaces[t.surface as usize];
    let normal = t.cross().try_normalize().unwrap_or(surface.normal);
    (normal, surface.profile_axis)
}

/// Fraction of the distance to the nearest wall a growing detection sphere
/// may reach (common practice, no source: keeps the whole sphere inside).
const LATE_RADIUS_WALL_FRACTION: f64 = 0.9;

/// Largest automatic late detection radius, m (our choice: beyond it the
/// spatial averaging of the late fluence spans more than a seat row or two).
pub const AUTO_LATE_RADIUS_M: f64 = 1.5;

/// The next-event estimator's receiver volumes, exact mirror chains and
/// their paths (per pair, in chain order), shared by every pass and batch.
/// Records each receiver's late radius in `receivers`.
fn prepare_next_event(
    room: &Room,
    options: &TraceOptions,
    settings: &NextEventSettings,
    bvh: &Bvh,
    sources: &[SourceInfo],
    receivers: &mut [ReceiverInfo],
) -> (NextEventScene, Vec<Vec<(Chain, SpecularPath)>>) {
    let speed_m_s = room.settings.air.speed_of_sound_m_s();
    let mut volumes = Vec::with_capacity(receivers.len());
    for r in receivers.iter_mut() {
        let early = DetectionSphere::new(r.position, r.radius_m);
        let wall_m = nearest_surface(room, r.position).map_or(f64::INFINITY, |(_, d)| d);
        let wanted = settings.late_radius_m.unwrap_or(AUTO_LATE_RADIUS_M);
        let late = wanted.min(LATE_RADIUS_WALL_FRACTION * wall_m);
        let volume = DetectionVolume::growing(early, settings.late_start_s * speed_m_s, late);
        r.late_radius_m = volume.largest().radius_m;
        volumes.push(volume);
    }
    let largest = volumes.iter().map(DetectionVolume::largest).collect();
    let frames: Vec<crate::geometry::Frame> = room
        .triangles
        .iter()
        .map(|t| {
            let (normal, axis) = triangle_axes(room, t);
            TriangleShading::new(normal, axis, 0, 0).frame
        })
        .collect();
    let normals: Vec<DVec3> = room
        .triangles
        .iter()
        .map(|t| triangle_axes(room, t).0)
        .collect();
    let source_points: Vec<DVec3> = sources.iter().map(|s| s.position).collect();
    let receiver_points: Vec<DVec3> = receivers.iter().map(|r| r.position).collect();
    let candidates = specular::find_candidates(
        room,
        bvh,
        &normals,
        &source_points,
        &receiver_points,
        settings.image_order,
        settings.pilot_rays,
        settings.pilot_capture_m,
        options.seed,
    );
    let mut exact_chains = Vec::with_capacity(candidates.len());
    let mut paths = Vec::with_capacity(candidates.len());
    for (pair, chains) in candidates.into_iter().enumerate() {
        let (s, r) = (pair / receivers.len(), pair % receivers.len());
        let valid: Vec<(Chain, SpecularPath)> = chains
            .iter()
            .filter_map(|c| {
                specular::trace_path(room, bvh, &frames, source_points[s], receiver_points[r], c)
                    .map(|p| (*c, p))
            })
            .collect();
        // Every candidate, valid at the receiver point or not, is evaluated
        // at the point (an invalid chain adds zero there); keeping only the
        // valid ones would be a selection by the point's own value and count
        // the invalid chains' beams through the sphere on top.
        exact_chains.push(chains.into_iter().collect());
        paths.push(valid);
    }
    (
        NextEventScene {
            volumes,
            largest,
            exact_chains,
            image_order: settings.image_order,
            rain: settings.rain,
        },
        paths,
    )
}

/// Traces chunk `chunk`, recording its receiver crossings.
fn trace_chunk<L: QueryLog + Default>(
    scene: &Scene<'_>,
    chunk: u64,
    total_rays: u64,
) -> (ArrivalLog, Tally, L) {
    let mut log = L::default();
    let mut arrivals = scene.new_arrival_log();
    let mut tally = Tally::default();
    let first = chunk * RAYS_PER_CHUNK as u64;
    let last = (first + RAYS_PER_CHUNK as u64).min(total_rays);
    scene.trace_rays(first, last, &mut arrivals, &mut tally, &mut log);
    (arrivals, tally, log)
}
