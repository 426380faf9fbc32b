//! The detection sphere: chord test, default radius and the lateral axis.

use std::f64::consts::PI;

use glam::DVec3;

use crate::lanes::F4;

/// A detection sphere around a receiver position.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DetectionSphere {
    /// Centre, metres.
    pub centre: DVec3,
    /// Radius, metres.
    pub radius_m: f64,
    /// 1 / V_R in 1/m³, the factor that turns e·ℓ (J·m) into fluence (J/m²).
    pub inverse_volume_per_m3: f64,
}

impl DetectionSphere {
    /// A sphere of radius `radius_m` (> 0) around `centre`.
    #[must_use]
    pub fn new(centre: DVec3, radius_m: f64) -> Self {
        debug_assert!(radius_m > 0.0, "receiver radius must be positive");
        Self {
            centre,
            radius_m,
            inverse_volume_per_m3: 3.0 / (4.0 * PI * radius_m.powi(3)),
        }
    }

    /// The part of the segment `origin + t·direction`, t ∈ [0, `length_m`]
    /// (unit `direction`) inside the sphere, as (distance of the chord midpoint
    /// from `origin`, chord length), both in metres; `None` if it misses.
    #[must_use]
    pub fn chord(&self, origin: DVec3, direction: DVec3, length_m: f64) -> Option<(f64, f64)> {
        self.chord_between(origin, direction, 0.0, length_m)
    }

    /// As [`DetectionSphere::chord`] for the part t ∈ [`lo_m`, `hi_m`] of the
    /// line (closest approach of the infinite line, then the chord clipped).
    #[must_use]
    pub fn chord_between(
        &self,
        origin: DVec3,
        direction: DVec3,
        lo_m: f64,
        hi_m: f64,
    ) -> Option<(f64, f64)> {
        let to_centre = self.centre - origin;
        let t_closest = to_centre.dot(direction);
        let miss_sq = to_centre.length_squared() - t_closest * t_closest;
        let r_sq = self.radius_m * self.radius_m;
        if miss_sq >= r_sq {
            return None;
        }
        let half = (r_sq - miss_sq).sqrt();
        let enter = (t_closest - half).max(lo_m);
        let leave = (t_closest + half).min(hi_m);
        (leave > enter).then_some((0.5 * (enter + leave), leave - enter))
    }
}

/// Detection spheres laid out four by four in single precision, so that one
/// segment is screened against four spheres with the same instructions. The
/// screen is conservative: it may pass a sphere the segment misses, never
/// the reverse; the spheres that pass get the exact f64
/// [`DetectionSphere::chord`], so results are exactly those of `chord`.
#[derive(Clone, Debug)]
pub struct SphereSet {
    spheres: Vec<DetectionSphere>,
    quads: Vec<SphereQuad>,
    /// Largest coordinate magnitude of any centre or segment origin, m.
    reach_m: f64,
}

/// Centres of four spheres in f32, and the squared distance from the centre
/// below which a line passes the screen (squared radius plus the screen's
/// margin, rounded up), by lane. Missing spheres have a limit of −∞, which
/// no line comes within.
#[derive(Clone, Copy, Debug)]
#[repr(C, align(16))]
struct SphereQuad {
    centre: [[f32; 4]; 3],
    limit_m2: [f32; 4],
}

/// Bound on the f32 rounding of the screen, relative to S² (S the largest
/// coordinate magnitude involved, m): with v = centre − origin and a unit
/// direction d, the computed |v|² − (v·d)² is within about 304·u·S² of the
/// exact one (u = 2⁻²⁴: the rounding of the centre, origin and direction to
/// f32 moves each component of v by at most 4uS and of d by u; |v|² and
/// (v·d)² are then off by at most 7|v|·4uS + 13u|v|², |v| ≤ 2√3·S).
/// 2⁻¹⁵ = 512u leaves room for the rounding of the bound itself.
const SCREEN_MARGIN_REL: f64 = 1.0 / 32768.0;

impl SphereSet {
    /// The set of `spheres`, in that order, for segments whose origins have
    /// no coordinate larger in magnitude than `reach_m` (for a room: the
    /// largest coordinate magnitude of its vertices and sources).
    #[must_use]
    pub fn new(spheres: &[DetectionSphere], reach_m: f64) -> Self {
        let reach_m = spheres
            .iter()
            .map(|s| s.centre.abs().max_element())
            .fold(reach_m.max(1.0), f64::max);
        let margin_m2 = SCREEN_MARGIN_REL * reach_m * reach_m;
        let quads = spheres
            .chunks(4)
            .map(|four| {
                let lane = |k: usize, f: &dyn Fn(&DetectionSphere) -> f32, empty: f32| {
                    four.get(k).map_or(empty, f)
                };
                let row = |f: &dyn Fn(&DetectionSphere) -> f32, empty: f32| {
                    [0, 1, 2, 3].map(|k| lane(k, f, empty))
                };
                SphereQuad {
                    centre: [
                        row(&|s| s.centre.x as f32, 0.0),
                        row(&|s| s.centre.y as f32, 0.0),
                        row(&|s| s.centre.z as f32, 0.0),
                    ],
                    limit_m2: row(
                        &|s| ((s.radius_m * s.radius_m + margin_m2) as f32).next_up(),
                        f32::NEG_INFINITY,
                    ),
                }
            })
            .collect();
        Self {
            spheres: spheres.to_vec(),
            quads,
            reach_m,
        }
    }

    /// The spheres, in order.
    #[must_use]
    pub fn spheres(&self) -> &[DetectionSphere] {
        &self.spheres
    }

    /// Calls `crossing(k, sphere, mid_m, chord_m)` for every sphere `k` that
    /// the segment `origin + t·direction`, t ∈ [0, `length_m`], crosses (unit
    /// `direction`, origin within the reach given to [`SphereSet::new`]), in
    /// index order, with what [`DetectionSphere::chord`] returns for it.
    #[inline]
    pub fn for_each_crossing(
        &self,
        origin: DVec3,
        direction: DVec3,
        length_m: f64,
        mut crossing: impl FnMut(usize, &DetectionSphere, f64, f64),
    ) {
        debug_assert!((direction.length_squared() - 1.0).abs() < 1e-9);
        debug_assert!(origin.abs().max_element() <= self.reach_m);
        let o = [origin.x, origin.y, origin.z].map(|c| F4::splat(c as f32));
        let d = [direction.x, direction.y, direction.z].map(|c| F4::splat(c as f32));
        for (q, quad) in self.quads.iter().enumerate() {
            // Squared distance from each centre to the line, in f32.
            let v = [0, 1, 2].map(|a| F4::load(&quad.centre[a]).sub(o[a]));
            let along = v[0].mul(d[0]).add(v[1].mul(d[1])).add(v[2].mul(d[2]));
            let length_sq = v[0].mul(v[0]).add(v[1].mul(v[1])).add(v[2].mul(v[2]));
            let miss_sq = length_sq.sub(along.mul(along));
            let mut near = miss_sq.lt_mask(F4::load(&quad.limit_m2));
            while near != 0 {
                let k = 4 * q + near.trailing_zeros() as usize;
                near &= near - 1;
                let sphere = &self.spheres[k];
                if let Some((mid_m, chord_m)) = sphere.chord(origin, direction, length_m) {
                    crossing(k, sphere, mid_m, chord_m);
                }
            }
        }
    }
}

/// Expected ray crossings per echogram bin that [`default_radius_m`] aims at in
/// the late field (our choice: about 30 % relative noise per bin, which the
/// integrals of ISO 3382 parameters average down further).
pub const TARGET_HITS_PER_BIN: f64 = 10.0;

/// Smallest default radius, m (keeps the sphere above a few ray spacings near the source).
pub const MIN_DEFAULT_RADIUS_M: f64 = 0.1;
/// Largest default radius, m (keeps the time smear 2r/c below about 6 ms).
pub const MAX_DEFAULT_RADIUS_M: f64 = 1.0;

/// Default detection radius in m for a room of `volume_m3` traced with `rays`
/// rays per source, bins of `bin_s` and sound speed `speed_m_s`.
///
/// Derivation (ours): in a diffuse field the N rays are spread evenly over the
/// volume V; in one bin each travels c·Δt, sweeping a tube that meets a sphere
/// of cross-section π r² with probability π r² c Δt / V. The expected
/// crossings per bin are H = N π r² c Δt / V, so
/// r = √(H V / (π N c Δt)) with H = [`TARGET_HITS_PER_BIN`], clamped to
/// [[`MIN_DEFAULT_RADIUS_M`], [`MAX_DEFAULT_RADIUS_M`]]. Absorption lowers the
/// weights, not the ray count (roulette aside), so H holds through the decay.
#[must_use]
pub fn default_radius_m(volume_m3: f64, rays: usize, speed_m_s: f64, bin_s: f64) -> f64 {
    let r =
        (TARGET_HITS_PER_BIN * volume_m3 / (PI * rays.max(1) as f64 * speed_m_s * bin_s)).sqrt();
    if r.is_finite() {
        r.clamp(MIN_DEFAULT_RADIUS_M, MAX_DEFAULT_RADIUS_M)
    } else {
        MIN_DEFAULT_RADIUS_M
    }
}

/// The lateral axis of a source–receiver pair: horizontal (z is up) and
/// perpendicular to the line between them, unit length. A figure-of-eight
/// microphone along it has its null toward the source (ISO 3382-1:2009, A.3).
/// When the source is straight above or below the receiver any horizontal
/// axis qualifies; +X is used.
#[must_use]
pub fn lateral_axis(source: DVec3, receiver: DVec3) -> DVec3 {
    DVec3::Z
        .cross(receiver - source)
        .try_normalize()
        .unwrap_or(DVec3::X)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::random::Stream;
    use approx::assert_relative_eq;

    #[test]
    fn chord_through_centre_and_clipped() {
        let s = DetectionSphere::new(DVec3::new(5.0, 0.0, 0.0), 1.0);
        let (mid, len) = s.chord(DVec3::ZERO, DVec3::X, 100.0).unwrap();
        assert_relative_eq!(mid, 5.0);
        assert_relative_eq!(len, 2.0);
        // Segment ending at the centre keeps the near half only.
        let (mid, len) = s.chord(DVec3::ZERO, DVec3::X, 5.0).unwrap();
        assert_relative_eq!(mid, 4.5);
        assert_relative_eq!(len, 1.0);
        assert!(s.chord(DVec3::ZERO, -DVec3::X, 100.0).is_none());
        assert!(s
            .chord(DVec3::new(0.0, 1.5, 0.0), DVec3::X, 100.0)
            .is_none());
    }

    #[test]
    fn free_field_rays_give_inverse_square_fluence() {
        // Kuttruff, Room Acoustics §9 / reference.md §6: expected fluence of a
        // point source of energy E0 at distance d is E0 / (4π d²). Monte Carlo
        // estimate with N rays of E0/N each through a sphere of r = 1 m at 10 m.
        let sphere = DetectionSphere::new(DVec3::new(10.0, 0.0, 0.0), 1.0);
        let n = 400_000;
        let mut sum = 0.0;
        for i in 0..n {
            let mut rng = Stream::new(3, i);
            let z = 1.0 - 2.0 * rng.uniform();
            let phi = std::f64::consts::TAU * rng.uniform();
            let sxy = (1.0 - z * z).sqrt();
            let dir = DVec3::new(z, sxy * phi.cos(), sxy * phi.sin());
            if let Some((_, len)) = sphere.chord(DVec3::ZERO, dir, 100.0) {
                sum += len * sphere.inverse_volume_per_m3 / n as f64;
            }
        }
        let expected = 1.0 / (4.0 * std::f64::consts::PI * 100.0);
        // About 1000 hits: relative standard error ≈ 1/√1000 · 0.5 ≈ 1.6 %; allow 5 %.
        assert_relative_eq!(sum, expected, max_relative = 0.05);
    }

    #[test]
    fn sphere_set_finds_what_chord_finds() {
        // Our contract: the f32 screen never drops a crossing that `chord`
        // finds (five spheres: a full quad and a padded one). Lines that
        // graze the spheres, the screen's hard case, come in the second half.
        let mut rng = Stream::new(9, 0);
        let unit = |rng: &mut Stream| {
            let z = 1.0 - 2.0 * rng.uniform();
            let phi = std::f64::consts::TAU * rng.uniform();
            let r = (1.0 - z * z).sqrt();
            DVec3::new(r * phi.cos(), r * phi.sin(), z)
        };
        // Far from the origin of coordinates, where f32 rounds coarsely.
        let base = DVec3::new(37.0, -24.0, 11.0);
        let spheres: Vec<DetectionSphere> = (0..5)
            .map(|k| {
                let c = base + DVec3::new(rng.uniform(), rng.uniform(), rng.uniform()) * 6.0;
                DetectionSphere::new(c, [0.1, 0.3, 1.0, 0.05, 0.6][k])
            })
            .collect();
        let set = SphereSet::new(&spheres, 200.0);
        let mut found = 0;
        for i in 0..40_000 {
            let (o, d, len) = if i < 20_000 {
                let o = base + DVec3::new(rng.uniform(), rng.uniform(), rng.uniform()) * 6.0;
                (o, unit(&mut rng), 4.0 * rng.uniform())
            } else {
                // A line passing the centre of sphere k at 1 ∓ 1e-9 of its
                // radius, from up to 60 m away.
                let s = &spheres[i % 5];
                let d = unit(&mut rng);
                let side = d.any_orthonormal_vector();
                let miss = s.radius_m * (1.0 + (rng.uniform() - 0.5) * 2e-9);
                let back = 60.0 * rng.uniform();
                let o = s.centre + side * miss - d * back;
                (o, d, back + 1.0)
            };
            let mut got = Vec::new();
            set.for_each_crossing(o, d, len, |k, _, mid, chord| got.push((k, mid, chord)));
            let want: Vec<(usize, f64, f64)> = spheres
                .iter()
                .enumerate()
                .filter_map(|(k, s)| s.chord(o, d, len).map(|(m, c)| (k, m, c)))
                .collect();
            assert_eq!(got, want);
            found += got.len();
        }
        assert!(
            found > 1000,
            "only {found} crossings: the test exercises too little"
        );
    }

    #[test]
    fn default_radius_matches_its_formula_and_clamps() {
        // r = √(H V / (π N c Δt)): V = 1000, N = 20000, c = 343.2, Δt = 1 ms → 0.681 m.
        let r = default_radius_m(1000.0, 20_000, 343.2, 0.001);
        assert_relative_eq!(r, (10.0 * 1000.0 / (PI * 20_000.0 * 0.3432)).sqrt());
        assert_eq!(
            default_radius_m(1e7, 100, 343.2, 0.001),
            MAX_DEFAULT_RADIUS_M
        );
        assert_eq!(
            default_radius_m(1.0, 1_000_000, 343.2, 0.001),
            MIN_DEFAULT_RADIUS_M
        );
        assert_eq!(
            default_radius_m(0.0, 10, 343.2, 0.001),
            MIN_DEFAULT_RADIUS_M
        );
    }

    #[test]
    fn lateral_axis_is_horizontal_and_perpendicular() {
        let s = DVec3::new(1.0, 2.0, 1.5);
        let r = DVec3::new(6.0, 4.0, 1.2);
        let a = lateral_axis(s, r);
        assert_relative_eq!(a.z, 0.0);
        assert_relative_eq!(a.dot(r - s), 0.0, epsilon = 1e-12);
        assert_relative_eq!(a.length(), 1.0, epsilon = 1e-12);
        assert_eq!(lateral_axis(DVec3::ZERO, DVec3::Z), DVec3::X);
    }
}
