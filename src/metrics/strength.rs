//! Sound strength G (ISO 3382-1:2009, Annex A, A.2.1): the level of the total
//! energy re that of the same source in a free field at 10 m.

use super::energy_ratios::total_energy;
use super::schroeder::Tail;

/// Free-field energy fluence at 10 m from a source that emits 1 J, J/m²:
/// 1 / (4π · 10²) (spherical spreading, no air absorption).
pub const FREE_FIELD_FLUENCE_10M: f64 = 1.0 / (4.0 * std::f64::consts::PI * 100.0);

/// G = 10 lg(Σ E / E_10m) in dB, with E in J/m² for a source emitting 1 J in the
/// band; `None` without energy.
#[must_use]
pub fn strength_db(energy: &[f64], tail: Option<&Tail>) -> Option<f64> {
    let total = total_energy(energy, tail);
    (total > 0.0).then(|| 10.0 * (total / FREE_FIELD_FLUENCE_10M).log10())
}
