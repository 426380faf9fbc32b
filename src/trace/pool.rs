//! Pooling the batches of one run into one result: the echogram of B batches
//! of n rays is the mean of their echograms (each is already normalised to
//! its own n rays), which is what one run of B·n rays on the same streams
//! records, up to the order of the floating-point sums.

use super::result::{TraceResult, TraceStats};
use crate::receiver::Echogram;

/// Mean of `all` echograms, leaving out batch `skip`, summed in batch order
/// (from scratch, so a delete-one mean has no cancellation error).
///
/// # Panics
/// Never: an empty `all` gives an empty echogram.
#[must_use]
pub fn mean_echogram(all: &[&Echogram], skip: Option<usize>) -> Echogram {
    let Some(first) = all.first() else {
        return Echogram::new(0, 0.0);
    };
    let mut sum = Echogram::new(first.bins(), first.bin_s);
    let mut count = 0usize;
    for (b, e) in all.iter().enumerate() {
        if Some(b) != skip {
            sum.merge(e);
            count += 1;
        }
    }
    let scale = 1.0 / count.max(1) as f64;
    for v in sum.energy.iter_mut().chain(sum.lateral.iter_mut()) {
        *v = *v * scale;
    }
    sum
}

/// One result from the batches of one run (same room, options and pairs, as
/// [`super::run_batches`] returns them): echograms and energies averaged,
/// counts summed, the mean free path averaged over the batches, warnings
/// kept once each in order. `None` without batches.
#[must_use]
pub fn pool(batches: &[TraceResult]) -> Option<TraceResult> {
    let first = batches.first()?;
    let count = batches.len() as f64;
    let mut pooled = first.clone();
    for (k, pair) in pooled.echograms.iter_mut().enumerate() {
        let all: Vec<&Echogram> = batches.iter().map(|r| &r.echograms[k].echogram).collect();
        pair.echogram = mean_echogram(&all, None);
    }
    let mut stats = TraceStats {
        passes: first.stats.passes,
        batches: batches.len(),
        wall_time_s: first.stats.wall_time_s,
        ..TraceStats::default()
    };
    let paths: Vec<f64> = batches
        .iter()
        .filter_map(|r| r.stats.traced_mean_free_path_m)
        .collect();
    stats.traced_mean_free_path_m =
        (!paths.is_empty()).then(|| paths.iter().sum::<f64>() / paths.len() as f64);
    let mut warnings: Vec<String> = Vec::new();
    for r in batches {
        let s = &r.stats;
        stats.rays += s.rays;
        stats.segments += s.segments;
        stats.reflections += s.reflections;
        stats.lost_rays += s.lost_rays;
        stats.roulette_stopped_rays += s.roulette_stopped_rays;
        stats.absorbed_rays += s.absorbed_rays;
        stats.lost_energy_j += s.lost_energy_j * (1.0 / count);
        stats.energy_at_end_j += s.energy_at_end_j * (1.0 / count);
        for w in &r.warnings {
            if !warnings.contains(w) {
                warnings.push(w.clone());
            }
        }
    }
    pooled.stats = stats;
    pooled.warnings = warnings;
    Some(pooled)
}
