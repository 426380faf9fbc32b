//! The in-memory room: materials, planar surfaces, their triangles, sources
//! and receivers, and the settings of a run. Built by the loader; read by
//! everything downstream, never modified by it.

use std::path::PathBuf;

use glam::DVec3;

use crate::air::AirConditions;
use crate::bands::{BandSet, Bands};

/// Acoustic data of one material, per band of the room's [`BandSet`].
#[derive(Clone, Debug)]
pub struct Material {
    /// Name used in the room file.
    pub name: String,
    /// Random-incidence absorption coefficient α per band, 0..1.
    pub absorption: Bands,
    /// Random-incidence scattering coefficient s per band, 0..1 (ISO 17497-1).
    pub scattering: Bands,
    /// Diffusion coefficient d per band, 0..1 (ISO 17497-2), if given.
    pub diffusion: Option<Bands>,
    /// Polar response file for the `polar` law, resolved relative to the room file.
    pub polar_file: Option<PathBuf>,
    /// The goniometer the diffusion coefficients were measured (or predicted)
    /// with; `None` means [`DiffusionGoniometer::default`].
    pub goniometer: Option<DiffusionGoniometer>,
}

/// A single-plane goniometer arrangement: what a diffusion coefficient means
/// depends on it (how many receivers, how many in the specular zone), so the
/// scattering–diffusion check and the bounded law's calibration use it.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct DiffusionGoniometer {
    /// Sample width across the measurement plane, m.
    pub sample_width_m: f64,
    /// Source distance from the sample centre, m.
    pub source_distance_m: f64,
    /// Receiver distance from the sample centre, m.
    pub receiver_distance_m: f64,
    /// Number of receivers, odd, centred on the normal.
    pub receivers: usize,
    /// Receiver spacing, degrees.
    pub receiver_step_deg: f64,
}

impl Default for DiffusionGoniometer {
    /// The defaults of `polaray polar` ([`crate::polar::zone`]): a 1.5 m
    /// sample, source 10 m, receivers 5 m, 37 receivers at 5° (5 in the zone).
    fn default() -> Self {
        use crate::polar::zone::{
            DEFAULT_RECEIVER_DISTANCE_M, DEFAULT_SAMPLE_WIDTH_M, DEFAULT_SOURCE_DISTANCE_M,
        };
        Self {
            sample_width_m: DEFAULT_SAMPLE_WIDTH_M,
            source_distance_m: DEFAULT_SOURCE_DISTANCE_M,
            receiver_distance_m: DEFAULT_RECEIVER_DISTANCE_M,
            receivers: 37,
            receiver_step_deg: 5.0,
        }
    }
}

impl DiffusionGoniometer {
    /// The arrangement at normal incidence, for the scattering–diffusion check.
    #[must_use]
    pub fn zone_geometry(&self) -> crate::polar::zone::ZoneGeometry {
        let c = (self.receivers as f64 - 1.0) / 2.0;
        crate::polar::zone::ZoneGeometry {
            receiver_deg: (0..self.receivers)
                .map(|i| (i as f64 - c) * self.receiver_step_deg)
                .collect(),
            incidence_deg: 0.0,
            zone: crate::polar::zone::ZoneRule::Sample {
                sample_width_m: self.sample_width_m,
                sample_depth_m: None,
                source_distance_m: self.source_distance_m,
                receiver_distance_m: self.receiver_distance_m,
            },
        }
    }

    /// What makes the arrangement unusable, if anything: lengths must be
    /// positive, receivers an odd number within ±90°, and the specular zone
    /// at normal incidence an odd, centred run smaller than the arc (so that
    /// the bound and the bounded law's calibration are defined).
    #[must_use]
    pub fn problem(&self) -> Option<String> {
        let lengths = [
            ("sample_width_m", self.sample_width_m),
            ("source_distance_m", self.source_distance_m),
            ("receiver_distance_m", self.receiver_distance_m),
            ("receiver_step_deg", self.receiver_step_deg),
        ];
        for (name, v) in lengths {
            if !(v.is_finite() && v > 0.0) {
                return Some(format!("{name} = {v} must be a positive number"));
            }
        }
        if self.receivers < 3 || self.receivers.is_multiple_of(2) {
            return Some(format!(
                "receivers = {}: give an odd number, at least 3, so one sits on the normal",
                self.receivers
            ));
        }
        let extent = (self.receivers as f64 - 1.0) / 2.0 * self.receiver_step_deg;
        if extent > 90.0 + 1e-9 {
            return Some(format!(
                "{} receivers at {}° reach ±{extent}°, past the surface; use fewer or a smaller step",
                self.receivers, self.receiver_step_deg
            ));
        }
        let zone = self.zone_geometry().membership();
        let count = zone.iter().filter(|&&z| z).count();
        let centre = (self.receivers - 1) / 2;
        let centred = count % 2 == 1
            && zone
                .iter()
                .enumerate()
                .all(|(i, &z)| z == (i.abs_diff(centre) <= (count - 1) / 2));
        if !centred || count >= self.receivers {
            return Some(format!(
                "the specular zone at normal incidence holds {count} of {} receivers; it must be \
                 an odd, centred run smaller than the arc (change the sample width or the distances)",
                self.receivers
            ));
        }
        None
    }
}

/// One planar polygon of the room as the user described it.
#[derive(Clone, Debug)]
pub struct Surface {
    /// Where it came from, for messages: `surfaces[3]`, `box.floor`, `mesh face 17 (group Seats)`.
    pub label: String,
    /// Index into [`Room::materials`].
    pub material: usize,
    /// Vertices in order, metres.
    pub vertices: Vec<DVec3>,
    /// Unit normal pointing into the room (after orientation checks).
    pub normal: DVec3,
    /// Area, m².
    pub area_m2: f64,
    /// Extrusion axis of a 1D (extruded) diffuser profile on this surface, if any.
    pub profile_axis: Option<DVec3>,
    /// Name of the group the surface belongs to (mesh group or material name, or
    /// the box face), used by comparisons to swap treatments.
    pub group: String,
}

/// A triangle of the traced mesh.
#[derive(Clone, Copy, Debug)]
pub struct Triangle {
    /// Corners, metres.
    pub vertices: [DVec3; 3],
    /// Index into [`Room::surfaces`].
    pub surface: u32,
}

impl Triangle {
    /// Unnormalized normal (v1 − v0) × (v2 − v0); its length is twice the area.
    #[must_use]
    pub fn cross(&self) -> DVec3 {
        (self.vertices[1] - self.vertices[0]).cross(self.vertices[2] - self.vertices[0])
    }
}

/// An omnidirectional point source.
#[derive(Clone, Debug)]
pub struct Source {
    /// Name from the room file.
    pub name: String,
    /// Position, metres.
    pub position: DVec3,
}

/// A detection sphere.
#[derive(Clone, Debug)]
pub struct Receiver {
    /// Name from the room file.
    pub name: String,
    /// Centre, metres.
    pub position: DVec3,
    /// Radius in metres, if the room file gives one (otherwise chosen by the tracer).
    pub radius_m: Option<f64>,
}

/// Settings of a run (the `[settings]` table with defaults filled in).
#[derive(Clone, Debug)]
pub struct Settings {
    /// Octave bands.
    pub bands: BandSet,
    /// Rays per source.
    pub rays: usize,
    /// Echogram length in s; `None` means 1.5 × the longest Eyring estimate, capped.
    pub duration_s: Option<f64>,
    /// Echogram bin width, s.
    pub bin_s: f64,
    /// Seed of all random streams.
    pub seed: u64,
    /// Air conditions.
    pub air: AirConditions,
    /// Whether air absorption acts on the rays.
    pub air_absorption: bool,
    /// An open model: rays leaving it count as lost instead of being an error.
    pub open: bool,
}

impl Default for Settings {
    fn default() -> Self {
        Self {
            bands: BandSet::standard(),
            rays: 20_000,
            duration_s: None,
            bin_s: 0.001,
            seed: 1,
            air: AirConditions::default(),
            air_absorption: true,
            open: false,
        }
    }
}

/// A loaded, checked room.
#[derive(Clone, Debug)]
pub struct Room {
    /// Name from the room file.
    pub name: String,
    /// The room file it came from (empty for rooms built in code).
    pub file: PathBuf,
    /// Run settings.
    pub settings: Settings,
    /// Materials, indexed by [`Surface::material`].
    pub materials: Vec<Material>,
    /// Surfaces, indexed by [`Triangle::surface`].
    pub surfaces: Vec<Surface>,
    /// Triangulation of all surfaces.
    pub triangles: Vec<Triangle>,
    /// Sources.
    pub sources: Vec<Source>,
    /// Receivers.
    pub receivers: Vec<Receiver>,
}
