//! Coefficients the goniometer reports, as thin adapters over the polar
//! module's functions ([`crate::polar::diffusion`], [`crate::polar::bound`]),
//! so a virtual measurement is evaluated exactly like a laboratory one.

use crate::polar::bound::ZoneSize;
use crate::polar::diffusion::diffusion_coefficient;

/// Diffusion coefficient of equal-area receivers (ISO 17497-2:2012 cl. 8;
/// reference.md §1): d = [(Σ p)² − Σ p²] / [(n − 1) Σ p²], p the receiver
/// energies (any common scale). `None` with fewer than two receivers or no energy.
#[must_use]
pub fn diffusion_equal_area(energies: &[f64]) -> Option<f64> {
    let ones = vec![1.0; energies.len()];
    diffusion_coefficient(energies, &ones)
}

/// Zone ratio at which the bound reaches 1: s* = (M − M_s)/M, the fraction of
/// receivers outside the specular zone (reference.md §3).
#[must_use]
pub fn zone_ratio_of_full_diffusion(receivers: usize, zone_receivers: usize) -> f64 {
    ZoneSize::equal_area(receivers, zone_receivers.min(receivers)).s_star()
}

/// The bound d_max(s; M, M_s) (reference.md §3) for zone ratio `zone_ratio`;
/// `None` when the zone is empty or holds every receiver, where it is undefined.
#[must_use]
pub fn diffusion_bound(zone_ratio: f64, receivers: usize, zone_receivers: usize) -> Option<f64> {
    ZoneSize::equal_area(receivers, zone_receivers)
        .d_max(zone_ratio)
        .ok()
}

/// The consistency bound for a material's scattering coefficient s (not a zone
/// ratio): d ≤ d_max(min(s, s*)), since the zone ratio can lie anywhere in
/// [0, s] (reference.md §3).
#[must_use]
pub fn diffusion_bound_for_scattering(
    scattering: f64,
    receivers: usize,
    zone_receivers: usize,
) -> Option<f64> {
    let s_star = zone_ratio_of_full_diffusion(receivers, zone_receivers);
    diffusion_bound(scattering.min(s_star), receivers, zone_receivers)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn equal_area_check_values() {
        // reference.md §1 check values: uniform → 1, single receiver → 0,
        // k equal of n → (k − 1)/(n − 1).
        assert_relative_eq!(
            diffusion_equal_area(&[2.0; 37]).unwrap(),
            1.0,
            epsilon = 1e-12
        );
        let mut one = vec![0.0; 37];
        one[4] = 3.0;
        assert_relative_eq!(diffusion_equal_area(&one).unwrap(), 0.0, epsilon = 1e-12);
        let mut k = vec![0.0; 37];
        k[..5].fill(1.0);
        assert_relative_eq!(
            diffusion_equal_area(&k).unwrap(),
            4.0 / 36.0,
            epsilon = 1e-12
        );
        assert!(diffusion_equal_area(&[0.0; 5]).is_none());
    }

    #[test]
    fn bound_check_values() {
        // reference.md §3: M = 37, M_s = 5: d_max(0) = 1/9, d_max(0.5) = 67/148,
        // d_max(s*) = 1 at s* = 32/37.
        assert_relative_eq!(
            diffusion_bound(0.0, 37, 5).unwrap(),
            1.0 / 9.0,
            epsilon = 1e-12
        );
        assert_relative_eq!(
            diffusion_bound(0.5, 37, 5).unwrap(),
            67.0 / 148.0,
            epsilon = 1e-12
        );
        assert_relative_eq!(
            diffusion_bound(32.0 / 37.0, 37, 5).unwrap(),
            1.0,
            epsilon = 1e-12
        );
        assert_relative_eq!(
            diffusion_bound_for_scattering(0.95, 37, 5).unwrap(),
            1.0,
            epsilon = 1e-12
        );
        assert!(diffusion_bound(0.2, 37, 0).is_none());
    }
}
