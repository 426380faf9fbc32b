//! One ray from its source to its end: the hot loop.

use glam::DVec3;

use super::options::Roulette;
use crate::accel::Bvh;
use crate::bands::Bands;
use crate::geometry::Frame;
use crate::law::ReflectionLaw;
use crate::random::Stream;
use crate::receiver::{DetectionSphere, Echogram};

/// Distance a reflected ray starts off the wall along the normal, m
/// (common practice, no source: keeps the next query from finding the same wall).
const SURFACE_OFFSET_M: f64 = 1e-7;

/// Everything the rays of one run share, read-only.
pub(super) struct Scene<'a> {
    pub bvh: &'a Bvh,
    /// Unit normal per triangle (either side; turned toward the ray at each hit).
    pub normals: Vec<DVec3>,
    /// Law index per triangle.
    pub triangle_law: Vec<u32>,
    /// Extrusion axis of the surface's diffuser profile per triangle, if any:
    /// the local frame's +X then runs along it (what 1D polar data need).
    pub triangle_axis: Vec<Option<DVec3>>,
    pub laws: Vec<Box<dyn ReflectionLaw>>,
    pub bands: usize,
    pub seed: u64,
    /// Stream index of ray 0 ([`super::TraceOptions::first_ray`]).
    pub first_ray: u64,
    pub rays_per_source: usize,
    /// 1/N in each used band, 0 elsewhere.
    pub start_weight: Bands,
    pub max_path_m: f64,
    pub speed_m_s: f64,
    /// Air energy attenuation per band, 1/m.
    pub air_per_m: Bands,
    /// Smallest of `air_per_m` over the used bands, 1/m.
    pub air_min_per_m: f64,
    pub has_air: bool,
    pub roulette: Option<Roulette>,
    pub spheres: Vec<DetectionSphere>,
    pub source_positions: Vec<DVec3>,
    /// Lateral axis per pair, source-major.
    pub lateral_axes: Vec<DVec3>,
}

/// Per-chunk counters, added in chunk order.
#[derive(Clone, Default)]
pub(super) struct Tally {
    pub segments: u64,
    pub reflections: u64,
    pub free_path_sum_m: f64,
    pub free_paths: u64,
    pub lost_rays: u64,
    pub roulette_stopped_rays: u64,
    pub absorbed_rays: u64,
    pub lost_energy_j: Bands,
    pub energy_at_end_j: Bands,
}

impl Tally {
    pub fn merge(&mut self, o: &Self) {
        self.segments += o.segments;
        self.reflections += o.reflections;
        self.free_path_sum_m += o.free_path_sum_m;
        self.free_paths += o.free_paths;
        self.lost_rays += o.lost_rays;
        self.roulette_stopped_rays += o.roulette_stopped_rays;
        self.absorbed_rays += o.absorbed_rays;
        self.lost_energy_j += o.lost_energy_j;
        self.energy_at_end_j += o.energy_at_end_j;
    }
}

impl Scene<'_> {
    /// e^(−m L) per used band.
    fn air_factor(&self, path_m: f64) -> Bands {
        if !self.has_air {
            return Bands::splat(1.0);
        }
        let mut f = Bands::ZERO;
        for b in 0..self.bands {
            f[b] = (-self.air_per_m[b] * path_m).exp();
        }
        f
    }

    /// Traces global ray `index` (source-major), adding to the echograms of its
    /// source (`echograms` holds that source's receivers in order) and telling
    /// `log` every closest-hit query it makes.
    pub fn trace_ray<L: QueryLog>(
        &self,
        index: u64,
        echograms: &mut [Echogram],
        tally: &mut Tally,
        log: &mut L,
    ) {
        let source = (index / self.rays_per_source as u64) as usize;
        let receivers = self.spheres.len();
        let axes = &self.lateral_axes[source * receivers..(source + 1) * receivers];
        let mut rng = Stream::new(self.seed, self.first_ray + index);
        let mut dir = uniform_sphere(rng.uniform2());
        let mut pos = self.source_positions[source];
        // Wall weights only; the air factor follows from the path length.
        let mut weight = self.start_weight;
        let start_max = weight.max_of(self.bands);
        let mut path_m = 0.0;
        let mut reflected = false;

        loop {
            let remaining = self.max_path_m - path_m;
            // One unbounded query per segment: a wall beyond the end of the
            // duration is still needed (lost ray or not, the free path in progress).
            log.record(pos, dir);
            let found = self.bvh.closest_hit(pos, dir, f64::INFINITY);
            let hit = found.filter(|h| h.distance_m < remaining);
            let segment_m = hit.map_or(remaining, |h| h.distance_m);
            tally.segments += 1;

            // Receivers count reflected sound only: the direct sound is added exactly.
            if reflected {
                for ((sphere, echogram), axis) in
                    self.spheres.iter().zip(echograms.iter_mut()).zip(axes)
                {
                    if let Some((mid_m, chord_m)) = sphere.chord(pos, dir, segment_m) {
                        let at_m = path_m + mid_m;
                        let fluence = weight
                            * self.air_factor(at_m)
                            * (chord_m * sphere.inverse_volume_per_m3);
                        let cos = dir.dot(*axis);
                        echogram.add(at_m / self.speed_m_s, fluence, cos * cos);
                    }
                }
            }
            path_m += segment_m;

            let Some(hit) = hit else {
                // Either the duration is used up or nothing lies ahead at all.
                let energy = weight * self.air_factor(path_m);
                match found {
                    None => {
                        tally.lost_rays += 1;
                        tally.lost_energy_j += energy;
                    }
                    Some(beyond) => {
                        tally.energy_at_end_j += energy;
                        // The free path in progress counts whole, past the
                        // duration: stopping at the first wall after c·T is a
                        // stopping time, so by Wald's identity the ratio of
                        // summed lengths to segments stays unbiased (dropping
                        // it would favour short paths, the inspection paradox).
                        if reflected {
                            tally.free_path_sum_m += beyond.distance_m;
                            tally.free_paths += 1;
                        }
                    }
                }
                return;
            };
            if reflected {
                tally.free_path_sum_m += segment_m;
                tally.free_paths += 1;
            }

            // Reflect in the local frame of the hit triangle, normal toward the ray.
            let triangle = hit.triangle as usize;
            pos += dir * segment_m;
            let mut normal = self.normals[triangle];
            if normal.dot(dir) > 0.0 {
                normal = -normal;
            }
            let frame = match self.triangle_axis[triangle] {
                Some(axis) => Frame::from_normal_and_tangent(normal, axis),
                None => Frame::from_normal(normal),
            };
            let wo = frame.to_local(-dir);
            let u_lobe = rng.uniform();
            let u_dir = rng.uniform2();
            let law = &self.laws[self.triangle_law[triangle] as usize];
            let Some(sample) = law.sample(wo, u_lobe, u_dir) else {
                tally.absorbed_rays += 1;
                return;
            };
            weight *= sample.weight;
            dir = frame.to_world(sample.wi).normalize();
            pos += normal * SURFACE_OFFSET_M;
            reflected = true;
            tally.reflections += 1;

            // Russian roulette on the largest band energy (cheap bound first).
            if let Some(rr) = self.roulette {
                let level = rr.threshold * start_max;
                let bound = weight.max_of(self.bands) * (-self.air_min_per_m * path_m).exp();
                if bound < level && (weight * self.air_factor(path_m)).max_of(self.bands) < level {
                    if rng.uniform() < rr.survival {
                        weight = weight * (1.0 / rr.survival);
                    } else {
                        tally.roulette_stopped_rays += 1;
                        return;
                    }
                }
            }
        }
    }
}

/// Receives every closest-hit query a ray makes (origin, unit direction; the
/// tracer asks for the nearest wall at any distance). The tracer uses [`NoLog`];
/// benchmarks record the queries to time the bare BVH on exactly the same rays.
pub trait QueryLog {
    /// One query.
    fn record(&mut self, origin: DVec3, direction: DVec3);
    /// Appends the log of a later chunk.
    fn append(&mut self, later: Self);
}

/// Records nothing; compiles away.
#[derive(Clone, Copy, Debug, Default)]
pub struct NoLog;

impl QueryLog for NoLog {
    #[inline(always)]
    fn record(&mut self, _origin: DVec3, _direction: DVec3) {}
    fn append(&mut self, _later: Self) {}
}

/// Keeps every query.
impl QueryLog for Vec<(DVec3, DVec3)> {
    fn record(&mut self, origin: DVec3, direction: DVec3) {
        self.push((origin, direction));
    }
    fn append(&mut self, mut later: Self) {
        Vec::append(self, &mut later);
    }
}

/// Uniform direction on the unit sphere: z = 1 − 2u₁, φ = 2π u₂ (Archimedes'
/// hat-box theorem; common practice).
fn uniform_sphere(u: [f64; 2]) -> DVec3 {
    let z = 1.0 - 2.0 * u[0];
    let r = (1.0 - z * z).max(0.0).sqrt();
    let phi = std::f64::consts::TAU * u[1];
    DVec3::new(r * phi.cos(), r * phi.sin(), z)
}
