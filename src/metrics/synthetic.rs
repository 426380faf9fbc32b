//! Synthetic impulse responses with a known reverberation time per octave band,
//! for tests and demonstrations: a sum of band-limited Gaussian noises, each
//! decaying exponentially at its own rate, plus a direct impulse and optionally a
//! stationary background noise per band.

use super::filter_bank::BandFilter;
use crate::bands::exact_octave_centre_hz;
use crate::random::Stream;

/// Recipe of a synthetic response.
#[derive(Clone, Debug, PartialEq)]
pub struct SyntheticResponse {
    /// Sample rate (Hz).
    pub sample_rate_hz: f64,
    /// Length (s).
    pub duration_s: f64,
    /// Direct impulse time (s); the reverberation starts there too.
    pub onset_s: f64,
    /// Direct impulse amplitude (full scale 1).
    pub direct_amplitude: f64,
    /// (nominal band Hz, reverberation time s) per band.
    pub bands: Vec<(u32, f64)>,
    /// RMS amplitude of each band's reverberation at the onset.
    pub band_rms: f64,
    /// Background noise per band re the band's reverberation at the onset (dB),
    /// `None` for none.
    pub noise_db: Option<f64>,
    /// Seed of the random streams.
    pub seed: u64,
}

fn gaussian(s: &mut Stream) -> f64 {
    // Box–Muller; 1 − u keeps the logarithm finite.
    let [u1, u2] = s.uniform2();
    (-2.0 * (1.0 - u1).ln()).sqrt() * (std::f64::consts::TAU * u2).cos()
}

/// Band-limited noise: white Gaussian noise through a half-octave Butterworth
/// band-pass (narrow, so little of it leaks into neighbouring octaves), scaled to
/// unit RMS.
fn band_noise(hz: u32, fs: f64, n: usize, seed: u64, index: u64) -> Vec<f64> {
    let mut s = Stream::new(seed, index);
    let mut x: Vec<f64> = (0..n).map(|_| gaussian(&mut s)).collect();
    if let Ok(f) = BandFilter::design(exact_octave_centre_hz(hz), 0.5, 3, 3.0, fs) {
        f.filter_forward(&mut x);
    }
    let rms = (x.iter().map(|v| v * v).sum::<f64>() / n as f64).sqrt();
    x.iter_mut().for_each(|v| *v /= rms);
    x
}

impl SyntheticResponse {
    /// Builds the samples.
    #[must_use]
    pub fn samples(&self) -> Vec<f64> {
        let fs = self.sample_rate_hz;
        let n = (self.duration_s * fs).round() as usize;
        let onset = (self.onset_s * fs).round() as usize;
        let mut out = vec![0.0; n];
        for (i, &(hz, t60)) in self.bands.iter().enumerate() {
            // Amplitude envelope 10^(−3 t / T): energy falls 60 dB in T.
            let reverb = band_noise(hz, fs, n - onset, self.seed, 2 * i as u64);
            for (k, r) in reverb.iter().enumerate() {
                let t = k as f64 / fs;
                out[onset + k] += self.band_rms * r * 10f64.powf(-3.0 * t / t60);
            }
            if let Some(db) = self.noise_db {
                let noise = band_noise(hz, fs, n, self.seed, 2 * i as u64 + 1);
                let a = self.band_rms * 10f64.powf(db / 20.0);
                for (o, v) in out.iter_mut().zip(&noise) {
                    *o += a * v;
                }
            }
        }
        if onset < n {
            out[onset] += self.direct_amplitude;
        }
        out
    }
}
