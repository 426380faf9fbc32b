//! Polar responses of surfaces: the polaray polar data file ([`data`], [`load`],
//! [`csv`]), the coefficients computed from it ([`diffusion`], [`scattering`],
//! [`zone`], [`weights`]), the bound that links scattering and diffusion
//! ([`bound`]), the per-file analysis ([`analysis`]), the reverberation-chamber
//! scattering coefficient ([`chamber`]) and the charts ([`plot`]).
//!
//! File formats are described in `FORMAT.md` beside this module.

pub mod bound;
pub mod data;
pub mod diffusion;
pub mod scattering;
pub mod weights;
pub mod zone;

pub use bound::{check_material_pair, BoundViolation, ZoneSize};
pub use data::{Arrangement, GoniometerGeometry, PolarFile, PolarResponse};
pub use zone::{Direction, ZoneGeometry, ZoneRule};
pub mod load;
pub use load::{check_polar_file, load_polar_file, parse_polar_toml, PolarFileError};
pub mod analysis;
pub mod chamber;
pub mod csv;
pub mod plot;
