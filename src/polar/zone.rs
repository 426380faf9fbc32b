//! The specular zone: the receivers that the mirror reflection off the sample
//! reaches, found from the goniometer geometry or given as an angular half-width
//! around the mirror direction.
//!
//! Frame: sample in the plane z = 0 centred on the origin, normal +z, width
//! along x (the measurement plane is x–z), depth along y. A direction at polar
//! angle θ from the normal and azimuth φ is (sin θ cos φ, sin θ sin φ, cos θ);
//! single-plane data have φ = 0 and signed θ, so the mirror direction of a
//! source at ψ is −ψ.

use glam::DVec3;

use super::bound::ZoneSize;
use super::data::GoniometerGeometry;

/// Angles closer than this to a zone edge (degrees) count as inside: edges are included.
const EDGE_TOLERANCE_DEG: f64 = 1e-6;
/// Crossing points within this distance (m) of a sample edge count as on the sample.
const EDGE_TOLERANCE_M: f64 = 1e-9;

/// A direction seen from the sample centre, degrees.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Direction {
    /// Angle from the normal, degrees (signed in the measurement plane).
    pub polar_deg: f64,
    /// Azimuth, degrees (0 for single-plane data).
    pub azimuth_deg: f64,
}

impl Direction {
    /// A direction in the measurement plane (azimuth 0).
    #[must_use]
    pub fn in_plane(polar_deg: f64) -> Self {
        Self {
            polar_deg,
            azimuth_deg: 0.0,
        }
    }

    /// Unit vector of this direction.
    #[must_use]
    pub fn unit(self) -> DVec3 {
        let (st, ct) = self.polar_deg.to_radians().sin_cos();
        let (sp, cp) = self.azimuth_deg.to_radians().sin_cos();
        DVec3::new(st * cp, st * sp, ct)
    }
}

/// How the specular zone is decided.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
#[serde(tag = "rule", rename_all = "kebab-case")]
pub enum ZoneRule {
    /// Receivers within this many degrees of the mirror direction, edges included.
    HalfWidth {
        /// Half-width of the zone, degrees.
        half_width_deg: f64,
    },
    /// Receivers reached by the image-source reflection off the finite sample:
    /// the line from the image source to the receiver crosses the sample.
    Sample {
        /// Sample width along the measurement plane, m.
        sample_width_m: f64,
        /// Sample depth, m (hemispherical data; `None` means square, depth = width).
        sample_depth_m: Option<f64>,
        /// Source distance from the sample centre, m.
        source_distance_m: f64,
        /// Receiver distance from the sample centre, m.
        receiver_distance_m: f64,
    },
}

impl ZoneRule {
    /// Whether each receiver lies in the specular zone of a source at `incidence`.
    #[must_use]
    pub fn membership(&self, incidence: Direction, receivers: &[Direction]) -> Vec<bool> {
        let u = incidence.unit();
        let mirror = DVec3::new(-u.x, -u.y, u.z);
        receivers
            .iter()
            .map(|r| match *self {
                Self::HalfWidth { half_width_deg } => {
                    let v = r.unit();
                    let angle_deg = v.cross(mirror).length().atan2(v.dot(mirror)).to_degrees();
                    angle_deg <= half_width_deg + EDGE_TOLERANCE_DEG
                }
                Self::Sample {
                    sample_width_m,
                    sample_depth_m,
                    source_distance_m,
                    receiver_distance_m,
                } => {
                    // Image source below the sample; intersect the line image → receiver with z = 0.
                    let image = source_distance_m * DVec3::new(u.x, u.y, -u.z);
                    let receiver = receiver_distance_m * r.unit();
                    let den = source_distance_m * u.z + receiver.z;
                    if den <= 0.0 {
                        return false;
                    }
                    let t = source_distance_m * u.z / den;
                    let hit = image + t * (receiver - image);
                    let depth = sample_depth_m.unwrap_or(sample_width_m);
                    hit.x.abs() <= 0.5 * sample_width_m + EDGE_TOLERANCE_M
                        && hit.y.abs() <= 0.5 * depth + EDGE_TOLERANCE_M
                }
            })
            .collect()
    }
}

impl ZoneRule {
    /// The zone rule a polar data file asks for: its `zone_half_width_deg` when
    /// given, otherwise the image-source construction on its sample.
    #[must_use]
    pub fn from_geometry(g: &GoniometerGeometry) -> Self {
        match g.zone_half_width_deg {
            Some(half_width_deg) => Self::HalfWidth { half_width_deg },
            None => Self::Sample {
                sample_width_m: g.sample_width_m,
                sample_depth_m: g.sample_depth_m,
                source_distance_m: g.source_distance_m,
                receiver_distance_m: g.receiver_distance_m,
            },
        }
    }

    /// One-line description for reports.
    #[must_use]
    pub fn describe(&self) -> String {
        match self {
            Self::HalfWidth { half_width_deg } => format!(
                "specular zone = receivers within {half_width_deg}° of the mirror direction (edges included)"
            ),
            Self::Sample {
                sample_width_m,
                sample_depth_m,
                source_distance_m,
                receiver_distance_m,
            } => {
                let depth = sample_depth_m.map(|d| format!(" × {d} m")).unwrap_or_default();
                format!(
                    "specular zone = receivers reached by the image-source reflection off a {sample_width_m} m{depth} sample, source at {source_distance_m} m, receivers at {receiver_distance_m} m"
                )
            }
        }
    }
}

/// A single-plane goniometer arrangement used to judge a material's (s, d) pair
/// when no measured geometry is at hand.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct ZoneGeometry {
    /// Receiver angles from the normal, degrees, equal-area.
    pub receiver_deg: Vec<f64>,
    /// Angle of incidence, degrees.
    pub incidence_deg: f64,
    /// How the specular zone is decided.
    pub zone: ZoneRule,
}

/// Default check arrangement: sample width 1.5 m (polaray's choice, common practice
/// for a scale goniometer, no source).
pub const DEFAULT_SAMPLE_WIDTH_M: f64 = 1.5;
/// Default source distance, m (polaray's choice).
pub const DEFAULT_SOURCE_DISTANCE_M: f64 = 10.0;
/// Default receiver distance, m (polaray's choice).
pub const DEFAULT_RECEIVER_DISTANCE_M: f64 = 5.0;

impl Default for ZoneGeometry {
    /// 37 receivers over 180° at 5° steps, normal incidence, a 1.5 m sample with the
    /// source at 10 m and receivers at 5 m: the image-source zone then holds the 5
    /// receivers at 0°, ±5°, ±10° (the ray to 10° crosses the sample 0.58 m from its
    /// centre, the one to 15° at 0.87 m, beyond the 0.75 m edge).
    fn default() -> Self {
        Self {
            receiver_deg: (0..37).map(|i| -90.0 + 5.0 * f64::from(i)).collect(),
            incidence_deg: 0.0,
            zone: ZoneRule::Sample {
                sample_width_m: DEFAULT_SAMPLE_WIDTH_M,
                sample_depth_m: None,
                source_distance_m: DEFAULT_SOURCE_DISTANCE_M,
                receiver_distance_m: DEFAULT_RECEIVER_DISTANCE_M,
            },
        }
    }
}

impl ZoneGeometry {
    /// Which receivers lie in the specular zone.
    #[must_use]
    pub fn membership(&self) -> Vec<bool> {
        let receivers: Vec<Direction> = self
            .receiver_deg
            .iter()
            .map(|&t| Direction::in_plane(t))
            .collect();
        self.zone
            .membership(Direction::in_plane(self.incidence_deg), &receivers)
    }

    /// Receiver and zone counts (M, M_s) of this arrangement.
    #[must_use]
    pub fn size(&self) -> ZoneSize {
        let m = self.membership();
        ZoneSize::from_membership(&m, &vec![1.0; m.len()])
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn default_geometry_has_five_zone_receivers() {
        // Derived in the doc comment of ZoneGeometry::default (image-source construction).
        let g = ZoneGeometry::default();
        let m = g.membership();
        let zone: Vec<f64> = g
            .receiver_deg
            .iter()
            .zip(&m)
            .filter(|(_, &z)| z)
            .map(|(&t, _)| t)
            .collect();
        assert_eq!(zone, vec![-10.0, -5.0, 0.0, 5.0, 10.0]);
        assert_eq!(g.size().receivers, 37);
    }

    #[test]
    fn half_width_includes_edges_around_mirror() {
        // Definition (task brief): zone = receivers within h of the mirror direction −ψ.
        let rule = ZoneRule::HalfWidth {
            half_width_deg: 10.0,
        };
        let receivers: Vec<Direction> = (0..37)
            .map(|i| Direction::in_plane(-90.0 + 5.0 * f64::from(i)))
            .collect();
        let m = rule.membership(Direction::in_plane(30.0), &receivers);
        let zone: Vec<f64> = receivers
            .iter()
            .zip(&m)
            .filter(|(_, &z)| z)
            .map(|(r, _)| r.polar_deg)
            .collect();
        assert_eq!(zone, vec![-40.0, -35.0, -30.0, -25.0, -20.0]);
    }

    #[test]
    fn oblique_image_source_zone_is_around_mirror() {
        // Image-source construction: the zone of a source at +30° surrounds −30°.
        let rule = ZoneRule::Sample {
            sample_width_m: 2.0,
            sample_depth_m: None,
            source_distance_m: 10.0,
            receiver_distance_m: 5.0,
        };
        let receivers: Vec<Direction> = (0..37)
            .map(|i| Direction::in_plane(-90.0 + 5.0 * f64::from(i)))
            .collect();
        let m = rule.membership(Direction::in_plane(30.0), &receivers);
        let i_mirror = 12; // −30°
        assert!(m[i_mirror]);
        assert!(!m[24]); // +30°, the source side
        assert!(m.iter().filter(|&&z| z).count() >= 3);
    }
}
