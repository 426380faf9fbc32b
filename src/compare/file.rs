//! The comparison file schema (TOML) as serde types; see `FORMAT.md` beside
//! this file for the format. Unknown fields are errors, so typos never pass.

use std::collections::BTreeMap;

use serde::Deserialize;

use crate::room::file::{MaterialFile, Real};

/// The whole comparison file.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ComparisonFile {
    /// Title of the comparison (defaults to the file name).
    pub name: Option<String>,
    /// Room file, relative to the comparison file.
    pub room: String,
    /// Reflection laws compared (default: split, bounded, polar).
    pub laws: Option<Vec<String>>,
    /// Law for materials that lack a law's data (none: that is an error).
    pub fallback: Option<String>,
    /// Rays per source over all batches (default: the room's `rays`).
    pub rays: Option<usize>,
    /// Batches the rays are split into for standard errors (default 20).
    pub batches: Option<usize>,
    /// Seed (default: the room's `seed`).
    pub seed: Option<u64>,
    /// Sources traced, by name (default: all).
    pub sources: Option<Vec<String>>,
    /// Receivers traced and judged, by name (default: all).
    pub receivers: Option<Vec<String>>,
    /// Parameters judged (default: all nine).
    pub parameters: Option<Vec<String>>,
    /// k: the noise band is ±k standard errors (default: the Student-t
    /// quantile with a Bonferroni allowance, see `verdict.rs`).
    pub noise_factor: Option<Real>,
    /// Receiver estimator: `exact-early` (default), `next-event` or `sphere`.
    pub estimator: Option<String>,
    /// Band of the echogram and decay charts, Hz (default 1000).
    pub plot_band_hz: Option<u32>,
    /// Materials the variants use, in the room-file format; `polar` is
    /// relative to the comparison file.
    #[serde(default)]
    pub materials: BTreeMap<String, MaterialFile>,
    /// Candidate surface treatments.
    #[serde(default)]
    pub variants: Vec<VariantFile>,
    /// The s-only envelope.
    pub envelope: Option<EnvelopeFile>,
}

/// `[[variants]]`: one candidate treatment.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct VariantFile {
    /// Name shown in reports.
    pub name: String,
    /// Surface group → material (from this file's `[materials]` or the room's).
    #[serde(default)]
    pub replace: BTreeMap<String, String>,
}

/// `[envelope]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct EnvelopeFile {
    /// Materials treated as known by their scattering coefficient alone
    /// (default: those with neither diffusion nor polar data); `[]` turns the envelope off.
    pub materials: Option<Vec<String>>,
    /// Variant the envelope runs on (default: the first).
    pub variant: Option<String>,
}
