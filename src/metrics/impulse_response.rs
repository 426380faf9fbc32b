//! ISO 3382-1 parameters of a measured impulse response: onset on the broadband
//! signal, zero-phase octave filtering, noise floor and tail compensation per
//! band (Lundeby et al. 1995: cut at the crossing point, mean noise power
//! subtracted before the cut, exponential tail added), then the same decay and energy-ratio computation as
//! for simulated echograms (G and J_LF need a calibrated source and a
//! figure-of-eight microphone, so they are left undefined).

use serde::Serialize;

use super::averages::{averages, Averages};
use super::filter_bank::{BandFilter, FilterError};
use super::noise_floor::{find_noise_floor, NoiseFloor, NoiseFloorError};
use super::onset::onset_index;
use super::parameters::{decay_parameters, BandParameters};

/// A band that cannot be analysed.
#[derive(Debug, thiserror::Error, PartialEq)]
pub enum ImpulseResponseError {
    /// The filter cannot be built.
    #[error(transparent)]
    Filter(#[from] FilterError),
    /// The signal is silent.
    #[error("the impulse response is silent")]
    Silent,
}

/// One analysed band of a measured response.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct MeasuredBand {
    /// Parameters (G and J_LF undefined).
    #[serde(flatten)]
    pub parameters: BandParameters,
    /// Background noise re the peak of the band's squared response (dB); `None`
    /// when no floor was found.
    pub noise_floor_db: Option<f64>,
    /// Details of the noise-floor search.
    pub noise: Option<NoiseFloor>,
}

/// All bands of a measured response.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct MeasuredAnalysis {
    /// Sample rate (Hz).
    pub sample_rate_hz: f64,
    /// Broadband onset (s from the file start).
    pub onset_s: f64,
    /// Per band, in the order asked.
    pub bands: Vec<MeasuredBand>,
    /// Single-number averages.
    pub averages: Averages,
}

/// Analyses `samples` (full scale 1) at `sample_rate_hz` in the octave bands
/// `bands_hz`.
pub fn analyse_impulse_response(
    samples: &[f64],
    sample_rate_hz: f64,
    bands_hz: &[u32],
) -> Result<MeasuredAnalysis, ImpulseResponseError> {
    let onset = onset_index(samples).ok_or(ImpulseResponseError::Silent)?;
    let filters = bands_hz
        .iter()
        .map(|&hz| BandFilter::octave(hz, sample_rate_hz))
        .collect::<Result<Vec<_>, _>>()?;
    let mut bands = Vec::with_capacity(bands_hz.len());
    for (&hz, filter) in bands_hz.iter().zip(&filters) {
        bands.push(analyse_band(hz, filter, samples, sample_rate_hz, onset));
    }
    let params: Vec<BandParameters> = bands.iter().map(|b| b.parameters.clone()).collect();
    Ok(MeasuredAnalysis {
        sample_rate_hz,
        onset_s: onset as f64 / sample_rate_hz,
        bands,
        averages: averages(&params),
    })
}

/// One band: filter, square, search the floor from the onset, cut, compensate.
/// The slice starts a guard of two periods of the band centre before the onset,
/// so the half of the zero-phase filtered direct sound that rings before the onset
/// is counted (at t = 0) rather than lost.
fn analyse_band(
    hz: u32,
    filter: &BandFilter,
    samples: &[f64],
    fs: f64,
    onset: usize,
) -> MeasuredBand {
    let filtered = filter.filter_zero_phase(samples);
    let guard = ((2.0 * fs / filter.centre_hz).round() as usize).min(onset);
    let squared: Vec<f64> = filtered[onset - guard..].iter().map(|x| x * x).collect();
    let onset_s = guard as f64 / fs;
    let peak = squared.iter().fold(0.0f64, |m, &x| m.max(x));
    let found: Result<NoiseFloor, NoiseFloorError> = find_noise_floor(&squared[guard..], fs);
    match found {
        Ok(noise) => {
            let cut = guard + noise.crossing_index;
            let mut tail = noise.tail(fs);
            tail.start_s += onset_s;
            // Subtract the mean noise power before integrating (ISO 3382-1:2009,
            // 5.3.4, noise subtraction, clause from memory), then add the tail.
            let used: Vec<f64> = squared[..cut]
                .iter()
                .map(|e| e - noise.noise_mean_square)
                .collect();
            let used = &used[..];
            let total: f64 = used.iter().sum::<f64>() + tail.energy;
            let floor_db =
                (total > 0.0 && tail.energy > 0.0).then(|| 10.0 * (tail.energy / total).log10());
            let mut parameters =
                decay_parameters(hz, used, 1.0 / fs, onset_s, Some(tail), floor_db);
            mark_unmeasured(&mut parameters);
            if !noise.converged {
                parameters.warnings.push(format!(
                    "noise-floor search did not settle in {} iterations",
                    noise.iterations
                ));
            }
            MeasuredBand {
                parameters,
                noise_floor_db: (peak > 0.0 && noise.noise_mean_square > 0.0)
                    .then(|| 10.0 * (noise.noise_mean_square / peak).log10()),
                noise: Some(noise),
            }
        }
        Err(e) => {
            // No floor: use the whole response uncompensated and say so.
            let mut parameters = decay_parameters(hz, &squared, 1.0 / fs, onset_s, None, None);
            parameters.warnings.push(format!(
                "no noise floor found ({e}); the decay is not compensated"
            ));
            mark_unmeasured(&mut parameters);
            MeasuredBand {
                parameters,
                noise_floor_db: None,
                noise: None,
            }
        }
    }
}

fn mark_unmeasured(p: &mut BandParameters) {
    p.undefined.insert(
        "G_db".into(),
        "not available from an uncalibrated impulse response".into(),
    );
    p.undefined.insert(
        "JLF".into(),
        "needs a figure-of-eight (lateral) channel".into(),
    );
}
