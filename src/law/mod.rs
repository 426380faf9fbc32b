//! Reflection laws: how a surface redistributes the energy of an arriving ray.
//!
//! A law is the acoustic counterpart of a BSDF in a physically based renderer.
//! It works in the local frame of [`crate::geometry::Frame`] (normal = +Z), with
//! `wo` pointing back along the arriving ray and `wi` the outgoing direction,
//! both away from the surface. One law instance serves one material, so it
//! includes the absorption: the weights it returns already hold the 1 − α factor.

pub mod bounded;
pub mod factory;
pub mod measured;
pub mod single_band;
pub mod split;

use glam::DVec3;

use crate::bands::Bands;

pub use bounded::{Adjustment, BoundedLaw, BoundedLawError, CalibrationArc, DiffusionRange};
pub use factory::{material_arc, LawError, LawKind, LawSet, OwnLaw, RoomLaws};
pub use measured::MeasuredPolarLaw;
pub use split::SplitLaw;

/// Which part of a law produced a sample.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize)]
pub enum Lobe {
    /// The mirror (specular) reflection, a delta distribution.
    Mirror,
    /// An even, cosine-weighted (Lambert) spread.
    Diffuse,
    /// A concentrated or measured directional distribution.
    Directional,
}

/// One sampled reflection.
#[derive(Clone, Copy, Debug)]
pub struct LawSample {
    /// Outgoing direction in the local frame, unit length, z ≥ 0.
    pub wi: DVec3,
    /// Energy multiplier per band (reflected energy ÷ probability of this
    /// sample), absorption included. Its expectation over samples is 1 − α.
    pub weight: Bands,
    /// Probability density of `wi` per steradian for non-mirror lobes, times the
    /// probability of having chosen a non-mirror lobe; `None` for the mirror lobe
    /// and other lobes without a density per steradian (the reflection cone of
    /// an extruded profile in [`MeasuredPolarLaw`]).
    pub pdf: Option<f64>,
    /// The lobe that fired.
    pub lobe: Lobe,
}

/// A surface reflection model for one material.
///
/// Implementations must be pure (`Send + Sync`, no interior randomness): all
/// randomness comes in as the uniform numbers `u_lobe` and `u_dir`.
pub trait ReflectionLaw: Send + Sync {
    /// Short name, as given to `--law`.
    fn name(&self) -> &'static str;

    /// Draws an outgoing direction for the arriving direction `wo` (local, unit,
    /// z > 0) from uniform numbers in [0, 1). `None` means the ray ends here.
    fn sample(&self, wo: DVec3, u_lobe: f64, u_dir: [f64; 2]) -> Option<LawSample>;

    /// Fraction of the arriving energy per band that leaves by the mirror lobe
    /// (absorption included). For a laboratory sample this is (1 − α)(1 − s).
    fn mirror_fraction(&self, wo: DVec3) -> Bands;

    /// Reflected energy per steradian per band of the non-mirror part, for
    /// arriving `wo` and outgoing `wi` (both local). Integrated over the
    /// hemisphere it gives (1 − α) minus [`ReflectionLaw::mirror_fraction`].
    fn eval(&self, wo: DVec3, wi: DVec3) -> Bands;

    /// Density per steradian with which [`ReflectionLaw::sample`] returns `wi`
    /// through a non-mirror lobe (including the probability of picking one).
    fn pdf(&self, wo: DVec3, wi: DVec3) -> f64;
}

/// Cosine-weighted direction on the local hemisphere: θ = asin √u1, φ = 2π u2
/// (Malley's method; reference.md §6). Returns a unit vector with z ≥ 0.
#[must_use]
pub fn sample_cosine(u: [f64; 2]) -> DVec3 {
    let sin_t = u[0].sqrt();
    let cos_t = (1.0 - u[0]).max(0.0).sqrt();
    let phi = std::f64::consts::TAU * u[1];
    DVec3::new(sin_t * phi.cos(), sin_t * phi.sin(), cos_t)
}
