//! The end of a simulated echogram as a floor. A histogram stops at the simulated
//! duration (or where the last ray died); its Schroeder curve then bends down to −∞
//! there, which would shorten every decay time fitted near the end. We continue the
//! decay past the end with an exponential fitted to the late part of the histogram
//! (the compensation Lundeby et al., Acustica 81 (1995), apply to noise-truncated
//! measurements) and take the level of that continuation, re the total, as the
//! truncation floor: below it the curve is extrapolation, not data.

use super::decay_fit::line_fit;
use super::schroeder::Tail;

/// Block length used to smooth the histogram before the late-decay fit (s).
pub const BLOCK_S: f64 = 0.010;

/// Fits an exponential to the late half of the histogram (between the −5 dB point
/// of the raw Schroeder curve and the last non-empty bin), on 10 ms block energies,
/// and returns its continuation past the end. `None` when there is no late decay
/// to fit (too few non-empty blocks or a rising fit).
#[must_use]
pub fn truncation_tail(energy: &[f64], bin_s: f64, first_bin: usize) -> Option<Tail> {
    let last = energy.iter().rposition(|&e| e > 0.0)?;
    if last <= first_bin {
        return None;
    }
    let total: f64 = energy[first_bin..=last].iter().sum();
    // Start of the late half: after the raw curve has fallen 5 dB.
    let mut remaining = total;
    let mut k5 = first_bin;
    for (k, e) in energy.iter().enumerate().take(last + 1).skip(first_bin) {
        if remaining <= total * 10f64.powf(-0.5) {
            k5 = k;
            break;
        }
        remaining -= e;
    }
    let span = last + 1 - k5;
    let from = k5 + span / 2;
    let n = last + 1 - from;
    let mut block = ((BLOCK_S / bin_s).round() as usize).max(1);
    if n / block < 4 {
        block = (n / 4).max(1);
    }
    let mut times = Vec::new();
    let mut levels = Vec::new();
    let mut k = from;
    while k + block <= last + 1 {
        let sum: f64 = energy[k..k + block].iter().sum();
        if sum > 0.0 {
            times.push((k as f64 + 0.5 * block as f64) * bin_s);
            levels.push(10.0 * (sum / (block as f64 * bin_s)).log10());
        }
        k += block;
    }
    if times.len() < 3 {
        return None;
    }
    let (a, b, _) = line_fit(&times, &levels)?;
    if b >= 0.0 {
        return None;
    }
    let end_s = (last + 1) as f64 * bin_s;
    let rate = -b * std::f64::consts::LN_10 / 10.0;
    let density_at_end = 10f64.powf((a + b * end_s) / 10.0);
    Some(Tail {
        start_s: end_s,
        energy: density_at_end / rate,
        decay_rate_per_s: rate,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn exponential_tail_is_continued_exactly() {
        // ∫_te^∞ e^(−k t) dt = e^(−k te)/k (calculus).
        let k = 13.8;
        let bin = 0.001;
        let e: Vec<f64> = (0..500)
            .map(|i| ((-k * i as f64 * bin).exp() - (-k * (i + 1) as f64 * bin).exp()) / k)
            .collect();
        let t = truncation_tail(&e, bin, 0).unwrap();
        assert!((t.decay_rate_per_s / k - 1.0).abs() < 1e-3);
        let exact = (-k * 0.5f64).exp() / k;
        assert!(
            (t.energy / exact - 1.0).abs() < 1e-3,
            "{} vs {exact}",
            t.energy
        );
    }
}
