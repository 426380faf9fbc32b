//! The room file schema (TOML) as serde types. Unknown fields are errors so
//! that typos never pass silently; the toml crate reports line and column.

use std::collections::BTreeMap;
use std::fmt;

use serde::de::{self, Deserializer, Visitor};
use serde::Deserialize;

/// A real number that may be written as a TOML integer (`10`) or float (`10.0`).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Real(pub f64);

impl<'de> Deserialize<'de> for Real {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        struct RealVisitor;
        impl Visitor<'_> for RealVisitor {
            type Value = Real;
            fn expecting(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                f.write_str("a number")
            }
            fn visit_f64<E: de::Error>(self, v: f64) -> Result<Real, E> {
                Ok(Real(v))
            }
            fn visit_i64<E: de::Error>(self, v: i64) -> Result<Real, E> {
                Ok(Real(v as f64))
            }
            fn visit_u64<E: de::Error>(self, v: u64) -> Result<Real, E> {
                Ok(Real(v as f64))
            }
        }
        d.deserialize_any(RealVisitor)
    }
}

/// A point or vector `[x, y, z]` in metres.
pub type Point = [Real; 3];

/// The whole room file.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RoomFile {
    /// Room name (defaults to the file name).
    pub name: Option<String>,
    /// Run settings.
    #[serde(default)]
    pub settings: SettingsFile,
    /// Materials by name.
    #[serde(default)]
    pub materials: BTreeMap<String, MaterialFile>,
    /// Explicit polygons.
    #[serde(default)]
    pub surfaces: Vec<SurfaceFile>,
    /// Shoebox shorthand.
    #[serde(rename = "box")]
    pub shoebox: Option<BoxFile>,
    /// Geometry from an OBJ file.
    pub mesh: Option<MeshFile>,
    /// Point sources.
    #[serde(default)]
    pub sources: Vec<SourceFile>,
    /// Receivers.
    #[serde(default)]
    pub receivers: Vec<ReceiverFile>,
}

/// `[settings]`: every field optional.
#[derive(Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SettingsFile {
    /// Octave-band centres, Hz.
    pub bands_hz: Option<Vec<u32>>,
    /// Rays per source.
    pub rays: Option<usize>,
    /// Echogram length, s.
    pub duration_s: Option<Real>,
    /// Echogram bin width, s.
    pub bin_s: Option<Real>,
    /// Random seed.
    pub seed: Option<u64>,
    /// Air temperature, °C.
    pub temperature_c: Option<Real>,
    /// Relative humidity, %.
    pub humidity_pct: Option<Real>,
    /// Ambient pressure, kPa.
    pub pressure_kpa: Option<Real>,
    /// Whether the air absorbs.
    pub air_absorption: Option<bool>,
    /// Open model: escaping rays are lost, an unclosed mesh is allowed.
    pub open: Option<bool>,
}

/// `[materials.NAME]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MaterialFile {
    /// Absorption coefficient per band.
    pub absorption: Vec<Real>,
    /// Scattering coefficient per band.
    pub scattering: Vec<Real>,
    /// Diffusion coefficient per band.
    pub diffusion: Option<Vec<Real>>,
    /// Polar response file, relative to the room file.
    pub polar: Option<String>,
    /// The goniometer the diffusion coefficients were measured with.
    pub goniometer: Option<GoniometerFile>,
}

/// `[materials.NAME.goniometer]`: every key optional, defaults as
/// [`super::DiffusionGoniometer::default`].
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct GoniometerFile {
    /// Sample width, m.
    pub sample_width_m: Option<Real>,
    /// Source distance, m.
    pub source_distance_m: Option<Real>,
    /// Receiver distance, m.
    pub receiver_distance_m: Option<Real>,
    /// Number of receivers.
    pub receivers: Option<usize>,
    /// Receiver spacing, degrees.
    pub receiver_step_deg: Option<Real>,
}

impl GoniometerFile {
    /// The arrangement, defaults filled in (not yet checked: see
    /// [`super::DiffusionGoniometer::problem`]).
    #[must_use]
    pub fn resolve(&self) -> super::DiffusionGoniometer {
        let d = super::DiffusionGoniometer::default();
        super::DiffusionGoniometer {
            sample_width_m: self.sample_width_m.map_or(d.sample_width_m, |r| r.0),
            source_distance_m: self.source_distance_m.map_or(d.source_distance_m, |r| r.0),
            receiver_distance_m: self
                .receiver_distance_m
                .map_or(d.receiver_distance_m, |r| r.0),
            receivers: self.receivers.unwrap_or(d.receivers),
            receiver_step_deg: self.receiver_step_deg.map_or(d.receiver_step_deg, |r| r.0),
        }
    }
}

/// `[[surfaces]]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SurfaceFile {
    /// Material name.
    pub material: String,
    /// Corners in order, metres; seen from inside the room they run counter-clockwise.
    pub vertices: Vec<Point>,
    /// Group name for comparisons.
    pub group: Option<String>,
    /// Extrusion axis of a 1D diffuser.
    pub profile_axis: Option<Point>,
}

/// `[box]`: a shoebox with one corner at `origin_m` (default the origin).
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct BoxFile {
    /// Size along x, y, z in metres.
    pub size_m: Point,
    /// Corner with the smallest coordinates, metres (extension; default origin).
    pub origin_m: Option<Point>,
    /// Material of z = 0.
    pub floor: Option<String>,
    /// Material of the top.
    pub ceiling: Option<String>,
    /// Material of the four walls unless given one by one.
    pub walls: Option<String>,
    /// Wall at x = 0.
    pub x0: Option<String>,
    /// Wall at x = size.
    pub x1: Option<String>,
    /// Wall at y = 0.
    pub y0: Option<String>,
    /// Wall at y = size.
    pub y1: Option<String>,
    /// Faces left out (extension for open models), e.g. `["y1"]`.
    #[serde(default)]
    pub omit: Vec<String>,
    /// Extrusion axis of a 1D diffuser profile per face, e.g.
    /// `{ y1 = [0, 0, 1] }` (the profile varies across it).
    #[serde(default)]
    pub profile_axes: BTreeMap<String, Point>,
}

/// `[mesh]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MeshFile {
    /// OBJ file, relative to the room file.
    pub file: String,
    /// OBJ material (usemtl) or group name → room material.
    #[serde(default)]
    pub materials: BTreeMap<String, String>,
    /// OBJ material (usemtl) or group name → extrusion axis of a 1D diffuser
    /// profile on those faces, e.g. `{ RearWall = [0, 0, 1] }`.
    #[serde(default)]
    pub profile_axes: BTreeMap<String, Point>,
}

/// `[[sources]]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SourceFile {
    /// Name.
    pub name: String,
    /// Position, metres.
    pub position: Point,
}

/// `[[receivers]]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ReceiverFile {
    /// Name.
    pub name: String,
    /// Centre, metres.
    pub position: Point,
    /// Sphere radius, metres.
    pub radius_m: Option<Real>,
}
