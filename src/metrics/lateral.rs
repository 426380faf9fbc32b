//! Early lateral energy fraction J_LF (ISO 3382-1:2009, Annex A, A.3.2):
//! J_LF = E_L(5..80 ms) / E(0..80 ms), E_L the energy of a figure-of-eight
//! receiver with its null toward the source (energy × cos² to the lateral axis).

use super::energy_ratios::energy_before;

/// J_LF from a lateral-weighted series and the omnidirectional series on the same
/// bins; `None` when no early energy arrives. Window limits are interpolated as in
/// [`energy_before`].
#[must_use]
pub fn lateral_fraction(lateral: &[f64], energy: &[f64], bin_s: f64, onset_s: f64) -> Option<f64> {
    let early = energy_before(energy, bin_s, onset_s, 0.080);
    if early <= 0.0 {
        return None;
    }
    let lat = energy_before(lateral, bin_s, onset_s, 0.080)
        - energy_before(lateral, bin_s, onset_s, 0.005);
    Some(lat / early)
}
