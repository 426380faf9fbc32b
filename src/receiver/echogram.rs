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

/// Arrivals recorded by one chunk of rays, in the order they happened, for
/// several echograms of the same shape; added to them later with
/// [`ArrivalLog::merge_into`]. Most bins of a chunk stay empty, so keeping
/// the arrivals is far cheaper than zeroing, filling and merging a full
/// echogram per chunk.
///
/// A log made with [`ArrivalLog::dense`] adds to full echograms at once
/// instead: for estimators that score at almost every bin (next-event
/// estimation), where keeping and sorting every arrival costs more.
#[derive(Clone, Debug, Default)]
pub struct ArrivalLog {
    arrivals: Vec<Arrival>,
    dense: Option<Vec<Echogram>>,
}

#[derive(Clone, Copy, Debug)]
struct Arrival {
    /// Which echogram (index into the slice given to `merge_into`).
    echogram: u32,
    bin: u32,
    fluence: Bands,
    lateral_cos_sq: f64,
}

impl ArrivalLog {
    /// An empty log.
    #[must_use]
    pub fn new() -> Self {
        Self::default()
    }

    /// A log that adds at once to `count` zeroed echograms of `bins` bins of
    /// `bin_s` seconds. Merging it gives the bits of adding in order to
    /// those echograms and merging them; appending adds echogram to echogram.
    #[must_use]
    pub fn dense(count: usize, bins: usize, bin_s: f64) -> Self {
        Self {
            arrivals: Vec::new(),
            dense: Some(vec![Echogram::new(bins, bin_s); count]),
        }
    }

    /// Records what [`Echogram::add`] would add to echogram `echogram`, whose
    /// shape is `bins` bins of `bin_s` seconds: fluence `fluence` (J/m²)
    /// arriving at `time_s` with lateral weight `lateral_cos_sq`; arrivals
    /// past the last bin are dropped.
    #[inline]
    pub fn add(
        &mut self,
        echogram: usize,
        bins: usize,
        bin_s: f64,
        time_s: f64,
        fluence: Bands,
        lateral_cos_sq: f64,
    ) {
        if let Some(dense) = &mut self.dense {
            dense[echogram].add(time_s, fluence, lateral_cos_sq);
            return;
        }
        let bin = (time_s / bin_s) as usize;
        if bin < bins {
            debug_assert!(self.arrivals.len() < u32::MAX as usize);
            self.arrivals.push(Arrival {
                echogram: echogram as u32,
                bin: bin as u32,
                fluence,
                lateral_cos_sq,
            });
        }
    }

    /// Appends the arrivals of `later`, recorded after these.
    pub fn append(&mut self, mut later: Self) {
        match (&mut self.dense, later.dense) {
            (Some(mine), Some(theirs)) => {
                for (a, b) in mine.iter_mut().zip(&theirs) {
                    a.merge(b);
                }
            }
            (None, None) => self.arrivals.append(&mut later.arrivals),
            _ => panic!("an arrival log cannot append a log of the other kind"),
        }
    }

    /// Number of arrivals recorded.
    #[must_use]
    pub fn len(&self) -> usize {
        self.arrivals.len()
    }

    /// Whether no arrival was recorded.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.arrivals.is_empty()
    }

    /// Adds the arrivals to `echograms`, bit for bit as if they had been
    /// added in order with [`Echogram::add`] to zeroed echograms that were
    /// then [merged](Echogram::merge) into `echograms`: each bin's arrivals
    /// are summed in recording order first, then added to the bin (bins
    /// without arrivals would have added +0, which changes nothing).
    pub fn merge_into(self, echograms: &mut [Echogram]) {
        if let Some(dense) = self.dense {
            for (target, d) in echograms.iter_mut().zip(&dense) {
                target.merge(d);
            }
            return;
        }
        // (echogram, bin) then recording position: sorting these small keys
        // orders the arrivals like a stable sort by (echogram, bin).
        let mut order: Vec<(u64, u32)> = self
            .arrivals
            .iter()
            .enumerate()
            .map(|(i, a)| ((u64::from(a.echogram) << 32) | u64::from(a.bin), i as u32))
            .collect();
        order.sort_unstable();
        for run in order.chunk_by(|a, b| a.0 == b.0) {
            let mut energy = Bands::ZERO;
            let mut lateral = Bands::ZERO;
            for &(_, i) in run {
                let a = &self.arrivals[i as usize];
                energy += a.fluence;
                lateral += a.fluence * a.lateral_cos_sq;
            }
            let first = &self.arrivals[run[0].1 as usize];
            let target = &mut echograms[first.echogram as usize];
            target.energy[first.bin as usize] += energy;
            target.lateral[first.bin as usize] += lateral;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn arrival_log_merges_like_dense_echograms() {
        // Exactness (our contract): the same bits as filling zeroed echograms
        // and merging them. Awkward values make any change of summation order show.
        let mut dense = vec![Echogram::new(20, 0.01); 3];
        let mut total_a = vec![Echogram::new(20, 0.01); 3];
        total_a[1].add(0.055, Bands::splat(0.3), 0.5);
        let mut total_b = total_a.clone();
        let mut log = ArrivalLog::new();
        let mut rng = crate::random::Stream::new(5, 0);
        for _ in 0..2000 {
            let e = (rng.next_u64() % 3) as usize;
            let t = rng.uniform() * 0.21;
            let f = Bands(std::array::from_fn(|_| rng.uniform() / 3.0));
            let c = rng.uniform();
            dense[e].add(t, f, c);
            log.add(e, 20, 0.01, t, f, c);
        }
        for (t, d) in total_a.iter_mut().zip(&dense) {
            t.merge(d);
        }
        log.merge_into(&mut total_b);
        assert_eq!(total_a, total_b);
    }

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
