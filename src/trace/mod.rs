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
//! - **All bands on one ray.** When the scattering coefficient differs from
//!   band to band, the law still picks one lobe for the whole ray, with a
//!   probability shared by all bands, and gives each band the weight
//!   (its own lobe share) / (probability of that lobe). The expected energy of
//!   every band leaving by each lobe is then exactly its own (1 − α)(1 − s) or
//!   (1 − α)s, so every band is unbiased while the geometry is traced once
//!   instead of once per band (see [`SplitLaw`](crate::law::SplitLaw)). The
//!   price is some extra variance in bands whose s is far from the mean.
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
//! - **Determinism.** Ray i (over all sources, source-major) draws only from
//!   `Stream::new(seed, i)`. Rays are traced in fixed chunks of
//!   [`RAYS_PER_CHUNK`]; each chunk fills its own echograms and statistics,
//!   which are added in chunk order, so any thread count gives bit-identical results.

mod options;
mod ray;
mod result;
mod runner;

pub use options::{Roulette, TraceError, TraceOptions};
pub use result::{PairEchogram, ReceiverInfo, SourceInfo, TraceResult, TraceStats};
pub use runner::{run, run_with_progress, RAYS_PER_CHUNK};

#[cfg(doc)]
use crate::room::Room;
