//! The bound-aware mixed law: scattering coefficient s and diffusion
//! coefficient d together.
//!
//! # What it reproduces
//! A fraction 1 − s of the reflected energy leaves by the mirror lobe, so the
//! material's s is reproduced exactly. The scattered fraction s is shaped so
//! that the law, measured on the virtual goniometer at normal incidence
//! (default arc: [`CalibrationArc::standard`], 37 receivers at 5° from −90° to
//! 90°, the 5 central ones in the specular zone, a ±2.5° slab around the
//! plane), also returns the material's d.
//!
//! # Derivation
//! Goniometer convention (see `crate::gonio`): the mirror energy 1 − s is
//! spread evenly over the M_s zone receivers; the non-mirror energy s is
//! spread over the arc in proportion to the per-steradian readings p_i of the
//! receivers, so receiver energies are
//! E_i = (1 − s) Z_i / M_s + s p_i / Σ_j p_j  (Z_i = 1 in the zone),
//! and d is the equal-area coefficient of the E_i (reference.md §1).
//!
//! A component whose energy per steradian (radiant intensity) is uniform gives
//! equal readings. Let β be the half-angle of the cone that covers exactly the
//! zone receivers' cells (M_s · Δθ / 2 = 12.5° on the standard arc) and γ = Δθ/2
//! (2.5°), the half-angle of a cone that fits in the central cell. Two unit-energy
//! components at normal incidence, both functions only of the angle α to the
//! mirror direction (here the normal):
//! - **near-mirror** `A`: uniform intensity for α ≤ γ. All of it lands on the
//!   central receiver: least even (for a given s, putting the scattered energy
//!   on one zone receiver maximizes Σ E_i², since the mirror already fills it).
//! - **even** `T(r)`: uniform intensity r for α ≤ β and 1 for β < α ≤ 90°. With
//!   r = 0 it reads 0 in the zone and one level outside, so the arc has one level
//!   inside and one outside with s_z = s, the Cauchy–Schwarz equality case of
//!   reference.md §3: d = d_max(s). That only works up to s* = (M − M_s)/M:
//!   above it, the arc is flat (d = 1, the global minimum of Σ E_i²) when
//!   (1 − s)/M_s + s r p/Σp = 1/M in the zone, i.e. r = M (s − s*)/M_s ∈ [0, 1].
//!   So r(s) = max(0, M (s − s*)/M_s), and `T` reaches d_max(min(s, s*)), the
//!   consistency bound for a material's s (reference.md §3).
//!
//! The law is the mixture s [(1 − w) A + w T(r(s))]. The arc energies move along
//! a straight segment from the `A` shape to the `T` shape as w goes 0 → 1, Σ E_i²
//! is a convex quadratic along it, and its minimum over all arcs with this
//! mirror part is the `T` end (see above), so d(w) rises monotonically. w is
//! found per band by bisection on the law's own arc response (computed from
//! the component definitions by quadrature over each receiver cell, no Monte
//! Carlo) and stored at construction.
//!
//! # Region reproduced
//! For each s, d ∈ [d_A(s), d_T(s)], where d_A is the near-mirror value
//! (1/9 at s = 0, falling to 0 at s = 1) and d_T is within 0.002 of
//! d_max(min(s, s*)) (the ±2.5° slab lets a sliver of the cone edge into the
//! ±10° cells). Outside it:
//! - d above the bound d_max(min(s, s*)) by more than the rounding slack of
//!   the room checks (`room::pairs::PAIR_TOLERANCE`, 0.005): refused with
//!   [`BoundedLawError::AboveBound`], in the words `polaray check` uses;
//! - d above the bound by less than that slack: treated as at the bound (w = 1),
//!   reported in the [`Adjustment`] list;
//! - d between d_T(s) and the bound: w = 1, reported in the [`Adjustment`] list;
//! - d below d_A(s): w = 0, reported in the [`Adjustment`] list.
//!
//! Nothing is changed silently: the constructor returns every adjustment.
//!
//! # Other incidence angles: a reciprocal, diffuse-field-preserving extension
//! The goniometer fixes only the normal-incidence shape. Away from normal
//! incidence the law is built so that it is reciprocal and lossless up to
//! 1 − α, because a law that is both keeps an ideally diffuse sound field
//! diffuse: cosine-weighted arrivals leave cosine-weighted, and the traced
//! mean free path stays at 4V/S (the invariant-measure argument behind
//! Kuttruff's result; Kuttruff, Room Acoustics, §4.5 and §5.2). A shape simply
//! carried along with the mirror direction is neither: it over-feeds grazing
//! directions and shortened the mean free path by 7.5 % in a lossless shoebox.
//!
//! Directions are mapped to the projected disk u = sin²θ, φ (θ from the
//! normal). Cosine-weighted (Lambert) directions are uniform in u ∈ [0, 1] and
//! in φ. Each scattered component has a normal-incidence density g(η) over
//! η = sin²α ∈ [0, 1] (α the angle to the normal), the shapes `A` and `T`
//! above. For an arrival at u₀ = sin²θ₀ and azimuth φ₀ the component draws
//! η ~ g and a sign ±, and leaves at
//! - v = fold(u₀ ± η), fold reflecting into [0, 1] (x < 0 → −x, x > 1 → 2 − x);
//! - φ = φ₀ + π + Δφ, Δφ uniform in [−Φ, Φ], with Φ = π for `T` and
//!   Φ = min(π, π sin²γ / max(u₀, v)) for `A` (so `A` stays a compact lobe
//!   next to the mirror direction at oblique incidence).
//!
//! The density of v is k(u₀, v) = ½[g(|u₀ − v|) + g(u₀ + v)] for u₀ + v ≤ 1 and
//! ½[g(|u₀ − v|) + g(2 − u₀ − v)] otherwise: symmetric in (u₀, v) and
//! integrating to 1 over either argument (a reflected random walk on [0, 1]),
//! so uniform u₀ gives uniform v, and Φ is symmetric too. Per steradian the
//! density is p(wi) = 2 cos θ · k(u₀, v) / (2Φ) (since dv dφ = 2 cos θ dω), so
//! the BRDF p / cos θ = k(u₀, v) / Φ is symmetric in wo and wi (reciprocity),
//! and the map sends the Lambert distribution onto itself; the mirror part
//! (u, φ + π) does both as well. At u₀ = 0, k(0, v) = g(v) and Φ = π: the
//! normal-incidence shape, and so the calibration above, is unchanged.
//!
//! What this means physically: by reciprocity, a surface that sends much
//! energy toward grazing at normal incidence (the even component, uniform per
//! steradian) sends much energy toward the normal at grazing incidence; and
//! the even component is spread evenly in azimuth around the normal rather
//! than around the mirror direction.
//!
//! # Bands
//! All bands travel on one ray: the lobe is chosen by picking a band uniformly
//! and then a lobe of that band, so the sampled density is the band average of
//! the per-band distributions and each band's weight is its own share divided
//! by that density (a one-sample balance-heuristic mixture), unbiased per band.

use std::f64::consts::{PI, TAU};

use glam::DVec3;

use super::{LawSample, Lobe, ReflectionLaw};
use crate::bands::{BandSet, Bands};
use crate::geometry::mirror_local;
use crate::gonio::coefficients::{
    diffusion_bound_for_scattering, diffusion_equal_area, zone_ratio_of_full_diffusion,
};
use crate::polar::bound::BoundViolation;
use crate::room::pairs::PAIR_TOLERANCE;
use crate::room::Material;

/// The receiver arc the law is calibrated on: normal incidence, receivers
/// centred on the normal, the specular zone the central `zone_receivers`.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct CalibrationArc {
    /// Receiver spacing and cell width along the arc, degrees.
    pub receiver_step_deg: f64,
    /// Number of receivers M (odd, so one sits on the normal).
    pub receivers: usize,
    /// Receivers in the specular zone M_s (odd, centred on the normal).
    pub zone_receivers: usize,
    /// Half-width of the slab around the measurement plane in which receivers
    /// collect, degrees.
    pub slab_half_width_deg: f64,
}

impl CalibrationArc {
    /// The default goniometer arc: 37 receivers at 5° (−90..90°), a 5-receiver
    /// zone (±10°, from the default geometry of `crate::gonio`), ±2.5° slab.
    #[must_use]
    pub fn standard() -> Self {
        Self {
            receiver_step_deg: 5.0,
            receivers: 37,
            zone_receivers: 5,
            slab_half_width_deg: 2.5,
        }
    }

    /// Receiver angles from the normal, degrees.
    #[must_use]
    pub fn receiver_deg(&self) -> Vec<f64> {
        let c = (self.receivers as f64 - 1.0) / 2.0;
        (0..self.receivers)
            .map(|i| (i as f64 - c) * self.receiver_step_deg)
            .collect()
    }

    /// Whether receiver `i` is in the specular zone.
    #[must_use]
    pub fn in_zone(&self, i: usize) -> bool {
        let c = (self.receivers - 1) / 2;
        let h = (self.zone_receivers - 1) / 2;
        i + h >= c && i <= c + h
    }

    /// Half-angle β of the cone that covers exactly the zone receivers' cells, degrees.
    #[must_use]
    pub fn zone_cone_half_angle_deg(&self) -> f64 {
        self.zone_receivers as f64 * self.receiver_step_deg / 2.0
    }

    /// Half-angle γ of the near-mirror cone (fits in the central cell), degrees.
    #[must_use]
    pub fn near_mirror_half_angle_deg(&self) -> f64 {
        self.receiver_step_deg / 2.0
    }

    fn check(&self) -> Result<(), String> {
        let ok = self.receivers >= 3
            && self.receivers % 2 == 1
            && self.zone_receivers % 2 == 1
            && self.zone_receivers < self.receivers
            && self.receiver_step_deg > 0.0
            && (self.receivers as f64 - 1.0) / 2.0 * self.receiver_step_deg <= 90.0 + 1e-9
            && self.slab_half_width_deg > 0.0
            && self.slab_half_width_deg <= 45.0
            && self.zone_cone_half_angle_deg() < 90.0;
        if ok {
            Ok(())
        } else {
            Err(format!(
                "calibration arc {self:?} is not usable: give an odd number of receivers \
                 (at least 3) within ±90°, an odd zone smaller than the arc, a positive step \
                 and a slab half-width in (0, 45]°"
            ))
        }
    }
}

/// A change the constructor made to a material's data, to be shown to the user.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct Adjustment {
    /// Material name.
    pub material: String,
    /// Band centre, Hz.
    pub band_hz: u32,
    /// Scattering coefficient s of the band.
    pub scattering: f64,
    /// Diffusion coefficient the material asked for.
    pub diffusion_requested: f64,
    /// Diffusion coefficient the law reproduces instead.
    pub diffusion_used: f64,
    /// Why.
    pub reason: String,
}

impl std::fmt::Display for Adjustment {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "material '{}', {} Hz: s = {:.3}, d = {:.3}: {}; the bounded law uses d = {:.3}",
            self.material,
            self.band_hz,
            self.scattering,
            self.diffusion_requested,
            self.reason,
            self.diffusion_used
        )
    }
}

/// Why a material cannot be given the bounded law.
#[derive(Debug, thiserror::Error, PartialEq)]
pub enum BoundedLawError {
    /// No diffusion coefficients.
    #[error(
        "material '{material}': the bounded law needs diffusion coefficients; add \
         `diffusion = [...]` (one per band) to the material or use another law"
    )]
    MissingDiffusion {
        /// Material name.
        material: String,
    },
    /// A coefficient outside [0, 1] or not finite.
    #[error("material '{material}', {band_hz} Hz: {quantity} = {value} is outside 0..1; give a value from 0 to 1")]
    OutOfRange {
        /// Material name.
        material: String,
        /// Band centre, Hz.
        band_hz: u32,
        /// Which coefficient.
        quantity: &'static str,
        /// The value given.
        value: f64,
    },
    /// The (s, d) pair lies above the scattering–diffusion bound; the text is
    /// the one `polaray check` prints for the same pair.
    #[error("materials.{material}: at {band_hz} Hz {violation}")]
    AboveBound {
        /// Material name.
        material: String,
        /// Band centre, Hz.
        band_hz: u32,
        /// The violation, as the polar module states it.
        violation: BoundViolation,
    },
    /// The calibration arc is not usable.
    #[error("{0}")]
    BadArc(String),
}

/// The diffusion coefficients the law can reproduce for one s.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct DiffusionRange {
    /// Least even reachable d (all scattered energy in the near-mirror cone).
    pub least_even: f64,
    /// Most even reachable d (the even component alone).
    pub most_even: f64,
    /// The bound d_max(min(s, s*)); pairs above it are refused.
    pub bound: f64,
}

/// Per-cell geometry of the calibration arc, precomputed.
#[derive(Clone, Debug)]
struct ArcModel {
    zone: Vec<bool>,
    /// Solid angle of each cell above the surface, sr.
    cell_sr: Vec<f64>,
    /// Solid angle of each cell inside the near-mirror cone, sr.
    near_sr: Vec<f64>,
    /// Solid angle of each cell inside the zone cone, sr.
    cone_sr: Vec<f64>,
    cos_near: f64,
    cos_cone: f64,
    receivers: usize,
    zone_receivers: usize,
    s_star: f64,
}

impl ArcModel {
    fn new(arc: &CalibrationArc) -> Self {
        let half = arc.receiver_step_deg.to_radians() / 2.0;
        let eta0 = arc.slab_half_width_deg.to_radians();
        let gamma = arc.near_mirror_half_angle_deg().to_radians();
        let beta = arc.zone_cone_half_angle_deg().to_radians();
        let lim = PI / 2.0;
        let mut model = Self {
            zone: Vec::new(),
            cell_sr: Vec::new(),
            near_sr: Vec::new(),
            cone_sr: Vec::new(),
            cos_near: gamma.cos(),
            cos_cone: beta.cos(),
            receivers: arc.receivers,
            zone_receivers: arc.zone_receivers,
            s_star: zone_ratio_of_full_diffusion(arc.receivers, arc.zone_receivers),
        };
        for (i, t) in arc.receiver_deg().into_iter().enumerate() {
            let t = t.to_radians();
            let (a, b) = ((t - half).max(-lim), (t + half).min(lim));
            model.zone.push(arc.in_zone(i));
            model.cell_sr.push((b - a) * 2.0 * eta0.sin());
            model.near_sr.push(cap_area_in_cell(a, b, eta0, gamma));
            model.cone_sr.push(cap_area_in_cell(a, b, eta0, beta));
        }
        model
    }

    /// Unit-energy intensity levels of the even component: (inside β, outside β), 1/sr.
    fn even_levels(&self, r: f64) -> (f64, f64) {
        let k = TAU * (r * (1.0 - self.cos_cone) + self.cos_cone);
        (r / k, 1.0 / k)
    }

    fn near_level(&self) -> f64 {
        1.0 / (TAU * (1.0 - self.cos_near))
    }

    /// Inner level r of the even component for scattering coefficient s.
    fn inner_level(&self, s: f64) -> f64 {
        (self.receivers as f64 * (s - self.s_star) / self.zone_receivers as f64).clamp(0.0, 1.0)
    }

    /// Receiver energies (shares of the reflected energy) for (s, w).
    fn energies(&self, s: f64, w: f64) -> Vec<f64> {
        let (inner, outer) = self.even_levels(self.inner_level(s));
        let near = self.near_level();
        let p: Vec<f64> = (0..self.zone.len())
            .map(|i| {
                let a = near * self.near_sr[i];
                let t = inner * self.cone_sr[i] + outer * (self.cell_sr[i] - self.cone_sr[i]);
                ((1.0 - w) * a + w * t) / self.cell_sr[i]
            })
            .collect();
        let total: f64 = p.iter().sum();
        let zone_share = (1.0 - s) / self.zone_receivers as f64;
        p.iter()
            .zip(&self.zone)
            .map(|(pi, &z)| {
                let scattered = if total > 0.0 { s * pi / total } else { 0.0 };
                scattered + if z { zone_share } else { 0.0 }
            })
            .collect()
    }

    fn diffusion(&self, s: f64, w: f64) -> f64 {
        diffusion_equal_area(&self.energies(s, w)).unwrap_or(0.0)
    }

    fn bound(&self, s: f64) -> f64 {
        diffusion_bound_for_scattering(s, self.receivers, self.zone_receivers).unwrap_or(1.0)
    }
}

/// Solid angle (sr) of the part of the cell θ ∈ [a, b] (in-plane angle, rad),
/// |η| ≤ η0 (out-of-plane angle), inside the cone of half-angle `half_angle`
/// around the normal. Directions are (cos η sin θ, sin η, cos η cos θ), so
/// dω = cos η dη dθ and the angle α to the normal obeys cos α = cos η cos θ;
/// at height η the cone spans |θ| ≤ acos(cos α_max / cos η). Midpoint rule in η.
fn cap_area_in_cell(a: f64, b: f64, eta0: f64, half_angle: f64) -> f64 {
    const STEPS: usize = 4000;
    let h = eta0 / STEPS as f64;
    let cos_max = half_angle.cos();
    let mut sum = 0.0;
    for k in 0..STEPS {
        let eta = (k as f64 + 0.5) * h;
        let ce = eta.cos();
        if ce <= cos_max {
            continue;
        }
        let tc = (cos_max / ce).min(1.0).acos();
        let len = (b.min(tc) - a.max(-tc)).max(0.0);
        sum += ce * len;
    }
    2.0 * sum * h
}

/// The bound-aware mixed law for one material.
#[derive(Clone, Debug)]
pub struct BoundedLaw {
    bands: usize,
    reflectance: Bands,
    scattering: Bands,
    /// Mixture weight w of the even component, per band.
    mix: Bands,
    /// Intensity levels of the even component per unit scattered energy, 1/sr.
    even_inner: Bands,
    even_outer: Bands,
    /// Mean over bands of the scattered energy in each component (for the pdf).
    pdf_near: f64,
    pdf_even_inner: f64,
    pdf_even_outer: f64,
    /// Intensity of the near-mirror component per unit energy, 1/sr.
    near_level: f64,
    mirror_probability: f64,
    cos_near: f64,
    cos_cone: f64,
    /// sin²γ and sin²β: the cone edges in η = sin²α.
    sin2_near: f64,
    sin2_cone: f64,
    arc: CalibrationArc,
}

impl BoundedLaw {
    /// The law for `material` over `bands`, calibrated on the standard arc.
    /// Returns the law and every adjustment made to the material's data.
    pub fn new(
        material: &Material,
        bands: &BandSet,
    ) -> Result<(Self, Vec<Adjustment>), BoundedLawError> {
        Self::with_arc(material, bands, &CalibrationArc::standard())
    }

    /// The law calibrated on a chosen arc.
    pub fn with_arc(
        material: &Material,
        bands: &BandSet,
        arc: &CalibrationArc,
    ) -> Result<(Self, Vec<Adjustment>), BoundedLawError> {
        arc.check().map_err(BoundedLawError::BadArc)?;
        let diffusion = material
            .diffusion
            .ok_or_else(|| BoundedLawError::MissingDiffusion {
                material: material.name.clone(),
            })?;
        let model = ArcModel::new(arc);
        let n = bands.len();
        let mut law = Self {
            bands: n,
            reflectance: Bands::ZERO,
            scattering: Bands::ZERO,
            mix: Bands::ZERO,
            even_inner: Bands::ZERO,
            even_outer: Bands::ZERO,
            pdf_near: 0.0,
            pdf_even_inner: 0.0,
            pdf_even_outer: 0.0,
            near_level: model.near_level(),
            mirror_probability: 0.0,
            cos_near: model.cos_near,
            cos_cone: model.cos_cone,
            sin2_near: 1.0 - model.cos_near * model.cos_near,
            sin2_cone: 1.0 - model.cos_cone * model.cos_cone,
            arc: arc.clone(),
        };
        let mut adjustments = Vec::new();
        for b in 0..n {
            let band_hz = bands.centres_hz()[b];
            let check = |quantity: &'static str, value: f64| {
                if value.is_finite() && (0.0..=1.0).contains(&value) {
                    Ok(value)
                } else {
                    Err(BoundedLawError::OutOfRange {
                        material: material.name.clone(),
                        band_hz,
                        quantity,
                        value,
                    })
                }
            };
            let alpha = check("absorption", material.absorption[b])?;
            let s = check("scattering", material.scattering[b])?;
            let d = check("diffusion", diffusion[b])?;
            let bound = model.bound(s);
            // The same slack as the room checks, so `check` and the law agree.
            if d - PAIR_TOLERANCE > bound + 1e-12 {
                return Err(BoundedLawError::AboveBound {
                    material: material.name.clone(),
                    band_hz,
                    violation: BoundViolation::Exceeds {
                        s,
                        d,
                        s_used: s.min(model.s_star),
                        s_star: model.s_star,
                        d_max: bound,
                        excess: d - bound,
                        receivers: arc.receivers,
                        zone_receivers: arc.zone_receivers,
                    },
                });
            }
            let (w, used, reason) = solve_mix(&model, s, d);
            if let Some(reason) = reason {
                adjustments.push(Adjustment {
                    material: material.name.clone(),
                    band_hz,
                    scattering: s,
                    diffusion_requested: d,
                    diffusion_used: used,
                    reason,
                });
            }
            let (inner, outer) = model.even_levels(model.inner_level(s));
            law.reflectance[b] = 1.0 - alpha;
            law.scattering[b] = s;
            law.mix[b] = w;
            law.even_inner[b] = inner;
            law.even_outer[b] = outer;
        }
        let nf = n as f64;
        law.mirror_probability = (0..n).map(|b| 1.0 - law.scattering[b]).sum::<f64>() / nf;
        law.pdf_near = (0..n)
            .map(|b| law.scattering[b] * (1.0 - law.mix[b]))
            .sum::<f64>()
            / nf;
        law.pdf_even_inner = (0..n)
            .map(|b| law.scattering[b] * law.mix[b] * law.even_inner[b])
            .sum::<f64>()
            / nf;
        law.pdf_even_outer = (0..n)
            .map(|b| law.scattering[b] * law.mix[b] * law.even_outer[b])
            .sum::<f64>()
            / nf;
        Ok((law, adjustments))
    }

    /// Mixture weight w of the even component in band `band` (0 = all
    /// near-mirror, 1 = all even).
    #[must_use]
    pub fn mix_weight(&self, band: usize) -> f64 {
        self.mix[band]
    }

    /// The arc the law was calibrated on.
    #[must_use]
    pub fn calibration_arc(&self) -> &CalibrationArc {
        &self.arc
    }

    /// The law's own goniometer response at normal incidence in band `band`:
    /// the energy share of each arc receiver (sums to 1), computed from the
    /// component definitions, no Monte Carlo.
    #[must_use]
    pub fn predicted_arc_energies(&self, band: usize) -> Vec<f64> {
        ArcModel::new(&self.arc).energies(self.scattering[band], self.mix[band])
    }

    /// The d values reachable for scattering coefficient `s` on `arc`.
    pub fn reachable_diffusion(
        s: f64,
        arc: &CalibrationArc,
    ) -> Result<DiffusionRange, BoundedLawError> {
        arc.check().map_err(BoundedLawError::BadArc)?;
        let model = ArcModel::new(arc);
        Ok(DiffusionRange {
            least_even: model.diffusion(s, 0.0),
            most_even: model.diffusion(s, 1.0),
            bound: model.bound(s),
        })
    }

    /// Half-width Φ of the near-mirror component's azimuth spread for an
    /// arrival at u = sin²θ₀ leaving at v = sin²θ, radians: π at normal
    /// incidence, narrowing as π sin²γ / max(u, v) away from it. Symmetric in
    /// (u, v), as reciprocity needs.
    #[must_use]
    pub fn near_azimuth_half_width_rad(&self, u: f64, v: f64) -> f64 {
        let m = u.max(v);
        if m <= self.sin2_near {
            PI
        } else {
            (PI * self.sin2_near / m).min(PI)
        }
    }

    /// Normal-incidence density over η = sin²α of a component whose intensity
    /// per steradian is `level(η)`: π · level / cos α (dη dφ = 2 cos α dω).
    fn radial(level: f64, eta: f64) -> f64 {
        // Clamp 1 − η away from 0: the density is integrable there, and a
        // finite value keeps weight ratios finite (common practice, no source).
        PI * level / (1.0 - eta).max(1e-300).sqrt()
    }

    /// Densities over (v, φ) of the near-mirror component (unit energy) and
    /// of the even component with unit levels split as (inner, outer), for an
    /// arrival at u and an exit at v with azimuth offset Δφ from the mirror.
    /// Each is the folded density k(u, v) = ½[g(|u − v|) + g(u + v or
    /// 2 − u − v)] of its level function (see the module documentation); the
    /// two folded points are shared by all three.
    fn component_densities(&self, u: f64, v: f64, dphi: f64) -> (f64, f64, f64) {
        let half = self.near_azimuth_half_width_rad(u, v);
        let near_on = dphi.abs() <= half;
        let (mut near, mut inner, mut outer) = (0.0, 0.0, 0.0);
        for eta in [
            (u - v).abs(),
            if u + v <= 1.0 { u + v } else { 2.0 - u - v },
        ] {
            if near_on && eta <= self.sin2_near {
                near += Self::radial(self.near_level, eta);
            }
            if eta <= self.sin2_cone {
                inner += Self::radial(1.0, eta);
            } else {
                outer += Self::radial(1.0, eta);
            }
        }
        (
            0.5 * near / (2.0 * half),
            0.5 * inner / TAU,
            0.5 * outer / TAU,
        )
    }

    /// Per-band scattered densities over (v, φ) (scattering and reflectance
    /// included) and the sampling density over (v, φ) of the non-mirror lobes.
    fn densities(&self, u: f64, v: f64, dphi: f64) -> (Bands, f64) {
        let (near, inner, outer) = self.component_densities(u, v, dphi);
        let per_band = Bands(std::array::from_fn(|b| {
            if b >= self.bands || self.scattering[b] == 0.0 {
                return 0.0;
            }
            let w = self.mix[b];
            let q =
                (1.0 - w) * near + w * (self.even_inner[b] * inner + self.even_outer[b] * outer);
            self.reflectance[b] * self.scattering[b] * q
        }));
        let sampling =
            self.pdf_near * near + self.pdf_even_inner * inner + self.pdf_even_outer * outer;
        (per_band, sampling)
    }

    /// Projected-disk coordinates of an arrival and an exit: (u₀, v, Δφ),
    /// Δφ the exit azimuth less the mirror azimuth, in (−π, π].
    fn disk_coordinates(wo: DVec3, wi: DVec3) -> (f64, f64, f64) {
        let u = (wo.x * wo.x + wo.y * wo.y).min(1.0);
        let v = (wi.x * wi.x + wi.y * wi.y).min(1.0);
        let dphi = wrap_angle(wi.y.atan2(wi.x) - wo.y.atan2(wo.x) - PI);
        (u, v, dphi)
    }
}

/// An angle brought into (−π, π].
fn wrap_angle(a: f64) -> f64 {
    let r = a.rem_euclid(TAU);
    if r > PI {
        r - TAU
    } else {
        r
    }
}

/// Reflects x into [0, 1]: x < 0 → −x, x > 1 → 2 − x (x within [−1, 2]).
fn fold_unit(x: f64) -> f64 {
    if x < 0.0 {
        (-x).min(1.0)
    } else if x > 1.0 {
        (2.0 - x).max(0.0)
    } else {
        x
    }
}

/// Finds w for (s, d) by bisection on the monotone d(w); returns w, the d it
/// reproduces, and a reason when that differs from the request.
fn solve_mix(model: &ArcModel, s: f64, d: f64) -> (f64, f64, Option<String>) {
    let low = model.diffusion(s, 0.0);
    let high = model.diffusion(s, 1.0);
    if d <= low {
        let reason = (d < low - 1e-12).then(|| {
            format!(
                "d is below the least even response the law can give for this s \
                 ({low:.3}: all scattered energy next to the mirror direction, the mirror \
                 spread over the {} zone receivers)",
                model.zone_receivers
            )
        });
        return (0.0, low, reason);
    }
    if d >= high {
        let bound = model.bound(s);
        if d > bound {
            let reason = format!(
                "d lies above the bound d_max = {bound:.4} by less than the rounding slack \
                 {PAIR_TOLERANCE}; treated as the most even response the law gives ({high:.4})"
            );
            return (1.0, high, Some(reason));
        }
        let reason = (d > high + 1e-12).then(|| {
            format!(
                "d is within the bound but above the most even response the law gives \
                 for this s ({high:.4}; the slab lets a sliver of the zone cone's edge into \
                 the zone cells)"
            )
        });
        return (1.0, high, reason);
    }
    let (mut lo, mut hi) = (0.0_f64, 1.0_f64);
    for _ in 0..60 {
        let mid = 0.5 * (lo + hi);
        if model.diffusion(s, mid) < d {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    (0.5 * (lo + hi), d, None)
}

impl ReflectionLaw for BoundedLaw {
    fn name(&self) -> &'static str {
        "bounded"
    }

    fn sample(&self, wo: DVec3, u_lobe: f64, u_dir: [f64; 2]) -> Option<LawSample> {
        // Pick a band uniformly, then one of its lobes, from the one number u_lobe.
        let n = self.bands;
        let x = u_lobe * n as f64;
        let k = (x as usize).min(n - 1);
        let u = (x - k as f64).clamp(0.0, 1.0);
        let s = self.scattering[k];
        if u < 1.0 - s {
            let p = self.mirror_probability;
            let weight = Bands(std::array::from_fn(|b| {
                if b < n {
                    self.reflectance[b] * (1.0 - self.scattering[b]) / p
                } else {
                    0.0
                }
            }));
            return Some(LawSample {
                wi: mirror_local(wo),
                weight,
                pdf: None,
                lobe: Lobe::Mirror,
            });
        }
        // Which component, and where u sits within its share (reused for the sign).
        let near_share = s * (1.0 - self.mix[k]);
        let near = u < 1.0 - s + near_share;
        let (start, width) = if near {
            (1.0 - s, near_share)
        } else {
            (1.0 - s + near_share, s * self.mix[k])
        };
        let t = if width > 0.0 {
            ((u - start) / width).clamp(0.0, 1.0)
        } else {
            0.0
        };
        // η = sin²α from the component's normal-incidence shape (cos α drawn).
        let (c, lobe) = if near {
            (1.0 - u_dir[0] * (1.0 - self.cos_near), Lobe::Directional)
        } else {
            let inner = self.even_inner[k] * TAU * (1.0 - self.cos_cone);
            let p_inner = inner.clamp(0.0, 1.0);
            let c = if u_dir[0] < 1.0 - p_inner {
                u_dir[0] / (1.0 - p_inner) * self.cos_cone
            } else {
                self.cos_cone + (u_dir[0] - (1.0 - p_inner)) / p_inner * (1.0 - self.cos_cone)
            };
            (c, Lobe::Diffuse)
        };
        let eta = ((1.0 - c) * (1.0 + c)).clamp(0.0, 1.0);
        // Fold u₀ ± η into [0, 1], then the azimuth around the mirror's.
        let u0 = (wo.x * wo.x + wo.y * wo.y).min(1.0);
        let v = fold_unit(if t < 0.5 { u0 + eta } else { u0 - eta });
        let half = if near {
            self.near_azimuth_half_width_rad(u0, v)
        } else {
            PI
        };
        let dphi = (2.0 * u_dir[1] - 1.0) * half;
        let phi = wo.y.atan2(wo.x) + PI + dphi;
        let (sin_t, cos_t) = (v.sqrt(), (1.0 - v).max(0.0).sqrt());
        let wi = DVec3::new(sin_t * phi.cos(), sin_t * phi.sin(), cos_t);
        let (per_band, sampling) = self.densities(u0, v, dphi);
        if sampling <= 0.0 || cos_t <= 0.0 {
            return None;
        }
        let weight = Bands(std::array::from_fn(|b| per_band[b] / sampling));
        Some(LawSample {
            wi,
            weight,
            pdf: Some(2.0 * cos_t * sampling),
            lobe,
        })
    }

    fn mirror_fraction(&self, _wo: DVec3) -> Bands {
        Bands(std::array::from_fn(|b| {
            self.reflectance[b] * (1.0 - self.scattering[b])
        }))
    }

    fn eval(&self, wo: DVec3, wi: DVec3) -> Bands {
        if wi.z <= 0.0 {
            return Bands::ZERO;
        }
        let (u, v, dphi) = Self::disk_coordinates(wo, wi);
        let (per_band, _) = self.densities(u, v, dphi);
        per_band * (2.0 * wi.z)
    }

    fn pdf(&self, wo: DVec3, wi: DVec3) -> f64 {
        if wi.z <= 0.0 {
            return 0.0;
        }
        let (u, v, dphi) = Self::disk_coordinates(wo, wi);
        2.0 * wi.z * self.densities(u, v, dphi).1
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cell_areas_sum_to_the_slab() {
        // Geometry check (derived here): the slab |η| ≤ η0 over θ ∈ [−90°, 90°] has
        // solid angle π · 2 sin η0, and a cone that holds the whole slab is the whole slab.
        let arc = CalibrationArc::standard();
        let model = ArcModel::new(&arc);
        let total: f64 = model.cell_sr.iter().sum();
        let eta0 = arc.slab_half_width_deg.to_radians();
        approx::assert_relative_eq!(total, PI * 2.0 * eta0.sin(), epsilon = 1e-12);
        let a = 5f64.to_radians();
        approx::assert_relative_eq!(
            cap_area_in_cell(-a, a, eta0, 20f64.to_radians()),
            2.0 * a * 2.0 * eta0.sin(),
            epsilon = 1e-9
        );
        // The near-mirror cone's own solid angle 2π(1 − cos γ) lies in the central cell.
        let g = arc.near_mirror_half_angle_deg().to_radians();
        approx::assert_relative_eq!(
            model.near_sr[18],
            TAU * (1.0 - g.cos()),
            max_relative = 1e-6
        );
    }
}
