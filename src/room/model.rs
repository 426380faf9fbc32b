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
