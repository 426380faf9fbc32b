//! Octave bands and fixed-capacity per-band values.
//!
//! Every band-indexed quantity in the engine is a [`Bands`]: a copyable array of
//! [`MAX_BANDS`] values whose first `BandSet::len()` entries are meaningful and the
//! rest zero. The tracer's inner loop therefore never allocates, and two band
//! vectors can never disagree in length.

use std::fmt;
use std::ops::{Add, AddAssign, Index, IndexMut, Mul, MulAssign, Sub};

use serde::{Deserialize, Serialize};

/// Nominal octave-band centre frequencies polaray supports, in Hz (IEC 61260-1).
pub const OCTAVE_CENTRES_HZ: [u32; 8] = [63, 125, 250, 500, 1000, 2000, 4000, 8000];

/// Most bands a [`Bands`] value holds.
pub const MAX_BANDS: usize = OCTAVE_CENTRES_HZ.len();

/// The default band list of a room file: 125 Hz to 4 kHz.
pub const DEFAULT_BANDS_HZ: [u32; 6] = [125, 250, 500, 1000, 2000, 4000];

/// An error in a band list.
#[derive(Debug, thiserror::Error, PartialEq)]
pub enum BandError {
    /// A frequency that is not a nominal octave centre.
    #[error(
        "{0} Hz is not an octave-band centre; use one of 63, 125, 250, 500, 1000, 2000, 4000, 8000"
    )]
    NotOctave(u32),
    /// The list is empty.
    #[error("the band list is empty; give at least one octave-band centre")]
    Empty,
    /// Bands out of order or repeated.
    #[error("bands must be strictly increasing, but {1} Hz follows {0} Hz")]
    NotIncreasing(u32, u32),
}

/// The octave bands a computation uses: a strictly increasing subset of
/// [`OCTAVE_CENTRES_HZ`].
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct BandSet {
    centres_hz: Vec<u32>,
}

impl BandSet {
    /// Validates a list of nominal centre frequencies (Hz).
    pub fn new(centres_hz: &[u32]) -> Result<Self, BandError> {
        if centres_hz.is_empty() {
            return Err(BandError::Empty);
        }
        for &f in centres_hz {
            if !OCTAVE_CENTRES_HZ.contains(&f) {
                return Err(BandError::NotOctave(f));
            }
        }
        for pair in centres_hz.windows(2) {
            if pair[1] <= pair[0] {
                return Err(BandError::NotIncreasing(pair[0], pair[1]));
            }
        }
        Ok(Self {
            centres_hz: centres_hz.to_vec(),
        })
    }

    /// The default set, 125 Hz to 4 kHz.
    #[must_use]
    pub fn standard() -> Self {
        Self {
            centres_hz: DEFAULT_BANDS_HZ.to_vec(),
        }
    }

    /// Number of bands.
    #[must_use]
    pub fn len(&self) -> usize {
        self.centres_hz.len()
    }

    /// Always false: a band set holds at least one band.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.centres_hz.is_empty()
    }

    /// Nominal centre frequencies in Hz.
    #[must_use]
    pub fn centres_hz(&self) -> &[u32] {
        &self.centres_hz
    }

    /// Exact mid-band frequency of band `i` in Hz, 1000 · 10^(k/10) with k the
    /// third-octave index (IEC 61260-1 base-ten series), e.g. 125 Hz → 125.89 Hz.
    #[must_use]
    pub fn exact_centre_hz(&self, i: usize) -> f64 {
        exact_octave_centre_hz(self.centres_hz[i])
    }

    /// Index of a nominal centre frequency in this set.
    #[must_use]
    pub fn index_of(&self, hz: u32) -> Option<usize> {
        self.centres_hz.iter().position(|&f| f == hz)
    }

    /// Builds a [`Bands`] from a slice whose length must equal `len()`.
    pub fn values(&self, v: &[f64]) -> Result<Bands, BandCountError> {
        if v.len() != self.len() {
            return Err(BandCountError {
                expected: self.len(),
                found: v.len(),
            });
        }
        Ok(Bands::from_slice(v))
    }
}

/// A per-band list whose length disagrees with the band set.
#[derive(Debug, thiserror::Error, PartialEq)]
#[error("expected {expected} values (one per band), found {found}")]
pub struct BandCountError {
    /// Bands in the set.
    pub expected: usize,
    /// Values given.
    pub found: usize,
}

/// Exact mid-band frequency (Hz) of a nominal octave centre: 1000 · 10^(k/10),
/// k = 10 lg(f/1000) rounded (IEC 61260-1, base-ten series).
#[must_use]
pub fn exact_octave_centre_hz(nominal_hz: u32) -> f64 {
    let k = (10.0 * (f64::from(nominal_hz) / 1000.0).log10()).round();
    1000.0 * 10f64.powf(k / 10.0)
}

/// Per-band values with fixed capacity [`MAX_BANDS`]; unused entries are zero.
#[derive(Clone, Copy, PartialEq, Default, Serialize, Deserialize)]
pub struct Bands(pub [f64; MAX_BANDS]);

impl Bands {
    /// All zero.
    pub const ZERO: Self = Self([0.0; MAX_BANDS]);

    /// The same value in every slot (callers mask unused bands themselves if needed).
    #[must_use]
    pub const fn splat(v: f64) -> Self {
        Self([v; MAX_BANDS])
    }

    /// Copies up to [`MAX_BANDS`] values; the rest stay zero.
    #[must_use]
    pub fn from_slice(v: &[f64]) -> Self {
        let mut out = [0.0; MAX_BANDS];
        for (o, x) in out.iter_mut().zip(v) {
            *o = *x;
        }
        Self(out)
    }

    /// The first `n` values.
    #[must_use]
    pub fn as_slice(&self, n: usize) -> &[f64] {
        &self.0[..n]
    }

    /// Largest of the first `n` values.
    #[must_use]
    pub fn max_of(&self, n: usize) -> f64 {
        self.0[..n]
            .iter()
            .copied()
            .fold(f64::NEG_INFINITY, f64::max)
    }

    /// Mean of the first `n` values.
    #[must_use]
    pub fn mean_of(&self, n: usize) -> f64 {
        self.0[..n].iter().sum::<f64>() / n as f64
    }

    /// Applies `f` to each slot.
    #[must_use]
    pub fn map(self, f: impl Fn(f64) -> f64) -> Self {
        Self(self.0.map(f))
    }
}

impl fmt::Debug for Bands {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.debug_list().entries(self.0.iter()).finish()
    }
}

impl Index<usize> for Bands {
    type Output = f64;
    fn index(&self, i: usize) -> &f64 {
        &self.0[i]
    }
}

impl IndexMut<usize> for Bands {
    fn index_mut(&mut self, i: usize) -> &mut f64 {
        &mut self.0[i]
    }
}

impl Add for Bands {
    type Output = Self;
    fn add(self, o: Self) -> Self {
        let mut r = self;
        r += o;
        r
    }
}

impl Sub for Bands {
    type Output = Self;
    fn sub(self, o: Self) -> Self {
        let mut r = self;
        for (a, b) in r.0.iter_mut().zip(o.0) {
            *a -= b;
        }
        r
    }
}

impl AddAssign for Bands {
    fn add_assign(&mut self, o: Self) {
        for (a, b) in self.0.iter_mut().zip(o.0) {
            *a += b;
        }
    }
}

impl Mul for Bands {
    type Output = Self;
    fn mul(self, o: Self) -> Self {
        let mut r = self;
        r *= o;
        r
    }
}

impl MulAssign for Bands {
    fn mul_assign(&mut self, o: Self) {
        for (a, b) in self.0.iter_mut().zip(o.0) {
            *a *= b;
        }
    }
}

impl Mul<f64> for Bands {
    type Output = Self;
    fn mul(self, k: f64) -> Self {
        self.map(|x| x * k)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn band_set_rejects_non_octave_and_disorder() {
        assert_eq!(BandSet::new(&[1000, 1250]), Err(BandError::NotOctave(1250)));
        assert_eq!(
            BandSet::new(&[1000, 500]),
            Err(BandError::NotIncreasing(1000, 500))
        );
        assert_eq!(BandSet::new(&[]), Err(BandError::Empty));
        assert_eq!(BandSet::new(&[63, 8000]).unwrap().len(), 2);
    }

    #[test]
    fn exact_centres_follow_base_ten_series() {
        // IEC 61260-1 base-ten series: 125 Hz nominal is 1000·10^(-9/10) = 125.89 Hz.
        approx::assert_relative_eq!(exact_octave_centre_hz(125), 125.892_541, epsilon = 1e-5);
        approx::assert_relative_eq!(exact_octave_centre_hz(1000), 1000.0);
        approx::assert_relative_eq!(exact_octave_centre_hz(63), 63.095_734, epsilon = 1e-5);
    }

    #[test]
    fn values_checks_length() {
        let set = BandSet::standard();
        assert!(set.values(&[0.1; 6]).is_ok());
        assert_eq!(
            set.values(&[0.1; 5]),
            Err(BandCountError {
                expected: 6,
                found: 5
            })
        );
    }
}
