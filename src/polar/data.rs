//! The polar data file: goniometer geometry plus one response per band and
//! angle of incidence, measured or predicted.
//!
//! Angles follow one convention everywhere: measured from the sample normal in
//! degrees, signed in the measurement plane, source and receivers alike, so the
//! mirror direction of a source at ψ is the receiver at −ψ. Hemispherical data
//! add an azimuth φ (degrees) to each receiver and to the source.

use serde::{Deserialize, Serialize};

/// How the receivers are arranged.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Arrangement {
    /// An arc of receivers in one plane through the normal.
    Plane,
    /// A (θ, φ) grid over the hemisphere.
    Hemisphere,
}

/// Geometry of the (real or virtual) goniometer.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct GoniometerGeometry {
    /// Receiver arrangement.
    pub arrangement: Arrangement,
    /// Sample width across the measurement plane, m.
    pub sample_width_m: f64,
    /// Sample depth (second dimension, hemispherical data), m.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub sample_depth_m: Option<f64>,
    /// Source distance from the sample centre, m.
    pub source_distance_m: f64,
    /// Receiver distance from the sample centre, m.
    pub receiver_distance_m: f64,
    /// Half-width of the specular zone in degrees, overriding the zone found
    /// from the geometry.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub zone_half_width_deg: Option<f64>,
}

/// One polar response: one band, one angle of incidence.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PolarResponse {
    /// Band centre frequency, Hz (octave or third-octave).
    pub band_hz: f64,
    /// Source angle from the normal, degrees.
    pub incidence_deg: f64,
    /// Source azimuth, degrees (hemisphere only).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub incidence_azimuth_deg: Option<f64>,
    /// Receiver angles from the normal, degrees.
    pub receiver_deg: Vec<f64>,
    /// Receiver azimuths, degrees (hemisphere only), one per receiver.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub receiver_azimuth_deg: Option<Vec<f64>>,
    /// Level at each receiver, dB (any common reference).
    pub level_db: Vec<f64>,
    /// Complex pressure, real part, one per receiver (optional).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pressure_re: Option<Vec<f64>>,
    /// Complex pressure, imaginary part (optional, with `pressure_re`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pressure_im: Option<Vec<f64>>,
    /// Level of the flat reference of the same footprint, dB (optional).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reference_level_db: Option<Vec<f64>>,
    /// Complex pressure of the flat reference, real part (optional).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reference_re: Option<Vec<f64>>,
    /// Complex pressure of the flat reference, imaginary part (optional).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reference_im: Option<Vec<f64>>,
}

/// A whole polar data file.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PolarFile {
    /// Descriptive name of the surface.
    pub name: String,
    /// Where the data come from (free text: "measured", "predicted by polaray profile ...").
    #[serde(default)]
    pub origin: String,
    /// Goniometer geometry.
    pub geometry: GoniometerGeometry,
    /// Responses, any order.
    pub responses: Vec<PolarResponse>,
}
