//! One ray from its source to its end: the hot loop.

use std::collections::HashSet;

use glam::DVec3;

use super::options::Roulette;
use super::specular::Chain;
use crate::accel::{Bvh, Hit};
use crate::bands::Bands;
use crate::geometry::Frame;
use crate::law::{Lobe, ReflectionLaw};
use crate::random::Stream;
use crate::receiver::{ArrivalLog, DetectionSphere, DetectionVolume, SphereSet};

/// Distance a reflected ray starts off the wall along the normal, m
/// (common practice, no source: keeps the next query from finding the same wall).
const SURFACE_OFFSET_M: f64 = 1e-7;

/// Everything the rays of one run share, read-only.
pub(super) struct Scene<'a> {
    pub bvh: &'a Bvh,
    /// Reflection data per triangle.
    pub shading: Vec<TriangleShading>,
    pub laws: Vec<Box<dyn ReflectionLaw>>,
    /// The bands this pass carries (the others keep weight 0).
    pub group: Vec<usize>,
    pub seed: u64,
    /// Stream index of ray 0 ([`super::TraceOptions::first_ray`]).
    pub first_ray: u64,
    pub rays_per_source: usize,
    /// 1/N in each used band, 0 elsewhere.
    pub start_weight: Bands,
    pub max_path_m: f64,
    pub speed_m_s: f64,
    /// Echogram shape: number of bins and bin width, s.
    pub bins: usize,
    pub bin_s: f64,
    /// Air energy attenuation per band, 1/m.
    pub air_per_m: Bands,
    /// Smallest of `air_per_m` over the used bands, 1/m.
    pub air_min_per_m: f64,
    pub has_air: bool,
    pub roulette: Option<Roulette>,
    /// The receivers' detection spheres.
    pub spheres: SphereSet,
    /// Lateral axis per pair, source-major.
    pub lateral_axes: Vec<DVec3>,
    pub source_positions: Vec<DVec3>,
    /// Per source, the random rotation of this batch's stratified start
    /// directions; empty for independent uniform directions.
    pub start_rotations: Vec<glam::DMat3>,
    /// The next-event estimator's data; `None` for detection spheres alone.
    pub next_event: Option<&'a NextEventScene>,
}

/// What the next-event estimator needs besides the scene (see the
/// [module docs](super)).
pub(super) struct NextEventScene {
    /// Each receiver's detection volume over time.
    pub volumes: Vec<DetectionVolume>,
    /// The largest sphere of each volume (the cone that next-event samples).
    pub largest: Vec<DetectionSphere>,
    /// Per pair (source-major): the mirror chains evaluated exactly.
    pub exact_chains: Vec<HashSet<Chain>>,
    /// Highest order among them (0: none).
    pub image_order: usize,
    /// Whether reflections score by next-event estimation.
    pub rain: bool,
}

/// Salt that gives each ray a second stream for its next-event directions,
/// so that the traced paths are those of the sphere estimator.
const NEXT_EVENT_STREAM_SALT: u64 = 0x4E45_5854_5F45_5645; // "NEXT_EVE"

/// What a reflection needs of the triangle hit: its local frame (normal =
/// the triangle's unit normal, on one side; the tracer turns it toward the
/// arriving ray) and its law.
pub(super) struct TriangleShading {
    pub frame: Frame,
    pub law: u32,
    /// Index of the room surface the triangle belongs to.
    pub surface: u32,
}

impl TriangleShading {
    /// The frame of the triangle with unit normal `normal` and, for a
    /// profiled surface, extrusion axis `axis` (its +X then runs along it,
    /// what 1D polar data need).
    pub fn new(normal: DVec3, axis: Option<DVec3>, law: u32, surface: u32) -> Self {
        let frame = match axis {
            Some(axis) => Frame::from_normal_and_tangent(normal, axis),
            None => Frame::from_normal(normal),
        };
        Self {
            frame,
            law,
            surface,
        }
    }

    /// The frame whose normal faces a ray arriving along `dir` (see [`facing`]).
    #[inline]
    pub fn facing(&self, dir: DVec3) -> Frame {
        facing(&self.frame, dir)
    }
}

/// `frame` turned so that its normal faces sound travelling along `dir`:
/// (tangent, −bitangent, −normal) for the other side, bit for bit what
/// `Frame::from_normal(−normal)` and `from_normal_and_tangent(−normal, axis)`
/// compute (every product and sum there only changes sign).
#[inline]
pub(super) fn facing(frame: &Frame, dir: DVec3) -> Frame {
    if frame.normal.dot(dir) > 0.0 {
        Frame {
            tangent: frame.tangent,
            bitangent: -frame.bitangent,
            normal: -frame.normal,
        }
    } else {
        *frame
    }
}

/// Per-chunk counters, added in chunk order.
///
/// A tally can defer its floating-point sums ([`Tally::deferred`]): it then
/// keeps each addition in order instead of summing, so that appending it to
/// another tally ([`Tally::append`]) gives exactly the sums of one tally
/// that saw all the additions in sequence.
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
    /// The floating-point additions, in order, when deferred.
    deferred: Option<Box<Deferred>>,
}

/// The deferred floating-point additions of a [`Tally`], one list per sum
/// (each sum depends only on the order of its own additions).
#[derive(Clone, Default)]
struct Deferred {
    free_paths_m: Vec<f64>,
    lost_energy_j: Vec<Bands>,
    energy_at_end_j: Vec<Bands>,
}

impl Tally {
    /// A tally that keeps its floating-point additions for [`Tally::append`].
    pub fn deferred() -> Self {
        Self {
            deferred: Some(Box::default()),
            ..Self::default()
        }
    }

    fn add_free_path(&mut self, length_m: f64) {
        self.free_paths += 1;
        self.add_free_path_length(length_m);
    }

    fn add_free_path_length(&mut self, length_m: f64) {
        match &mut self.deferred {
            Some(d) => d.free_paths_m.push(length_m),
            None => self.free_path_sum_m += length_m,
        }
    }

    fn add_lost_energy(&mut self, energy_j: Bands) {
        match &mut self.deferred {
            Some(d) => d.lost_energy_j.push(energy_j),
            None => self.lost_energy_j += energy_j,
        }
    }

    fn add_energy_at_end(&mut self, energy_j: Bands) {
        match &mut self.deferred {
            Some(d) => d.energy_at_end_j.push(energy_j),
            None => self.energy_at_end_j += energy_j,
        }
    }

    /// Adds the counts of `later` and replays its deferred additions, as if
    /// this tally had seen them after its own.
    pub fn append(&mut self, later: Self) {
        self.segments += later.segments;
        self.reflections += later.reflections;
        self.free_paths += later.free_paths;
        self.lost_rays += later.lost_rays;
        self.roulette_stopped_rays += later.roulette_stopped_rays;
        self.absorbed_rays += later.absorbed_rays;
        debug_assert!(
            later.free_path_sum_m == 0.0
                && later.lost_energy_j == Bands::ZERO
                && later.energy_at_end_j == Bands::ZERO
        );
        if let Some(d) = later.deferred {
            for m in d.free_paths_m {
                self.add_free_path_length(m);
            }
            for e in d.lost_energy_j {
                self.add_lost_energy(e);
            }
            for e in d.energy_at_end_j {
                self.add_energy_at_end(e);
            }
        }
    }

    /// Adds the counts and sums of a whole later chunk.
    pub fn merge(&mut self, o: &Self) {
        debug_assert!(o.deferred.is_none());
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

/// A lower bound below every computed e^(−x) for x < 1, relative: 1 − x
/// never exceeds e^(−x), and this factor covers the rounding of 1 − x and
/// of the library's exponential (within 2 ulp).
const EXP_LOWER_BOUND_FACTOR: f64 = 1.0 - 1.0 / (1u64 << 50) as f64;

/// The largest of the band values, for weights (never negative; unused
/// bands hold 0): the same as `Bands::max_of(bands)` for them, as a short
/// tree of comparisons that compiles to a few `maxpd`.
#[inline]
fn largest_weight(w: &Bands) -> f64 {
    let m = |a: f64, b: f64| if a > b { a } else { b };
    let x = &w.0;
    const _: () = assert!(crate::bands::MAX_BANDS == 8);
    let half = [m(x[0], x[4]), m(x[1], x[5]), m(x[2], x[6]), m(x[3], x[7])];
    m(m(half[0], half[2]), m(half[1], half[3]))
}

impl Scene<'_> {
    /// e^(−m L) per band of this pass (1 in the others, whose weights are 0).
    fn air_factor(&self, path_m: f64) -> Bands {
        let mut f = Bands::splat(1.0);
        if self.has_air {
            for &b in &self.group {
                f[b] = (-self.air_per_m[b] * path_m).exp();
            }
        }
        f
    }

    /// Traces rays `first..last` (global, source-major indices), recording
    /// their receiver crossings in `arrivals` (echogram index = pair index,
    /// source-major), counting in `tally` and telling `log` every closest-hit
    /// query, in ray order.
    ///
    /// The rays run as [`STREAMS`] interleaved streams, each over one run of
    /// consecutive rays, with exactly the results of tracing them one after
    /// the other (start, then query and advance until the ray ends): each
    /// stream keeps its own arrivals, counters and query log, and the later
    /// streams' are appended to the first's in order. While one ray waits for
    /// its closest hit, the processor works on another, which a single chain
    /// of dependent queries does not allow.
    pub fn trace_rays<L: QueryLog + Default>(
        &self,
        first: u64,
        last: u64,
        arrivals: &mut ArrivalLog,
        tally: &mut Tally,
        log: &mut L,
    ) {
        // Stream k traces the k-th of STREAMS consecutive runs of rays.
        let bound = |k: u64| first + (last - first) * k / STREAMS as u64;
        let mut streams: [RayStream<L>; STREAMS] = std::array::from_fn(|k| RayStream {
            next: bound(k as u64),
            last: bound(k as u64 + 1),
            ray: None,
            arrivals: self.new_arrival_log(),
            tally: if k == 0 {
                std::mem::take(tally)
            } else {
                Tally::deferred()
            },
            log: L::default(),
        });
        streams[0].arrivals = std::mem::take(arrivals);
        streams[0].log = std::mem::take(log);
        for stream in &mut streams {
            stream.refill(self);
        }
        loop {
            let mut found = [None; STREAMS];
            for (stream, found) in streams.iter_mut().zip(&mut found) {
                *found = stream.ray.as_ref().map(|r| self.query(r, &mut stream.log));
            }
            if found.iter().all(Option::is_none) {
                break;
            }
            for (stream, found) in streams.iter_mut().zip(found) {
                stream.step(self, found);
            }
        }
        let [first_stream, later @ ..] = streams;
        *arrivals = first_stream.arrivals;
        *tally = first_stream.tally;
        *log = first_stream.log;
        for stream in later {
            arrivals.append(stream.arrivals);
            tally.append(stream.tally);
            log.append(stream.log);
        }
    }

    /// An empty arrival log of the kind this scene's estimator needs: dense
    /// echograms when next-event scoring adds an arrival per reflection and
    /// receiver, the sparse list otherwise (a dense log per chunk costs more
    /// to clear and merge than the few sphere crossings it would hold).
    pub fn new_arrival_log(&self) -> ArrivalLog {
        match self.next_event {
            Some(ne) if ne.rain => {
                ArrivalLog::dense(self.lateral_axes.len(), self.bins, self.bin_s)
            }
            _ => ArrivalLog::new(),
        }
    }

    /// Ray `index` (source-major) at its source, before its first query.
    fn start_ray(&self, index: u64) -> RayState {
        let source = (index / self.rays_per_source as u64) as usize;
        let mut rng = Stream::new(self.seed, self.first_ray + index);
        let u = rng.uniform2();
        let dir = match self.start_rotations.get(source) {
            // Stratified: point j of a randomly rotated spherical Fibonacci set.
            Some(rotation) => {
                let j = index % self.rays_per_source as u64;
                *rotation * fibonacci_sphere(j, self.rays_per_source as u64)
            }
            None => uniform_sphere(u),
        };
        // Wall weights only; the air factor follows from the path length.
        let weight = self.start_weight;
        RayState {
            rng,
            rain_rng: Stream::new(self.seed ^ NEXT_EVENT_STREAM_SALT, self.first_ray + index),
            counts: true,
            chain: Some(Chain::default()),
            pos: self.source_positions[source],
            dir,
            weight,
            start_max: largest_weight(&weight),
            path_m: 0.0,
            reflected: false,
            first_pair: source * self.spheres.spheres().len(),
        }
    }

    /// The closest-hit query for the ray's next segment. One unbounded query
    /// per segment: a wall beyond the end of the duration is still needed
    /// (lost ray or not, the free path in progress).
    #[inline]
    fn query<L: QueryLog>(&self, ray: &RayState, log: &mut L) -> Option<Hit> {
        log.record(ray.pos, ray.dir);
        self.bvh.closest_hit(ray.pos, ray.dir, f64::INFINITY)
    }

    /// Moves the ray along its segment, whose query answered `found`, and
    /// reflects it; false when the ray has ended.
    #[inline]
    fn advance(
        &self,
        ray: &mut RayState,
        found: Option<Hit>,
        arrivals: &mut ArrivalLog,
        tally: &mut Tally,
    ) -> bool {
        let remaining = self.max_path_m - ray.path_m;
        let hit = found.filter(|h| h.distance_m < remaining);
        let segment_m = hit.map_or(remaining, |h| h.distance_m);
        tally.segments += 1;
        let (pos, dir, path_m) = (ray.pos, ray.dir, ray.path_m);

        // Receivers count reflected sound only: the direct sound is added exactly.
        if let (true, Some(ne)) = (ray.reflected && ray.counts, self.next_event) {
            self.cross_volumes(ne, ray, segment_m, arrivals);
        } else if ray.reflected && ray.counts {
            let weight = ray.weight;
            let first_pair = ray.first_pair;
            self.spheres
                .for_each_crossing(pos, dir, segment_m, |k, sphere, mid_m, chord_m| {
                    let at_m = path_m + mid_m;
                    let fluence =
                        weight * self.air_factor(at_m) * (chord_m * sphere.inverse_volume_per_m3);
                    let cos = dir.dot(self.lateral_axes[first_pair + k]);
                    let time_s = at_m / self.speed_m_s;
                    arrivals.add(
                        first_pair + k,
                        self.bins,
                        self.bin_s,
                        time_s,
                        fluence,
                        cos * cos,
                    );
                });
        }
        ray.path_m += segment_m;

        let Some(hit) = hit else {
            // Either the duration is used up or nothing lies ahead at all.
            let energy = ray.weight * self.air_factor(ray.path_m);
            match found {
                None => {
                    tally.lost_rays += 1;
                    tally.add_lost_energy(energy);
                }
                Some(beyond) => {
                    tally.add_energy_at_end(energy);
                    // The free path in progress counts whole, past the
                    // duration: stopping at the first wall after c·T is a
                    // stopping time, so by Wald's identity the ratio of
                    // summed lengths to segments stays unbiased (dropping
                    // it would favour short paths, the inspection paradox).
                    if ray.reflected {
                        tally.add_free_path(beyond.distance_m);
                    }
                }
            }
            return false;
        };
        if ray.reflected {
            tally.add_free_path(segment_m);
        }

        // Reflect in the local frame of the hit triangle, normal toward the ray.
        let shading = &self.shading[hit.triangle as usize];
        let frame = shading.facing(dir);
        let wo = frame.to_local(-dir);
        let u_lobe = ray.rng.uniform();
        let u_dir = ray.rng.uniform2();
        let law = &self.laws[shading.law as usize];
        if let Some(ne) = self.next_event.filter(|ne| ne.rain) {
            let point = pos + dir * segment_m + frame.normal * SURFACE_OFFSET_M;
            self.rain(ne, ray, point, &frame, wo, law.as_ref(), arrivals);
        }
        let Some(sample) = law.sample(wo, u_lobe, u_dir) else {
            tally.absorbed_rays += 1;
            return false;
        };
        if let Some(ne) = self.next_event {
            // Density lobes were counted by next-event estimation above.
            ray.counts = !ne.rain || sample.pdf.is_none();
            ray.chain = match sample.lobe {
                Lobe::Mirror => ray.chain.and_then(|c| c.then(shading.surface)),
                _ => None,
            };
        }
        ray.weight *= sample.weight;
        ray.dir = frame.to_world(sample.wi).normalize();
        ray.pos = pos + dir * segment_m + frame.normal * SURFACE_OFFSET_M;
        ray.reflected = true;
        tally.reflections += 1;

        // Russian roulette on the largest band energy (cheap bounds first).
        if let Some(rr) = self.roulette {
            let level = rr.threshold * ray.start_max;
            let max_weight = largest_weight(&ray.weight);
            // While max_weight · (1 − x) is at or above the level, so is the
            // bound with e^(−x) (x = air_min · path): the exponential is
            // needed only near the level, and the decision is the same.
            let x = self.air_min_per_m * ray.path_m;
            if max_weight * ((1.0 - x) * EXP_LOWER_BOUND_FACTOR) < level {
                let bound = max_weight * (-self.air_min_per_m * ray.path_m).exp();
                if bound < level
                    && largest_weight(&(ray.weight * self.air_factor(ray.path_m))) < level
                {
                    if ray.rng.uniform() < rr.survival {
                        ray.weight = ray.weight * (1.0 / rr.survival);
                    } else {
                        tally.roulette_stopped_rays += 1;
                        return false;
                    }
                }
            }
        }
        true
    }
}

impl Scene<'_> {
    /// Receiver crossings of the ray's current segment under next-event
    /// estimation: each receiver's volume, window by window, except the
    /// receivers whose sphere this mirror chain reaches exactly (see
    /// [`super::specular`]).
    fn cross_volumes(
        &self,
        ne: &NextEventScene,
        ray: &RayState,
        segment_m: f64,
        arrivals: &mut ArrivalLog,
    ) {
        let (pos, dir, path_m) = (ray.pos, ray.dir, ray.path_m);
        for (k, volume) in ne.volumes.iter().enumerate() {
            if ne.largest[k].chord(pos, dir, segment_m).is_none() {
                continue;
            }
            let pair = ray.first_pair + k;
            if let Some(chain) = ray.chain {
                if chain.order() <= ne.image_order && ne.exact_chains[pair].contains(&chain) {
                    continue;
                }
            }
            let cos = dir.dot(self.lateral_axes[pair]);
            volume.for_each_chord(pos, dir, segment_m, path_m, |mid_m, chord_m, inv_volume| {
                let at_m = path_m + mid_m;
                let fluence = ray.weight * self.air_factor(at_m) * (chord_m * inv_volume);
                arrivals.add(
                    pair,
                    self.bins,
                    self.bin_s,
                    at_m / self.speed_m_s,
                    fluence,
                    cos * cos,
                );
            });
        }
    }

    /// Next-event estimation ("diffuse rain") at a reflection at `point`:
    /// for each receiver of the ray's source, one direction ω uniform in the
    /// cone of the largest sphere the path can reach in time (solid angle Ω,
    /// [`DetectionVolume::reachable_sphere`]; spheres of other windows score
    /// nothing along it) scores
    /// W · eval(wo, ω) · Ω · Σ_windows e^(−m L) ℓ_j / V_j, with ℓ_j the chord
    /// of window j's sphere along ω, clipped to the window's path lengths,
    /// to the rest of the duration and at the first wall.
    ///
    /// Unbiased for what the sphere estimator would count on the next
    /// segment through the law's density lobes: by the law's contract
    /// (`eval`), E[weight · g(wi); density lobe] = ∫ eval(wo, ω) g(ω) dω for
    /// any g, here g = the segment's sphere score, which is zero outside the
    /// cone; a uniform ω in the cone estimates ∫_cone f g dω as Ω f(ω) g(ω).
    /// The continuing ray therefore does not count crossings after a density
    /// lobe (`RayState::counts`).
    #[allow(clippy::too_many_arguments)]
    fn rain(
        &self,
        ne: &NextEventScene,
        ray: &mut RayState,
        point: DVec3,
        frame: &Frame,
        wo: DVec3,
        law: &dyn ReflectionLaw,
        arrivals: &mut ArrivalLog,
    ) {
        let remaining_m = self.max_path_m - ray.path_m;
        for (k, volume) in ne.volumes.iter().enumerate() {
            let to_centre = ne.largest[k].centre - point;
            let distance_m = to_centre.length();
            // The cone of the largest sphere this path can reach in time:
            // a cone wider than needed only wastes samples.
            let Some(big) = volume.reachable_sphere(ray.path_m, distance_m) else {
                continue;
            };
            let big = &big;
            // A sphere wholly behind the surface receives nothing.
            if to_centre.dot(frame.normal) <= -big.radius_m {
                continue;
            }
            let u = ray.rain_rng.uniform2();
            let (omega, solid_angle) = if distance_m > big.radius_m {
                let axis = to_centre / distance_m;
                let sin_b = big.radius_m / distance_m;
                let cos_b = (1.0 - sin_b * sin_b).max(0.0).sqrt();
                let cos_t = 1.0 - u[0] * (1.0 - cos_b);
                let sin_t = (1.0 - cos_t * cos_t).max(0.0).sqrt();
                let phi = std::f64::consts::TAU * u[1];
                let cone = Frame::from_normal(axis);
                let local = DVec3::new(sin_t * phi.cos(), sin_t * phi.sin(), cos_t);
                (
                    cone.to_world(local).normalize(),
                    std::f64::consts::TAU * (1.0 - cos_b),
                )
            } else {
                (uniform_sphere(u), 4.0 * std::f64::consts::PI)
            };
            let wi = frame.to_local(omega);
            if wi.z <= 0.0 {
                continue;
            }
            let f = law.eval(wo, wi);
            let score = ray.weight * f;
            if largest_weight(&score) <= 0.0 {
                continue;
            }
            let Some((mid, chord_len)) = big.chord(point, omega, remaining_m) else {
                continue;
            };
            let leave_m = mid + 0.5 * chord_len;
            let end_m = match self.bvh.closest_hit(point, omega, leave_m) {
                Some(wall) if wall.distance_m < leave_m => wall.distance_m,
                _ => remaining_m,
            };
            let pair = ray.first_pair + k;
            let cos = omega.dot(self.lateral_axes[pair]);
            let length_m = end_m.min(remaining_m);
            ne.volumes[k].for_each_chord(
                point,
                omega,
                length_m,
                ray.path_m,
                |mid_m, chord_m, inv_volume| {
                    let at_m = ray.path_m + mid_m;
                    let fluence =
                        score * self.air_factor(at_m) * (chord_m * inv_volume * solid_angle);
                    arrivals.add(
                        pair,
                        self.bins,
                        self.bin_s,
                        at_m / self.speed_m_s,
                        fluence,
                        cos * cos,
                    );
                },
            );
        }
    }
}

/// A ray in flight.
struct RayState {
    rng: Stream,
    /// The stream of its next-event directions (never touches `rng`).
    rain_rng: Stream,
    /// Whether the current segment counts receiver crossings (false after a
    /// density lobe under next-event estimation).
    counts: bool,
    /// The surfaces of its reflections so far while all were mirror lobes
    /// (`None` once one was not, or past the longest chain kept).
    chain: Option<Chain>,
    pos: DVec3,
    dir: DVec3,
    /// Wall weights only; the air factor follows from the path length.
    weight: Bands,
    /// Largest band weight at the start (the roulette's reference).
    start_max: f64,
    path_m: f64,
    reflected: bool,
    /// Index of the ray's first pair (its source's first receiver).
    first_pair: usize,
}

/// Rays traced side by side in one thread by [`Scene::trace_rays`].
const STREAMS: usize = 2;

/// One of the streams of [`Scene::trace_rays`]: rays `next..last` still to
/// start, the ray in flight, and what they record.
struct RayStream<L> {
    next: u64,
    last: u64,
    ray: Option<RayState>,
    arrivals: ArrivalLog,
    tally: Tally,
    log: L,
}

impl<L: QueryLog> RayStream<L> {
    /// Starts the next ray if none is in flight and any is left.
    fn refill(&mut self, scene: &Scene<'_>) {
        if self.ray.is_none() && self.next < self.last {
            self.ray = Some(scene.start_ray(self.next));
            self.next += 1;
        }
    }

    /// Advances the ray in flight past the answer `found` to its query.
    #[inline]
    fn step(&mut self, scene: &Scene<'_>, found: Option<Option<Hit>>) {
        if let (Some(ray), Some(found)) = (self.ray.as_mut(), found) {
            if !scene.advance(ray, found, &mut self.arrivals, &mut self.tally) {
                self.ray = None;
                self.refill(scene);
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

/// Point `j` of the `n`-point spherical Fibonacci set: z = 1 − (2j + 1)/n,
/// φ = 2π j / Φ (Φ the golden ratio); equal-area strata (González,
/// Math. Geosci. 42 (2010) 49–64).
pub(super) fn fibonacci_sphere(j: u64, n: u64) -> DVec3 {
    const INV_GOLDEN: f64 = 0.618_033_988_749_894_8;
    let z = 1.0 - (2 * j + 1) as f64 / n as f64;
    let r = (1.0 - z * z).max(0.0).sqrt();
    let phi = std::f64::consts::TAU * (j as f64 * INV_GOLDEN).fract();
    DVec3::new(r * phi.cos(), r * phi.sin(), z)
}

/// A uniformly distributed random rotation from three uniform numbers: the
/// unit quaternion of Shoemake, "Uniform random rotations", Graphics Gems
/// III (1992). Rotating any fixed direction by it gives a uniform direction.
pub(super) fn uniform_rotation(u: [f64; 3]) -> glam::DMat3 {
    let tau = std::f64::consts::TAU;
    let (a, b) = ((1.0 - u[0]).sqrt(), u[0].sqrt());
    let q = glam::DQuat::from_xyzw(
        a * (tau * u[1]).sin(),
        a * (tau * u[1]).cos(),
        b * (tau * u[2]).sin(),
        b * (tau * u[2]).cos(),
    );
    glam::DMat3::from_quat(q.normalize())
}

/// Uniform direction on the unit sphere: z = 1 − 2u₁, φ = 2π u₂ (Archimedes'
/// hat-box theorem; common practice).
fn uniform_sphere(u: [f64; 2]) -> DVec3 {
    let z = 1.0 - 2.0 * u[0];
    let r = (1.0 - z * z).max(0.0).sqrt();
    let phi = std::f64::consts::TAU * u[1];
    DVec3::new(r * phi.cos(), r * phi.sin(), z)
}
