//! What a trace run returns.

use glam::DVec3;

use crate::bands::{BandSet, Bands};
use crate::receiver::Echogram;

/// A source as traced.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct SourceInfo {
    /// Name from the room file.
    pub name: String,
    /// Position, m.
    pub position: DVec3,
}

/// A receiver as traced.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct ReceiverInfo {
    /// Name from the room file.
    pub name: String,
    /// Centre, m.
    pub position: DVec3,
    /// Detection radius used, m.
    pub radius_m: f64,
    /// Whether the radius came from the default rule (not the room file or options).
    pub radius_is_default: bool,
    /// Radius the detection sphere grows to late in the decay under the
    /// next-event estimator, m (equal to `radius_m` when it does not grow).
    pub late_radius_m: f64,
}

/// The echogram of one source at one receiver.
#[derive(Clone, Debug, PartialEq)]
pub struct PairEchogram {
    /// Index into [`TraceResult::sources`].
    pub source: usize,
    /// Index into [`TraceResult::receivers`].
    pub receiver: usize,
    /// Energy and lateral echograms, J/m² per bin for 1 J emitted per band.
    pub echogram: Echogram,
    /// Direct-sound delay d / c, s (whether or not the path is blocked).
    pub direct_time_s: f64,
    /// Source–receiver distance d, m.
    pub distance_m: f64,
    /// Whether the straight path is free of walls (the direct sound is in the echogram).
    pub direct_visible: bool,
    /// Lateral axis used for the lateral echogram (unit, horizontal).
    pub lateral_axis: DVec3,
}

/// Counters and sums of a run.
#[derive(Clone, Debug, Default, PartialEq, serde::Serialize)]
pub struct TraceStats {
    /// Rays per pass over all sources (all batches pooled into this result).
    pub rays: u64,
    /// Batches pooled into this result ([`super::pool`]); 1 for one batch.
    pub batches: usize,
    /// Tracing passes, one per group of bands that can share rays
    /// ([`crate::law::LawKind::band_groups`]); every band gets `rays` rays.
    pub passes: usize,
    /// Segments traced (closest-hit queries that moved a ray).
    pub segments: u64,
    /// Wall reflections.
    pub reflections: u64,
    /// Mean length of the segments between two reflections, m; `None` without
    /// any. The path in flight at the end is followed to its wall. With Lambert
    /// walls it tends to 4V/S (Kuttruff).
    pub traced_mean_free_path_m: Option<f64>,
    /// Rays that found no surface ahead before the end (open model or a leak).
    pub lost_rays: u64,
    /// Rays stopped by Russian roulette.
    pub roulette_stopped_rays: u64,
    /// Rays the law ended (absorbed outright).
    pub absorbed_rays: u64,
    /// Energy per band the lost rays carried when they left, J (air included).
    pub lost_energy_j: Bands,
    /// Energy per band of the rays still travelling at the end of the duration, J.
    pub energy_at_end_j: Bands,
    /// Wall-clock time of the run, s.
    pub wall_time_s: f64,
}

impl TraceStats {
    /// Lost rays as a fraction of all rays.
    #[must_use]
    pub fn lost_fraction(&self) -> f64 {
        if self.rays == 0 {
            0.0
        } else {
            self.lost_rays as f64 / (self.rays as f64 * self.passes.max(1) as f64)
        }
    }
}

/// Everything a trace run produces.
#[derive(Clone, Debug)]
pub struct TraceResult {
    /// Bands traced.
    pub bands: BandSet,
    /// Echogram bin width, s.
    pub bin_s: f64,
    /// Echogram length, s.
    pub duration_s: f64,
    /// Speed of sound used, m/s.
    pub speed_of_sound_m_s: f64,
    /// Energy attenuation of the air per band, 1/m (zero when disabled).
    pub air_attenuation_per_m: Bands,
    /// Sources, in room order.
    pub sources: Vec<SourceInfo>,
    /// Receivers, in room order.
    pub receivers: Vec<ReceiverInfo>,
    /// One echogram per pair, source-major: index `source · receivers + receiver`.
    pub echograms: Vec<PairEchogram>,
    /// Counters of the run.
    pub stats: TraceStats,
    /// Things the user should know (e.g. many lost rays), each naming what is concerned.
    pub warnings: Vec<String>,
    /// Materials traced with the fallback law, with the reason.
    pub fallbacks: Vec<String>,
}

impl TraceResult {
    /// The echogram of source `source` at receiver `receiver`.
    #[must_use]
    pub fn pair(&self, source: usize, receiver: usize) -> &PairEchogram {
        &self.echograms[source * self.receivers.len() + receiver]
    }
}
