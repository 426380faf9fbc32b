//! Errors and warnings of the measured-polar law, each naming the polar file
//! and the band (and incidence) concerned.

use std::fmt;
use std::path::PathBuf;

/// A polar file the `polar` law cannot use.
#[derive(Debug, thiserror::Error)]
pub enum MeasuredLawError {
    /// The material names no polar file.
    #[error("material '{material}' has no polar_file; give one to use the polar law")]
    NoPolarFile {
        /// Material name.
        material: String,
    },
    /// The file cannot be read.
    #[error("{}: cannot read the polar file: {}", .file.display(), crate::messages::io_problem(.cause))]
    Read {
        /// Polar file.
        file: PathBuf,
        /// Why (not a `source`: the message already says it).
        cause: std::io::Error,
    },
    /// The file is not a valid polar data file.
    #[error("{}: not a valid polar file: {message}", .file.display())]
    Parse {
        /// Polar file.
        file: PathBuf,
        /// Parser message (with line and column).
        message: String,
    },
    /// A band of the room has no data in the file.
    #[error(
        "{}: no response for the {band_hz} Hz band{detail}; the file has bands {available}; \
         add the band or drop it from the room's band list",
        .file.display()
    )]
    MissingBand {
        /// Polar file.
        file: PathBuf,
        /// Room band, nominal Hz.
        band_hz: u32,
        /// Which third-octave band is missing, if any.
        detail: String,
        /// Bands present in the file, Hz.
        available: String,
    },
    /// One response cannot be used.
    #[error(
        "{}: band {band_hz} Hz, incidence {incidence_deg}°: {problem}",
        .file.display()
    )]
    BadResponse {
        /// Polar file.
        file: PathBuf,
        /// File band, Hz.
        band_hz: f64,
        /// Incidence angle, degrees.
        incidence_deg: f64,
        /// What is wrong and how to fix it.
        problem: String,
    },
}

/// Something the law assumed or approximated while reading a polar file;
/// returned as data so the caller decides how to show it.
#[derive(Clone, Debug, PartialEq)]
pub enum MeasuredLawWarning {
    /// Arrivals outside the measured incidence range use the nearest measured
    /// incidence's pattern.
    IncidenceClamped {
        /// Polar file.
        file: PathBuf,
        /// Room band, nominal Hz.
        band_hz: u32,
        /// Lowest measured incidence (after mirroring), degrees.
        lowest_deg: f64,
        /// Highest measured incidence (after mirroring), degrees.
        highest_deg: f64,
    },
    /// The file has no negative incidences, so the responses were mirrored to
    /// cover them (symmetric sample assumed).
    MirroredIncidences {
        /// Polar file.
        file: PathBuf,
    },
}

impl fmt::Display for MeasuredLawWarning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::IncidenceClamped {
                file,
                band_hz,
                lowest_deg,
                highest_deg,
            } => write!(
                f,
                "{}: band {band_hz} Hz: incidences measured from {lowest_deg}° to {highest_deg}°; \
                 arrivals outside use the nearest measured pattern",
                file.display()
            ),
            Self::MirroredIncidences { file } => write!(
                f,
                "{}: no negative incidences; responses mirrored for them (symmetric sample assumed)",
                file.display()
            ),
        }
    }
}
