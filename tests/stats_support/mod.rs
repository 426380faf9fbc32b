//! Statistics shared by the law tests: chi-square against expected counts and
//! its critical value.
#![allow(dead_code)]

/// Chi-square statistic and degrees of freedom for counts against expected
/// counts, pooling bins whose expectation is under 5 (common practice).
pub fn chi_square(counts: &[f64], expected: &[f64]) -> (f64, usize) {
    let (mut chi, mut dof, mut pool_c, mut pool_e) = (0.0, 0usize, 0.0, 0.0);
    for (c, e) in counts.iter().zip(expected) {
        if *e < 5.0 {
            pool_c += c;
            pool_e += e;
            continue;
        }
        chi += (c - e) * (c - e) / e;
        dof += 1;
    }
    if pool_e > 0.0 {
        chi += (pool_c - pool_e) * (pool_c - pool_e) / pool_e.max(1e-300);
        dof += 1;
    }
    (chi, dof.saturating_sub(1))
}

/// The 99.9 % quantile of chi-square with `dof` degrees of freedom, by the
/// Wilson–Hilferty approximation (z = 3.09).
pub fn critical(dof: usize) -> f64 {
    let k = dof as f64;
    k * (1.0 - 2.0 / (9.0 * k) + 3.09 * (2.0 / (9.0 * k)).sqrt()).powi(3)
}
