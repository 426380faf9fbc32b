//! Polar responses of surfaces: the polaray polar data file ([`data`], read and
//! checked by [`load`]; the quick [`csv`] form), the coefficients computed from
//! it ([`diffusion`], [`scattering`], [`zone`], [`weights`]), the bound that
//! links scattering and diffusion ([`bound`]), the per-file [`analysis`], the
//! reverberation-chamber scattering coefficient ([`chamber`]) and the charts
//! ([`plot`]).
//!
#![doc = include_str!("FORMAT.md")]

pub mod analysis;
pub mod bound;
pub mod chamber;
pub mod csv;
pub mod data;
pub mod diffusion;
pub mod load;
pub mod plot;
pub mod scattering;
pub mod weights;
pub mod zone;

pub use bound::{check_material_pair, BoundViolation, ZoneSize};
pub use data::{Arrangement, GoniometerGeometry, PolarFile, PolarResponse};
pub use load::{check_polar_file, load_polar_file, parse_polar_toml, PolarFileError};
pub use zone::{Direction, ZoneGeometry, ZoneRule};
