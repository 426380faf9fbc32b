//! Delete-one jackknife standard errors of parameters computed from pooled
//! batches (Efron & Tibshirani, An Introduction to the Bootstrap, 1993,
//! ch. 11; from memory).
//!
//! A run traced in B batches with disjoint random streams gives one pooled
//! echogram (the mean of the batches) and B delete-one pools (the mean of the
//! other B − 1). A parameter θ computed on each gives θ_(b); the jackknife
//! standard error of the pooled value is se² = (B − 1)/B · Σ_b (θ_(b) − θ̄)²,
//! θ̄ the mean of the θ_(b). It needs no formula for how θ depends on the
//! echogram, which is why it serves T30's line fit as well as C80's ratio.

/// Delete-one jackknife standard error from the delete-one values θ_(b).
/// `None` with fewer than two values or when any is undefined.
#[must_use]
pub fn jackknife_se(delete_one: &[Option<f64>]) -> Option<f64> {
    let b = delete_one.len();
    if b < 2 {
        return None;
    }
    let values: Option<Vec<f64>> = delete_one.iter().copied().collect();
    let values = values?;
    if values.iter().any(|v| !v.is_finite()) {
        return None;
    }
    let mean = values.iter().sum::<f64>() / b as f64;
    let sum_sq: f64 = values.iter().map(|v| (v - mean) * (v - mean)).sum();
    Some(((b as f64 - 1.0) / b as f64 * sum_sq).sqrt())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn jackknife_of_the_mean_is_the_standard_error_of_the_mean() {
        // Derived here: for the mean, θ_(b) − θ̄ = (x̄ − x_b)/(B − 1), so the
        // jackknife gives Σ(x_b − x̄)²/(B(B − 1)) = s²/B exactly.
        let x = [1.0, 4.0, 2.5, 7.0, 3.0];
        let b = x.len() as f64;
        let total: f64 = x.iter().sum();
        let delete_one: Vec<Option<f64>> =
            x.iter().map(|v| Some((total - v) / (b - 1.0))).collect();
        let mean = total / b;
        let s2 = x.iter().map(|v| (v - mean).powi(2)).sum::<f64>() / (b - 1.0);
        let se = jackknife_se(&delete_one).unwrap();
        assert!((se - (s2 / b).sqrt()).abs() < 1e-12, "{se}");
        assert_eq!(jackknife_se(&[Some(1.0)]), None);
        assert_eq!(jackknife_se(&[Some(1.0), None]), None);
    }
}
