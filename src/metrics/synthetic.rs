//! Synthetic impulse responses with a known reverberation time per octave band,
//! for tests and demonstrations: per band a noise-like carrier decaying
//! exponentially at its own rate, plus a direct impulse and optionally a
//! stationary Gaussian background noise per band.
//!
//! The decaying carrier is a third-octave multisine with Schroeder's low-crest
//! phases (Schroeder, IEEE Trans. Inf. Theory 16 (1970) 85–89): its envelope is
//! nearly flat, so the band's decay is exponential without the random
//! fluctuation of decaying Gaussian noise, whose Schroeder curve wanders by about
//! 1/√(B/k) in relative terms (B bandwidth, k decay rate: ±1.6 dB at 125 Hz for
//! T = 1.6 s), more than a 3 % check on T allows. [`Carrier::GaussianNoise`]
//! keeps that case available.

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
    /// Signal that decays in each band.
    pub carrier: Carrier,
}

/// The decaying signal of each band.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Carrier {
    /// Third-octave multisine, Schroeder phases plus a random phase offset per band.
    FlatMultisine,
    /// Half-octave band-limited Gaussian noise.
    GaussianNoise,
}

/// Third-octave multisine around the band centre, Schroeder phases φ_m = −π m²/M
/// plus a random offset, unit RMS. Such a multisine sweeps through its band once
/// per period with a flat envelope except near the period's wrap-around, so the
/// period is made twice the signal length and the signal is the middle half of it.
fn band_multisine(hz: u32, fs: f64, n: usize, seed: u64, index: u64) -> Vec<f64> {
    let fm = exact_octave_centre_hz(hz);
    let g = super::filter_bank::OCTAVE_RATIO;
    let (lo, hi) = (fm * g.powf(-1.0 / 6.0), fm * g.powf(1.0 / 6.0));
    let df = fs / (2 * n) as f64;
    let m0 = (lo / df).ceil() as usize;
    let m1 = (hi / df).floor() as usize;
    let count = (m1 + 1 - m0) as f64;
    let offset = Stream::new(seed, index).uniform() * std::f64::consts::TAU;
    let mut x = vec![0.0; n];
    for (j, m) in (m0..=m1).enumerate() {
        let w = std::f64::consts::TAU * m as f64 * df / fs;
        // Start a quarter period (n/2 samples) in.
        let phase = -std::f64::consts::PI * (j * j) as f64 / count + offset + w * (n / 2) as f64;
        // Phasor recursion: z_k = z_0 · e^(i w k); renormalised every 4096 steps.
        let (sw, cw) = w.sin_cos();
        let (mut re, mut im) = (phase.cos(), phase.sin());
        for (k, v) in x.iter_mut().enumerate() {
            *v += re;
            let nre = re * cw - im * sw;
            im = re * sw + im * cw;
            re = nre;
            if k % 4096 == 4095 {
                let r = re.hypot(im);
                re /= r;
                im /= r;
            }
        }
    }
    let scale = (2.0 / count).sqrt();
    x.iter_mut().for_each(|v| *v *= scale);
    x
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
            let reverb = match self.carrier {
                Carrier::FlatMultisine => {
                    band_multisine(hz, fs, n - onset, self.seed, 2 * i as u64)
                }
                Carrier::GaussianNoise => band_noise(hz, fs, n - onset, self.seed, 2 * i as u64),
            };
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
