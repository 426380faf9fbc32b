//! Where the Kirchhoff prediction is known to be unreliable, found from the
//! request and returned as data (the command prints them).
//!
//! The thresholds are common practice, no source: they mark where the
//! approximation's assumptions (surface large and smooth on the scale of a
//! wavelength, locally plane reflection, no shadowing, plane waves in
//! independent wells) begin to fail, not where errors reach a given size.

use std::fmt;

/// Sample narrower than this many wavelengths triggers [`ProfileWarning::SmallSample`].
pub const MIN_WAVELENGTHS: f64 = 3.0;
/// Incidence beyond this angle (degrees) is grazing.
pub const GRAZING_INCIDENCE_DEG: f64 = 70.0;
/// Receivers beyond this angle (degrees) are grazing.
pub const GRAZING_RECEIVER_DEG: f64 = 80.0;
/// Distances under this many wavelengths (lowest band) count as close.
pub const CLOSE_WAVELENGTHS: f64 = 1.0;
/// Depth-to-width ratio above which wells count as deep and narrow.
pub const DEEP_WELL_RATIO: f64 = 4.0;
/// Well width below which viscous and thermal losses matter, m.
pub const NARROW_WELL_M: f64 = 0.02;

/// One condition under which the prediction is doubtful.
#[derive(Clone, Debug, PartialEq)]
pub enum ProfileWarning {
    /// The sample spans few wavelengths: edge diffraction dominates and the
    /// Kirchhoff boundary values are poor near the edges.
    SmallSample {
        /// Band, Hz (nominal).
        band_hz: f64,
        /// Sample size (smallest side) in wavelengths at the band centre.
        wavelengths: f64,
    },
    /// Source near grazing: shadowing and multiple reflection are ignored.
    GrazingIncidence {
        /// Source angle, degrees.
        incidence_deg: f64,
    },
    /// Receivers near grazing, where the Kirchhoff approximation is poor.
    GrazingReceivers {
        /// How many receivers lie beyond [`GRAZING_RECEIVER_DEG`].
        count: usize,
    },
    /// Part of the surface faces away from the source: Kirchhoff ignores the
    /// shadow and counts it as lit.
    SelfShadowing {
        /// Source angle, degrees.
        incidence_deg: f64,
        /// Fraction of the surface length facing away from the source.
        fraction: f64,
    },
    /// Above c/(2w) cross modes can form in a well: the plane-wave reflection
    /// factor e^{−2jkd} no longer holds.
    WellCrossModes {
        /// Band, Hz (nominal).
        band_hz: f64,
        /// The limit c/(2w), Hz.
        limit_hz: f64,
    },
    /// Deep or narrow wells: coupling between wells and viscous/thermal
    /// losses are not modelled (lossless, independent wells).
    DeepNarrowWells {
        /// Largest depth / well width.
        depth_to_width: f64,
        /// Well width, m.
        well_width_m: f64,
    },
    /// Source or receivers closer than the sample size or a wavelength:
    /// the result is a near-field response of this geometry, not a
    /// directivity, and locally plane reflection is a poorer approximation.
    CloseGoniometer {
        /// The smaller of the two distances, m.
        distance_m: f64,
        /// Largest sample dimension, m.
        sample_size_m: f64,
    },
}

impl fmt::Display for ProfileWarning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::SmallSample { band_hz, wavelengths } => write!(
                f,
                "{band_hz} Hz: the sample is only {wavelengths:.1} wavelengths across; below about {MIN_WAVELENGTHS} the Kirchhoff prediction is rough (edge diffraction)"
            ),
            Self::GrazingIncidence { incidence_deg } => write!(
                f,
                "incidence {incidence_deg}°: beyond {GRAZING_INCIDENCE_DEG}° shadowing and multiple reflection, which Kirchhoff ignores, matter"
            ),
            Self::GrazingReceivers { count } => write!(
                f,
                "{count} receivers lie beyond ±{GRAZING_RECEIVER_DEG}°, where the Kirchhoff prediction is unreliable"
            ),
            Self::SelfShadowing { incidence_deg, fraction } => write!(
                f,
                "incidence {incidence_deg}°: {:.0} % of the surface faces away from the source, but is treated as lit (no shadowing in Kirchhoff)",
                fraction * 100.0
            ),
            Self::WellCrossModes { band_hz, limit_hz } => write!(
                f,
                "{band_hz} Hz: above {limit_hz:.0} Hz (c / 2w) cross modes form in the wells; the plane-wave well model fails"
            ),
            Self::DeepNarrowWells { depth_to_width, well_width_m } => write!(
                f,
                "wells up to {depth_to_width:.1} times deeper than wide ({well_width_m} m): coupling between wells and losses are not modelled, so the prediction is optimistic"
            ),
            Self::CloseGoniometer { distance_m, sample_size_m } => write!(
                f,
                "distance {distance_m} m is under the sample size {sample_size_m:.3} m or a wavelength: this is a near-field response of this geometry, and locally plane reflection is a poor approximation"
            ),
        }
    }
}
