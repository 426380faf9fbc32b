//! Standard errors from batches, differences in JNDs, and the verdict rule.
//!
//! # Standard errors
//! A run is traced in B batches of rays with disjoint random streams; the
//! parameters are computed on the pooled echogram (the mean of the batch
//! echograms) and on each delete-one pool (the mean of the other B − 1
//! batches). The delete-one jackknife then gives the standard error of the
//! pooled value: se² = (B − 1)/B · Σ_b (θ_(b) − θ̄)², θ̄ the mean of the θ_(b)
//! (Efron & Tibshirani, An Introduction to the Bootstrap, 1993, ch. 11; from
//! memory). Batch b traces the same rays in every run of a comparison (common
//! random numbers), so the standard error of a difference comes from the
//! differences of the paired delete-one values, which keeps the correlation
//! between runs that tracing the same rays creates.
//!
//! # Verdicts
//! For a difference Δ between two runs with standard error σ, one JND J (for
//! the relative JNDs of EDT, T20 and T30, 5 % of the mean of the two values)
//! and the noise factor k:
//! - spread S = |Δ| / J and noise N = k σ / J, both in JNDs;
//! - **sensitive to the treatment** when S − N > 1: the whole band S ± N
//!   lies above one JND, so the difference is real and audible;
//! - **robust** when S + N ≤ 1: even at the top of its noise band the
//!   difference stays within one JND;
//! - **within noise** otherwise: the noise band straddles one JND, so the
//!   Monte Carlo noise hides whether the difference can be heard (trace more
//!   rays or batches);
//! - **not available** when a value or its standard error is undefined.
//!
//! # The noise factor k
//! Unless a comparison file fixes it, k is the two-sided Student-t quantile
//! for B − 1 degrees of freedom (B batches: the jackknife standard error of a
//! smooth statistic of batch means has B − 1 degrees of freedom) at level
//! 1 − α/m, with α = 0.05 and m the number of pairs in the largest group
//! compared (Bonferroni). Bonferroni rather than Holm because each cell
//! reports one noise band N for all its pairs, and Holm's step-down levels
//! would give every pair its own band; Bonferroni's band is the widest of
//! Holm's, so it is the conservative choice (Holm, Scand. J. Statist. 6
//! (1979) 65–70). The family-wise error is then at most α per cell: the
//! chance that any pair of the cell has its true difference outside S ± N.
//!
//! With more than two runs, the verdict is that of the deciding pair: any
//! sensitive pair decides (the one with the largest S); otherwise, when every
//! pair is robust, the robust verdict, shown with the pair of largest S + N;
//! otherwise within noise, shown with the non-robust pair of largest S + N.

use serde::Serialize;

use crate::metrics::{jackknife_se, Jnd};

/// Family-wise error allowed per cell of a comparison (common practice, no source).
pub const FAMILY_WISE_ALPHA: f64 = 0.05;

/// The default noise factor k for `batches` batches and `pairs` pairs per
/// cell: the Student-t quantile at 1 − α/(2m) for B − 1 degrees of freedom
/// (see the module docs); `None` below two batches.
#[must_use]
pub fn default_noise_factor(batches: usize, pairs: usize) -> Option<f64> {
    if batches < 2 {
        return None;
    }
    let m = pairs.max(1) as f64;
    Some(student_t_quantile(
        1.0 - FAMILY_WISE_ALPHA / (2.0 * m),
        (batches - 1) as f64,
    ))
}

/// Quantile of Student's t distribution with `dof` (> 0) degrees of freedom
/// at probability `p` in (0.5, 1): the t at which the distribution function,
/// 1 − ½ I_{ν/(ν+t²)}(ν/2, ½) (Abramowitz & Stegun (1964) 26.7.1 with
/// 26.5.27), equals p, found by bisection to 1e-12.
#[must_use]
pub fn student_t_quantile(p: f64, dof: f64) -> f64 {
    let upper_tail = |t: f64| 0.5 * regularized_beta(dof / (dof + t * t), 0.5 * dof, 0.5);
    let target = 1.0 - p;
    let (mut lo, mut hi) = (0.0_f64, 1.0_f64);
    while upper_tail(hi) > target && hi < 1e12 {
        hi *= 2.0;
    }
    while hi - lo > 1e-12 * hi.max(1.0) {
        let mid = 0.5 * (lo + hi);
        if upper_tail(mid) > target {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

/// The regularized incomplete beta function I_x(a, b), by its continued
/// fraction (Press et al., Numerical Recipes, 3rd ed. (2007) §6.4).
fn regularized_beta(x: f64, a: f64, b: f64) -> f64 {
    if x <= 0.0 {
        return 0.0;
    }
    if x >= 1.0 {
        return 1.0;
    }
    let ln_front = ln_gamma(a + b) - ln_gamma(a) - ln_gamma(b) + a * x.ln() + b * (1.0 - x).ln();
    if x < (a + 1.0) / (a + b + 2.0) {
        ln_front.exp() * beta_fraction(x, a, b) / a
    } else {
        1.0 - ln_front.exp() * beta_fraction(1.0 - x, b, a) / b
    }
}

/// The continued fraction of the incomplete beta function (modified Lentz).
fn beta_fraction(x: f64, a: f64, b: f64) -> f64 {
    const TINY: f64 = 1e-300;
    let (qab, qap, qam) = (a + b, a + 1.0, a - 1.0);
    let mut c = 1.0;
    let mut d = 1.0 - qab * x / qap;
    if d.abs() < TINY {
        d = TINY;
    }
    d = 1.0 / d;
    let mut h = d;
    for m in 1..300 {
        let m = f64::from(m);
        let m2 = 2.0 * m;
        for aa in [
            m * (b - m) * x / ((qam + m2) * (a + m2)),
            -(a + m) * (qab + m) * x / ((a + m2) * (qap + m2)),
        ] {
            d = 1.0 + aa * d;
            if d.abs() < TINY {
                d = TINY;
            }
            c = 1.0 + aa / c;
            if c.abs() < TINY {
                c = TINY;
            }
            d = 1.0 / d;
            h *= d * c;
        }
        if (d * c - 1.0).abs() < 1e-15 {
            break;
        }
    }
    h
}

/// ln Γ(x) for x > 0: the Lanczos approximation with g = 7, nine terms
/// (Lanczos, SIAM J. Numer. Anal. B 1 (1964); coefficients as commonly
/// published), relative error near 1e-15.
fn ln_gamma(x: f64) -> f64 {
    const G: f64 = 7.0;
    const C: [f64; 9] = [
        0.999_999_999_999_809_9,
        676.520_368_121_885_1,
        -1_259.139_216_722_402_8,
        771.323_428_777_653_1,
        -176.615_029_162_140_6,
        12.507_343_278_686_905,
        -0.138_571_095_265_720_12,
        9.984_369_578_019_572e-6,
        1.505_632_735_149_311_6e-7,
    ];
    if x < 0.5 {
        // Reflection: Γ(x) Γ(1 − x) = π / sin(πx).
        let pi = std::f64::consts::PI;
        return (pi / (pi * x).sin()).ln() - ln_gamma(1.0 - x);
    }
    let x = x - 1.0;
    let mut sum = C[0];
    for (i, c) in C.iter().enumerate().skip(1) {
        sum += c / (x + i as f64);
    }
    let t = x + G + 0.5;
    0.5 * (2.0 * std::f64::consts::PI).ln() + (x + 0.5) * t.ln() - t + sum.ln()
}

/// The verdict on a difference (or on the spread of several runs).
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Verdict {
    /// Within one JND even at the top of the noise band.
    Robust,
    /// The noise band straddles one JND.
    WithinNoise,
    /// Real and at least one JND.
    Sensitive,
    /// A value or standard error is undefined.
    Undefined,
}

impl Verdict {
    /// Every verdict, in table order.
    pub const ALL: [Verdict; 4] = [
        Self::Robust,
        Self::WithinNoise,
        Self::Sensitive,
        Self::Undefined,
    ];

    /// Words shown in reports.
    #[must_use]
    pub fn label(self) -> &'static str {
        match self {
            Self::Robust => "robust",
            Self::WithinNoise => "within noise",
            Self::Sensitive => "sensitive to the treatment",
            Self::Undefined => "not available",
        }
    }

    /// The key used in JSON and CSV.
    #[must_use]
    pub fn key(self) -> &'static str {
        match self {
            Self::Robust => "robust",
            Self::WithinNoise => "within_noise",
            Self::Sensitive => "sensitive",
            Self::Undefined => "undefined",
        }
    }

    /// The rule, one sentence per verdict, for reports (`k` the noise factor).
    #[must_use]
    pub fn rule_text(self, k: f64) -> String {
        match self {
            Self::Robust => format!(
                "S + N ≤ 1: the difference plus {k:.2} standard errors stays within one JND, so the conclusion holds whichever treatment is right"
            ),
            Self::WithinNoise => format!(
                "otherwise: the band S ± N straddles one JND, so the Monte Carlo noise ({k:.2} standard errors) hides whether the difference can be heard; trace more rays or batches"
            ),
            Self::Sensitive => format!(
                "S − N > 1: even at the bottom of its noise band ({k:.2} standard errors) the difference exceeds one JND, so it is real and large enough to hear"
            ),
            Self::Undefined => {
                "a value or its standard error is undefined (see the reason given)".to_string()
            }
        }
    }
}

/// The verdict for spread `s` and noise `n`, both in JNDs (see the module docs).
#[must_use]
pub fn judge(s: f64, n: f64) -> Verdict {
    if !(s.is_finite() && n.is_finite()) {
        Verdict::Undefined
    } else if s - n > 1.0 {
        Verdict::Sensitive
    } else if s + n <= 1.0 {
        Verdict::Robust
    } else {
        Verdict::WithinNoise
    }
}

/// One difference between two runs, in the parameter's unit and in JNDs.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Difference {
    /// Run subtracted (id).
    pub from: String,
    /// Run compared (id): the difference is `to` − `from`.
    pub to: String,
    /// `to` − `from`, in the parameter's unit; `null` where either is undefined.
    pub difference: Option<f64>,
    /// Its standard error (paired delete-one jackknife), same unit.
    pub se: Option<f64>,
    /// One JND in the parameter's unit (relative JNDs taken at the mean of the two values).
    pub jnd: Option<f64>,
    /// S = |difference| / JND.
    pub spread_jnd: Option<f64>,
    /// N = k · se / JND.
    pub noise_jnd: Option<f64>,
    /// The verdict from S and N.
    pub verdict: Verdict,
}

/// The difference `to − from` of one parameter between two runs, from their
/// pooled values and delete-one values (same batches, same order).
#[must_use]
#[allow(clippy::too_many_arguments)]
pub fn difference(
    from: &str,
    to: &str,
    value_from: Option<f64>,
    value_to: Option<f64>,
    delete_one_from: &[Option<f64>],
    delete_one_to: &[Option<f64>],
    jnd: Option<&Jnd>,
    noise_factor: f64,
) -> Difference {
    let diff = match (value_from, value_to) {
        (Some(a), Some(b)) if a.is_finite() && b.is_finite() => Some((a, b, b - a)),
        _ => None,
    };
    let paired: Vec<Option<f64>> = delete_one_from
        .iter()
        .zip(delete_one_to)
        .map(|(a, b)| Some(b.as_ref()? - a.as_ref()?))
        .collect();
    let se = if diff.is_some() {
        jackknife_se(&paired)
    } else {
        None
    };
    // One JND in the parameter's unit: Jnd::in_jnds gives the JNDs of 1 unit.
    let jnd_unit = match (diff, jnd) {
        (Some((a, b, _)), Some(j)) => {
            let reference = 0.5 * (a + b);
            let per_unit = j.in_jnds(reference, reference + 1.0);
            (per_unit.is_finite() && per_unit > 0.0).then(|| 1.0 / per_unit)
        }
        _ => None,
    };
    let spread_jnd = match (diff, jnd_unit) {
        (Some((_, _, d)), Some(u)) => Some(d.abs() / u),
        _ => None,
    };
    let noise_jnd = match (se, jnd_unit) {
        (Some(s), Some(u)) => Some(noise_factor * s / u),
        _ => None,
    };
    let verdict = match (spread_jnd, noise_jnd) {
        (Some(s), Some(n)) => judge(s, n),
        _ => Verdict::Undefined,
    };
    Difference {
        from: from.to_string(),
        to: to.to_string(),
        difference: diff.map(|d| d.2),
        se,
        jnd: jnd_unit,
        spread_jnd,
        noise_jnd,
        verdict,
    }
}

/// The verdict over several pairwise differences and the index of the pair
/// that decides it (see the module docs); `None` without differences.
#[must_use]
pub fn deciding(differences: &[Difference]) -> Option<(Verdict, usize)> {
    if differences.is_empty() {
        return None;
    }
    let s = |d: &Difference| d.spread_jnd.unwrap_or(0.0);
    let sn = |d: &Difference| d.spread_jnd.unwrap_or(0.0) + d.noise_jnd.unwrap_or(0.0);
    let largest = |pick: &dyn Fn(&Difference) -> bool, by: &dyn Fn(&Difference) -> f64| {
        differences
            .iter()
            .enumerate()
            .filter(|(_, d)| pick(d))
            .max_by(|a, b| by(a.1).total_cmp(&by(b.1)))
            .map(|(i, _)| i)
    };
    if let Some(i) = largest(&|d| d.verdict == Verdict::Sensitive, &s) {
        return Some((Verdict::Sensitive, i));
    }
    if let Some(i) = largest(&|d| d.verdict == Verdict::Undefined, &sn) {
        return Some((Verdict::Undefined, i));
    }
    if let Some(i) = largest(&|d| d.verdict == Verdict::WithinNoise, &sn) {
        return Some((Verdict::WithinNoise, i));
    }
    largest(&|_| true, &sn).map(|i| (Verdict::Robust, i))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::metrics::jnd_of;

    #[test]
    fn verdict_rule_partitions_the_plane() {
        assert_eq!(judge(1.6, 0.5), Verdict::Sensitive);
        assert_eq!(judge(1.4, 0.5), Verdict::WithinNoise);
        assert_eq!(judge(0.4, 0.5), Verdict::Robust);
        assert_eq!(judge(0.6, 0.5), Verdict::WithinNoise);
        assert_eq!(judge(1.5, 2.0), Verdict::WithinNoise);
        assert_eq!(judge(1.0, 0.0), Verdict::Robust);
        assert_eq!(judge(f64::NAN, 0.1), Verdict::Undefined);
    }

    #[test]
    fn student_t_quantiles_match_the_tables() {
        // Two-sided 95 % and Bonferroni levels; table values of Student's t
        // (Abramowitz & Stegun 1964, Table 26.10; from memory, 3 decimals).
        for (p, dof, table) in [
            (0.975, 1.0, 12.706),
            (0.975, 3.0, 3.182),
            (0.995, 3.0, 5.841),
            (0.975, 9.0, 2.262),
            (0.975, 19.0, 2.093),
            (0.975, 29.0, 2.045),
            (0.995, 9.0, 3.250),
            (0.995, 19.0, 2.861),
            (0.975, 1e6, 1.960),
        ] {
            let t = student_t_quantile(p, dof);
            assert!(
                (t - table).abs() < 0.01,
                "t({p}, {dof}) = {t}, table {table}"
            );
        }
        assert!(default_noise_factor(1, 3).is_none());
        // More pairs or fewer batches widen the band.
        let k = |b, m| default_noise_factor(b, m).unwrap();
        assert!(k(20, 3) > k(20, 1) && k(10, 1) > k(20, 1));
    }

    #[test]
    fn relative_jnds_use_the_mean_of_the_two_values() {
        // ISO 3382-1:2009 Table A.1: EDT JND 5 % (relative).
        let edt = jnd_of("EDT_s").unwrap();
        let batches = [Some(1.0), Some(1.0)];
        let later = [Some(1.1), Some(1.1)];
        let d = difference(
            "a",
            "b",
            Some(1.9),
            Some(2.1),
            &batches,
            &later,
            Some(edt),
            2.0,
        );
        // 0.2 s over 5 % of 2.0 s = 2 JNDs; the paired delete-one values agree, so se = 0.
        assert!((d.spread_jnd.unwrap() - 2.0).abs() < 1e-12);
        assert_eq!(d.se, Some(0.0));
        assert_eq!(d.verdict, Verdict::Sensitive);
    }

    #[test]
    fn deciding_pair_prefers_sensitive_then_noise() {
        let mk = |s: f64, n: f64| Difference {
            from: "a".into(),
            to: "b".into(),
            difference: Some(s),
            se: Some(n),
            jnd: Some(1.0),
            spread_jnd: Some(s),
            noise_jnd: Some(n),
            verdict: judge(s, n),
        };
        let ds = [mk(0.2, 0.1), mk(0.9, 0.5), mk(1.4, 0.3)];
        assert_eq!(deciding(&ds), Some((Verdict::Sensitive, 2)));
        let ds = [mk(0.2, 0.1), mk(0.9, 0.5)];
        assert_eq!(deciding(&ds), Some((Verdict::WithinNoise, 1)));
        let ds = [mk(0.2, 0.1), mk(0.5, 0.3)];
        assert_eq!(deciding(&ds), Some((Verdict::Robust, 1)));
    }
}
