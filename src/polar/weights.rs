//! Weights: the solid angle each receiver of a hemispherical grid stands for
//! (ISO 17497-2:2012, clause 8), and the weight each angle of incidence gets in
//! a random-incidence average.
//!
//! Both use one rule on "rings" of equal polar angle θ (measured from the
//! normal): a ring spans from the midpoint with the ring below to the midpoint
//! with the ring above, the innermost ring reaching down to 0° and the outermost
//! up to 90°, so the rings always tile the hemisphere. A ring's solid angle,
//! 2π (cos θ_lo − cos θ_hi), is shared equally by the points on it (they are
//! assumed evenly spread in azimuth). On a regular grid θ = 0, Δθ, …, 90° this
//! gives exactly the standard's expressions: the pole 4π sin²(Δθ/4), a ring
//! 2 sin θ sin(Δθ/2) per unit azimuth step, the rim sin(Δθ/2) per unit azimuth
//! step; all weights sum to 2π.

use std::f64::consts::PI;

/// Two polar angles closer than this (degrees) lie on the same ring.
const RING_TOLERANCE_DEG: f64 = 1e-6;

/// Solid angle (sr) each point stands for, points given by polar angle from the
/// normal in degrees (sign ignored: −θ at azimuth φ is θ at φ + 180°). Weights
/// sum to 2π. Returns an empty list for no points.
#[must_use]
pub fn ring_solid_angles_sr(polar_deg: &[f64]) -> Vec<f64> {
    ring_weights(polar_deg, |lo, hi| 2.0 * PI * (lo.cos() - hi.cos()))
}

/// Projected solid angle (cos-weighted, sr) each point stands for: the share of
/// diffuse-field incident power arriving from its ring, ∫ cos θ dΩ =
/// π (sin² θ_hi − sin² θ_lo) (Paris' formula; Kuttruff, Room Acoustics §2.5).
/// Weights sum to π.
#[must_use]
pub fn ring_projected_solid_angles_sr(polar_deg: &[f64]) -> Vec<f64> {
    ring_weights(polar_deg, |lo, hi| {
        PI * (hi.sin().powi(2) - lo.sin().powi(2))
    })
}

/// Shares the measure of each ring (given its edges in radians) among its points.
fn ring_weights(polar_deg: &[f64], ring_measure: impl Fn(f64, f64) -> f64) -> Vec<f64> {
    let abs: Vec<f64> = polar_deg.iter().map(|t| t.abs().min(90.0)).collect();
    let mut rings: Vec<f64> = Vec::new();
    let mut sorted = abs.clone();
    sorted.sort_by(f64::total_cmp);
    for t in sorted {
        if rings.last().is_none_or(|&r| t - r > RING_TOLERANCE_DEG) {
            rings.push(t);
        }
    }
    let ring_of = |t: f64| {
        rings
            .iter()
            .position(|&r| (t - r).abs() <= RING_TOLERANCE_DEG)
            .unwrap_or(0)
    };
    let mut counts = vec![0usize; rings.len()];
    for &t in &abs {
        counts[ring_of(t)] += 1;
    }
    let measures: Vec<f64> = (0..rings.len())
        .map(|k| {
            let lo = if k == 0 {
                0.0
            } else {
                0.5 * (rings[k - 1] + rings[k])
            };
            let hi = if k + 1 == rings.len() {
                90.0
            } else {
                0.5 * (rings[k] + rings[k + 1])
            };
            ring_measure(lo.to_radians(), hi.to_radians())
        })
        .collect();
    abs.iter()
        .map(|&t| {
            let k = ring_of(t);
            measures[k] / counts[k] as f64
        })
        .collect()
}

/// Area weights N_i = A_i / A_min for the diffusion coefficient of hemispherical
/// data (ISO 17497-2:2012, clause 8): the smallest receiver counts 1.
#[must_use]
pub fn hemisphere_area_weights(polar_deg: &[f64]) -> Vec<f64> {
    let areas = ring_solid_angles_sr(polar_deg);
    let min = areas.iter().copied().fold(f64::INFINITY, f64::min);
    areas.iter().map(|a| a / min).collect()
}

/// How the angles of incidence are weighted in a random-incidence average.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default, serde::Serialize, clap::ValueEnum)]
#[serde(rename_all = "kebab-case")]
pub enum IncidenceWeighting {
    /// Share of diffuse-field incident power each incidence represents
    /// (projected solid angle of its ring, cos-weighted). For 0°, ±30°, ±60° this
    /// gives 1 : 3.23 : 3.73 per angle, close to the 1 : 3 : 3 usually quoted for
    /// single-plane data (quoted value from memory).
    #[default]
    ProjectedSolidAngle,
    /// Solid angle of the ring each incidence represents (uniform over the hemisphere).
    SolidAngle,
    /// Every incidence counts the same (plain arithmetic mean).
    Equal,
}

impl IncidenceWeighting {
    /// Weights, normalized to sum 1, for incidences given by polar angle (degrees).
    /// The incidences on one ring (e.g. +30° and −30°) share its weight, which
    /// assumes the sample behaves alike at azimuths the data do not cover.
    #[must_use]
    pub fn weights(self, incidence_deg: &[f64]) -> Vec<f64> {
        let raw = match self {
            Self::ProjectedSolidAngle => ring_projected_solid_angles_sr(incidence_deg),
            Self::SolidAngle => ring_solid_angles_sr(incidence_deg),
            Self::Equal => vec![1.0; incidence_deg.len()],
        };
        let total: f64 = raw.iter().sum();
        raw.iter().map(|w| w / total).collect()
    }

    /// Name used in reports.
    #[must_use]
    pub fn label(self) -> &'static str {
        match self {
            Self::ProjectedSolidAngle => "projected solid angle",
            Self::SolidAngle => "solid angle",
            Self::Equal => "equal",
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    /// A full 5° hemisphere grid: pole once, every ring at 5° azimuth steps.
    fn grid_5deg() -> Vec<f64> {
        let mut polar = vec![0.0];
        for k in 1..=18 {
            for _ in 0..72 {
                polar.push(f64::from(k) * 5.0);
            }
        }
        polar
    }

    #[test]
    fn hemisphere_weights_sum_to_two_pi_on_5deg_grid() {
        // ISO 17497-2:2012 clause 8 / reference.md §1: on a 5° grid the receiver
        // solid angles sum to 2π.
        let a = ring_solid_angles_sr(&grid_5deg());
        assert_relative_eq!(a.iter().sum::<f64>(), 2.0 * PI, epsilon = 1e-12);
    }

    #[test]
    fn hemisphere_weights_match_standard_expressions() {
        // reference.md §1 (ISO 17497-2:2012 clause 8): pole (4π/Δφ) sin²(Δθ/4),
        // ring 2 sin θ sin(Δθ/2), rim sin(Δθ/2), each per unit Δφ.
        let dth = 5f64.to_radians();
        let dph = 5f64.to_radians();
        let polar = grid_5deg();
        let a = ring_solid_angles_sr(&polar);
        assert_relative_eq!(a[0], 4.0 * PI * (dth / 4.0).sin().powi(2), epsilon = 1e-14);
        let i30 = polar.iter().position(|&t| t == 30.0).unwrap();
        assert_relative_eq!(
            a[i30],
            2.0 * 30f64.to_radians().sin() * (dth / 2.0).sin() * dph,
            epsilon = 1e-14
        );
        let i90 = polar.iter().position(|&t| t == 90.0).unwrap();
        assert_relative_eq!(a[i90], (dth / 2.0).sin() * dph, epsilon = 1e-14);
        let n = hemisphere_area_weights(&polar);
        assert_relative_eq!(n.iter().copied().fold(f64::INFINITY, f64::min), 1.0);
    }

    #[test]
    fn incidence_weights_for_0_30_60() {
        // Derived here: rings 0–15°, 15–45°, 45–90°; projected solid angle
        // π (sin²hi − sin²lo): 0.066987π, 0.433013π (shared by ±30°), 0.5π (shared
        // by ±60°). Per angle relative to 0°: 1, 3.232, 3.732.
        let w = IncidenceWeighting::ProjectedSolidAngle.weights(&[0.0, 30.0, -30.0, 60.0, -60.0]);
        let sin15_sq = 15f64.to_radians().sin().powi(2); // 0.0669873
        assert_relative_eq!(
            w[1] / w[0],
            (0.5 - sin15_sq) / 2.0 / sin15_sq,
            epsilon = 1e-12
        );
        assert_relative_eq!(w[1] / w[0], 3.232, epsilon = 1e-3);
        assert_relative_eq!(w[3] / w[0], 3.732, epsilon = 1e-3);
        assert_relative_eq!(w.iter().sum::<f64>(), 1.0, epsilon = 1e-12);
        let e = IncidenceWeighting::Equal.weights(&[0.0, 30.0]);
        assert_eq!(e, vec![0.5, 0.5]);
    }
}
