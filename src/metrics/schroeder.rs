//! Schroeder backward integration of an energy-time series (Schroeder, "New
//! method of measuring reverberation time", JASA 37 (1965) 409–412).

use serde::Serialize;

/// Exponential continuation of a decay beyond the last usable bin: the energy
/// the data lack because a simulation stopped (truncation) or because the
/// background noise hid the tail (Lundeby et al., Acustica 81 (1995)).
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct Tail {
    /// Time (s, same clock as the series) at which the continuation starts.
    pub start_s: f64,
    /// Energy of the continuation from `start_s` to infinity, in the series' unit.
    pub energy: f64,
    /// Energy decay rate k (1/s): energy density ∝ e^(−k t); T = 6 ln10 / k.
    pub decay_rate_per_s: f64,
}

impl Tail {
    /// Reverberation time (s) of the exponential continuation, 6 ln 10 / k.
    #[must_use]
    pub fn reverberation_time_s(&self) -> f64 {
        6.0 * std::f64::consts::LN_10 / self.decay_rate_per_s
    }
}

/// Schroeder decay curve of one band, t = 0 at the direct sound.
#[derive(Clone, Debug, Default, PartialEq, Serialize)]
pub struct DecayCurve {
    /// Times in s after the direct sound, ascending.
    pub times_s: Vec<f64>,
    /// Level in dB re the total energy (0 dB at t = 0; −∞ where nothing remains).
    pub level_db: Vec<f64>,
}

/// Backward integral at each bin start plus the end: `out[k] = Σ_{j≥k} e_j + tail_energy`,
/// `out.len() = energy.len() + 1`. Summed sequentially from the end, so the result
/// is deterministic.
#[must_use]
pub fn backward_integral(energy: &[f64], tail_energy: f64) -> Vec<f64> {
    let mut out = vec![0.0; energy.len() + 1];
    let mut acc = tail_energy;
    out[energy.len()] = acc;
    for (k, e) in energy.iter().enumerate().rev() {
        acc += e;
        out[k] = acc;
    }
    out
}

/// Level in dB of each value re the first: 10 lg(I_k / I_0). Zero values give −∞.
#[must_use]
pub fn level_db(integral: &[f64]) -> Vec<f64> {
    let first = integral.first().copied().unwrap_or(0.0);
    integral
        .iter()
        .map(|&v| {
            if v > 0.0 && first > 0.0 {
                10.0 * (v / first).log10()
            } else {
                f64::NEG_INFINITY
            }
        })
        .collect()
}

/// Schroeder decay curve of a histogram with bins of `bin_s` seconds, the direct
/// sound at `onset_s`, and an optional tail continuation. Bins that end before the
/// onset count as arriving at t = 0 (they hold no reverberant energy in a
/// simulation; in a measurement they hold the pre-ringing of zero-phase filters).
/// Point 0 is t = 0; point k ≥ 1 is the start of bin `first + k`, `first` the bin
/// holding the onset.
#[must_use]
pub fn decay_curve(energy: &[f64], bin_s: f64, onset_s: f64, tail: Option<&Tail>) -> DecayCurve {
    let tail_energy = tail.map_or(0.0, |t| t.energy);
    let integral = backward_integral(energy, tail_energy);
    let first = onset_bin(onset_s, bin_s).min(energy.len());
    let mut values = Vec::with_capacity(energy.len() - first + 1);
    let mut times_s = Vec::with_capacity(energy.len() - first + 1);
    values.push(integral[0]);
    times_s.push(0.0);
    for (k, v) in integral.iter().enumerate().skip(first + 1) {
        values.push(*v);
        times_s.push(k as f64 * bin_s - onset_s);
    }
    DecayCurve {
        times_s,
        level_db: level_db(&values),
    }
}

/// Index of the bin holding time `onset_s`.
#[must_use]
pub fn onset_bin(onset_s: f64, bin_s: f64) -> usize {
    if onset_s <= 0.0 {
        0
    } else {
        (onset_s / bin_s).floor() as usize
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn integral_sums_from_the_end() {
        let i = backward_integral(&[1.0, 2.0, 3.0], 0.5);
        assert_eq!(i, vec![6.5, 5.5, 3.5, 0.5]);
        let l = level_db(&[10.0, 1.0, 0.0]);
        assert!((l[1] + 10.0).abs() < 1e-12);
        assert!(l[2].is_infinite());
    }
}
