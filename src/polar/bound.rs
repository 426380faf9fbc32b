//! The scattering–diffusion bound (reference.md §3, derived there from the
//! definitions): a response with a fraction s of its energy outside the specular
//! zone has diffusion coefficient at most d_max(s); and the consistency check of
//! a material's (s, d) pair built on it.
//!
//! Derivation with area weights N_i (hemispherical data): with energies
//! e_i = N_i p_i normalized to Σ e_i = 1, d = (1 − w)/((W − 1) w) where
//! w = Σ e_i²/N_i and W = Σ N_i. Cauchy–Schwarz on each zone gives
//! Σ_zone e_i²/N_i ≥ (Σ_zone e_i)²/W_s, equality when p_i is constant in the zone,
//! so w ≥ (1 − s)²/W_s + s²/(W − W_s) and d ≤ d_max(s) with W, W_s in place of
//! the counts M, M_s of equal-area receivers.

use super::zone::ZoneGeometry;

/// Receivers of a goniometer and how many of them (and how much area weight) lie
/// in the specular zone.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct ZoneSize {
    /// Receivers, M.
    pub receivers: usize,
    /// Receivers in the specular zone, M_s.
    pub zone_receivers: usize,
    /// Sum of the area weights, W (= M for equal-area receivers).
    pub total_weight: f64,
    /// Sum of the area weights in the zone, W_s (= M_s for equal-area receivers).
    pub zone_weight: f64,
}

/// The bound is undefined for this zone.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ZoneSizeError {
    /// No receiver lies in the zone.
    #[error("the specular zone holds no receiver; widen it (zone half-width or sample size) so that the mirror direction has receivers")]
    EmptyZone,
    /// Every receiver lies in the zone.
    #[error("every receiver lies in the specular zone; the bound needs receivers outside it (narrow the zone or add receivers)")]
    FullZone,
}

impl ZoneSize {
    /// Equal-area receivers: M of them, M_s in the zone.
    #[must_use]
    pub fn equal_area(receivers: usize, zone_receivers: usize) -> Self {
        Self {
            receivers,
            zone_receivers,
            total_weight: receivers as f64,
            zone_weight: zone_receivers as f64,
        }
    }

    /// Counts from a zone membership list and area weights (same length).
    #[must_use]
    pub fn from_membership(in_zone: &[bool], weight: &[f64]) -> Self {
        Self {
            receivers: in_zone.len(),
            zone_receivers: in_zone.iter().filter(|&&z| z).count(),
            total_weight: weight.iter().sum(),
            zone_weight: in_zone
                .iter()
                .zip(weight)
                .filter(|(&z, _)| z)
                .map(|(_, w)| w)
                .sum(),
        }
    }

    /// Checks that the bound is defined (receivers both inside and outside the zone).
    pub fn check(&self) -> Result<(), ZoneSizeError> {
        if self.zone_receivers == 0 {
            Err(ZoneSizeError::EmptyZone)
        } else if self.zone_receivers == self.receivers {
            Err(ZoneSizeError::FullZone)
        } else {
            Ok(())
        }
    }

    /// s* = (W − W_s)/W: the zone ratio at which d_max reaches 1, the share of
    /// receivers (area) outside the zone (reference.md §3).
    #[must_use]
    pub fn s_star(&self) -> f64 {
        (self.total_weight - self.zone_weight) / self.total_weight
    }

    /// Largest diffusion coefficient a response can have with a fraction
    /// `s_zone` of its energy outside the zone (reference.md §3):
    /// w(s) = (1 − s)²/W_s + s²/(W − W_s), d_max = (1 − w)/((W − 1) w).
    pub fn d_max(&self, s_zone: f64) -> Result<f64, ZoneSizeError> {
        self.check()?;
        let outside = self.total_weight - self.zone_weight;
        let w = (1.0 - s_zone).powi(2) / self.zone_weight + s_zone.powi(2) / outside;
        Ok((1.0 - w) / ((self.total_weight - 1.0) * w))
    }
}

/// A material's (s, d) pair that cannot be right, or cannot be judged.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum BoundViolation {
    /// d lies above the largest value the scattering coefficient allows.
    #[error(
        "diffusion coefficient d = {d:.3} exceeds the largest value scattering coefficient s = {s:.3} allows, \
         d_max = {d_max:.3}, by {excess:.3} (bound at min(s, s*) = {s_used:.3}, s* = {s_star:.3}, for {receivers} \
         equal-area receivers with {zone_receivers} in the specular zone); raise s, lower d or check the data. \
         Note: s is usually a random-incidence value and d a normal-incidence one, so this check is approximate"
    )]
    Exceeds {
        /// Scattering coefficient given.
        s: f64,
        /// Diffusion coefficient given.
        d: f64,
        /// min(s, s*), where the bound is evaluated.
        s_used: f64,
        /// s* = (M − M_s)/M.
        s_star: f64,
        /// The bound d_max(min(s, s*)).
        d_max: f64,
        /// d − d_max.
        excess: f64,
        /// M.
        receivers: usize,
        /// M_s.
        zone_receivers: usize,
    },
    /// s or d outside [0, 1] or not a number.
    #[error("{name} = {value} is not a coefficient between 0 and 1; give a value in [0, 1]")]
    OutOfRange {
        /// "s" or "d".
        name: &'static str,
        /// The value given.
        value: f64,
    },
    /// The geometry leaves the bound undefined.
    #[error("the check geometry is unusable: {0}")]
    Geometry(#[from] ZoneSizeError),
}

/// Checks a material's scattering coefficient `s` (ISO 17497-1) against its
/// diffusion coefficient `d` (ISO 17497-2) with the goniometer `geometry`
/// (use [`ZoneGeometry::default`] without better knowledge: 37 receivers at 5°,
/// 5 in the zone). The zone ratio a goniometer sees lies in [0, s], so the
/// rigorous limit is d_max(min(s, s*)) (reference.md §3); above s* nothing is
/// excluded. Values within 1e-12 of the bound pass.
pub fn check_material_pair(s: f64, d: f64, geometry: &ZoneGeometry) -> Result<(), BoundViolation> {
    for (name, value) in [("s", s), ("d", d)] {
        if !(0.0..=1.0).contains(&value) {
            return Err(BoundViolation::OutOfRange { name, value });
        }
    }
    let size = geometry.size();
    let s_star = size.s_star();
    let s_used = s.min(s_star);
    let d_max = size.d_max(s_used)?;
    if d > d_max + 1e-12 {
        return Err(BoundViolation::Exceeds {
            s,
            d,
            s_used,
            s_star,
            d_max,
            excess: d - d_max,
            receivers: size.receivers,
            zone_receivers: size.zone_receivers,
        });
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn reference_check_values() {
        // reference.md §3: M = 37, M_s = 5: d_max(0) = 1/9, d_max(0.5) = 67/148,
        // d_max(s*) = 1 at s* = 32/37.
        let z = ZoneSize::equal_area(37, 5);
        assert_relative_eq!(z.d_max(0.0).unwrap(), 1.0 / 9.0, epsilon = 1e-14);
        assert_relative_eq!(z.d_max(0.5).unwrap(), 67.0 / 148.0, epsilon = 1e-14);
        assert_relative_eq!(z.s_star(), 32.0 / 37.0, epsilon = 1e-15);
        assert_relative_eq!(z.d_max(32.0 / 37.0).unwrap(), 1.0, epsilon = 1e-14);
        assert!(z.d_max(0.8).unwrap() < 1.0 && z.d_max(0.95).unwrap() < 1.0);
    }

    #[test]
    fn undefined_zones_are_errors() {
        assert_eq!(
            ZoneSize::equal_area(37, 0).d_max(0.2),
            Err(ZoneSizeError::EmptyZone)
        );
        assert_eq!(
            ZoneSize::equal_area(5, 5).d_max(0.0),
            Err(ZoneSizeError::FullZone)
        );
    }
}
