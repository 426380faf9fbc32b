//! Reading a measured impulse response from a WAV file (mono, or the first
//! channel; 16/24/32-bit integer or 32-bit float PCM) with checks that name the
//! file and what is wrong.

use std::path::{Path, PathBuf};

/// Shortest usable response after its onset (s): C80 needs 80 ms plus a late part,
/// and the noise search needs at least 10 averaging intervals.
pub const MIN_DURATION_AFTER_ONSET_S: f64 = 0.2;

/// What is wrong, from what hound reported: a file that cannot be read at
/// all, or one that is not a WAV file polaray reads.
fn wav_problem(e: &hound::Error) -> String {
    match e {
        hound::Error::IoError(io)
            if matches!(
                io.kind(),
                std::io::ErrorKind::NotFound
                    | std::io::ErrorKind::PermissionDenied
                    | std::io::ErrorKind::IsADirectory
            ) =>
        {
            format!("cannot read the file: {}", crate::messages::io_problem(io))
        }
        other => format!(
            "cannot read as a WAV file ({other}); give a PCM or 32-bit float WAV impulse response"
        ),
    }
}

/// Consecutive samples at full scale that count as clipping.
pub const CLIP_RUN: usize = 3;

/// A WAV file that cannot be used.
#[derive(Debug, thiserror::Error)]
pub enum WavError {
    /// Not readable as WAV.
    #[error("{path}: {}", wav_problem(.cause))]
    Unreadable {
        /// File.
        path: PathBuf,
        /// What hound reported (not a `source`: the message already says it).
        cause: hound::Error,
    },
    /// A sample format polaray does not read.
    #[error("{path}: {bits}-bit {format} samples are not supported; use 16, 24 or 32-bit integer or 32-bit float")]
    Format {
        /// File.
        path: PathBuf,
        /// Bits per sample.
        bits: u16,
        /// "integer" or "float".
        format: &'static str,
    },
    /// No samples.
    #[error("{path}: the file holds no samples")]
    Empty {
        /// File.
        path: PathBuf,
    },
    /// Every sample zero.
    #[error("{path}: every sample is zero; the recording holds no impulse response")]
    Silent {
        /// File.
        path: PathBuf,
    },
    /// All samples equal (a DC level).
    #[error("{path}: every sample has the same value ({value}); the recording holds no impulse response")]
    Flat {
        /// File.
        path: PathBuf,
        /// The value.
        value: f64,
    },
    /// The peak sits at full scale for several samples.
    #[error("{path}: clipped: {run} consecutive samples at full scale from {time_s:.4} s; record again with less gain")]
    Clipped {
        /// File.
        path: PathBuf,
        /// Length of the longest full-scale run.
        run: usize,
        /// Where it starts (s).
        time_s: f64,
    },
    /// Too little response after the onset.
    #[error("{path}: only {after_onset_s:.3} s of response after the onset at {onset_s:.3} s; at least {MIN_DURATION_AFTER_ONSET_S} s are needed")]
    TooShort {
        /// File.
        path: PathBuf,
        /// Onset (s).
        onset_s: f64,
        /// Duration after it (s).
        after_onset_s: f64,
    },
}

/// Samples of the first channel, scaled to ±1 full scale, and the sample rate.
#[derive(Clone, Debug, PartialEq)]
pub struct ImpulseResponse {
    /// The file read.
    pub path: PathBuf,
    /// Sample rate (Hz).
    pub sample_rate_hz: f64,
    /// First channel, full scale = 1.
    pub samples: Vec<f64>,
    /// Channels in the file (only the first is used).
    pub channels: u16,
}

/// Reads and checks a WAV impulse response.
pub fn read_wav(path: &Path) -> Result<ImpulseResponse, WavError> {
    let p = || path.to_path_buf();
    let mut reader =
        hound::WavReader::open(path).map_err(|cause| WavError::Unreadable { path: p(), cause })?;
    let spec = reader.spec();
    let channels = spec.channels.max(1) as usize;
    let unreadable = |cause| WavError::Unreadable { path: p(), cause };
    let (samples, full_scale): (Vec<f64>, f64) = match (spec.sample_format, spec.bits_per_sample) {
        (hound::SampleFormat::Int, bits @ (16 | 24 | 32)) => {
            let scale = f64::from(1u32 << (bits - 1));
            let v = reader
                .samples::<i32>()
                .step_by(channels)
                .map(|s| s.map(|s| f64::from(s) / scale))
                .collect::<Result<Vec<_>, _>>()
                .map_err(unreadable)?;
            (v, (scale - 1.0) / scale)
        }
        (hound::SampleFormat::Float, 32) => {
            let v = reader
                .samples::<f32>()
                .step_by(channels)
                .map(|s| s.map(f64::from))
                .collect::<Result<Vec<_>, _>>()
                .map_err(unreadable)?;
            (v, 1.0)
        }
        (fmt, bits) => {
            return Err(WavError::Format {
                path: p(),
                bits,
                format: if fmt == hound::SampleFormat::Int {
                    "integer"
                } else {
                    "float"
                },
            })
        }
    };
    let sample_rate_hz = f64::from(spec.sample_rate);
    check_samples(path, &samples, full_scale, sample_rate_hz)?;
    Ok(ImpulseResponse {
        path: p(),
        sample_rate_hz,
        samples,
        channels: spec.channels,
    })
}

/// The checks of [`read_wav`] on decoded samples (full scale = largest magnitude
/// the format can hold).
pub fn check_samples(
    path: &Path,
    samples: &[f64],
    full_scale: f64,
    sample_rate_hz: f64,
) -> Result<(), WavError> {
    let p = || path.to_path_buf();
    let Some(&first) = samples.first() else {
        return Err(WavError::Empty { path: p() });
    };
    if samples.iter().all(|&x| x == 0.0) {
        return Err(WavError::Silent { path: p() });
    }
    if samples.iter().all(|&x| x == first) {
        return Err(WavError::Flat {
            path: p(),
            value: first,
        });
    }
    // Longest run at full scale.
    let (mut run, mut best, mut best_start) = (0usize, 0usize, 0usize);
    for (i, x) in samples.iter().enumerate() {
        if x.abs() >= full_scale {
            run += 1;
            if run > best {
                best = run;
                best_start = i + 1 - run;
            }
        } else {
            run = 0;
        }
    }
    if best >= CLIP_RUN {
        return Err(WavError::Clipped {
            path: p(),
            run: best,
            time_s: best_start as f64 / sample_rate_hz,
        });
    }
    let onset = super::onset::onset_index(samples).unwrap_or(0);
    let after = (samples.len() - onset) as f64 / sample_rate_hz;
    if after < MIN_DURATION_AFTER_ONSET_S {
        return Err(WavError::TooShort {
            path: p(),
            onset_s: onset as f64 / sample_rate_hz,
            after_onset_s: after,
        });
    }
    Ok(())
}
