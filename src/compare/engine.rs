//! Tracing the runs of a comparison in batches, and the parameters of the
//! pooled echograms and of every delete-one pool.
//!
//! Batch b of every run traces the rays with stream indices
//! [b·n·S, (b+1)·n·S) (n rays per source per batch, S sources; see
//! [`TraceOptions::first_ray`](crate::trace::TraceOptions::first_ray)), so the
//! runs share their random numbers batch by batch. The pooled echogram is the
//! mean of the batch echograms, summed in batch order; each delete-one pool is
//! the mean of the other batches, summed in batch order from scratch (no
//! subtraction, so no cancellation).

use std::time::Instant;

use serde::Serialize;

use super::error::CompareError;
use super::plan::{ComparisonPlan, RunSpec};
use crate::metrics::{BandParameters, Parameter};
use crate::receiver::Echogram;
use crate::report::batches::delete_one_tables;
pub use crate::report::batches::ValueTable;
use crate::report::pair_parameters_with;
use crate::report::PairParameters;
use crate::trace;

/// One source–receiver pair of a run.
#[derive(Clone, Debug)]
pub struct PairOutcome {
    /// Source name.
    pub source: String,
    /// Receiver name.
    pub receiver: String,
    /// Parameters of the pooled echogram (with decay curves, for charts).
    pub pooled: PairParameters,
    /// The pooled echogram (mean of the batches), J/m² per bin.
    pub echogram: Echogram,
    /// Direct-sound delay, s.
    pub direct_time_s: f64,
    /// Values of the pooled echogram.
    pub values: ValueTable,
    /// Values of each delete-one pool, in batch order.
    pub delete_one: Vec<ValueTable>,
}

impl PairOutcome {
    /// The delete-one values of one entry, in batch order.
    #[must_use]
    pub fn delete_one_of(&self, parameter: Parameter, slot: usize) -> Vec<Option<f64>> {
        self.delete_one
            .iter()
            .map(|t| t.get(parameter, slot))
            .collect()
    }

    /// Reason a pooled value is undefined, if it is.
    #[must_use]
    pub fn undefined_reason(&self, parameter: Parameter, slot: usize) -> Option<String> {
        let bands: &[BandParameters] = &self.pooled.bands;
        match bands.get(slot) {
            Some(b) => b.undefined.get(parameter.key()).cloned(),
            None => self.pooled.averages.undefined.get(parameter.key()).cloned(),
        }
        .or_else(|| {
            self.values
                .get(parameter, slot)
                .is_none()
                .then(|| "not a finite number".to_string())
        })
    }
}

/// Counters of a run over all its batches.
#[derive(Clone, Debug, Default, PartialEq, Serialize)]
pub struct RunStats {
    /// Rays per band pass over all sources and batches.
    pub rays: u64,
    /// Band passes per batch.
    pub passes: usize,
    /// Segments traced.
    pub segments: u64,
    /// Wall reflections.
    pub reflections: u64,
    /// Rays that left the model.
    pub lost_rays: u64,
    /// Rays stopped by roulette.
    pub roulette_stopped_rays: u64,
    /// Rays the law absorbed outright.
    pub absorbed_rays: u64,
    /// Traced mean free path ÷ 4V/S, the mean over batches. A law that is
    /// reciprocal and lossless keeps it near 1 in a diffuse hall (Kuttruff;
    /// `law::bounded`); a departure shifts reverberation times by itself.
    pub free_path_ratio: Option<f64>,
}

/// Everything one run produced.
#[derive(Clone, Debug)]
pub struct RunOutcome {
    /// The run.
    pub spec: RunSpec,
    /// Pairs, source-major.
    pub pairs: Vec<PairOutcome>,
    /// Counters.
    pub stats: RunStats,
    /// Warnings of the tracer (each once).
    pub warnings: Vec<String>,
    /// Materials traced with the fallback law.
    pub fallbacks: Vec<String>,
    /// Wall-clock time, s (the only value that changes between identical runs).
    pub wall_time_s: f64,
}

/// Traces every batch of `run` and computes its pooled and delete-one parameters.
/// `progress(rays)` is called as rays finish (from worker threads).
pub fn trace_run(
    plan: &ComparisonPlan,
    run: &RunSpec,
    progress: &(dyn Fn(usize) + Sync),
) -> Result<RunOutcome, CompareError> {
    let started = Instant::now();
    let room = plan.room_of(run);
    let options = plan.batch_options(run, 0);
    let batches = trace::run_batches(room, &options, plan.batches, progress).map_err(|source| {
        CompareError::Trace {
            file: plan.file.clone(),
            run: run.id.clone(),
            source,
        }
    })?;
    let (Some(first), Some(pooled_run)) = (batches.first(), trace::pool(&batches)) else {
        return Err(CompareError::Trace {
            file: plan.file.clone(),
            run: run.id.clone(),
            source: crate::trace::TraceError::Option("no batch was traced".into()),
        });
    };
    let four_v_over_s = crate::room::estimates::mean_free_path_m(room);
    let ratios: Vec<f64> = batches
        .iter()
        .filter_map(|r| r.stats.traced_mean_free_path_m)
        .map(|m| m / four_v_over_s)
        .collect();
    let s = &pooled_run.stats;
    let stats = RunStats {
        rays: s.rays,
        passes: s.passes,
        segments: s.segments,
        reflections: s.reflections,
        lost_rays: s.lost_rays,
        roulette_stopped_rays: s.roulette_stopped_rays,
        absorbed_rays: s.absorbed_rays,
        // The mean of the batches' ratios (not of their paths), as recorded.
        free_path_ratio: (!ratios.is_empty() && four_v_over_s > 0.0)
            .then(|| ratios.iter().sum::<f64>() / ratios.len() as f64),
    };
    let warnings = pooled_run.warnings.clone();

    let pairs = first
        .echograms
        .iter()
        .enumerate()
        .map(|(k, pair)| {
            let pooled_echogram = pooled_run.echograms[k].echogram.clone();
            let pooled = pair_parameters_with(first, pair, &pooled_echogram);
            let delete_one = delete_one_tables(&batches, k);
            PairOutcome {
                source: first.sources[pair.source].name.clone(),
                receiver: first.receivers[pair.receiver].name.clone(),
                values: ValueTable::of(&pooled),
                pooled,
                echogram: pooled_echogram,
                direct_time_s: pair.direct_time_s,
                delete_one,
            }
        })
        .collect();
    Ok(RunOutcome {
        spec: run.clone(),
        pairs,
        stats,
        warnings,
        fallbacks: first.fallbacks.clone(),
        wall_time_s: started.elapsed().as_secs_f64(),
    })
}
