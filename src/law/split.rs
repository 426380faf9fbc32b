//! The scattering-only split law: a fraction s of the reflected energy leaves
//! in a Lambert (cosine) distribution, the rest as a mirror reflection
//! (the usual treatment in geometric room acoustics; Vorländer, Auralization, 2008, §11).

use std::f64::consts::PI;

use glam::DVec3;

use super::{sample_cosine, LawSample, Lobe, ReflectionLaw};
use crate::bands::Bands;
use crate::geometry::mirror_local;
use crate::room::Material;

/// Lambert split with per-band scattering coefficients.
///
/// The bands a law instance serves travel on one ray. The lobe is chosen with
/// probability P(mirror) = mean over those bands of (1 − s_b), and each band's
/// weight is its own lobe share divided by that probability, so every band
/// stays unbiased even when the s_b differ. Unequal s_b make the weights
/// fluctuate, and over many reflections that noise compounds (the mean square
/// weight grows by a factor per reflection), so the tracer builds one instance
/// per group of bands whose scattering coefficients agree in every material
/// ([`crate::law::LawKind::band_groups`]); within a group the weights are exactly 1 − α.
#[derive(Clone, Debug)]
pub struct SplitLaw {
    reflectance: Bands,
    scattering: Bands,
    mirror_probability: f64,
}

impl SplitLaw {
    /// The law for `material` over the first `bands` bands.
    #[must_use]
    pub fn new(material: &Material, bands: usize) -> Self {
        let all: Vec<usize> = (0..bands).collect();
        Self::for_bands(material, &all)
    }

    /// The law for `material` serving only the band indices in `active`; every
    /// other band gets weight 0.
    #[must_use]
    pub fn for_bands(material: &Material, active: &[usize]) -> Self {
        let mut reflectance = Bands::ZERO;
        let mut scattering = Bands::ZERO;
        for &b in active {
            reflectance[b] = 1.0 - material.absorption[b];
            scattering[b] = material.scattering[b];
        }
        let mirror_probability = if active.is_empty() {
            1.0
        } else {
            active.iter().map(|&b| 1.0 - scattering[b]).sum::<f64>() / active.len() as f64
        };
        Self {
            reflectance,
            scattering,
            mirror_probability,
        }
    }
}

impl ReflectionLaw for SplitLaw {
    fn name(&self) -> &'static str {
        "split"
    }

    fn sample(&self, wo: DVec3, u_lobe: f64, u_dir: [f64; 2]) -> Option<LawSample> {
        let p = self.mirror_probability;
        if u_lobe < p {
            let weight = Bands(std::array::from_fn(|b| {
                self.reflectance[b] * (1.0 - self.scattering[b]) / p
            }));
            Some(LawSample {
                wi: mirror_local(wo),
                weight,
                pdf: None,
                lobe: Lobe::Mirror,
            })
        } else {
            let q = 1.0 - p;
            let wi = sample_cosine(u_dir);
            let weight = Bands(std::array::from_fn(|b| {
                self.reflectance[b] * self.scattering[b] / q
            }));
            Some(LawSample {
                wi,
                weight,
                pdf: Some(q * wi.z / PI),
                lobe: Lobe::Diffuse,
            })
        }
    }

    fn mirror_fraction(&self, _wo: DVec3) -> Bands {
        Bands(std::array::from_fn(|b| {
            self.reflectance[b] * (1.0 - self.scattering[b])
        }))
    }

    fn eval(&self, _wo: DVec3, wi: DVec3) -> Bands {
        if wi.z <= 0.0 {
            return Bands::ZERO;
        }
        let lambert = wi.z / PI;
        Bands(std::array::from_fn(|b| {
            self.reflectance[b] * self.scattering[b] * lambert
        }))
    }

    fn pdf(&self, _wo: DVec3, wi: DVec3) -> f64 {
        if wi.z <= 0.0 {
            return 0.0;
        }
        (1.0 - self.mirror_probability) * wi.z / PI
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::random::Stream;
    use approx::assert_relative_eq;

    fn material(alpha: [f64; 3], s: [f64; 3]) -> Material {
        Material {
            name: "m".into(),
            absorption: Bands::from_slice(&alpha),
            scattering: Bands::from_slice(&s),
            diffusion: None,
            polar_file: None,
            goniometer: None,
        }
    }

    #[test]
    fn expected_weight_is_one_minus_alpha_per_band() {
        // Energy conservation (common practice for reflection models, e.g. pbrt's
        // white-furnace test): E[weight_b] = 1 − α_b, even when s_b differ.
        let law = SplitLaw::new(&material([0.1, 0.3, 0.6], [0.05, 0.5, 0.95]), 3);
        let wo = DVec3::new(0.3, 0.1, 0.9).normalize();
        let mut rng = Stream::new(11, 0);
        let n = 200_000;
        let mut sum = Bands::ZERO;
        let mut mirror = Bands::ZERO;
        for _ in 0..n {
            let s = law.sample(wo, rng.uniform(), rng.uniform2()).unwrap();
            sum += s.weight;
            if s.lobe == Lobe::Mirror {
                mirror += s.weight;
            }
        }
        for (b, (a, sc)) in [(0.1, 0.05), (0.3, 0.5), (0.6, 0.95)]
            .into_iter()
            .enumerate()
        {
            assert_relative_eq!(sum[b] / n as f64, 1.0 - a, epsilon = 0.01);
            assert_relative_eq!(mirror[b] / n as f64, (1.0 - a) * (1.0 - sc), epsilon = 0.01);
        }
    }

    #[test]
    fn zero_scattering_is_a_pure_mirror() {
        let law = SplitLaw::new(&material([0.2, 0.2, 0.2], [0.0, 0.0, 0.0]), 3);
        let wo = DVec3::new(-0.4, 0.2, 0.7).normalize();
        for u in [0.0, 0.5, 0.999_999] {
            let s = law.sample(wo, u, [0.3, 0.6]).unwrap();
            assert_eq!(s.lobe, Lobe::Mirror);
            assert_relative_eq!((s.wi - mirror_local(wo)).length(), 0.0, epsilon = 1e-15);
        }
    }
}
