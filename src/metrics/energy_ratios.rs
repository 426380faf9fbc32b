//! Early/late energy ratios with t = 0 at the direct sound: C50, C80, D50, Ts
//! (ISO 3382-1:2009, Annex A, A.2.4 and A.2.5).
//!
//! Bin-edge handling: energy is taken as spread uniformly over its bin, so the bin
//! that straddles a limit (50 or 80 ms after the onset) contributes the fraction of
//! its span that lies before the limit. The bin holding the onset spans only from
//! the onset to its end; bins ending before the onset count as arriving at t = 0.

use super::schroeder::Tail;

/// Span `[start, end)` in s after the onset that bin `k` stands for.
fn bin_span(k: usize, bin_s: f64, onset_s: f64) -> (f64, f64) {
    let a = (k as f64 * bin_s - onset_s).max(0.0);
    let b = ((k + 1) as f64 * bin_s - onset_s).max(0.0);
    (a, b)
}

/// Energy arriving within `limit_s` after the onset, interpolated inside the
/// straddling bin (see module notes). Tail energy is never early (callers check
/// that the data reach the limit).
#[must_use]
pub fn energy_before(energy: &[f64], bin_s: f64, onset_s: f64, limit_s: f64) -> f64 {
    let mut sum = 0.0;
    for (k, e) in energy.iter().enumerate() {
        let (a, b) = bin_span(k, bin_s, onset_s);
        if b <= limit_s {
            sum += e;
        } else if a < limit_s {
            sum += e * (limit_s - a) / (b - a);
        } else {
            break;
        }
    }
    sum
}

/// Total energy including the tail continuation.
#[must_use]
pub fn total_energy(energy: &[f64], tail: Option<&Tail>) -> f64 {
    energy.iter().sum::<f64>() + tail.map_or(0.0, |t| t.energy)
}

/// Clarity C_limit = 10 lg(E(0..limit) / E(limit..∞)) in dB; `None` when no
/// energy lies on one side.
#[must_use]
pub fn clarity_db(
    energy: &[f64],
    bin_s: f64,
    onset_s: f64,
    limit_s: f64,
    tail: Option<&Tail>,
) -> Option<f64> {
    let early = energy_before(energy, bin_s, onset_s, limit_s);
    let late = total_energy(energy, tail) - early;
    (early > 0.0 && late > 0.0).then(|| 10.0 * (early / late).log10())
}

/// Definition D50 = E(0..50 ms) / E(0..∞) (ratio 0–1); `None` without energy.
#[must_use]
pub fn definition(energy: &[f64], bin_s: f64, onset_s: f64, tail: Option<&Tail>) -> Option<f64> {
    let total = total_energy(energy, tail);
    (total > 0.0).then(|| energy_before(energy, bin_s, onset_s, 0.050) / total)
}

/// Centre time Ts = ∫ t E dt / ∫ E dt in s after the onset, each bin at the
/// middle of its span; the tail contributes E_tail (t_start + 1/k).
#[must_use]
pub fn centre_time_s(energy: &[f64], bin_s: f64, onset_s: f64, tail: Option<&Tail>) -> Option<f64> {
    let total = total_energy(energy, tail);
    if total <= 0.0 {
        return None;
    }
    let mut moment = 0.0;
    for (k, e) in energy.iter().enumerate() {
        let (a, b) = bin_span(k, bin_s, onset_s);
        moment += e * 0.5 * (a + b);
    }
    if let Some(t) = tail {
        moment += t.energy * ((t.start_s - onset_s).max(0.0) + 1.0 / t.decay_rate_per_s);
    }
    Some(moment / total)
}
