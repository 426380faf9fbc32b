//! The Monte Carlo ray tracer.
//!
//! [`run`] traces `rays` rays from every source of a [`Room`] and returns an
//! [`Echogram`](crate::receiver::Echogram) per source–receiver pair plus run
//! statistics; writing files is left to [`crate::report`].
//!
//! # Method
//! - Each source emits 1 J per band: ray i starts in a uniform random
//!   direction with 1/N J in every band.
//! - At a wall hit the triangle normal, turned toward the arriving ray, makes a
//!   [`Frame`](crate::geometry::Frame) (the only world↔local conversion), and
//!   the material's law draws the outgoing direction; its per-band weight holds
//!   the 1 − α factor.
//! - **Bands share rays only when their lobe choice agrees.** A law picks one
//!   outgoing direction for all the bands a ray carries. Where the scattering
//!   coefficient differs between bands, sharing a ray would need per-band
//!   weights (own lobe share ÷ shared lobe probability): unbiased, but the mean
//!   square weight grows by a factor at every reflection, and over the fifty or
//!   so reflections of a 1 s decay that noise compounds beyond use. So the
//!   tracer runs one pass per group of bands whose law data agree in every
//!   material ([`LawKind::band_groups`](crate::law::LawKind::band_groups)):
//!   one pass when all bands agree, at most one per band. Within a pass each
//!   band's weight is exactly 1 − α per reflection. Ray i uses the same
//!   stream in every pass (common random numbers across bands), so the cost is
//!   the number of passes and the noise per band is that of a single-band run.
//! - **Air absorption** (ISO 9613-1) acts along every segment as e^(−m·len).
//!   It depends only on the total path length, so a ray carries its wall
//!   weights and its path length and the factor e^(−m·L) is applied where an
//!   energy is needed (receiver crossings, roulette, the end of the ray).
//! - **Termination.** A ray stops when its path reaches c · duration, when it
//!   finds no surface ahead (lost: open model or a leak), or by Russian
//!   roulette: once its largest band energy is below `roulette_threshold`
//!   times its start energy, it survives with probability q and its weight is
//!   divided by q. The expected energy carried on is unchanged, so the
//!   echogram stays unbiased, while rays that no longer matter stop costing time.
//! - **Receivers** are detection spheres (see [`crate::receiver`]). Rays count
//!   there only after their first reflection; the direct sound is added
//!   deterministically from geometry and visibility, e^(−m d) / (4π d²) at
//!   t = d / c, so it is neither double counted nor noisy.
//! - **Determinism.** Ray i (over all sources, source-major) draws, in every pass, only from
//!   `Stream::new(seed, first_ray + i)` (`first_ray` is 0 unless a caller
//!   traces batches of one larger set, see [`TraceOptions::first_ray`]). Rays
//!   are traced in fixed chunks of [`RAYS_PER_CHUNK`]; each chunk records its
//!   own receiver arrivals and statistics, which are added in chunk order, so
//!   any thread count gives bit-identical results. Within a chunk, two runs of
//!   rays are traced side by side (one ray's reflection overlaps the other's
//!   closest-hit query) and their records joined in ray order, so the sums are
//!   those of tracing the rays one by one.

mod options;
mod pool;
mod ray;
mod result;
mod runner;
mod specular;

pub use options::{
    Estimator, NextEventSettings, Roulette, TraceError, TraceOptions, ESTIMATOR_NAMES,
    MAX_IMAGE_ORDER,
};
pub use pool::{mean_echogram, pool};
pub use ray::{NoLog, QueryLog};
pub use result::{PairEchogram, ReceiverInfo, SourceInfo, TraceResult, TraceStats};
pub use runner::{
    run, run_batches, run_recording_queries, run_with_laws, run_with_progress, AUTO_LATE_RADIUS_M,
    RAYS_PER_CHUNK,
};

#[cfg(doc)]
use crate::room::Room;
