//! Polar responses of surfaces: the polaray polar data file ([`data`]), and the
//! coefficients computed from it (diffusion, scattering, the bound that links them).

pub mod data;

pub use data::{Arrangement, GoniometerGeometry, PolarFile, PolarResponse};
