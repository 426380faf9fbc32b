//! Predicted polar responses of candidate surface profiles (`polaray profile`).
//!
//! A profile specification ([`spec`], format in `src/profile/FORMAT.md`)
//! names a surface (flat, sinusoid, well diffusers from number sequences,
//! piecewise-linear points, or a grid of wells), a virtual goniometer and
//! bands. [`predict`] cuts the surface into elements ([`surface`]), evaluates
//! the Kirchhoff integral ([`kirchhoff`]) with the real source and receiver
//! distances for the profile and for a flat rigid reference of the same
//! footprint, and returns a [`crate::polar::PolarFile`] plus [`warnings`].
//!
//! Method and its limits:
//! - Extruded profiles: 2D Helmholtz–Kirchhoff integral, line source, exact
//!   2D Green's function (−j/4) H0^(2)(kr). Grid profiles: 3D integral over the
//!   aperture plane, point source, G = e^{−jkr}/(4πr); wells only (no raised
//!   relief), so shadowing never arises there, but cross-coupling between
//!   wells and the finite sample's edges are treated as coarsely as in 1D.
//! - Wells: plane-wave, lossless, rigid-bottomed, R = e^{−2jkd}; fins rigid.
//! - Known failures: samples under a few wavelengths, grazing source or
//!   receivers, self-shadowing relief, deep narrow wells (coupling, losses),
//!   well cross modes above c/(2w), small distances. Each is reported as a
//!   [`warnings::ProfileWarning`].
//! - Integration rule: elements ≤ λ_min / 10 (configurable, ≥ 6 per
//!   wavelength) at the highest frequency evaluated in each band, at least 4
//!   across each well (configurable), boundaries on well and fin edges; each
//!   element's phase progression is integrated exactly (Filon-type midpoint).

pub mod bem;
pub mod green;
pub mod kirchhoff;
pub mod predict;
pub mod sequence;
pub mod spec;
pub mod surface;
pub mod warnings;

pub use predict::{predict, PredictError, Prediction};
pub use spec::{load_spec, parse_spec, ProfileSpec, SpecError};
pub use warnings::ProfileWarning;
