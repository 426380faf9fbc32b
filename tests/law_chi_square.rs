//! Sampling agrees with each law's own pdf: a chi-square test of sampled
//! directions against the integral of `pdf` over each bin, as physically based
//! renderers test their reflection models (pbrt-v3 chi2 test; common practice).

mod stats_support;

use glam::DVec3;
use polaray::bands::{BandSet, Bands};
use polaray::law::{BoundedLaw, CalibrationArc, ReflectionLaw, SplitLaw};
use polaray::random::Stream;
use polaray::room::Material;
use stats_support::{chi_square, critical};

fn material(s: f64, d: Option<f64>) -> Material {
    Material {
        name: "m".into(),
        absorption: Bands::from_slice(&[0.1]),
        scattering: Bands::from_slice(&[s]),
        diffusion: d.map(|d| Bands::from_slice(&[d])),
        polar_file: None,
        goniometer: None,
    }
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

/// Integral of `f` over [a, b] by the midpoint rule after the map
/// v = a + (b − a)(1 − cos πt)/2, which tames 1/√ end-point singularities.
fn integrate_cos_map(a: f64, b: f64, nodes: usize, f: impl Fn(f64) -> f64) -> f64 {
    use std::f64::consts::PI;
    (0..nodes)
        .map(|k| {
            let t = (k as f64 + 0.5) / nodes as f64;
            let v = a + (b - a) * (1.0 - (PI * t).cos()) / 2.0;
            f(v) * (b - a) * PI / 2.0 * (PI * t).sin() / nodes as f64
        })
        .sum()
}

#[test]
fn bounded_law_samples_follow_its_pdf_at_oblique_incidence() {
    // Away from normal incidence the law is written in the projected disk
    // (v = sin²θ, azimuth Δφ from the mirror azimuth; see `law::bounded`).
    // Bins: v (uniform edges plus the law's lobe edges and the fold point
    // 1 − u₀, where the density has a 1/√ singularity), and azimuth in the
    // near-mirror lobe's own width Φ(u₀, v) (4 bins of Δφ/Φ) and outside it
    // (6 bins of (|Δφ| − Φ)/(π − Φ), signed). Within each azimuth bin the pdf
    // is constant in Δφ, so each bin's expectation is a 1D quadrature in v of
    // `pdf` read at one azimuth inside and one outside the lobe.
    use std::f64::consts::PI;
    let arc = CalibrationArc::standard();
    let bands = BandSet::new(&[1000]).unwrap();
    let range = BoundedLaw::reachable_diffusion(0.6, &arc).unwrap();
    let d = 0.5 * (range.least_even + range.most_even);
    let (law, _) = BoundedLaw::new(&material(0.6, Some(d)), &bands).unwrap();
    let theta0 = 40f64.to_radians();
    let phi0 = 0.7f64;
    let wo = DVec3::new(
        theta0.sin() * phi0.cos(),
        theta0.sin() * phi0.sin(),
        theta0.cos(),
    );
    let u0 = theta0.sin().powi(2);
    let sin2 = |deg: f64| deg.to_radians().sin().powi(2);
    let (sg, sb) = (
        sin2(arc.near_mirror_half_angle_deg()),
        sin2(arc.zone_cone_half_angle_deg()),
    );
    let mut edges: Vec<f64> = (0..=24).map(|i| i as f64 / 24.0).collect();
    edges.extend([u0 - sg, u0 + sg, u0 - sb, u0 + sb, 1.0 - u0]);
    edges.retain(|e| (0.0..=1.0).contains(e));
    edges.sort_by(f64::total_cmp);
    edges.dedup_by(|a, b| (*a - *b).abs() < 1e-12);
    let (inner_bins, outer_bins) = (4usize, 6usize);
    let per_v = inner_bins + outer_bins;
    let vbins = edges.len() - 1;
    let half = |v: f64| law.near_azimuth_half_width_rad(u0, v);
    let dir = |v: f64, dphi: f64| {
        let phi = phi0 + PI + dphi;
        DVec3::new(v.sqrt() * phi.cos(), v.sqrt() * phi.sin(), (1.0 - v).sqrt())
    };
    // Densities over (v, Δφ): pdf per steradian / (2 cos θ).
    let inside = |v: f64| law.pdf(wo, dir(v, 0.0)) / (2.0 * (1.0 - v).sqrt());
    let outside = |v: f64| law.pdf(wo, dir(v, PI)) / (2.0 * (1.0 - v).sqrt());

    let n = 600_000;
    let mut counts = vec![0.0; vbins * per_v];
    let mut rng = Stream::new(17, 0);
    for _ in 0..n {
        let s = law.sample(wo, rng.uniform(), rng.uniform2()).unwrap();
        if s.pdf.is_none() {
            continue;
        }
        let v = (s.wi.x * s.wi.x + s.wi.y * s.wi.y).min(1.0);
        let iv = edges.partition_point(|&e| e <= v).clamp(1, vbins) - 1;
        let dphi = (s.wi.y.atan2(s.wi.x) - phi0 - PI).rem_euclid(2.0 * PI);
        let dphi = if dphi > PI { dphi - 2.0 * PI } else { dphi };
        let h = half(v);
        let ia = if dphi.abs() <= h {
            let t = (dphi / h + 1.0) / 2.0;
            ((t * inner_bins as f64) as usize).min(inner_bins - 1)
        } else {
            let t = (dphi.abs() - h) / (PI - h);
            let k = ((t * (outer_bins / 2) as f64) as usize).min(outer_bins / 2 - 1);
            inner_bins + if dphi < 0.0 { k } else { outer_bins / 2 + k }
        };
        counts[iv * per_v + ia] += 1.0;
    }
    let mut expected = vec![0.0; vbins * per_v];
    for iv in 0..vbins {
        let (a, b) = (edges[iv], edges[iv + 1]);
        let inner_mass = integrate_cos_map(a, b, 400, |v| inside(v) * 2.0 * half(v));
        let outer_mass = integrate_cos_map(a, b, 400, |v| outside(v) * 2.0 * (PI - half(v)));
        for k in 0..inner_bins {
            expected[iv * per_v + k] = n as f64 * inner_mass / inner_bins as f64;
        }
        for k in 0..outer_bins {
            expected[iv * per_v + inner_bins + k] = n as f64 * outer_mass / outer_bins as f64;
        }
    }
    let (chi, dof) = chi_square(&counts, &expected);
    eprintln!("oblique bounded: chi² {chi:.1} over {dof} dof");
    assert!(
        chi < critical(dof),
        "chi² {chi:.1} over {dof} dof (limit {:.1})",
        critical(dof)
    );
    // The bins hold every non-mirror sample's worth: the expectation sums to
    // the non-mirror share s = 0.6 of the samples (within 0.5 %).
    let total: f64 = expected.iter().sum::<f64>() / n as f64;
    assert!((total - 0.6).abs() < 0.003, "expected mass {total}");
}
