//! Geometry of the virtual goniometer: the receiver arc, its cells, and the
//! specular zone by the image-source rule.

use serde::Serialize;

use crate::law::CalibrationArc;
use crate::polar::{Arrangement, GoniometerGeometry};

/// Layout of the virtual goniometer, in the x–z plane of the local frame.
///
/// Defaults: those of `polaray polar` ([`crate::polar::zone`]): a 1.5 m wide
/// sample, the source 10 m and the receivers 5 m from its centre, 37 receivers
/// at 5° from −90° to 90°, each collecting within ±2.5° along the arc and a
/// ±2.5° slab across it. The image-source zone at normal incidence is then the
/// 5 receivers 0°, ±5°, ±10° (edges ±12.9°), the case of the check values in
/// reference.md §1 and §3 (M = 37, M_s = 5). The ±2.5° slab (our choice;
/// common practice, no source) makes each cell a 5° × 5° patch: thin enough
/// to stay in the plane, thick enough to catch about 4 % of an even reflection.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct ArcGeometry {
    /// Sample width across the measurement plane, m.
    pub sample_width_m: f64,
    /// Source distance from the sample centre, m.
    pub source_distance_m: f64,
    /// Receiver distance from the sample centre, m.
    pub receiver_distance_m: f64,
    /// Number of receivers (odd), centred on the normal.
    pub receivers: usize,
    /// Receiver spacing, degrees; each receiver collects within ±step/2 along the arc.
    pub receiver_step_deg: f64,
    /// Half-width of the slab across the plane in which receivers collect, degrees.
    pub slab_half_width_deg: f64,
}

/// Half-width of the slab across the arc in which receivers collect, degrees.
const SLAB_HALF_WIDTH_DEG: f64 = 2.5;

impl Default for ArcGeometry {
    /// The default goniometer of [`crate::room::DiffusionGoniometer`] with the
    /// ±2.5° slab.
    fn default() -> Self {
        Self::from(&crate::room::DiffusionGoniometer::default())
    }
}

impl From<&crate::room::DiffusionGoniometer> for ArcGeometry {
    /// The arrangement a material's diffusion coefficients were measured
    /// with, with the default slab.
    fn from(g: &crate::room::DiffusionGoniometer) -> Self {
        Self {
            sample_width_m: g.sample_width_m,
            source_distance_m: g.source_distance_m,
            receiver_distance_m: g.receiver_distance_m,
            receivers: g.receivers,
            receiver_step_deg: g.receiver_step_deg,
            slab_half_width_deg: SLAB_HALF_WIDTH_DEG,
        }
    }
}

/// A goniometer layout that cannot be used.
#[derive(Debug, thiserror::Error, PartialEq)]
#[error("goniometer geometry: {0}")]
pub struct ArcError(pub String);

impl ArcGeometry {
    /// Checks the layout and the angle of incidence (degrees).
    pub fn check(&self, incidence_deg: f64) -> Result<(), ArcError> {
        let positive = |name: &str, v: f64| {
            if v.is_finite() && v > 0.0 {
                Ok(())
            } else {
                Err(ArcError(format!("{name} = {v} must be a positive number")))
            }
        };
        positive("sample width (m)", self.sample_width_m)?;
        positive("source distance (m)", self.source_distance_m)?;
        positive("receiver distance (m)", self.receiver_distance_m)?;
        positive("receiver step (deg)", self.receiver_step_deg)?;
        positive("slab half-width (deg)", self.slab_half_width_deg)?;
        if self.receivers < 3 || self.receivers.is_multiple_of(2) {
            return Err(ArcError(format!(
                "{} receivers: give an odd number, at least 3, so one sits on the normal",
                self.receivers
            )));
        }
        let extent = (self.receivers as f64 - 1.0) / 2.0 * self.receiver_step_deg;
        if extent > 90.0 + 1e-9 {
            return Err(ArcError(format!(
                "{} receivers at {}° reach ±{extent}°, past the surface; use fewer or a smaller step",
                self.receivers, self.receiver_step_deg
            )));
        }
        if self.slab_half_width_deg > 45.0 {
            return Err(ArcError(format!(
                "slab half-width {}° is not a thin slab; use at most 45°",
                self.slab_half_width_deg
            )));
        }
        if !incidence_deg.is_finite() || incidence_deg.abs() >= 90.0 {
            return Err(ArcError(format!(
                "angle of incidence {incidence_deg}° must lie strictly between −90° and 90°"
            )));
        }
        Ok(())
    }

    /// Receiver angles from the normal, degrees, signed in the plane.
    #[must_use]
    pub fn receiver_deg(&self) -> Vec<f64> {
        let c = (self.receivers as f64 - 1.0) / 2.0;
        (0..self.receivers)
            .map(|i| (i as f64 - c) * self.receiver_step_deg)
            .collect()
    }

    /// Where the line from the image source to the receiver at `theta_deg`
    /// crosses the sample plane, m from the sample centre (source at `incidence_deg`).
    fn crossing_m(&self, incidence_deg: f64, theta_deg: f64) -> f64 {
        let (ps, pc) = incidence_deg.to_radians().sin_cos();
        let (ts, tc) = theta_deg.to_radians().sin_cos();
        let (rs, rr) = (self.source_distance_m, self.receiver_distance_m);
        // Image source (rs sin ψ, −rs cos ψ); receiver (rr sin θ, rr cos θ).
        let t = rs * pc / (rs * pc + rr * tc.max(0.0));
        rs * ps + t * (rr * ts - rs * ps)
    }

    /// Specular zone by the image-source rule (reference.md §2): a receiver is
    /// in the zone when the line from the image source to it crosses the sample.
    #[must_use]
    pub fn specular_zone(&self, incidence_deg: f64) -> Vec<bool> {
        let half = self.sample_width_m / 2.0;
        self.receiver_deg()
            .into_iter()
            .map(|t| t.abs() < 90.0 && self.crossing_m(incidence_deg, t).abs() <= half)
            .collect()
    }

    /// The zone's edges along the arc, degrees (lower, upper): the receiver
    /// angles whose image-source line meets the sample's edges. The crossing
    /// point moves monotonically along the sample as the receiver moves along
    /// the arc, so bisection finds each edge.
    #[must_use]
    pub fn zone_edges_deg(&self, incidence_deg: f64) -> (f64, f64) {
        let half = self.sample_width_m / 2.0;
        let solve = |target: f64| {
            let (mut lo, mut hi) = (-90.0_f64, 90.0_f64);
            for _ in 0..80 {
                let mid = 0.5 * (lo + hi);
                if self.crossing_m(incidence_deg, mid) < target {
                    lo = mid;
                } else {
                    hi = mid;
                }
            }
            0.5 * (lo + hi)
        };
        (solve(-half), solve(half))
    }

    /// The same layout as a polar data file's geometry.
    #[must_use]
    pub fn to_polar_geometry(&self) -> GoniometerGeometry {
        GoniometerGeometry {
            arrangement: Arrangement::Plane,
            sample_width_m: self.sample_width_m,
            sample_depth_m: None,
            source_distance_m: self.source_distance_m,
            receiver_distance_m: self.receiver_distance_m,
            zone_half_width_deg: None,
        }
    }

    /// The bounded law's calibration arc for this layout at normal incidence,
    /// or an error when the zone there is not a centred, odd run of receivers.
    pub fn calibration_arc(&self) -> Result<CalibrationArc, ArcError> {
        self.check(0.0)?;
        let zone = self.specular_zone(0.0);
        let count = zone.iter().filter(|&&z| z).count();
        let arc = CalibrationArc {
            receiver_step_deg: self.receiver_step_deg,
            receivers: self.receivers,
            zone_receivers: count,
            slab_half_width_deg: self.slab_half_width_deg,
        };
        let matches = count % 2 == 1
            && count < self.receivers
            && zone.iter().enumerate().all(|(i, &z)| z == arc.in_zone(i));
        if matches {
            Ok(arc)
        } else {
            Err(ArcError(format!(
                "the specular zone at normal incidence holds {count} receivers; the bounded \
                 law needs an odd, centred zone smaller than the arc (change the sample width \
                 or the distances)"
            )))
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn default_zone_is_five_receivers() {
        // Derived here: image source at (0, −10 m), receiver at 5 m and angle θ:
        // the line meets the sample at x = 10 · 5 sin θ / (10 + 5 cos θ), which
        // is 0.58 m at 10° and 0.87 m at 15° against the 0.75 m half-width, so
        // 0°, ±5°, ±10° are in; the edge solves x(θ) = 0.75 m.
        let g = ArcGeometry::default();
        let zone = g.specular_zone(0.0);
        let inside: Vec<f64> = g
            .receiver_deg()
            .into_iter()
            .zip(&zone)
            .filter(|(_, &z)| z)
            .map(|(t, _)| t)
            .collect();
        assert_eq!(inside, vec![-10.0, -5.0, 0.0, 5.0, 10.0]);
        let (lo, hi) = g.zone_edges_deg(0.0);
        let x = |t: f64| 50.0 * t.to_radians().sin() / (10.0 + 5.0 * t.to_radians().cos());
        approx::assert_relative_eq!(x(hi), 0.75, epsilon = 1e-9);
        approx::assert_relative_eq!(x(-lo), 0.75, epsilon = 1e-9);
        assert!(hi > 10.0 && hi < 15.0);
        assert_eq!(g.calibration_arc().unwrap(), CalibrationArc::standard());
    }

    #[test]
    fn oblique_zone_sits_around_the_mirror_receiver() {
        // Image-source rule (reference.md §2): at ψ = 30° the mirror receiver is −30°.
        let g = ArcGeometry::default();
        let zone = g.specular_zone(30.0);
        let deg = g.receiver_deg();
        let i = deg.iter().position(|&t| t == -30.0).unwrap();
        assert!(zone[i]);
        assert!(!zone[deg.iter().position(|&t| t == 30.0).unwrap()]);
        let (lo, hi) = g.zone_edges_deg(30.0);
        assert!(lo < -30.0 && hi > -30.0);
    }
}
