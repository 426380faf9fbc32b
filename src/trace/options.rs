//! What a trace run needs besides the room, and what can go wrong before it starts.

use crate::law::{LawError, LawKind};
use crate::room::{estimates, Room};

/// Russian roulette settings.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct Roulette {
    /// Relative level (largest band energy ÷ start energy) below which a ray
    /// plays roulette, e.g. 1e-6 (−60 dB).
    pub threshold: f64,
    /// Probability q of surviving one round; survivors' weights are divided by q.
    pub survival: f64,
}

impl Default for Roulette {
    fn default() -> Self {
        Self {
            threshold: 1e-6,
            survival: 0.1,
        }
    }
}

/// Options of a trace run; [`TraceOptions::from_room`] fills them from the room's settings.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct TraceOptions {
    /// Reflection law used for every material.
    pub law: LawKind,
    /// Law for materials that lack the data `law` needs; `None` makes that an error.
    pub fallback: Option<LawKind>,
    /// Rays per source.
    pub rays: usize,
    /// Seed of all random streams.
    pub seed: u64,
    /// Echogram length, s (rays stop when their path reaches c · duration).
    pub duration_s: f64,
    /// Echogram bin width, s.
    pub bin_s: f64,
    /// Radius for every receiver, m, overriding the room file and the default rule.
    pub receiver_radius_m: Option<f64>,
    /// Russian roulette; `None` lets rays run to the full duration.
    pub roulette: Option<Roulette>,
    /// Stream index of the run's first ray (default 0): ray i of the run
    /// (source-major) draws from `Stream::new(seed, first_ray + i)`. Batches
    /// of one comparison set it to b · rays · sources, so batch b traces the
    /// same rays under every law and treatment (common random numbers) and
    /// no two batches share a ray.
    pub first_ray: u64,
}

impl TraceOptions {
    /// Options from the room's `[settings]`, with the default duration
    /// ([`estimates::default_duration_s`]) when the room gives none.
    #[must_use]
    pub fn from_room(room: &Room, law: LawKind) -> Self {
        let s = &room.settings;
        Self {
            law,
            fallback: None,
            rays: s.rays,
            seed: s.seed,
            duration_s: s
                .duration_s
                .unwrap_or_else(|| estimates::default_duration_s(room)),
            bin_s: s.bin_s,
            receiver_radius_m: None,
            roulette: Some(Roulette::default()),
            first_ray: 0,
        }
    }
}

/// Most bins an echogram may have (about 3 GB of echograms per 100 pairs at the limit).
pub const MAX_BINS: usize = 2_000_000;

/// A run that cannot start.
#[derive(Debug, thiserror::Error, PartialEq)]
pub enum TraceError {
    /// Bad option value.
    #[error("{0}")]
    Option(String),
    /// The room has nothing to trace from or to.
    #[error("room `{room}` has no {what}; add at least one to the room file")]
    Missing {
        /// Room name.
        room: String,
        /// "sources" or "receivers".
        what: &'static str,
    },
    /// A receiver sits on a source.
    #[error("receiver `{receiver}` is at the position of source `{source_name}`; move one of them (the direct sound would be infinite)")]
    Coincident {
        /// Receiver name.
        receiver: String,
        /// Source name.
        source_name: String,
    },
    /// The law could not be built.
    #[error(transparent)]
    Law(#[from] LawError),
}

impl TraceOptions {
    /// Checks the option values.
    pub fn validate(&self) -> Result<(), TraceError> {
        let bad = |m: String| Err(TraceError::Option(m));
        if self.rays == 0 {
            return bad("rays must be at least 1".into());
        }
        if !(self.bin_s.is_finite() && self.bin_s > 0.0) {
            return bad(format!(
                "bin width must be a positive number of seconds, got {}",
                self.bin_s
            ));
        }
        if !(self.duration_s.is_finite() && self.duration_s > 0.0) {
            return bad(format!(
                "duration must be a positive number of seconds, got {}",
                self.duration_s
            ));
        }
        if self.bins() > MAX_BINS {
            return bad(format!(
                "duration {} s with bins of {} s gives {} bins, more than {MAX_BINS}; use wider bins or a shorter duration",
                self.duration_s,
                self.bin_s,
                self.bins()
            ));
        }
        if let Some(r) = self.receiver_radius_m {
            if !(r.is_finite() && r > 0.0) {
                return bad(format!(
                    "receiver radius must be a positive number of metres, got {r}"
                ));
            }
        }
        if let Some(rr) = self.roulette {
            let ok =
                rr.threshold > 0.0 && rr.threshold < 1.0 && rr.survival > 0.0 && rr.survival <= 1.0;
            if !ok {
                return bad(format!(
                    "roulette threshold must lie in (0, 1) and survival in (0, 1], got {} and {}",
                    rr.threshold, rr.survival
                ));
            }
        }
        Ok(())
    }

    /// Number of echogram bins, ⌈duration / bin⌉.
    #[must_use]
    pub fn bins(&self) -> usize {
        let n = (self.duration_s / self.bin_s).ceil();
        if n.is_finite() && n >= 1.0 {
            n.min(usize::MAX as f64) as usize
        } else {
            1
        }
    }
}
