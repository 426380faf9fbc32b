//! Receivers: detection spheres and the echograms they fill.
//!
//! A receiver is a sphere of radius r (volume V_R = 4/3 π r³). A ray segment
//! that crosses it with chord ℓ adds e ℓ / V_R to the bin of the chord
//! midpoint's arrival time, e being the ray's energy per band at that
//! midpoint. The expected sum is the energy fluence in J/m² for the source's
//! emitted energy (Kuttruff, Room Acoustics, §9; reference.md §6): a
//! free-field point source of energy E0 gives E0 / (4π d²).

mod echogram;
mod sphere;
mod volume;

pub use echogram::{ArrivalLog, Echogram};
pub use sphere::{default_radius_m, lateral_axis, DetectionSphere, SphereSet, TARGET_HITS_PER_BIN};
pub use volume::{DetectionVolume, VolumeWindow, GROWTH_STEPS};
