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
    /// How receivers collect energy: detection spheres alone (the default),
    /// or the experimental next-event estimator.
    pub estimator: Estimator,
}

/// How receivers collect the reflected sound (the direct sound is always exact).
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Estimator {
    /// Detection spheres only: a ray counts where it crosses a sphere (the
    /// reference estimator, kept for checks and studies).
    Sphere,
    /// Exact early specular paths, stratified start directions and a
    /// detection sphere that grows late in the decay, with next-event
    /// estimation at every reflection when [`NextEventSettings::rain`] is
    /// set; see the [module docs](super). Without next-event scoring this is
    /// the default (`exact-early`).
    NextEvent(NextEventSettings),
}

impl Estimator {
    /// The default estimator: exact early mirror paths, stratified starts and
    /// the growing late sphere, without next-event scoring (on the rooms
    /// measured it is the most efficient; DEVELOPERS.md has the table).
    #[must_use]
    pub fn exact_early() -> Self {
        Self::NextEvent(NextEventSettings {
            rain: false,
            ..NextEventSettings::default()
        })
    }

    /// The same with next-event scoring at every reflection.
    #[must_use]
    pub fn next_event() -> Self {
        Self::NextEvent(NextEventSettings::default())
    }

    /// The name used on the command line and in result files: `sphere`,
    /// `exact-early` (no next-event scoring) or `next-event`.
    #[must_use]
    pub fn name(&self) -> &'static str {
        match self {
            Self::Sphere => "sphere",
            Self::NextEvent(s) if !s.rain => "exact-early",
            Self::NextEvent(_) => "next-event",
        }
    }

    /// One line for reports: the name and the settings that matter.
    #[must_use]
    pub fn describe(&self) -> String {
        match self {
            Self::Sphere => "sphere: detection spheres only".into(),
            Self::NextEvent(s) => format!(
                "{}: mirror paths to order {} evaluated exactly ({} pilot rays per source, \
                 capture radius {} m), stratified start directions, detection sphere growing \
                 from {} s to at most {} m{}",
                self.name(),
                s.image_order,
                s.pilot_rays,
                s.pilot_capture_m,
                s.late_start_s,
                s.late_radius_m.unwrap_or(super::AUTO_LATE_RADIUS_M),
                if s.rain {
                    ", next-event estimation at every reflection"
                } else {
                    ""
                }
            ),
        }
    }

    /// The estimator of a name given by [`Self::name`], with default settings.
    #[must_use]
    pub fn from_name(name: &str) -> Option<Self> {
        match name {
            "sphere" => Some(Self::Sphere),
            "exact-early" => Some(Self::exact_early()),
            "next-event" => Some(Self::next_event()),
            _ => None,
        }
    }
}

/// The estimator names [`Estimator::from_name`] knows, for messages.
pub const ESTIMATOR_NAMES: [&str; 3] = ["exact-early", "next-event", "sphere"];

impl Default for Estimator {
    /// [`Estimator::exact_early`].
    fn default() -> Self {
        Self::exact_early()
    }
}

/// Written as `{"kind": <name>, ...settings}` so that a result file names
/// the estimator as the command line does.
impl serde::Serialize for Estimator {
    fn serialize<S: serde::Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        #[derive(serde::Serialize)]
        struct Named<'a> {
            kind: &'a str,
            #[serde(flatten)]
            settings: Option<&'a NextEventSettings>,
        }
        let settings = match self {
            Self::Sphere => None,
            Self::NextEvent(s) => Some(s),
        };
        Named {
            kind: self.name(),
            settings,
        }
        .serialize(serializer)
    }
}

/// Settings of the next-event estimator.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct NextEventSettings {
    /// Highest order of the mirror paths evaluated exactly as image sources
    /// (0: none). Mirror chains of higher order keep sphere detection.
    pub image_order: usize,
    /// Pilot rays per source that find the candidate mirror chains (their own
    /// random streams, independent of the traced rays).
    pub pilot_rays: usize,
    /// Radius around a receiver within which a pilot ray's mirror chain
    /// becomes a candidate image source, m.
    pub pilot_capture_m: f64,
    /// Largest detection radius late in the decay, m (capped per receiver
    /// so the sphere never reaches a wall); `None` takes
    /// [`super::AUTO_LATE_RADIUS_M`]. A value at or below a receiver's own
    /// radius keeps that receiver's radius fixed.
    pub late_radius_m: Option<f64>,
    /// Time after which the detection radius starts to grow, s.
    pub late_start_s: f64,
    /// Whether reflections score receivers by next-event estimation; `false`
    /// keeps sphere detection for every lobe, with the exact mirror paths,
    /// stratified start directions and growing late sphere still on (their
    /// cost is small; the next-event queries are what make a run slower).
    pub rain: bool,
}

/// Highest image order the next-event estimator supports.
pub const MAX_IMAGE_ORDER: usize = 6;

impl Default for NextEventSettings {
    fn default() -> Self {
        Self {
            image_order: 3,
            pilot_rays: 50_000,
            pilot_capture_m: 2.0,
            late_radius_m: None,
            late_start_s: 0.1,
            rain: true,
        }
    }
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
            estimator: Estimator::default(),
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
        if let Estimator::NextEvent(ne) = &self.estimator {
            if ne.image_order > MAX_IMAGE_ORDER {
                return bad(format!(
                    "image order {} is above the supported {MAX_IMAGE_ORDER}",
                    ne.image_order
                ));
            }
            if !(ne.pilot_capture_m.is_finite() && ne.pilot_capture_m > 0.0) {
                return bad(format!(
                    "pilot capture radius must be a positive number of metres, got {}",
                    ne.pilot_capture_m
                ));
            }
            if let Some(r) = ne.late_radius_m {
                if !(r.is_finite() && r > 0.0) {
                    return bad(format!(
                        "late detection radius must be a positive number of metres, got {r}"
                    ));
                }
            }
            if !(ne.late_start_s.is_finite() && ne.late_start_s >= 0.0) {
                return bad(format!(
                    "late start must be a non-negative number of seconds, got {}",
                    ne.late_start_s
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
