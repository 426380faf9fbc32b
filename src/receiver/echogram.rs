//! Energy echograms: energy fluence per time bin and band.

use crate::bands::Bands;

/// Energy fluence per time bin and band at one receiver for one source, with
/// the lateral (figure-of-eight) weighted copy used for J_LF.
#[derive(Clone, Debug, PartialEq)]
pub struct Echogram {
    /// Bin width, s. Bin k covers [k·bin_s, (k+1)·bin_s), time from emission.
    pub bin_s: f64,
    /// Energy fluence per bin, J/m², for a source emitting 1 J per band.
    pub energy: Vec<Bands>,
    /// The same weighted by cos² of the angle between the arrival direction
    /// and the lateral axis ([`super::lateral_axis`]), J/m².
    pub lateral: Vec<Bands>,
}

impl Echogram {
    /// An all-zero echogram of `bins` bins of `bin_s` seconds.
    #[must_use]
    pub fn new(bins: usize, bin_s: f64) -> Self {
        Self {
            bin_s,
            energy: vec![Bands::ZERO; bins],
            lateral: vec![Bands::ZERO; bins],
        }
    }

    /// Number of bins.
    #[must_use]
    pub fn bins(&self) -> usize {
        self.energy.len()
    }

    /// Adds fluence `fluence` (J/m²) arriving at `time_s` with lateral weight
    /// `lateral_cos_sq` (0..1); arrivals past the last bin are dropped.
    pub fn add(&mut self, time_s: f64, fluence: Bands, lateral_cos_sq: f64) {
        let bin = (time_s / self.bin_s) as usize;
        if bin < self.energy.len() {
            self.energy[bin] += fluence;
            self.lateral[bin] += fluence * lateral_cos_sq;
        }
    }

    /// Adds another echogram of the same shape bin by bin.
    pub fn merge(&mut self, other: &Self) {
        debug_assert_eq!(self.bins(), other.bins());
        for (a, b) in self.energy.iter_mut().zip(&other.energy) {
            *a += *b;
        }
        for (a, b) in self.lateral.iter_mut().zip(&other.lateral) {
            *a += *b;
        }
    }

    /// Sum over all bins per band, J/m².
    #[must_use]
    pub fn total(&self) -> Bands {
        self.energy.iter().fold(Bands::ZERO, |acc, &e| acc + e)
    }

    /// Index of the first bin holding energy in any band.
    #[must_use]
    pub fn first_nonzero_bin(&self) -> Option<usize> {
        self.energy
            .iter()
            .position(|e| e.0.iter().any(|&x| x != 0.0))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn add_bins_by_time_and_drops_late_arrivals() {
        let mut e = Echogram::new(10, 0.001);
        e.add(0.0034, Bands::splat(2.0), 0.25);
        e.add(0.5, Bands::splat(1.0), 1.0);
        assert_eq!(e.energy[3][0], 2.0);
        assert_eq!(e.lateral[3][0], 0.5);
        assert_eq!(e.total()[0], 2.0);
        assert_eq!(e.first_nonzero_bin(), Some(3));
        let mut f = Echogram::new(10, 0.001);
        f.merge(&e);
        assert_eq!(f, e);
    }
}
