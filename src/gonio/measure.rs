//! Measuring a law on the virtual goniometer: Monte Carlo shots (or, for
//! checks, quadrature of the law's `eval`) collected per receiver and band.

use glam::DVec3;
use rayon::prelude::*;
use serde::Serialize;

use super::arc::{ArcError, ArcGeometry};
use super::coefficients::{diffusion_bound, diffusion_equal_area};
use crate::bands::Bands;
use crate::law::{Lobe, ReflectionLaw};
use crate::random::Stream;

/// Shots per parallel chunk; fixed so sums do not depend on the thread count.
const CHUNK: u64 = 8192;

/// Levels of empty receivers are written at this many dB below the total
/// reflected energy: the polar file format has no −∞.
pub const EMPTY_LEVEL_DB: f64 = -120.0;

/// How the goniometer shows the mirror lobe, stated in every report.
pub const MIRROR_NOTE: &str = "the mirror lobe is spread evenly over the specular-zone receivers, \
as a finite sample's specular reflection would appear; the non-mirror energy is spread over the \
arc in proportion to the receivers' readings per steradian";

/// What to measure.
#[derive(Clone, Debug)]
pub struct GonioRequest {
    /// Layout of the goniometer.
    pub geometry: ArcGeometry,
    /// Source angle from the normal in the x–z plane, degrees; the mirror
    /// receiver is at −incidence.
    pub incidence_deg: f64,
    /// Band centres, Hz, one per band of the law.
    pub bands_hz: Vec<u32>,
}

/// A measurement that cannot be made.
#[derive(Debug, thiserror::Error)]
pub enum GonioError {
    /// Bad geometry or angle.
    #[error(transparent)]
    Geometry(#[from] ArcError),
    /// No receiver in the specular zone.
    #[error("no receiver lies in the specular zone at {0}° incidence, so the mirror energy has nowhere to go; use a wider sample or a smaller angle")]
    EmptyZone(f64),
    /// Non-mirror energy left but none reached the arc.
    #[error("{band_hz} Hz: the law scattered energy but no sample reached the receiver arc; use more samples")]
    NothingOnArc {
        /// Band centre, Hz.
        band_hz: u32,
    },
    /// Settings out of range.
    #[error("{0}")]
    Settings(String),
}

/// Where the reflected energy went, per band, as fractions of the arriving energy.
#[derive(Clone, Debug, Serialize)]
pub struct EnergyBalance {
    /// Reflected energy (mean sample weight), should be 1 − α.
    pub reflected: f64,
    /// Standard error of `reflected` (Monte Carlo only).
    pub reflected_std_error: Option<f64>,
    /// Energy that left by the mirror lobe.
    pub mirror: f64,
    /// Energy that left by the other lobes.
    pub non_mirror: f64,
    /// The law's own `mirror_fraction`, for comparison with `mirror`.
    pub law_mirror_fraction: f64,
    /// Share of the non-mirror energy that the arc's cells caught.
    pub non_mirror_on_arc: f64,
    /// Share of shots the law ended (returned no reflection).
    pub ended_shots: f64,
}

/// The virtual measurement in one band.
#[derive(Clone, Debug, Serialize)]
pub struct BandReport {
    /// Band centre, Hz.
    pub band_hz: u32,
    /// Share of the reflected energy at each receiver (sums to 1).
    pub energy_share: Vec<f64>,
    /// 10 lg of `energy_share`, dB, empty receivers at [`EMPTY_LEVEL_DB`].
    pub level_db: Vec<f64>,
    /// Zone ratio s_z: share of the energy on receivers outside the zone.
    pub zone_ratio: f64,
    /// Equal-area diffusion coefficient d of the receivers.
    pub diffusion: Option<f64>,
    /// Bound d_max(s_z) for this arc and zone.
    pub diffusion_bound: Option<f64>,
    /// d / d_max(s_z): how evenly the scattered energy is spread.
    pub diffusion_ratio: Option<f64>,
    /// The law's own scattering coefficient 1 − mirror/reflected (only a
    /// simulation can tell it apart from s_z).
    pub law_scattering: Option<f64>,
    /// Energy balance.
    pub balance: EnergyBalance,
}

/// A whole virtual measurement.
#[derive(Clone, Debug, Serialize)]
pub struct GonioReport {
    /// Name of the law measured.
    pub law: String,
    /// `"monte carlo"` or `"quadrature"`.
    pub method: String,
    /// Shots fired (Monte Carlo).
    pub samples: Option<u64>,
    /// Seed of the random streams (Monte Carlo).
    pub seed: Option<u64>,
    /// Source angle, degrees.
    pub incidence_deg: f64,
    /// The layout.
    pub geometry: ArcGeometry,
    /// Receiver angles, degrees.
    pub receiver_deg: Vec<f64>,
    /// Which receivers are in the specular zone.
    pub zone: Vec<bool>,
    /// The zone's edges along the arc, degrees (lower, upper).
    pub zone_edges_deg: (f64, f64),
    /// How the mirror lobe is represented.
    pub mirror_representation: String,
    /// One report per band.
    pub bands: Vec<BandReport>,
}

/// In-plane angle θ (from the normal, toward +x) and out-of-plane angle η of
/// a direction (cos η sin θ, sin η, cos η cos θ), radians.
fn arc_angles(w: DVec3) -> (f64, f64) {
    (w.x.atan2(w.z), w.y.clamp(-1.0, 1.0).asin())
}

/// Receiver cells: θ limits (rad, clipped at ±90°) and solid angles (sr).
struct Cells {
    lo: Vec<f64>,
    hi: Vec<f64>,
    sr: Vec<f64>,
    first_edge: f64,
    step: f64,
    eta0: f64,
}

impl Cells {
    fn new(g: &ArcGeometry) -> Self {
        let step = g.receiver_step_deg.to_radians();
        let eta0 = g.slab_half_width_deg.to_radians();
        let lim = std::f64::consts::FRAC_PI_2;
        let (mut lo, mut hi, mut sr) = (Vec::new(), Vec::new(), Vec::new());
        for t in g.receiver_deg() {
            let t = t.to_radians();
            let (a, b) = ((t - step / 2.0).max(-lim), (t + step / 2.0).min(lim));
            lo.push(a);
            hi.push(b);
            sr.push((b - a) * 2.0 * eta0.sin());
        }
        let first_edge = g.receiver_deg()[0].to_radians() - step / 2.0;
        Self {
            lo,
            hi,
            sr,
            first_edge,
            step,
            eta0,
        }
    }

    fn index(&self, w: DVec3) -> Option<usize> {
        let (theta, eta) = arc_angles(w);
        if eta.abs() > self.eta0 || w.z < 0.0 {
            return None;
        }
        let i = ((theta - self.first_edge) / self.step).floor();
        if i < 0.0 || i as usize >= self.lo.len() {
            return None;
        }
        let i = i as usize;
        (theta >= self.lo[i] && theta <= self.hi[i]).then_some(i)
    }
}

/// Sums over one chunk of shots.
#[derive(Clone)]
struct Partial {
    receivers: Vec<Bands>,
    total: Bands,
    total_sq: Bands,
    mirror: Bands,
    non_mirror: Bands,
    ended: u64,
}

impl Partial {
    fn new(m: usize) -> Self {
        Self {
            receivers: vec![Bands::ZERO; m],
            total: Bands::ZERO,
            total_sq: Bands::ZERO,
            mirror: Bands::ZERO,
            non_mirror: Bands::ZERO,
            ended: 0,
        }
    }

    fn add(&mut self, o: &Self) {
        for (a, b) in self.receivers.iter_mut().zip(&o.receivers) {
            *a += *b;
        }
        self.total += o.total;
        self.total_sq += o.total_sq;
        self.mirror += o.mirror;
        self.non_mirror += o.non_mirror;
        self.ended += o.ended;
    }
}

fn incident(incidence_deg: f64) -> DVec3 {
    let (s, c) = incidence_deg.to_radians().sin_cos();
    DVec3::new(s, 0.0, c)
}

fn check_request(request: &GonioRequest) -> Result<(), GonioError> {
    request.geometry.check(request.incidence_deg)?;
    if request.bands_hz.is_empty() || request.bands_hz.len() > crate::bands::MAX_BANDS {
        return Err(GonioError::Settings(format!(
            "give 1 to {} bands, not {}",
            crate::bands::MAX_BANDS,
            request.bands_hz.len()
        )));
    }
    Ok(())
}

/// Fires `samples` reflections of `law` (shot i draws from
/// `Stream::new(seed, i)`) and reports the arc per band. Deterministic for
/// any thread count.
pub fn measure(
    law: &dyn ReflectionLaw,
    request: &GonioRequest,
    samples: u64,
    seed: u64,
) -> Result<GonioReport, GonioError> {
    check_request(request)?;
    if samples == 0 {
        return Err(GonioError::Settings(
            "the number of samples must be at least 1".into(),
        ));
    }
    let cells = Cells::new(&request.geometry);
    let m = cells.sr.len();
    let wo = incident(request.incidence_deg);
    let chunks = samples.div_ceil(CHUNK);
    let partials: Vec<Partial> = (0..chunks)
        .into_par_iter()
        .map(|c| {
            let mut p = Partial::new(m);
            for i in c * CHUNK..((c + 1) * CHUNK).min(samples) {
                let mut rng = Stream::new(seed, i);
                let u_lobe = rng.uniform();
                let u_dir = rng.uniform2();
                let Some(s) = law.sample(wo, u_lobe, u_dir) else {
                    p.ended += 1;
                    continue;
                };
                p.total += s.weight;
                p.total_sq += s.weight * s.weight;
                if s.lobe == Lobe::Mirror {
                    p.mirror += s.weight;
                } else {
                    p.non_mirror += s.weight;
                    if let Some(k) = cells.index(s.wi) {
                        p.receivers[k] += s.weight;
                    }
                }
            }
            p
        })
        .collect();
    let mut sum = Partial::new(m);
    for p in &partials {
        sum.add(p);
    }
    let n = samples as f64;
    let law_mirror = law.mirror_fraction(wo);
    let mut bands = Vec::new();
    for (b, &band_hz) in request.bands_hz.iter().enumerate() {
        let mean = sum.total[b] / n;
        let var = (sum.total_sq[b] / n - mean * mean).max(0.0);
        let caught: f64 = sum.receivers.iter().map(|r| r[b]).sum();
        let readings: Vec<f64> = (0..m)
            .map(|i| sum.receivers[i][b] / (n * cells.sr[i]))
            .collect();
        let balance = EnergyBalance {
            reflected: mean,
            reflected_std_error: Some((var / n).sqrt()),
            mirror: sum.mirror[b] / n,
            non_mirror: sum.non_mirror[b] / n,
            law_mirror_fraction: law_mirror[b],
            non_mirror_on_arc: if sum.non_mirror[b] > 0.0 {
                caught / sum.non_mirror[b]
            } else {
                0.0
            },
            ended_shots: sum.ended as f64 / n,
        };
        bands.push(band_report(request, band_hz, &readings, balance)?);
    }
    Ok(report(
        law,
        request,
        "monte carlo",
        Some(samples),
        Some(seed),
        bands,
    ))
}

/// The same measurement without noise: each receiver's reading is the
/// midpoint-rule integral of `law.eval` over its cell (`steps` × `steps`
/// points per cell) and the mirror part is `law.mirror_fraction`. For checks;
/// only [`measure`] exercises the law's sampling.
pub fn measure_by_quadrature(
    law: &dyn ReflectionLaw,
    request: &GonioRequest,
    steps: usize,
) -> Result<GonioReport, GonioError> {
    check_request(request)?;
    let steps = steps.max(1);
    let cells = Cells::new(&request.geometry);
    let wo = incident(request.incidence_deg);
    let dir = |theta: f64, eta: f64| {
        DVec3::new(eta.cos() * theta.sin(), eta.sin(), eta.cos() * theta.cos())
    };
    let readings_all: Vec<Bands> = (0..cells.sr.len())
        .into_par_iter()
        .map(|i| {
            let (a, b) = (cells.lo[i], cells.hi[i]);
            let (dt, de) = ((b - a) / steps as f64, 2.0 * cells.eta0 / steps as f64);
            let mut acc = Bands::ZERO;
            for j in 0..steps {
                let theta = a + (j as f64 + 0.5) * dt;
                for k in 0..steps {
                    let eta = -cells.eta0 + (k as f64 + 0.5) * de;
                    acc += law.eval(wo, dir(theta, eta)) * (eta.cos() * dt * de);
                }
            }
            acc * (1.0 / cells.sr[i])
        })
        .collect();
    // Non-mirror energy over the whole hemisphere, in the same (θ, η) angles.
    let hemi_steps = 8 * steps.max(90);
    let h = std::f64::consts::PI / hemi_steps as f64;
    let rows: Vec<Bands> = (0..hemi_steps)
        .into_par_iter()
        .map(|j| {
            let theta = -std::f64::consts::FRAC_PI_2 + (j as f64 + 0.5) * h;
            let mut acc = Bands::ZERO;
            for k in 0..hemi_steps {
                let eta = -std::f64::consts::FRAC_PI_2 + (k as f64 + 0.5) * h;
                acc += law.eval(wo, dir(theta, eta)) * (eta.cos() * h * h);
            }
            acc
        })
        .collect();
    let mut non_mirror = Bands::ZERO;
    for r in rows {
        non_mirror += r;
    }
    let mirror = law.mirror_fraction(wo);
    let mut bands = Vec::new();
    for (b, &band_hz) in request.bands_hz.iter().enumerate() {
        let readings: Vec<f64> = readings_all.iter().map(|r| r[b]).collect();
        let caught: f64 = readings.iter().zip(&cells.sr).map(|(p, sr)| p * sr).sum();
        let balance = EnergyBalance {
            reflected: mirror[b] + non_mirror[b],
            reflected_std_error: None,
            mirror: mirror[b],
            non_mirror: non_mirror[b],
            law_mirror_fraction: mirror[b],
            non_mirror_on_arc: if non_mirror[b] > 0.0 {
                caught / non_mirror[b]
            } else {
                0.0
            },
            ended_shots: 0.0,
        };
        bands.push(band_report(request, band_hz, &readings, balance)?);
    }
    Ok(report(law, request, "quadrature", None, None, bands))
}

fn report(
    law: &dyn ReflectionLaw,
    request: &GonioRequest,
    method: &str,
    samples: Option<u64>,
    seed: Option<u64>,
    bands: Vec<BandReport>,
) -> GonioReport {
    let g = &request.geometry;
    GonioReport {
        law: law.name().to_string(),
        method: method.to_string(),
        samples,
        seed,
        incidence_deg: request.incidence_deg,
        geometry: g.clone(),
        receiver_deg: g.receiver_deg(),
        zone: g.specular_zone(request.incidence_deg),
        zone_edges_deg: g.zone_edges_deg(request.incidence_deg),
        mirror_representation: MIRROR_NOTE.to_string(),
        bands,
    }
}

/// Turns per-steradian readings of the non-mirror part and the energy
/// balance into receiver energy shares and coefficients.
fn band_report(
    request: &GonioRequest,
    band_hz: u32,
    readings: &[f64],
    balance: EnergyBalance,
) -> Result<BandReport, GonioError> {
    let zone = request.geometry.specular_zone(request.incidence_deg);
    let zone_count = zone.iter().filter(|&&z| z).count();
    if zone_count == 0 {
        return Err(GonioError::EmptyZone(request.incidence_deg));
    }
    let reading_sum: f64 = readings.iter().sum();
    if balance.non_mirror > 0.0 && reading_sum <= 0.0 {
        return Err(GonioError::NothingOnArc { band_hz });
    }
    let energy: Vec<f64> = readings
        .iter()
        .zip(&zone)
        .map(|(p, &z)| {
            let scattered = if reading_sum > 0.0 {
                balance.non_mirror * p / reading_sum
            } else {
                0.0
            };
            scattered
                + if z {
                    balance.mirror / zone_count as f64
                } else {
                    0.0
                }
        })
        .collect();
    let total: f64 = energy.iter().sum();
    let share: Vec<f64> = if total > 0.0 {
        energy.iter().map(|e| e / total).collect()
    } else {
        vec![0.0; energy.len()]
    };
    let level_db = share
        .iter()
        .map(|&e| {
            if e > 0.0 {
                (10.0 * e.log10()).max(EMPTY_LEVEL_DB)
            } else {
                EMPTY_LEVEL_DB
            }
        })
        .collect();
    let zone_ratio = share
        .iter()
        .zip(&zone)
        .filter(|(_, &z)| !z)
        .map(|(e, _)| e)
        .sum::<f64>();
    let diffusion = diffusion_equal_area(&share);
    let bound = diffusion_bound(zone_ratio, share.len(), zone_count);
    let ratio = match (diffusion, bound) {
        (Some(d), Some(b)) if b > 0.0 => Some(d / b),
        _ => None,
    };
    let law_scattering =
        (balance.reflected > 0.0).then(|| 1.0 - balance.mirror / balance.reflected);
    Ok(BandReport {
        band_hz,
        energy_share: share,
        level_db,
        zone_ratio,
        diffusion,
        diffusion_bound: bound,
        diffusion_ratio: ratio,
        law_scattering,
        balance,
    })
}
