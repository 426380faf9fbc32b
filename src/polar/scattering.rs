//! Scattering coefficients seen by a goniometer: the specular-zone energy ratio
//! and the correlation scattering coefficient (Mommertz, Applied Acoustics 60 (2000)).

/// A complex pressure, (real, imaginary).
pub type Complex = (f64, f64);

/// Specular-zone scattering ratio s_z = (energy outside the zone) / (total), the
/// energy of receiver i being N_i p_i (reference.md §2). `None` without energy.
#[must_use]
pub fn zone_scattering_ratio(energy: &[f64], weight: &[f64], in_zone: &[bool]) -> Option<f64> {
    debug_assert!(energy.len() == weight.len() && energy.len() == in_zone.len());
    let mut total = 0.0;
    let mut outside = 0.0;
    for ((p, n), &z) in energy.iter().zip(weight).zip(in_zone) {
        total += n * p;
        if !z {
            outside += n * p;
        }
    }
    (total > 0.0 && total.is_finite()).then(|| outside / total)
}

/// Correlation scattering coefficient of the sample's pressures `p1` against the
/// flat reference's `p0` with area weights `weight`:
/// s_c = 1 − |Σ w p1 p0*|² / (Σ w |p1|² Σ w |p0|²) (Mommertz, Applied Acoustics
/// 60 (2000); reference.md §2). `None` when either response is silent.
#[must_use]
pub fn correlation_scattering(p1: &[Complex], p0: &[Complex], weight: &[f64]) -> Option<f64> {
    debug_assert!(p1.len() == p0.len() && p1.len() == weight.len());
    let (mut cr, mut ci, mut e1, mut e0) = (0.0, 0.0, 0.0, 0.0);
    for ((&(a, b), &(c, d)), &w) in p1.iter().zip(p0).zip(weight) {
        // p1 · conj(p0) = (a + jb)(c − jd)
        cr += w * (a * c + b * d);
        ci += w * (b * c - a * d);
        e1 += w * (a * a + b * b);
        e0 += w * (c * c + d * d);
    }
    (e1 > 0.0 && e0 > 0.0).then(|| 1.0 - (cr * cr + ci * ci) / (e1 * e0))
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn correlation_checks() {
        // Mommertz (2000) / reference.md §2: p1 = κ p0 → 0; p1 orthogonal to p0 → 1.
        let p0: Vec<Complex> = (0..9)
            .map(|i| ((0.3 * i as f64).cos(), (0.7 * i as f64).sin()))
            .collect();
        let w = vec![1.0; 9];
        let kappa = (0.4, -1.3);
        let p1: Vec<Complex> = p0
            .iter()
            .map(|&(a, b)| (kappa.0 * a - kappa.1 * b, kappa.0 * b + kappa.1 * a))
            .collect();
        assert_relative_eq!(
            correlation_scattering(&p1, &p0, &w).unwrap(),
            0.0,
            epsilon = 1e-12
        );
        let q0 = [(1.0, 0.0); 4];
        let q1 = [(1.0, 0.0), (-1.0, 0.0), (0.0, 2.0), (0.0, -2.0)];
        assert_relative_eq!(
            correlation_scattering(&q1, &q0, &[1.0; 4]).unwrap(),
            1.0,
            epsilon = 1e-12
        );
        assert_eq!(
            correlation_scattering(&[(0.0, 0.0)], &[(1.0, 0.0)], &[1.0]),
            None
        );
    }

    #[test]
    fn zone_ratio() {
        // Definition (reference.md §2): energy outside / total.
        let s = zone_scattering_ratio(
            &[1.0, 3.0, 1.0, 5.0],
            &[1.0; 4],
            &[false, true, true, false],
        );
        assert_relative_eq!(s.unwrap(), 0.6, epsilon = 1e-15);
    }
}
