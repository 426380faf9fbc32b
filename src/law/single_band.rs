//! Serving one band of a room with a law built for that band alone.
//!
//! A law whose lobes differ from band to band (the bounded and measured laws)
//! is traced one band per pass. [`SingleBand`] builds the law over a one-band
//! set and moves its band-0 results to the room's band index, so any law gets
//! per-band passes without code of its own for it.

use glam::DVec3;

use super::{LawSample, ReflectionLaw};
use crate::bands::{BandSet, Bands};
use crate::room::Material;

/// A law built for a single band, answering at band index `band` of the room.
pub struct SingleBand {
    inner: Box<dyn ReflectionLaw>,
    band: usize,
}

impl SingleBand {
    /// Wraps `inner`, which was built over [`single_band_inputs`]'s band set.
    #[must_use]
    pub fn new(inner: Box<dyn ReflectionLaw>, band: usize) -> Self {
        Self { inner, band }
    }

    fn moved(&self, w: Bands) -> Bands {
        let mut out = Bands::ZERO;
        out[self.band] = w[0];
        out
    }
}

/// The one-band material and band set for band index `band` of `bands`.
#[must_use]
pub fn single_band_inputs(
    material: &Material,
    bands: &BandSet,
    band: usize,
) -> (Material, BandSet) {
    let one = |v: Bands| Bands::from_slice(&[v[band]]);
    let m = Material {
        name: material.name.clone(),
        absorption: one(material.absorption),
        scattering: one(material.scattering),
        diffusion: material.diffusion.map(one),
        polar_file: material.polar_file.clone(),
        goniometer: material.goniometer.clone(),
    };
    let set = BandSet::new(&[bands.centres_hz()[band]]).expect("a band of a valid set is valid");
    (m, set)
}

impl ReflectionLaw for SingleBand {
    fn name(&self) -> &'static str {
        self.inner.name()
    }

    fn sample(&self, wo: DVec3, u_lobe: f64, u_dir: [f64; 2]) -> Option<LawSample> {
        self.inner.sample(wo, u_lobe, u_dir).map(|s| LawSample {
            weight: self.moved(s.weight),
            ..s
        })
    }

    fn mirror_fraction(&self, wo: DVec3) -> Bands {
        self.moved(self.inner.mirror_fraction(wo))
    }

    fn eval(&self, wo: DVec3, wi: DVec3) -> Bands {
        self.moved(self.inner.eval(wo, wi))
    }

    fn pdf(&self, wo: DVec3, wi: DVec3) -> f64 {
        self.inner.pdf(wo, wi)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::law::SplitLaw;

    #[test]
    fn results_land_on_the_room_band() {
        let bands = BandSet::new(&[250, 1000, 4000]).unwrap();
        let m = Material {
            name: "m".into(),
            absorption: Bands::from_slice(&[0.1, 0.2, 0.3]),
            scattering: Bands::from_slice(&[0.0, 0.0, 0.0]),
            diffusion: None,
            polar_file: None,
            goniometer: None,
        };
        let (one, set) = single_band_inputs(&m, &bands, 1);
        let law = SingleBand::new(Box::new(SplitLaw::new(&one, set.len())), 1);
        let s = law.sample(DVec3::Z, 0.5, [0.5, 0.5]).unwrap();
        // Mirror with s = 0: weight 1 − α of band 1 only.
        assert_eq!(s.weight.0[..3], [0.0, 0.8, 0.0]);
    }
}
