//! The virtual goniometer: measures any [`crate::law::ReflectionLaw`] the way
//! a laboratory measures a sample (ISO 17497-2 style polar responses), and
//! reports what only a simulation can add: how much energy really left by the
//! mirror lobe.
//!
//! # Method
//! - Layout ([`ArcGeometry`]): source at angle ψ in the x–z plane of the local
//!   frame (normal +Z), receivers on an arc in that plane; the specular zone by
//!   the image-source rule (reference.md §2).
//! - Shots: shot i draws from `random::Stream::new(seed, i)`, fixed chunks of
//!   8192 shots summed in order, so results do not depend on the thread count.
//! - Receivers: a non-mirror sample counts for receiver i when its in-plane
//!   angle θ = atan2(x, z) is within ±step/2 of the receiver and its
//!   out-of-plane angle η = asin y within the slab. The sum is divided by the
//!   cell's solid angle above the surface (Δθ · 2 sin η0), giving energy per
//!   steradian (radiant intensity), so an even reflection reads the same
//!   everywhere, the ±90° half-cells included.
//! - The arc as a planar measurement: the mirror energy is spread evenly over
//!   the zone receivers (how a finite sample's specular lobe appears); the
//!   non-mirror energy is spread over the arc in proportion to the readings.
//!   Hence s_z = s (1 − f), f the zone share of the non-mirror readings
//!   (reference.md §3), independent of the slab width.
//! - Extruded (1D) profiles scatter across their extrusion axis only:
//!   [`CrossAxisView`] lays the arc in that plane.
//! - Reported per band: levels (dB re the total), s_z, d (equal-area), the
//!   bound d_max(s_z), d/d_max, the law's own scattering coefficient
//!   1 − mirror/reflected, and the energy balance.

pub mod arc;
pub mod coefficients;
pub mod cross_axis;
pub mod material_file;
pub mod measure;
pub mod polar_file;

pub use arc::{ArcError, ArcGeometry};
pub use cross_axis::CrossAxisView;
pub use material_file::{load_material_file, parse_material_file, MaterialFile, MaterialFileError};
pub use measure::{
    measure, measure_by_quadrature, BandReport, EnergyBalance, GonioError, GonioReport,
    GonioRequest, EMPTY_LEVEL_DB, MIRROR_NOTE,
};
pub use polar_file::to_polar_file;
