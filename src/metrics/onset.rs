//! Start of a measured impulse response. ISO 3382-1:2009, Annex A (A.3.4, clause
//! number from memory) places it where the signal first rises significantly above
//! the background noise, and no more than 20 dB below the maximum; we take the
//! first sample whose square reaches the peak square − 20 dB.

/// Level below the peak that marks the onset (dB).
pub const ONSET_BELOW_PEAK_DB: f64 = 20.0;

/// Index of the first sample with x² ≥ max(x²) · 10^(−2); `None` for silence.
#[must_use]
pub fn onset_index(samples: &[f64]) -> Option<usize> {
    let peak = samples.iter().fold(0.0f64, |m, x| m.max(x * x));
    if peak <= 0.0 {
        return None;
    }
    let threshold = peak * 10f64.powf(-ONSET_BELOW_PEAK_DB / 10.0);
    samples.iter().position(|x| x * x >= threshold)
}
