//! A receiver's detection volume over time: a sphere whose radius may grow in
//! steps late in the decay.
//!
//! Window j covers the path lengths [start_j, start_{j+1}) (path length = c ×
//! arrival time) and detects with a sphere of radius r_j. A segment adds, for
//! every window, e ℓ_j / V_j where ℓ_j is its chord through sphere j clipped
//! to the window's path lengths. Within window j the expected sum is the
//! energy fluence averaged over sphere j (the reasoning of
//! [`super::DetectionSphere`], applied window by window), so the estimator
//! stays unbiased for the fluence averaged over a ball of radius r(t) at time
//! t. The radii are capped below the distance to the nearest wall, so no part
//! of a sphere lies outside the room and V_j = 4/3 π r_j³ holds exactly.

use glam::DVec3;

use super::DetectionSphere;

/// One time window of a [`DetectionVolume`].
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct VolumeWindow {
    /// Path length where the window starts, m (c × time).
    pub start_path_m: f64,
    /// Path length where it ends (exclusive), m; +∞ for the last window.
    pub end_path_m: f64,
    /// The sphere that detects in this window.
    pub sphere: DetectionSphere,
}

/// The detection spheres of one receiver over time, in time order.
#[derive(Clone, Debug, PartialEq)]
pub struct DetectionVolume {
    windows: Vec<VolumeWindow>,
}

/// Steps in which the radius grows from its early to its late value.
pub const GROWTH_STEPS: usize = 6;

impl DetectionVolume {
    /// One sphere for all times.
    #[must_use]
    pub fn fixed(sphere: DetectionSphere) -> Self {
        Self {
            windows: vec![VolumeWindow {
                start_path_m: 0.0,
                end_path_m: f64::INFINITY,
                sphere,
            }],
        }
    }

    /// The early sphere `early` until path length `late_start_path_m`, then
    /// [`GROWTH_STEPS`] windows of equal length `late_start_path_m` whose
    /// radii grow linearly to `late_radius_m` (kept for the rest of the
    /// decay). A late radius at or below the early one gives [`Self::fixed`].
    #[must_use]
    pub fn growing(early: DetectionSphere, late_start_path_m: f64, late_radius_m: f64) -> Self {
        if late_radius_m <= early.radius_m || late_start_path_m <= 0.0 {
            return Self::fixed(early);
        }
        let mut windows = vec![VolumeWindow {
            start_path_m: 0.0,
            end_path_m: late_start_path_m,
            sphere: early,
        }];
        for step in 1..=GROWTH_STEPS {
            let start =
                late_start_path_m + late_start_path_m * (step - 1) as f64 / GROWTH_STEPS as f64;
            let end = if step == GROWTH_STEPS {
                f64::INFINITY
            } else {
                late_start_path_m + late_start_path_m * step as f64 / GROWTH_STEPS as f64
            };
            let radius = early.radius_m
                + (late_radius_m - early.radius_m) * step as f64 / GROWTH_STEPS as f64;
            windows.push(VolumeWindow {
                start_path_m: start,
                end_path_m: end,
                sphere: DetectionSphere::new(early.centre, radius),
            });
        }
        Self { windows }
    }

    /// The largest sphere of any window (what a segment must reach to count).
    #[must_use]
    pub fn largest(&self) -> DetectionSphere {
        self.windows
            .iter()
            .map(|w| w.sphere)
            .max_by(|a, b| a.radius_m.total_cmp(&b.radius_m))
            .unwrap_or(self.windows[0].sphere)
    }

    /// The largest sphere that a line through a point at distance
    /// `distance_m` from the centre can score with, when that point lies at
    /// path length `path_m`: window j counts only along path lengths within
    /// [path + D − r_j, path + D + r_j] (the sphere's chord) that also lie in
    /// the window, so windows the ray cannot reach in time are left out.
    /// `None` when no window can be reached.
    #[must_use]
    pub fn reachable_sphere(&self, path_m: f64, distance_m: f64) -> Option<DetectionSphere> {
        self.windows
            .iter()
            .filter(|w| {
                let r = w.sphere.radius_m;
                let near = path_m + (distance_m - r).max(0.0);
                let far = path_m + distance_m + r;
                w.start_path_m < far && w.end_path_m > near
            })
            .map(|w| w.sphere)
            .max_by(|a, b| a.radius_m.total_cmp(&b.radius_m))
    }

    /// Calls `chord(mid_m, chord_m, inverse_volume_per_m3)` for each window
    /// the segment `origin + t·direction`, t ∈ [0, `length_m`], crosses
    /// inside the window's path lengths, where the segment's origin lies at
    /// path length `origin_path_m`; `mid_m` is measured from `origin`.
    #[inline]
    pub fn for_each_chord(
        &self,
        origin: DVec3,
        direction: DVec3,
        length_m: f64,
        origin_path_m: f64,
        mut chord: impl FnMut(f64, f64, f64),
    ) {
        for w in &self.windows {
            let lo = (w.start_path_m - origin_path_m).max(0.0);
            let hi = (w.end_path_m - origin_path_m).min(length_m);
            if hi <= lo {
                continue;
            }
            if let Some((mid, len)) = w.sphere.chord_between(origin, direction, lo, hi) {
                chord(mid, len, w.sphere.inverse_volume_per_m3);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn only_windows_reachable_in_time_set_the_cone() {
        // Early 0.2 m until 10 m of path, then growing to 1.4 m.
        let v = DetectionVolume::growing(DetectionSphere::new(DVec3::ZERO, 0.2), 10.0, 1.4);
        // 3 m away at path 1 m: arrives near 4 m, only the early sphere counts.
        assert_eq!(v.reachable_sphere(1.0, 3.0).unwrap().radius_m, 0.2);
        // Late in the decay the largest sphere counts.
        assert_eq!(v.reachable_sphere(30.0, 3.0).unwrap().radius_m, 1.4);
        // Across the first step (10 m): both the early and the first grown
        // sphere can be reached; the larger sets the cone.
        let first_step = 0.2 + 1.2 / GROWTH_STEPS as f64;
        assert!((v.reachable_sphere(6.9, 3.0).unwrap().radius_m - first_step).abs() < 1e-12);
    }
}
