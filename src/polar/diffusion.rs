//! The diffusion coefficient of a polar response (ISO 17497-2:2012, clause 8;
//! AES-4id-2001) and its normalized form.

/// Energies p_i = 10^(L_i/10) of levels in dB.
#[must_use]
pub fn energies_from_levels_db(level_db: &[f64]) -> Vec<f64> {
    level_db.iter().map(|l| 10f64.powf(l / 10.0)).collect()
}

/// Diffusion coefficient from receiver energies `energy` (linear, p_i) and area
/// weights `weight` (N_i ≥ 1, all 1 for equal-area receivers):
/// d = [(Σ N_i p_i)² − Σ N_i p_i²] / [(Σ N_i − 1) Σ N_i p_i²]
/// (ISO 17497-2:2012, clause 8). `None` when it is undefined: fewer than two
/// receivers' worth of weight, or no energy at all.
#[must_use]
pub fn diffusion_coefficient(energy: &[f64], weight: &[f64]) -> Option<f64> {
    debug_assert_eq!(energy.len(), weight.len());
    let total_weight: f64 = weight.iter().sum();
    let sum: f64 = energy.iter().zip(weight).map(|(p, n)| n * p).sum();
    let sum_sq: f64 = energy.iter().zip(weight).map(|(p, n)| n * p * p).sum();
    if total_weight <= 1.0 || sum_sq <= 0.0 || !sum_sq.is_finite() {
        return None;
    }
    Some((sum * sum - sum_sq) / ((total_weight - 1.0) * sum_sq))
}

/// Diffusion coefficient of levels in dB on equal-area receivers.
#[must_use]
pub fn diffusion_coefficient_db(level_db: &[f64]) -> Option<f64> {
    let p = energies_from_levels_db(level_db);
    diffusion_coefficient(&p, &vec![1.0; p.len()])
}

/// Normalized diffusion coefficient d_n = (d − d_ref)/(1 − d_ref), d_ref that of
/// a flat reference of the same footprint (ISO 17497-2:2012, clause 8). `None`
/// when d_ref = 1 (the reference is already perfectly diffuse).
#[must_use]
pub fn normalized_diffusion(d: f64, d_ref: f64) -> Option<f64> {
    let den = 1.0 - d_ref;
    (den.abs() > 1e-12).then(|| (d - d_ref) / den)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn uniform_response_is_fully_diffuse() {
        // ISO 17497-2 clause 8 / reference.md §1 check value: uniform → d = 1.
        assert_relative_eq!(
            diffusion_coefficient_db(&[3.0; 37]).unwrap(),
            1.0,
            epsilon = 1e-12
        );
    }

    #[test]
    fn single_receiver_is_not_diffuse() {
        // reference.md §1 check value: one non-zero receiver → d = 0.
        let mut p = vec![0.0; 37];
        p[18] = 2.5;
        assert_relative_eq!(
            diffusion_coefficient(&p, &[1.0; 37]).unwrap(),
            0.0,
            epsilon = 1e-15
        );
    }

    #[test]
    fn k_equal_receivers_of_n() {
        // reference.md §1 check value: k equal non-zero receivers of n → (k − 1)/(n − 1).
        for (k, n) in [(2usize, 37usize), (5, 37), (10, 19), (19, 19)] {
            let mut p = vec![0.0; n];
            for x in p.iter_mut().take(k) {
                *x = 0.7;
            }
            let d = diffusion_coefficient(&p, &vec![1.0; n]).unwrap();
            assert_relative_eq!(d, (k as f64 - 1.0) / (n as f64 - 1.0), epsilon = 1e-12);
        }
    }

    #[test]
    fn normalization() {
        // Definition (ISO 17497-2:2012 clause 8): d = d_ref → 0, d = 1 → 1.
        assert_eq!(normalized_diffusion(0.3, 0.3), Some(0.0));
        assert_relative_eq!(normalized_diffusion(1.0, 0.3).unwrap(), 1.0);
        assert_eq!(normalized_diffusion(0.5, 1.0), None);
    }

    #[test]
    fn undefined_cases() {
        assert_eq!(diffusion_coefficient(&[1.0], &[1.0]), None);
        assert_eq!(diffusion_coefficient(&[0.0, 0.0], &[1.0, 1.0]), None);
    }
}
