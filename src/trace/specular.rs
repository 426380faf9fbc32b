//! Exact early specular paths: image sources found by pilot rays, checked
//! leg by leg and evaluated exactly.
//!
//! # Method
//! - **Candidates.** Pilot rays (own random streams, independent of the traced
//!   rays) leave each source uniformly and reflect as mirrors at every wall up
//!   to the image order K. Whenever a pilot segment after k ≥ 1 reflections
//!   passes within the capture radius of a receiver, the sequence of surfaces
//!   it reflected from becomes a candidate chain of that source–receiver pair.
//! - **Exact evaluation.** For each candidate chain (σ₁ … σ_k) the source is
//!   mirrored in the planes of σ₁ … σ_k (the image-source construction of
//!   Allen & Berkley, JASA 65 (1979), for any planar surfaces as in Borish,
//!   JASA 75 (1984)). The path is rebuilt backwards from the receiver and
//!   accepted only when each leg's first wall is the expected surface at the
//!   expected point and the last leg reaches the source unobstructed. It adds
//!   Π mirror_fraction(θ_i) · e^(−mL) / (4π L²) at t = L / c, with each
//!   surface's own law at its own incidence angle.
//! - **No double counting.** A traced ray whose reflections so far were all
//!   mirror lobes, along a chain that is a candidate of the pair, does not
//!   count that receiver's sphere: its expected contribution is what the
//!   chain's image source adds (the mirror lobe is chosen with the
//!   probability its weight divides by), up to the difference between the
//!   point and the sphere's mean. This holds for every candidate, valid at
//!   the receiver point or not: an invalid chain adds zero at the point.
//!   Skipping only the valid ones would select chains by the point's own
//!   value and add the sphere's share of the invalid ones' beams on top
//!   (a wall cut into patches shows one image through several patches; in
//!   the demo hall G came out about 0.5 dB high that way, see
//!   `tests/trace_next_event.rs`). Chains that are not candidates keep
//!   sphere detection. The candidate set comes from independent rays, so it
//!   is a fixed set as far as the traced rays are concerned, and the sum stays
//!   unbiased whatever pilot rays found or missed; missing a chain only costs
//!   variance.
//! - **What it measures.** An image source gives the fluence at the receiver
//!   point, where a sphere gives the mean over its volume: the two differ by
//!   the factor 1 + a²/(5L²) for a sphere of radius a at path length L and
//!   where a beam's edge crosses the sphere.

use std::collections::BTreeSet;
use std::f64::consts::PI;

use glam::DVec3;
use rayon::prelude::*;

use crate::accel::Bvh;
use crate::bands::Bands;
use crate::geometry::Frame;
use crate::random::Stream;
use crate::receiver::DetectionSphere;
use crate::room::Room;

use super::options::MAX_IMAGE_ORDER;
use super::ray::{facing, Scene};
use super::result::PairEchogram;

/// The surfaces a mirror chain reflected from, in order (a fixed-size key).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord, Default)]
pub(super) struct Chain {
    len: u8,
    surfaces: [u32; MAX_IMAGE_ORDER],
}

impl Chain {
    /// The chain one reflection longer; `None` past [`MAX_IMAGE_ORDER`].
    #[inline]
    pub fn then(self, surface: u32) -> Option<Self> {
        let n = self.len as usize;
        if n >= MAX_IMAGE_ORDER {
            return None;
        }
        let mut next = self;
        next.surfaces[n] = surface;
        next.len += 1;
        Some(next)
    }

    /// Number of reflections.
    #[inline]
    pub fn order(&self) -> usize {
        self.len as usize
    }

    fn surfaces(&self) -> &[u32] {
        &self.surfaces[..self.len as usize]
    }
}

/// Salt that separates the pilot rays' streams from the traced rays'.
const PILOT_STREAM_SALT: u64 = 0x5049_4C4F_545F_5241; // "PILOT_RA"

/// Distance a pilot ray starts off the wall, m (as the traced rays).
const OFFSET_M: f64 = 1e-7;

/// Finds the candidate chains of every pair with `pilot_rays` pilot rays per
/// source (see the module docs). Deterministic: each pilot ray has its own
/// stream and the sets are unions, which do not depend on order. Returns
/// the candidate chains per source–receiver pair (source-major), sorted.
#[allow(clippy::too_many_arguments)]
pub(super) fn find_candidates(
    room: &Room,
    bvh: &Bvh,
    normals: &[DVec3],
    sources: &[DVec3],
    receivers: &[DVec3],
    order: usize,
    pilot_rays: usize,
    capture_m: f64,
    seed: u64,
) -> Vec<Vec<Chain>> {
    let capture: Vec<DetectionSphere> = receivers
        .iter()
        .map(|&r| DetectionSphere::new(r, capture_m))
        .collect();
    let mut per_pair: Vec<BTreeSet<Chain>> = vec![BTreeSet::new(); sources.len() * receivers.len()];
    if order == 0 || pilot_rays == 0 {
        return vec![Vec::new(); per_pair.len()];
    }
    const CHUNK: usize = 1024;
    for (si, &source) in sources.iter().enumerate() {
        let chunks = pilot_rays.div_ceil(CHUNK);
        let found: Vec<Vec<BTreeSet<Chain>>> = (0..chunks)
            .into_par_iter()
            .map(|c| {
                let mut sets = vec![BTreeSet::new(); receivers.len()];
                let first = c * CHUNK;
                let last = (first + CHUNK).min(pilot_rays);
                for i in first..last {
                    let index = (si * pilot_rays + i) as u64;
                    let mut rng = Stream::new(seed ^ PILOT_STREAM_SALT, index);
                    let mut pos = source;
                    let mut dir = uniform_sphere(rng.uniform2());
                    let mut chain = Chain::default();
                    for k in 0..=order {
                        let hit = bvh.closest_hit(pos, dir, f64::INFINITY);
                        let length = hit.map_or(f64::INFINITY, |h| h.distance_m);
                        if k >= 1 {
                            for (ri, s) in capture.iter().enumerate() {
                                if s.chord(pos, dir, length).is_some() {
                                    sets[ri].insert(chain);
                                }
                            }
                        }
                        let Some(hit) = hit else { break };
                        if k == order {
                            break;
                        }
                        let tri = hit.triangle as usize;
                        let surface = room.triangles[tri].surface;
                        let Some(next) = chain.then(surface) else {
                            break;
                        };
                        chain = next;
                        let n = normals[tri];
                        let n = if n.dot(dir) > 0.0 { -n } else { n };
                        pos = pos + dir * hit.distance_m + n * OFFSET_M;
                        dir = (dir - 2.0 * dir.dot(n) * n).normalize();
                    }
                }
                sets
            })
            .collect();
        for sets in found {
            for (ri, set) in sets.into_iter().enumerate() {
                per_pair[si * receivers.len() + ri].extend(set);
            }
        }
    }
    per_pair
        .into_iter()
        .map(|set| set.into_iter().collect())
        .collect()
}

/// One exact specular path.
pub(super) struct SpecularPath {
    /// Total length L, m.
    pub length_m: f64,
    /// Unit direction of the last leg, toward the receiver.
    pub arrival_dir: DVec3,
    /// For each reflection: the triangle hit and the local arriving direction
    /// `wo` in that triangle's frame (normal toward the arriving sound).
    pub reflections: Vec<(u32, DVec3)>,
}

/// Rebuilds the path of `chain` from `source` to `receiver` and checks every
/// leg (see the module docs); `None` when the chain gives no valid path.
pub(super) fn trace_path(
    room: &Room,
    bvh: &Bvh,
    frames: &[Frame],
    source: DVec3,
    receiver: DVec3,
    chain: &Chain,
) -> Option<SpecularPath> {
    let surfaces = chain.surfaces();
    // Image sources I_0 = source, I_i = I_{i-1} mirrored in plane σ_i.
    let mut images = Vec::with_capacity(surfaces.len() + 1);
    images.push(source);
    for &s in surfaces {
        let surface = &room.surfaces[s as usize];
        let n = surface.normal;
        let offset = n.dot(surface.vertices[0]);
        let prev = *images.last()?;
        images.push(prev - 2.0 * (prev.dot(n) - offset) * n);
    }
    // Walk back from the receiver: leg i goes from the current point toward
    // image I_i and must first meet surface σ_i on its plane.
    let mut point = receiver;
    let mut leaving: Option<u32> = None;
    let mut hits: Vec<(u32, DVec3)> = Vec::with_capacity(surfaces.len());
    let mut length_m = 0.0;
    let arrival_dir = (receiver - images[surfaces.len()]).try_normalize()?;
    for i in (0..surfaces.len()).rev() {
        let surface = &room.surfaces[surfaces[i] as usize];
        let n = surface.normal;
        let offset = n.dot(surface.vertices[0]);
        let to_image = images[i + 1] - point;
        let dir = to_image.try_normalize()?;
        let denom = dir.dot(n);
        if denom.abs() < 1e-12 {
            return None;
        }
        let t = (offset - point.dot(n)) / denom;
        if t.is_nan() || t <= 0.0 {
            return None;
        }
        let hit = match leaving {
            None => bvh.closest_hit(point, dir, t * (1.0 + 1e-9) + 1e-9),
            Some(s) => bvh.closest_hit_leaving(point, dir, t * (1.0 + 1e-9) + 1e-9, s),
        }?;
        let tri = &room.triangles[hit.triangle as usize];
        if tri.surface != surfaces[i] || (hit.distance_m - t).abs() > 1e-7 * (1.0 + t) {
            return None;
        }
        // The sound travels toward the receiver, i.e. along −dir.
        let travel = -dir;
        let frame = facing(&frames[hit.triangle as usize], travel);
        hits.push((hit.triangle, frame.to_local(-travel)));
        point += dir * hit.distance_m;
        length_m += hit.distance_m;
        leaving = Some(surfaces[i]);
    }
    // The last leg, to the source, must be free.
    let to_source = source - point;
    let distance = to_source.length();
    let dir = to_source / distance;
    let blocked = match leaving {
        Some(s) => bvh.occluded_leaving(point, dir, distance, s),
        None => bvh.occluded(point, dir, distance),
    };
    if blocked {
        return None;
    }
    length_m += distance;
    hits.reverse();
    Some(SpecularPath {
        length_m,
        arrival_dir,
        reflections: hits,
    })
}

/// Adds the exact specular part of one pass to the pair echograms: every
/// valid path of every exact chain, with the pass's laws at each
/// reflection's own incidence direction and the pass's bands, in the order
/// of `paths` (per pair, source-major).
pub(super) fn add_exact_paths(
    scene: &Scene<'_>,
    paths: &[Vec<(Chain, SpecularPath)>],
    pairs: &mut [PairEchogram],
) {
    for ((list, pair), axis) in paths.iter().zip(pairs).zip(&scene.lateral_axes) {
        for (_, path) in list {
            let l = path.length_m;
            let mut energy = Bands::ZERO;
            for &b in &scene.group {
                energy[b] = (-scene.air_per_m[b] * l).exp() / (4.0 * PI * l * l);
            }
            for &(triangle, wo) in &path.reflections {
                let law = scene.shading[triangle as usize].law as usize;
                energy *= scene.laws[law].mirror_fraction(wo);
            }
            let cos = path.arrival_dir.dot(*axis);
            pair.echogram.add(l / scene.speed_m_s, energy, cos * cos);
        }
    }
}

/// Uniform direction on the unit sphere (as the traced rays).
fn uniform_sphere(u: [f64; 2]) -> DVec3 {
    let z = 1.0 - 2.0 * u[0];
    let r = (1.0 - z * z).max(0.0).sqrt();
    let phi = std::f64::consts::TAU * u[1];
    DVec3::new(r * phi.cos(), r * phi.sin(), z)
}
