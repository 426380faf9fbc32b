//! Sampling agrees with each law's own pdf: a chi-square test of sampled
//! directions against the integral of `pdf` over each bin, as physically based
//! renderers test their reflection models (pbrt-v3 chi2 test; common practice).

use glam::DVec3;
use polaray::bands::{BandSet, Bands};
use polaray::law::{BoundedLaw, CalibrationArc, ReflectionLaw, SplitLaw};
use polaray::random::Stream;
use polaray::room::Material;

fn material(s: f64, d: Option<f64>) -> Material {
    Material {
        name: "m".into(),
        absorption: Bands::from_slice(&[0.1]),
        scattering: Bands::from_slice(&[s]),
        diffusion: d.map(|d| Bands::from_slice(&[d])),
        polar_file: None,
    }
}

/// Chi-square statistic and degrees of freedom for counts against expected
/// counts, pooling bins whose expectation is under 5 (common practice).
fn chi_square(counts: &[f64], expected: &[f64]) -> (f64, usize) {
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
fn critical(dof: usize) -> f64 {
    let k = dof as f64;
    k * (1.0 - 2.0 / (9.0 * k) + 3.09 * (2.0 / (9.0 * k)).sqrt()).powi(3)
}

#[test]
fn split_law_samples_follow_its_pdf() {
    // Bins: 16 in cos θ × 24 in φ over the hemisphere; expected counts from a
    // midpoint quadrature of `pdf` (8 × 8 points per bin).
    let law = SplitLaw::new(&material(0.7, None), 1);
    let wo = DVec3::new(0.5, -0.3, 0.81).normalize();
    let (nt, np, n) = (16, 24, 400_000);
    let mut counts = vec![0.0; nt * np];
    let mut rng = Stream::new(9, 0);
    for _ in 0..n {
        let s = law.sample(wo, rng.uniform(), rng.uniform2()).unwrap();
        if s.pdf.is_none() {
            continue;
        }
        let it = ((s.wi.z * nt as f64) as usize).min(nt - 1);
        let phi = s.wi.y.atan2(s.wi.x).rem_euclid(std::f64::consts::TAU);
        let ip = ((phi / std::f64::consts::TAU * np as f64) as usize).min(np - 1);
        counts[it * np + ip] += 1.0;
    }
    let mut expected = vec![0.0; nt * np];
    let sub = 8;
    let d_omega = (1.0 / (nt * sub) as f64) * (std::f64::consts::TAU / (np * sub) as f64);
    for it in 0..nt {
        for ip in 0..np {
            let mut integral = 0.0;
            for a in 0..sub {
                for b in 0..sub {
                    let z = (it as f64 + (a as f64 + 0.5) / sub as f64) / nt as f64;
                    let phi = (ip as f64 + (b as f64 + 0.5) / sub as f64) / np as f64
                        * std::f64::consts::TAU;
                    let r = (1.0 - z * z).sqrt();
                    integral += law.pdf(wo, DVec3::new(r * phi.cos(), r * phi.sin(), z)) * d_omega;
                }
            }
            expected[it * np + ip] = integral * n as f64;
        }
    }
    let (chi, dof) = chi_square(&counts, &expected);
    assert!(
        chi < critical(dof),
        "chi² {chi:.1} over {dof} dof (limit {:.1})",
        critical(dof)
    );
}

#[test]
fn bounded_law_samples_follow_its_pdf() {
    // Normal incidence: the law is symmetric about the mirror direction (+Z),
    // so rings in cos θ suffice; ring edges include the law's near-mirror and
    // zone-cone half-angles, and each ring's expectation is a fine 1D quadrature
    // of `pdf` times 2π.
    let arc = CalibrationArc::standard();
    let bands = BandSet::new(&[1000]).unwrap();
    let (law, _) = BoundedLaw::new(&material(0.5, Some(0.3)), &bands).unwrap();
    let wo = DVec3::Z;
    let mut edges: Vec<f64> = (0..=20).map(|i| i as f64 / 20.0).collect();
    for deg in [
        arc.near_mirror_half_angle_deg(),
        arc.zone_cone_half_angle_deg(),
    ] {
        edges.push(deg.to_radians().cos());
    }
    edges.sort_by(f64::total_cmp);
    edges.dedup_by(|a, b| (*a - *b).abs() < 1e-12);
    let rings = edges.len() - 1;
    let n = 400_000;
    let mut counts = vec![0.0; rings];
    let mut rng = Stream::new(4, 0);
    for _ in 0..n {
        let s = law.sample(wo, rng.uniform(), rng.uniform2()).unwrap();
        if s.pdf.is_none() {
            continue;
        }
        let i = edges.partition_point(|&e| e <= s.wi.z).clamp(1, rings) - 1;
        counts[i] += 1.0;
    }
    let expected: Vec<f64> = (0..rings)
        .map(|i| {
            let steps = 4000;
            let h = (edges[i + 1] - edges[i]) / steps as f64;
            (0..steps)
                .map(|k| {
                    let z = edges[i] + (k as f64 + 0.5) * h;
                    let r = (1.0 - z * z).max(0.0).sqrt();
                    law.pdf(wo, DVec3::new(r, 0.0, z)) * std::f64::consts::TAU * h
                })
                .sum::<f64>()
                * n as f64
        })
        .collect();
    let (chi, dof) = chi_square(&counts, &expected);
    assert!(
        chi < critical(dof),
        "chi² {chi:.1} over {dof} dof (limit {:.1}); counts {counts:?} expected {expected:?}",
        critical(dof)
    );
}
