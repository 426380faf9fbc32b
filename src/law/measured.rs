//! The `polar` law: reflections drawn from measured or predicted polar responses.
//!
//! # Energy and the specular zone
//! The measured pattern gives only the *shape*; the total reflected energy of
//! band b is 1 − α_b. Of it, (1 − α_b)(1 − s_b) leaves as an exact mirror
//! reflection, s_b being the material's scattering coefficient (ISO 17497-1),
//! and (1 − α_b) s_b is drawn from the measured pattern. A finite sample's
//! specular lobe spreads over the receivers of its specular zone with a width
//! set by the sample size, not by the room surface, whose geometric reflection
//! is an infinite-plane mirror. So the zone receivers' levels are replaced by
//! the level their neighbours outside the zone give (linear in angle for plane
//! data; inverse-angle weighting of the four nearest for hemispherical data),
//! or kept where they are lower (a dip at the mirror direction, as diffusers
//! show near their design frequency, is scattered energy missing there, not
//! specular energy), before the pattern is used: the mirror energy is then not counted twice,
//! and the law uses the same s as the other laws, so law comparisons differ
//! only in the shape of the scattered part. The zone is the set of receivers
//! the image source reaches through the sample (reference.md §2), or those
//! within `zone_half_width_deg` of the mirror direction when the file gives
//! it, plus always the receiver nearest the mirror direction.
//!
//! # Three uses of the data ([`PolarUse`])
//! - Hemispherical (θ, φ) data are used directly: a cell is drawn by its
//!   energy ∝ level × solid angle, then a direction uniformly (in solid
//!   angle) within it. φ is measured from local +X toward +Y. The pattern
//!   measured at source azimuth φ_s is turned by φ(wo) − φ_s (azimuthally
//!   isotropic statistics assumed); where several source azimuths share one
//!   incidence angle the nearest is used.
//! - Single-plane data of a surface without a profile axis are taken as
//!   rotationally symmetric about the normal: the level at polar angle θ is the
//!   mean energy of the receivers at +θ and −θ, φ is uniform, and the
//!   arrival azimuth plays no part (only its polar angle does). Responses at
//!   +ψ and −ψ are pooled.
//! - Single-plane data of an extruded (1D) profile scatter only in the plane
//!   across the extrusion axis. **The tracer must build the local frame with
//!   `Frame::from_normal_and_tangent(normal, profile_axis)`, so local +X is the
//!   extrusion axis**; the measurement plane is then local YZ, with receiver
//!   angles positive toward local +Y. Outgoing directions lie on the cone of
//!   the Kirchhoff result for an extruded surface: the axial component of the
//!   mirror direction (−wo.x) is kept and the in-plane angle
//!   θ = atan2(wi.y, wi.z) is drawn from the pattern measured at the in-plane
//!   incidence ψ = atan2(wo.y, wo.z) (the pattern is not rescaled for the
//!   smaller in-plane wavenumber of oblique arrivals). If the file has no
//!   negative incidences the responses are mirrored for them (ψ → −ψ,
//!   θ → −θ): a symmetric sample is assumed, and a warning says so.
//!
//! # Incidence
//! Between two measured incidences the pattern is the energy mixture
//! (1 − t) g_a + t g_b of the two normalized patterns, t linear in angle;
//! outside the measured range the nearest pattern is used and a
//! [`MeasuredLawWarning::IncidenceClamped`] is returned at construction.
//!
//! # Densities
//! All bands travel on one ray. The scattered lobe picks band c with
//! probability ∝ s_c, then a direction from that band's pattern, so the
//! density is q(wi) = Σ_c s_c g_c(wi) / B (B bands), and band b's weight is
//! (1 − α_b) s_b g_b(wi) / q(wi), unbiased for every band. For hemispherical
//! and rotational data `eval` and `pdf` are exact per steradian (piecewise
//! constant in the cells). For an extruded profile the scattered part is a
//! delta across the cone: no density per steradian exists, so `eval` and
//! `pdf` return zero, samples carry `pdf: None`, and the density per radian of
//! the in-plane angle is offered by [`MeasuredPolarLaw::pdf_in_plane`] and
//! [`MeasuredPolarLaw::eval_in_plane`] instead.

mod error;
mod prepare;
mod table;

use std::f64::consts::TAU;
use std::path::{Path, PathBuf};

use glam::DVec3;

use super::{LawSample, Lobe, ReflectionLaw};
use crate::bands::{BandSet, Bands, MAX_BANDS};
use crate::geometry::mirror_local;
use crate::polar::{Arrangement, PolarFile};
use crate::room::Material;

pub use error::{MeasuredLawError, MeasuredLawWarning};
pub use prepare::load_polar_file;
use prepare::{BandPattern, Entry, Table, Variant};

/// How the law reads the polar data (see the module documentation).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum PolarUse {
    /// Hemispherical (θ, φ) data, used directly.
    Hemisphere,
    /// Single-plane data taken as rotationally symmetric about the normal.
    Rotational,
    /// Single-plane data of an extruded profile: the reflection cone.
    Extruded,
}

/// The reflection law driven by a polar data file, for one material (and, for
/// an extruded profile, one surface frame with local +X along the axis).
#[derive(Clone, Debug)]
pub struct MeasuredPolarLaw {
    file: PathBuf,
    usage: PolarUse,
    bands: usize,
    /// Bands this instance serves (the others get weight 0); lobe and band
    /// probabilities are shared among these only.
    active_count: usize,
    reflectance: Bands,
    scattering: Bands,
    mirror_probability: f64,
    /// Cumulative probability of picking each band for the scattered lobe (∝ s_b).
    band_cdf: [f64; MAX_BANDS],
    patterns: Vec<Option<BandPattern>>,
    ranges_rad: Vec<(f64, f64)>,
}

/// Where an arrival falls among the measured incidences of one band.
#[derive(Clone, Copy, Debug)]
struct Bracket {
    lower: usize,
    upper: usize,
    /// Weight of `upper`, 0..1.
    t: f64,
}

fn bracket(entries: &[Entry], x: f64) -> Bracket {
    let n = entries.len();
    let k = entries.partition_point(|e| e.incidence_rad <= x);
    if k == 0 {
        return Bracket {
            lower: 0,
            upper: 0,
            t: 0.0,
        };
    }
    if k == n {
        return Bracket {
            lower: n - 1,
            upper: n - 1,
            t: 0.0,
        };
    }
    let (a, b) = (entries[k - 1].incidence_rad, entries[k].incidence_rad);
    Bracket {
        lower: k - 1,
        upper: k,
        t: (x - a) / (b - a),
    }
}

/// The variant whose source azimuth is nearest `phi_rad` (around the circle).
fn nearest_variant(variants: &[Variant], phi_rad: f64) -> &Variant {
    let gap = |v: &Variant| {
        let d = (phi_rad - v.azimuth_rad).rem_euclid(TAU);
        d.min(TAU - d)
    };
    variants
        .iter()
        .min_by(|a, b| gap(a).total_cmp(&gap(b)))
        .unwrap_or(&variants[0])
}

/// Arrival coordinates: incidence (polar or signed in-plane angle) and azimuth.
#[derive(Clone, Copy, Debug)]
struct Arrival {
    incidence_rad: f64,
    azimuth_rad: f64,
}

impl MeasuredPolarLaw {
    /// Builds the law for `material` over the room's `bands` from `polar`
    /// (read from `file`, named in messages). `extruded` says that the surface
    /// has a profile axis (then the tracer must use a frame with local +X
    /// along it; see the module documentation). Returns the warnings found.
    pub fn new(
        material: &Material,
        bands: &BandSet,
        polar: &PolarFile,
        file: &Path,
        extruded: bool,
    ) -> Result<(Self, Vec<MeasuredLawWarning>), MeasuredLawError> {
        let all: Vec<usize> = (0..bands.len()).collect();
        Self::for_bands(material, bands, &all, polar, file, extruded)
    }

    /// As [`MeasuredPolarLaw::new`], serving only the band indices in `active`
    /// (others get weight 0, and their data are not read). The tracer builds
    /// one instance per band, since bands with different patterns cannot share
    /// a ray without compounding weight noise (see `crate::trace`).
    pub fn for_bands(
        material: &Material,
        bands: &BandSet,
        active: &[usize],
        polar: &PolarFile,
        file: &Path,
        extruded: bool,
    ) -> Result<(Self, Vec<MeasuredLawWarning>), MeasuredLawError> {
        let usage = match (polar.geometry.arrangement, extruded) {
            (Arrangement::Hemisphere, _) => PolarUse::Hemisphere,
            (Arrangement::Plane, true) => PolarUse::Extruded,
            (Arrangement::Plane, false) => PolarUse::Rotational,
        };
        let n = bands.len();
        let mut reflectance = Bands::ZERO;
        let mut scattering = Bands::ZERO;
        let mut warnings = Vec::new();
        let mut patterns = Vec::with_capacity(n);
        let mut ranges_rad = Vec::with_capacity(n);
        for (b, &band_hz) in bands.centres_hz().iter().enumerate() {
            if !active.contains(&b) {
                patterns.push(None);
                ranges_rad.push((0.0, 0.0));
                continue;
            }
            reflectance[b] = 1.0 - material.absorption[b];
            scattering[b] = material.scattering[b].clamp(0.0, 1.0);
            let prepared =
                prepare::prepare_band(file, polar, band_hz, scattering[b], usage, &mut warnings)?;
            patterns.push(prepared.pattern);
            ranges_rad.push(prepared.range_rad);
        }
        let s_sum: f64 = (0..n).map(|b| scattering[b]).sum();
        let active_count = active.len().max(1);
        let mirror_probability = 1.0 - s_sum / active_count as f64;
        let mut band_cdf = [1.0; MAX_BANDS];
        if s_sum > 0.0 {
            let mut acc = 0.0;
            for (b, c) in band_cdf.iter_mut().enumerate().take(n) {
                acc += scattering[b] / s_sum;
                *c = acc;
            }
            // Close the table at the last served band, so rounding can never
            // leave a sliver of probability on a band this instance does not serve.
            let last = active.iter().copied().max().unwrap_or(n - 1);
            for c in band_cdf.iter_mut().take(n).skip(last) {
                *c = 1.0;
            }
        }
        Ok((
            Self {
                file: file.to_path_buf(),
                usage,
                bands: n,
                active_count,
                reflectance,
                scattering,
                mirror_probability,
                band_cdf,
                patterns,
                ranges_rad,
            },
            warnings,
        ))
    }

    /// Builds the law from the material's `polar_file`, read with [`load_polar_file`].
    pub fn from_material(
        material: &Material,
        bands: &BandSet,
        extruded: bool,
    ) -> Result<(Self, Vec<MeasuredLawWarning>), MeasuredLawError> {
        let file = material
            .polar_file
            .as_deref()
            .ok_or_else(|| MeasuredLawError::NoPolarFile {
                material: material.name.clone(),
            })?;
        let polar = load_polar_file(file)?;
        Self::new(material, bands, &polar, file, extruded)
    }

    /// How the data are used.
    #[must_use]
    pub fn usage(&self) -> PolarUse {
        self.usage
    }

    /// The polar file the law came from.
    #[must_use]
    pub fn file(&self) -> &Path {
        &self.file
    }

    /// True when `wo` lies outside the measured incidences of band `band`, so
    /// the nearest measured pattern stands in for it.
    #[must_use]
    pub fn is_clamped(&self, wo: DVec3, band: usize) -> bool {
        let x = self.arrival(wo).incidence_rad;
        let (lo, hi) = self.ranges_rad[band];
        x < lo - 1e-12 || x > hi + 1e-12
    }

    /// The signed in-plane angle of an outgoing direction (radians), the
    /// coordinate the extruded-profile pattern is drawn in: atan2(wi.y, wi.z).
    #[must_use]
    pub fn in_plane_angle(wi: DVec3) -> f64 {
        wi.y.atan2(wi.z)
    }

    /// Extruded profile only: density per radian of the in-plane angle
    /// `angle_rad` with which `sample` returns a scattered direction (including
    /// the probability of the scattered lobe). Zero for other uses.
    #[must_use]
    pub fn pdf_in_plane(&self, wo: DVec3, angle_rad: f64) -> f64 {
        if self.usage != PolarUse::Extruded {
            return 0.0;
        }
        let arrival = self.arrival(wo);
        let mut q = 0.0;
        for b in 0..self.bands {
            if self.scattering[b] > 0.0 {
                q += self.scattering[b] * self.density_arc(b, arrival, angle_rad);
            }
        }
        q / self.active_count as f64
    }

    /// Extruded profile only: reflected energy per radian of the in-plane
    /// angle of the scattered part, per band. Integrated over −π/2..π/2 it
    /// gives (1 − α) s. Zero for other uses.
    #[must_use]
    pub fn eval_in_plane(&self, wo: DVec3, angle_rad: f64) -> Bands {
        if self.usage != PolarUse::Extruded {
            return Bands::ZERO;
        }
        let arrival = self.arrival(wo);
        let mut out = Bands::ZERO;
        for b in 0..self.bands {
            if self.scattering[b] > 0.0 {
                out[b] = self.reflectance[b]
                    * self.scattering[b]
                    * self.density_arc(b, arrival, angle_rad);
            }
        }
        out
    }

    fn arrival(&self, wo: DVec3) -> Arrival {
        match self.usage {
            PolarUse::Extruded => Arrival {
                incidence_rad: wo.y.atan2(wo.z),
                azimuth_rad: 0.0,
            },
            PolarUse::Rotational | PolarUse::Hemisphere => Arrival {
                incidence_rad: wo.z.clamp(-1.0, 1.0).acos(),
                azimuth_rad: wo.y.atan2(wo.x),
            },
        }
    }

    /// Density of band `b`'s pattern per steradian at (θ, φ) of the outgoing direction.
    fn density_sphere(&self, b: usize, arrival: Arrival, theta_rad: f64, phi_rad: f64) -> f64 {
        let Some(pattern) = &self.patterns[b] else {
            return 0.0;
        };
        let br = bracket(&pattern.entries, arrival.incidence_rad);
        let one = |k: usize| {
            let v = nearest_variant(&pattern.entries[k].variants, arrival.azimuth_rad);
            let turn = if v.rotate {
                arrival.azimuth_rad - v.azimuth_rad
            } else {
                0.0
            };
            match &v.table {
                Table::Sphere(t) => t.density(theta_rad, phi_rad - turn),
                Table::Arc(_) => 0.0,
            }
        };
        if br.t == 0.0 {
            one(br.lower)
        } else {
            (1.0 - br.t) * one(br.lower) + br.t * one(br.upper)
        }
    }

    /// Density of band `b`'s pattern per radian of the in-plane angle.
    fn density_arc(&self, b: usize, arrival: Arrival, angle_rad: f64) -> f64 {
        let Some(pattern) = &self.patterns[b] else {
            return 0.0;
        };
        let br = bracket(&pattern.entries, arrival.incidence_rad);
        let one = |k: usize| match &pattern.entries[k].variants[0].table {
            Table::Arc(t) => t.density(angle_rad),
            Table::Sphere(_) => 0.0,
        };
        if br.t == 0.0 {
            one(br.lower)
        } else {
            (1.0 - br.t) * one(br.lower) + br.t * one(br.upper)
        }
    }

    /// Per-band pattern densities g_b at `wi` (per sr or per radian by use).
    fn densities(&self, wo: DVec3, arrival: Arrival, wi: DVec3) -> Bands {
        let mut g = Bands::ZERO;
        match self.usage {
            PolarUse::Extruded => {
                let _ = wo;
                let angle = Self::in_plane_angle(wi);
                for b in 0..self.bands {
                    if self.scattering[b] > 0.0 {
                        g[b] = self.density_arc(b, arrival, angle);
                    }
                }
            }
            PolarUse::Rotational | PolarUse::Hemisphere => {
                let theta = wi.z.clamp(-1.0, 1.0).acos();
                let phi = wi.y.atan2(wi.x);
                for b in 0..self.bands {
                    if self.scattering[b] > 0.0 {
                        g[b] = self.density_sphere(b, arrival, theta, phi);
                    }
                }
            }
        }
        g
    }

    /// Draws a scattered direction from band `band`'s pattern.
    fn sample_pattern(
        &self,
        band: usize,
        wo: DVec3,
        arrival: Arrival,
        u: f64,
        u_dir: [f64; 2],
    ) -> Option<DVec3> {
        let pattern = self.patterns[band].as_ref()?;
        let br = bracket(&pattern.entries, arrival.incidence_rad);
        let k = if u < 1.0 - br.t { br.lower } else { br.upper };
        let v = nearest_variant(&pattern.entries[k].variants, arrival.azimuth_rad);
        match &v.table {
            Table::Sphere(t) => {
                let (cos_t, phi) = t.sample(u_dir[0], u_dir[1]);
                let turn = if v.rotate {
                    arrival.azimuth_rad - v.azimuth_rad
                } else {
                    0.0
                };
                let sin_t = (1.0 - cos_t * cos_t).max(0.0).sqrt();
                let phi = phi + turn;
                Some(DVec3::new(sin_t * phi.cos(), sin_t * phi.sin(), cos_t))
            }
            Table::Arc(t) => {
                let angle = t.sample(u_dir[0]);
                let axial = -wo.x;
                let r = (1.0 - axial * axial).max(0.0).sqrt();
                Some(DVec3::new(axial, r * angle.sin(), r * angle.cos()))
            }
        }
    }
}

impl ReflectionLaw for MeasuredPolarLaw {
    fn name(&self) -> &'static str {
        "polar"
    }

    fn sample(&self, wo: DVec3, u_lobe: f64, u_dir: [f64; 2]) -> Option<LawSample> {
        let p = self.mirror_probability;
        if u_lobe < p {
            let weight = Bands(std::array::from_fn(|b| {
                self.reflectance[b] * (1.0 - self.scattering[b]) / p
            }));
            return Some(LawSample {
                wi: mirror_local(wo),
                weight,
                pdf: None,
                lobe: Lobe::Mirror,
            });
        }
        // Remap u_lobe to pick the band, then (remapped again) the incidence.
        let mut u = ((u_lobe - p) / (1.0 - p)).clamp(0.0, 1.0 - f64::EPSILON / 2.0);
        let band = self.band_cdf[..self.bands]
            .partition_point(|&c| c <= u)
            .min(self.bands - 1);
        let lo = if band == 0 {
            0.0
        } else {
            self.band_cdf[band - 1]
        };
        let width = self.band_cdf[band] - lo;
        u = if width > 0.0 { (u - lo) / width } else { 0.5 };
        let arrival = self.arrival(wo);
        let wi = self.sample_pattern(band, wo, arrival, u, u_dir)?;
        let g = self.densities(wo, arrival, wi);
        let q: f64 = (0..self.bands)
            .map(|b| self.scattering[b] * g[b])
            .sum::<f64>()
            / self.active_count as f64;
        if q.is_nan() || q <= 0.0 {
            return None;
        }
        let weight = Bands(std::array::from_fn(|b| {
            if b < self.bands {
                self.reflectance[b] * self.scattering[b] * g[b] / q
            } else {
                0.0
            }
        }));
        Some(LawSample {
            wi,
            weight,
            pdf: (self.usage != PolarUse::Extruded).then_some(q),
            lobe: Lobe::Directional,
        })
    }

    fn mirror_fraction(&self, _wo: DVec3) -> Bands {
        Bands(std::array::from_fn(|b| {
            self.reflectance[b] * (1.0 - self.scattering[b])
        }))
    }

    fn eval(&self, wo: DVec3, wi: DVec3) -> Bands {
        if wi.z <= 0.0 || self.usage == PolarUse::Extruded {
            return Bands::ZERO;
        }
        let g = self.densities(wo, self.arrival(wo), wi);
        Bands(std::array::from_fn(|b| {
            self.reflectance[b] * self.scattering[b] * g[b]
        }))
    }

    fn pdf(&self, wo: DVec3, wi: DVec3) -> f64 {
        if wi.z <= 0.0 || self.usage == PolarUse::Extruded {
            return 0.0;
        }
        let g = self.densities(wo, self.arrival(wo), wi);
        (0..self.bands)
            .map(|b| self.scattering[b] * g[b])
            .sum::<f64>()
            / self.active_count as f64
    }
}
