//! Background-noise floor of a measured band impulse response and compensation of
//! the truncated tail, after Lundeby, Vigran, Bietz and Vorländer, "Uncertainties
//! of measurements in room acoustics", Acustica 81 (1995) 344–355:
//!
//! 1. average the squared response in 20 ms intervals (their 10–50 ms);
//! 2. take the noise from the last 10 % of the response;
//! 3. fit a line to the averaged decay from its peak to 10 dB above the noise;
//! 4. the crossing point is where the line meets the noise level;
//! 5. choose new intervals, 5 per 10 dB of decay (their 3–10);
//! 6. re-estimate the noise from the point 5 dB of decay past the crossing (at
//!    least the last 10 % of the response);
//! 7. fit the late decay from 25 dB to 5 dB above the noise (a 20 dB range);
//! 8. new crossing point; repeat 6–8 until it moves less than one interval (at
//!    most 5 times).
//!
//! The response is then cut at the crossing point and the energy beyond it is
//! replaced by the fitted exponential: E_c = A(t_c) / k, A the fitted energy
//! density at the crossing and k its decay rate.

use super::decay_fit::line_fit;
use super::schroeder::Tail;

/// First averaging interval (s).
pub const FIRST_INTERVAL_S: f64 = 0.020;
/// Averaging intervals per 10 dB of decay in the iterations.
pub const INTERVALS_PER_10_DB: f64 = 5.0;
/// Most iterations of steps 6–8.
pub const MAX_ITERATIONS: usize = 5;

/// Why no noise floor could be found.
#[derive(Debug, thiserror::Error, PartialEq)]
pub enum NoiseFloorError {
    /// The decay does not rise far enough above the noise to fit a line.
    #[error("the decay rises only {range_db:.1} dB above the background noise; at least 20 dB are needed to find the noise floor")]
    TooLittleRange {
        /// Peak of the averaged decay above the noise (dB).
        range_db: f64,
    },
    /// The fitted decay does not fall.
    #[error("the band response does not decay (the fitted slope is not negative)")]
    NotDecaying,
    /// Too few samples after the onset.
    #[error("too few samples after the onset to average ({samples})")]
    TooShort {
        /// Samples after the onset.
        samples: usize,
    },
}

/// Outcome of the noise-floor search on one band.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct NoiseFloor {
    /// Mean square of the background noise (signal units² per sample).
    pub noise_mean_square: f64,
    /// Crossing point: sample index (from the start of the slice given) where the
    /// late decay meets the noise; the response is used up to here.
    pub crossing_index: usize,
    /// Late decay rate (1/s), energy ∝ e^(−k t).
    pub decay_rate_per_s: f64,
    /// Energy (Σ x²) of the exponential continuation beyond the crossing point.
    pub tail_energy: f64,
    /// Iterations of steps 6–8 run.
    pub iterations: usize,
    /// Whether the crossing point settled within [`MAX_ITERATIONS`].
    pub converged: bool,
}

impl NoiseFloor {
    /// The continuation as a [`Tail`], times in s from the slice start.
    #[must_use]
    pub fn tail(&self, sample_rate_hz: f64) -> Tail {
        Tail {
            start_s: self.crossing_index as f64 / sample_rate_hz,
            energy: self.tail_energy,
            decay_rate_per_s: self.decay_rate_per_s,
        }
    }
}

/// Mean squares over intervals of `len` samples; returns (centre index, mean).
fn smooth(squared: &[f64], len: usize) -> Vec<(f64, f64)> {
    squared
        .chunks(len)
        .filter(|c| c.len() == len)
        .enumerate()
        .map(|(i, c)| {
            (
                (i * len) as f64 + 0.5 * len as f64,
                c.iter().sum::<f64>() / len as f64,
            )
        })
        .collect()
}

fn db(x: f64) -> f64 {
    10.0 * x.max(1e-300).log10()
}

fn mean(x: &[f64]) -> f64 {
    x.iter().sum::<f64>() / x.len().max(1) as f64
}

/// Runs the iteration on a squared band response `squared` (x², starting at the
/// onset) sampled at `sample_rate_hz`.
pub fn find_noise_floor(
    squared: &[f64],
    sample_rate_hz: f64,
) -> Result<NoiseFloor, NoiseFloorError> {
    let n = squared.len();
    let first_len = ((FIRST_INTERVAL_S * sample_rate_hz).round() as usize).max(1);
    if n < 10 * first_len {
        return Err(NoiseFloorError::TooShort { samples: n });
    }
    // Steps 1–2.
    let blocks = smooth(squared, first_len);
    let mut noise = mean(&squared[n - n / 10..]);
    let noise_db0 = db(noise);
    let (peak_i, peak) =
        blocks.iter().enumerate().fold(
            (0, 0.0),
            |(bi, bv), (i, &(_, v))| if v > bv { (i, v) } else { (bi, bv) },
        );
    let range_db = db(peak) - noise_db0;
    if range_db < 20.0 {
        return Err(NoiseFloorError::TooLittleRange { range_db });
    }
    // Step 3: from the peak to the last block 10 dB above the noise.
    let mut t = Vec::new();
    let mut l = Vec::new();
    for &(c, v) in &blocks[peak_i..] {
        if db(v) < noise_db0 + 10.0 {
            break;
        }
        t.push(c);
        l.push(db(v));
    }
    let (a, b, _) = line_fit(&t, &l).ok_or(NoiseFloorError::TooLittleRange { range_db })?;
    if b >= 0.0 {
        return Err(NoiseFloorError::NotDecaying);
    }
    // Step 4 (line in dB per sample index).
    let mut slope = b;
    let mut intercept = a;
    let mut crossing = ((noise_db0 - a) / b).clamp(0.0, n as f64);
    // Step 5.
    let len = ((10.0 / (-slope * INTERVALS_PER_10_DB)).round() as usize).clamp(1, n / 10);
    let fine = smooth(squared, len);
    let mut iterations = 0;
    let mut converged = false;
    while iterations < MAX_ITERATIONS {
        iterations += 1;
        // Step 6: noise from 5 dB of decay past the crossing, at least the last 10 %.
        let from = (crossing + 5.0 / -slope).min(0.9 * n as f64) as usize;
        noise = mean(&squared[from..]);
        let noise_db = db(noise);
        // Step 7: late decay from noise + 25 dB down to noise + 5 dB, before the crossing.
        let mut t = Vec::new();
        let mut l = Vec::new();
        let start = fine
            .iter()
            .position(|&(c, v)| c >= peak_i as f64 * first_len as f64 && db(v) <= noise_db + 25.0)
            .unwrap_or(0);
        for &(c, v) in &fine[start..] {
            if c > crossing || db(v) < noise_db + 5.0 {
                break;
            }
            t.push(c);
            l.push(db(v));
        }
        let Some((a, b, _)) = line_fit(&t, &l) else {
            break;
        };
        if b >= 0.0 {
            break;
        }
        slope = b;
        intercept = a;
        // Step 8.
        let new_crossing = ((noise_db - a) / b).clamp(0.0, n as f64);
        let moved = (new_crossing - crossing).abs();
        crossing = new_crossing;
        if moved < len as f64 {
            converged = true;
            break;
        }
    }
    let crossing_index = (crossing.round() as usize).min(n);
    // Exponential continuation: density A (per sample) at the crossing, rate per sample.
    let rate_per_sample = -slope * std::f64::consts::LN_10 / 10.0;
    let density = 10f64.powf((intercept + slope * crossing_index as f64) / 10.0);
    Ok(NoiseFloor {
        noise_mean_square: noise,
        crossing_index,
        decay_rate_per_s: rate_per_sample * sample_rate_hz,
        tail_energy: density / rate_per_sample,
        iterations,
        converged,
    })
}
