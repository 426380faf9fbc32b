//! Tests of the `polar` law (measured polar responses), on the invented polar
//! files in tests/data/law (written by tests/data/law/generate.py).

// Band loops index several parallel per-band arrays; ranges read more clearly here.
#![allow(clippy::needless_range_loop)]

use std::f64::consts::{FRAC_PI_2, PI, TAU};
use std::path::{Path, PathBuf};

use glam::DVec3;
use polaray::bands::{BandSet, Bands};
use polaray::geometry::mirror_local;
use polaray::law::measured::{
    load_polar_file, MeasuredLawError, MeasuredLawWarning, MeasuredPolarLaw, PolarUse,
};
use polaray::law::{Lobe, ReflectionLaw};
use polaray::polar::PolarFile;
use polaray::random::Stream;
use polaray::room::Material;

fn data(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data/law")
        .join(name)
}

fn material(alpha: &[f64], s: &[f64]) -> Material {
    Material {
        name: "diffuser".into(),
        absorption: Bands::from_slice(alpha),
        scattering: Bands::from_slice(s),
        diffusion: None,
        polar_file: None,
        goniometer: None,
    }
}

const OCTAVES: [u32; 6] = [125, 250, 500, 1000, 2000, 4000];
const ALPHA6: [f64; 6] = [0.05, 0.1, 0.2, 0.3, 0.45, 0.6];
const S6: [f64; 6] = [0.1, 0.3, 0.5, 0.7, 0.85, 1.0];

fn build(
    file: &str,
    bands: &[u32],
    alpha: &[f64],
    s: &[f64],
    extruded: bool,
) -> (MeasuredPolarLaw, Vec<MeasuredLawWarning>) {
    let path = data(file);
    let polar = load_polar_file(&path).unwrap();
    MeasuredPolarLaw::new(
        &material(alpha, s),
        &BandSet::new(bands).unwrap(),
        &polar,
        &path,
        extruded,
    )
    .unwrap()
}

fn build_err(polar: &PolarFile, bands: &[u32], s: &[f64], extruded: bool) -> String {
    let alpha = vec![0.1; bands.len()];
    match MeasuredPolarLaw::new(
        &material(&alpha, s),
        &BandSet::new(bands).unwrap(),
        polar,
        Path::new("bad.toml"),
        extruded,
    ) {
        Ok(_) => panic!("expected an error"),
        Err(e) => e.to_string(),
    }
}

fn dir(theta_deg: f64, phi_deg: f64) -> DVec3 {
    let (t, p) = (theta_deg.to_radians(), phi_deg.to_radians());
    DVec3::new(t.sin() * p.cos(), t.sin() * p.sin(), t.cos())
}

/// Equal-area diffusion coefficient (ISO 17497-2:2012 clause 8; reference.md §1).
fn diffusion(p: &[f64]) -> f64 {
    let n = p.len() as f64;
    let s: f64 = p.iter().sum();
    let s2: f64 = p.iter().map(|x| x * x).sum();
    (s * s - s2) / ((n - 1.0) * s2)
}

fn correlation(a: &[f64], b: &[f64]) -> f64 {
    let n = a.len() as f64;
    let (ma, mb) = (a.iter().sum::<f64>() / n, b.iter().sum::<f64>() / n);
    let cov: f64 = a.iter().zip(b).map(|(x, y)| (x - ma) * (y - mb)).sum();
    let va: f64 = a.iter().map(|x| (x - ma).powi(2)).sum();
    let vb: f64 = b.iter().map(|y| (y - mb).powi(2)).sum();
    cov / (va * vb).sqrt()
}

/// Mean weight per band and its standard error, over `n` samples at `wo`.
fn mean_weights(law: &MeasuredPolarLaw, wo: DVec3, n: usize, seed: u64) -> (Bands, Bands, Bands) {
    let mut rng = Stream::new(seed, 0);
    let (mut sum, mut sum2, mut mirror) = (Bands::ZERO, Bands::ZERO, Bands::ZERO);
    for _ in 0..n {
        let s = law.sample(wo, rng.uniform(), rng.uniform2()).unwrap();
        assert!(s.wi.z >= 0.0 && (s.wi.length() - 1.0).abs() < 1e-12);
        sum += s.weight;
        sum2 += s.weight * s.weight;
        if s.lobe == Lobe::Mirror {
            mirror += s.weight;
        }
    }
    let nf = n as f64;
    let mean = sum * (1.0 / nf);
    let se = Bands(std::array::from_fn(|b| {
        ((sum2[b] / nf - mean[b] * mean[b]).max(0.0) / nf).sqrt()
    }));
    (mean, se, mirror * (1.0 / nf))
}

#[test]
fn mean_weight_is_one_minus_alpha_per_band_for_every_use() {
    // Energy conservation (white-furnace check, common practice for reflection
    // models): E[weight_b] = 1 − α_b, and the mirror share (1 − α_b)(1 − s_b)
    // (ISO 17497-1 definition of s; reference.md §2). 10^6 samples, 5 σ.
    let cases: [(&str, bool, DVec3); 3] = [
        ("plane_octave.toml", false, dir(47.0, 20.0)),
        (
            "plane_octave.toml",
            true,
            DVec3::new(0.3, 0.5, 0.7).normalize(),
        ),
        ("hemisphere.toml", false, dir(25.0, 70.0)),
    ];
    for (file, extruded, wo) in cases {
        let bands: &[u32] = if file == "hemisphere.toml" {
            &[500, 1000]
        } else {
            &OCTAVES
        };
        let nb = bands.len();
        let (law, _) = build(file, bands, &ALPHA6[..nb], &S6[..nb], extruded);
        let (mean, se, mirror) = mean_weights(&law, wo, 1_000_000, 3);
        for b in 0..nb {
            let expected = 1.0 - ALPHA6[b];
            eprintln!(
                "{file} extruded={extruded} band {b}: mean {:.5} vs {expected} (se {:.5})",
                mean[b], se[b]
            );
            assert!(
                (mean[b] - expected).abs() < 5.0 * se[b] + 1e-12,
                "{file} extruded={extruded} band {b}: mean {} vs {expected} (se {})",
                mean[b],
                se[b]
            );
            assert!(se[b] < 0.01, "noise too large to test: {}", se[b]);
            let m = (1.0 - ALPHA6[b]) * (1.0 - S6[b]);
            assert!(
                (mirror[b] - m).abs() < 0.01,
                "mirror share {} vs {m}",
                mirror[b]
            );
            assert!((law.mirror_fraction(wo)[b] - m).abs() < 1e-15);
        }
    }
}

/// Chi-square of sampled scattered directions against the law's own pdf over
/// a (cos θ, φ) grid, the sampling parameterization; expected counts from the
/// pdf integrated by a 16 × 16 midpoint rule per bin. Also checks that each
/// sample's pdf and weight agree with `pdf` and `eval`, and that ∫ eval dΩ =
/// (1 − α)s.
fn chi_square_sphere(law: &MeasuredPolarLaw, wo: DVec3, alpha: &[f64], s: &[f64]) {
    let (nc, np, sub) = (18usize, 24usize, 16usize);
    let n = 300_000usize;
    let mut counts = vec![0.0; nc * np];
    let mut rng = Stream::new(17, 1);
    for _ in 0..n {
        let smp = law.sample(wo, rng.uniform(), rng.uniform2()).unwrap();
        if smp.lobe == Lobe::Mirror {
            continue;
        }
        let pdf = smp.pdf.unwrap();
        assert!((pdf - law.pdf(wo, smp.wi)).abs() <= 1e-12 * pdf);
        let e = law.eval(wo, smp.wi);
        for b in 0..alpha.len() {
            assert!((smp.weight[b] - e[b] / pdf).abs() <= 1e-9 * (1.0 + smp.weight[b]));
        }
        let c = ((1.0 - smp.wi.z) * nc as f64).min(nc as f64 - 1.0) as usize;
        let p = (smp.wi.y.atan2(smp.wi.x).rem_euclid(TAU) / TAU * np as f64) as usize % np;
        counts[c * np + p] += 1.0;
    }
    let mut chi2 = 0.0;
    let mut dof = 0usize;
    let mut integral = Bands::ZERO;
    let d_omega = (1.0 / (nc * sub) as f64) * (TAU / (np * sub) as f64);
    for c in 0..nc {
        for p in 0..np {
            let mut prob = 0.0;
            for i in 0..sub {
                let z = 1.0 - (c as f64 + (i as f64 + 0.5) / sub as f64) / nc as f64;
                let r = (1.0 - z * z).sqrt();
                for j in 0..sub {
                    let phi = (p as f64 + (j as f64 + 0.5) / sub as f64) / np as f64 * TAU;
                    let wi = DVec3::new(r * phi.cos(), r * phi.sin(), z);
                    prob += law.pdf(wo, wi) * d_omega;
                    integral += law.eval(wo, wi) * d_omega;
                }
            }
            let expected = prob * n as f64;
            if expected >= 5.0 {
                chi2 += (counts[c * np + p] - expected).powi(2) / expected;
                dof += 1;
            } else {
                assert!(counts[c * np + p] < 5.0 + 5.0 * expected.sqrt() + 5.0);
            }
        }
    }
    // Normal approximation to chi-square: mean dof, sd sqrt(2 dof); 5 sd
    // (common practice, no source).
    let limit = dof as f64 + 5.0 * (2.0 * dof as f64).sqrt();
    eprintln!("sphere chi2 {chi2:.1} over {dof} bins (limit {limit:.1}); ∫eval {integral:?}");
    assert!(chi2 < limit, "chi2 {chi2} over {dof} bins (limit {limit})");
    for b in 0..alpha.len() {
        let want = (1.0 - alpha[b]) * s[b];
        assert!(
            (integral[b] - want).abs() < 2e-3,
            "band {b}: ∫eval {} vs {want}",
            integral[b]
        );
    }
}

#[test]
fn rotational_samples_follow_own_pdf() {
    let (law, _) = build("plane_octave.toml", &OCTAVES, &ALPHA6, &S6, false);
    assert_eq!(law.usage(), PolarUse::Rotational);
    // 42° lies between the measured 30° and 60°: a mixture of two tables.
    chi_square_sphere(&law, dir(42.0, 130.0), &ALPHA6, &S6);
}

#[test]
fn hemisphere_samples_follow_own_pdf() {
    let (law, _) = build(
        "hemisphere.toml",
        &[500, 1000],
        &[0.2, 0.4],
        &[0.6, 0.9],
        false,
    );
    assert_eq!(law.usage(), PolarUse::Hemisphere);
    // 20° between the measured 0° and 40°, at an azimuth that turns the 40° pattern.
    chi_square_sphere(&law, dir(20.0, 75.0), &[0.2, 0.4], &[0.6, 0.9]);
}

#[test]
fn extruded_samples_follow_in_plane_pdf() {
    // Chi-square over 2° bins of the in-plane angle, the one free coordinate
    // of the reflection cone, against the law's pdf per radian.
    let (law, _) = build("plane_octave.toml", &OCTAVES, &ALPHA6, &S6, true);
    let wo = DVec3::new(0.4, -0.3, 0.6).normalize();
    let nbins = 90usize;
    let n = 300_000usize;
    let mut counts = vec![0.0; nbins];
    let mut rng = Stream::new(5, 2);
    for _ in 0..n {
        let smp = law.sample(wo, rng.uniform(), rng.uniform2()).unwrap();
        if smp.lobe == Lobe::Mirror {
            continue;
        }
        assert!(smp.pdf.is_none());
        let a = MeasuredPolarLaw::in_plane_angle(smp.wi);
        let k = (((a + FRAC_PI_2) / PI) * nbins as f64).min(nbins as f64 - 1.0) as usize;
        counts[k] += 1.0;
    }
    let mut chi2 = 0.0;
    let sub = 200;
    for (k, count) in counts.iter().enumerate() {
        let h = PI / (nbins * sub) as f64;
        let prob: f64 = (0..sub)
            .map(|i| {
                let a = -FRAC_PI_2 + (k * sub + i) as f64 * h + 0.5 * h;
                law.pdf_in_plane(wo, a) * h
            })
            .sum();
        let expected = prob * n as f64;
        assert!(expected > 5.0);
        chi2 += (count - expected).powi(2) / expected;
    }
    let limit = nbins as f64 + 5.0 * (2.0 * nbins as f64).sqrt();
    eprintln!("in-plane chi2 {chi2:.1} over {nbins} bins (limit {limit:.1})");
    assert!(chi2 < limit, "chi2 {chi2} (limit {limit})");
    // No density per steradian on a cone.
    assert_eq!(law.pdf(wo, DVec3::Z), 0.0);
    assert_eq!(law.eval(wo, DVec3::Z), Bands::ZERO);
}

/// The input level pattern with the zone receivers (within 7.5° of the mirror
/// receiver −ψ, as the file's zone_half_width_deg says) replaced by linear
/// interpolation between the nearest receivers outside, in linear energy.
fn zone_replaced(receiver_deg: &[f64], level_db: &[f64], psi_deg: f64) -> Vec<f64> {
    let e: Vec<f64> = level_db.iter().map(|l| 10f64.powf(l / 10.0)).collect();
    let inside = |t: f64| (t + psi_deg).abs() <= 7.5 + 1e-9;
    (0..e.len())
        .map(|i| {
            let t = receiver_deg[i];
            if !inside(t) {
                return e[i];
            }
            let left = (0..i).rev().find(|&j| !inside(receiver_deg[j]));
            let right = (i + 1..e.len()).find(|&j| !inside(receiver_deg[j]));
            match (left, right) {
                (Some(l), Some(r)) => {
                    let f = (t - receiver_deg[l]) / (receiver_deg[r] - receiver_deg[l]);
                    e[l] + f * (e[r] - e[l])
                }
                (Some(j), None) | (None, Some(j)) => e[j],
                (None, None) => unreachable!(),
            }
        })
        .collect()
}

#[test]
fn extruded_law_reproduces_the_input_polar_response() {
    // Histogram of the scattered in-plane angles on the file's 5° receiver
    // cells (linear energy per radian) against the input with its specular
    // zone replaced (the law's documented zone choice; the mirror part goes
    // to the exact mirror direction). Correlation of linear energies > 0.99
    // per band, and the equal-area diffusion coefficient (ISO 17497-2 clause 8)
    // within 0.02 of the input's.
    let path = data("plane_octave.toml");
    let polar = load_polar_file(&path).unwrap();
    let (law, _) = build("plane_octave.toml", &OCTAVES, &ALPHA6, &S6, true);
    let n = 400_000usize;
    for psi in [0.0, 30.0, 60.0, -30.0] {
        let wo = DVec3::new(0.0, f64::to_radians(psi).sin(), f64::to_radians(psi).cos());
        let mut hist = vec![Bands::ZERO; 37];
        let mut mirror = Bands::ZERO;
        let mut rng = Stream::new(23, psi.to_bits());
        for _ in 0..n {
            let smp = law.sample(wo, rng.uniform(), rng.uniform2()).unwrap();
            if smp.lobe == Lobe::Mirror {
                assert!((smp.wi - mirror_local(wo)).length() < 1e-15);
                mirror += smp.weight;
                continue;
            }
            let a = MeasuredPolarLaw::in_plane_angle(smp.wi).to_degrees();
            let k = ((a + 92.5) / 5.0).floor().clamp(0.0, 36.0) as usize;
            hist[k] += smp.weight;
        }
        for (b, &band) in OCTAVES.iter().enumerate() {
            // The file holds only ψ ≥ 0; ψ < 0 is the mirrored response.
            let r = polar
                .responses
                .iter()
                .find(|r| r.band_hz == f64::from(band) && r.incidence_deg == psi.abs())
                .unwrap();
            let mut expected = zone_replaced(&r.receiver_deg, &r.level_db, psi.abs());
            if psi < 0.0 {
                expected.reverse();
            }
            let got: Vec<f64> = (0..37)
                .map(|k| {
                    let width_deg: f64 = if k == 0 || k == 36 { 2.5 } else { 5.0 };
                    hist[k][b] / n as f64 / width_deg.to_radians()
                })
                .collect();
            let corr = correlation(&got, &expected);
            let (dg, de) = (diffusion(&got), diffusion(&expected));
            eprintln!("ψ {psi} band {band}: correlation {corr:.5}, d {dg:.4} vs {de:.4}");
            assert!(corr > 0.99, "ψ {psi} band {band}: correlation {corr}");
            assert!(
                (dg - de).abs() < 0.02,
                "ψ {psi} band {band}: d {dg} vs {de}"
            );
            let total: f64 = (0..37).map(|k| hist[k][b]).sum::<f64>() / n as f64;
            let want = (1.0 - ALPHA6[b]) * S6[b];
            assert!((total - want).abs() < 0.01, "scattered {total} vs {want}");
            let m = (1.0 - ALPHA6[b]) * (1.0 - S6[b]);
            assert!((mirror[b] / n as f64 - m).abs() < 0.01);
        }
    }
}

#[test]
fn zone_replacement_removes_the_specular_bump() {
    // The invented file adds a bump of up to 12× the scattered level inside
    // the ±7.5° zone; after replacement the law's density at the mirror
    // receiver must be the neighbours' interpolated level, not the bump
    // (so the mirror energy is not counted twice).
    let path = data("plane_octave.toml");
    let polar = load_polar_file(&path).unwrap();
    let (law, _) = build("plane_octave.toml", &[1000], &[0.0], &[1.0], true);
    let r = polar
        .responses
        .iter()
        .find(|r| r.band_hz == 1000.0 && r.incidence_deg == 30.0)
        .unwrap();
    let expected = zone_replaced(&r.receiver_deg, &r.level_db, 30.0);
    let total: f64 = expected
        .iter()
        .enumerate()
        .map(|(k, e)| e * f64::to_radians(if k == 0 || k == 36 { 2.5 } else { 5.0 }))
        .sum();
    let wo = DVec3::new(0.0, 0.5, 0.75f64.sqrt());
    for (k, &theta) in r.receiver_deg.iter().enumerate() {
        let got = law.eval_in_plane(wo, theta.to_radians())[0];
        let want = expected[k] / total;
        assert!(
            (got - want).abs() < 1e-9 * want,
            "{theta}°: {got} vs {want}"
        );
    }
    let raw_mirror = 10f64.powf(r.level_db[12] / 10.0); // receiver −30°
    assert!(raw_mirror / total > 3.0 * law.eval_in_plane(wo, (-30f64).to_radians())[0]);
}

#[test]
fn a_dip_at_the_mirror_direction_is_kept() {
    // A zone receiver measured below its neighbours' level keeps its own level
    // (law::measured: the dip is scattered energy missing, not specular
    // energy). Here the mirror receiver (−30° at 30° incidence) is set 10 dB
    // below the lower of its neighbours outside the zone.
    let path = data("plane_octave.toml");
    let mut polar = load_polar_file(&path).unwrap();
    let r = polar
        .responses
        .iter_mut()
        .find(|r| r.band_hz == 1000.0 && r.incidence_deg == 30.0)
        .unwrap();
    let dip_db = r.level_db[9].min(r.level_db[15]) - 10.0;
    r.level_db[12] = dip_db;
    let r = r.clone();
    let (law, _) = MeasuredPolarLaw::new(
        &material(&[0.0], &[1.0]),
        &BandSet::new(&[1000]).unwrap(),
        &polar,
        &path,
        true,
    )
    .unwrap();
    let mut expected = zone_replaced(&r.receiver_deg, &r.level_db, 30.0);
    expected[12] = 10f64.powf(dip_db / 10.0);
    let total: f64 = expected
        .iter()
        .enumerate()
        .map(|(k, e)| e * f64::to_radians(if k == 0 || k == 36 { 2.5 } else { 5.0 }))
        .sum();
    let wo = DVec3::new(0.0, 0.5, 0.75f64.sqrt());
    let got = law.eval_in_plane(wo, (-30f64).to_radians())[0];
    let want = expected[12] / total;
    assert!((got - want).abs() < 1e-9 * want, "{got} vs {want}");
}

#[test]
fn patterns_interpolate_between_incidences_and_clamp_outside() {
    // Linear in angle on the energy pattern: at 15° (between 0° and 30°) the
    // density is the mean of the two neighbours; beyond the last measured
    // incidence (60°) the 60° pattern is used, with a warning.
    let (law, warnings) = build("plane_octave.toml", &OCTAVES, &ALPHA6, &S6, true);
    let at = |psi: f64| DVec3::new(0.0, psi.to_radians().sin(), psi.to_radians().cos());
    for i in -18..=18 {
        let a = f64::from(i * 5).to_radians() + 0.01;
        let (e0, e15, e30) = (
            law.eval_in_plane(at(0.0), a),
            law.eval_in_plane(at(15.0), a),
            law.eval_in_plane(at(30.0), a),
        );
        let (e60, e75) = (
            law.eval_in_plane(at(60.0), a),
            law.eval_in_plane(at(75.0), a),
        );
        for b in 0..6 {
            assert!(e15[b] >= e0[b].min(e30[b]) - 1e-15 && e15[b] <= e0[b].max(e30[b]) + 1e-15);
            assert!((e15[b] - 0.5 * (e0[b] + e30[b])).abs() < 1e-12);
            assert_eq!(e75[b], e60[b]);
        }
        // Mirrored incidences: the pattern at −ψ is that at ψ reflected.
        let (m, p) = (
            law.eval_in_plane(at(-30.0), a),
            law.eval_in_plane(at(30.0), -a),
        );
        for b in 0..6 {
            assert!((m[b] - p[b]).abs() < 1e-12);
        }
    }
    assert!(law.is_clamped(at(75.0), 0));
    assert!(!law.is_clamped(at(45.0), 0));
    assert!(warnings
        .iter()
        .any(|w| matches!(w, MeasuredLawWarning::MirroredIncidences { .. })));
    let clamped = warnings
        .iter()
        .filter(|w| {
            matches!(w, MeasuredLawWarning::IncidenceClamped { lowest_deg, highest_deg, .. }
                if *lowest_deg == -60.0 && *highest_deg == 60.0)
        })
        .count();
    assert_eq!(clamped, 6);
    assert!(warnings[1].to_string().contains("plane_octave.toml"));

    // Rotational use: the same rule on the polar angle of the arrival.
    let (rot, warnings) = build("plane_octave.toml", &OCTAVES, &ALPHA6, &S6, false);
    assert!(warnings.iter().any(|w| matches!(w,
        MeasuredLawWarning::IncidenceClamped { lowest_deg, highest_deg, .. }
            if *lowest_deg == 0.0 && *highest_deg == 60.0)));
    for t in [3.0, 33.0, 61.0, 88.0] {
        let wi = dir(t, 10.0);
        let (e0, e15, e30) = (
            rot.eval(dir(0.0, 0.0), wi),
            rot.eval(dir(15.0, 80.0), wi),
            rot.eval(dir(30.0, 200.0), wi),
        );
        let (e60, e80) = (rot.eval(dir(60.0, 0.0), wi), rot.eval(dir(80.0, 0.0), wi));
        for b in 0..6 {
            assert!((e15[b] - 0.5 * (e0[b] + e30[b])).abs() < 1e-12);
            assert_eq!(e80[b], e60[b]);
        }
    }
}

#[test]
fn zero_scattering_or_flat_plate_gives_a_pure_mirror() {
    // s = 0: the whole reflected energy leaves by the mirror (ISO 17497-1 definition).
    for (file, bands) in [
        ("plane_octave.toml", &OCTAVES[..]),
        ("flat_plate.toml", &[1000][..]),
    ] {
        let nb = bands.len();
        for extruded in [false, true] {
            let (law, _) = build(file, bands, &ALPHA6[..nb], &vec![0.0; nb], extruded);
            let mut rng = Stream::new(9, 0);
            for _ in 0..1000 {
                let wo = dir(80.0 * rng.uniform(), 360.0 * rng.uniform());
                let s = law.sample(wo, rng.uniform(), rng.uniform2()).unwrap();
                assert_eq!(s.lobe, Lobe::Mirror);
                assert!((s.wi - mirror_local(wo)).length() < 1e-15);
                for b in 0..nb {
                    assert!((s.weight[b] - (1.0 - ALPHA6[b])).abs() < 1e-15);
                }
                assert_eq!(law.pdf(wo, DVec3::Z), 0.0);
            }
        }
    }
}

#[test]
fn flat_plate_with_scattering_is_an_error() {
    let path = data("flat_plate.toml");
    let polar = load_polar_file(&path).unwrap();
    let msg = build_err(&polar, &[1000], &[0.3], false);
    assert!(msg.contains("bad.toml") && msg.contains("1000") && msg.contains("no energy outside"));
}

#[test]
fn extruded_directions_keep_the_mirror_axial_component() {
    // Kirchhoff theory of an extruded surface: the axial wavenumber is kept,
    // so every outgoing direction lies on the cone of the mirror direction.
    let (law, _) = build("plane_octave.toml", &OCTAVES, &ALPHA6, &S6, true);
    let mut rng = Stream::new(31, 0);
    for _ in 0..100_000 {
        let wo = dir(89.0 * rng.uniform(), 360.0 * rng.uniform());
        let s = law.sample(wo, rng.uniform(), rng.uniform2()).unwrap();
        assert!((s.wi.x - mirror_local(wo).x).abs() < 1e-12);
        assert!((s.wi.length() - 1.0).abs() < 1e-12 && s.wi.z >= 0.0);
    }
}

#[test]
fn hemisphere_pattern_turns_with_the_arrival_azimuth() {
    // Azimuthally isotropic statistics (the documented assumption): turning
    // the arrival by 90° turns the scattered pattern by 90°.
    let (law, _) = build(
        "hemisphere.toml",
        &[500, 1000],
        &[0.2, 0.4],
        &[0.6, 0.9],
        false,
    );
    for (t, p) in [(10.0, 20.0), (35.0, 185.0), (70.0, 300.0)] {
        let a = law.eval(dir(40.0, 0.0), dir(t, p));
        let b = law.eval(dir(40.0, 90.0), dir(t, p + 90.0));
        for k in 0..2 {
            assert!((a[k] - b[k]).abs() < 1e-12 * a[k].max(1e-300));
        }
    }
}

#[test]
fn third_octave_bands_are_energy_averaged() {
    // The 1 kHz octave from 800, 1000, 1250 Hz third-octave responses equals
    // the law built from an octave file holding their mean energies.
    let path = data("plane_third.toml");
    let third = load_polar_file(&path).unwrap();
    let mut octave = third.clone();
    octave.responses.retain(|r| r.band_hz == 1000.0);
    for r in &mut octave.responses {
        let twins: Vec<_> = third
            .responses
            .iter()
            .filter(|t| t.incidence_deg == r.incidence_deg)
            .collect();
        assert_eq!(twins.len(), 3);
        for (i, l) in r.level_db.iter_mut().enumerate() {
            let mean = twins
                .iter()
                .map(|t| 10f64.powf(t.level_db[i] / 10.0))
                .sum::<f64>()
                / 3.0;
            *l = 10.0 * mean.log10();
        }
    }
    let m = material(&[0.2], &[0.7]);
    let bands = BandSet::new(&[1000]).unwrap();
    let (a, _) = MeasuredPolarLaw::new(&m, &bands, &third, &path, true).unwrap();
    let (b, _) = MeasuredPolarLaw::new(&m, &bands, &octave, &path, true).unwrap();
    for psi in [0.0, 20.0, 45.0] {
        let wo = DVec3::new(0.0, f64::to_radians(psi).sin(), f64::to_radians(psi).cos());
        for k in -45..=45 {
            let ang = f64::from(k * 2).to_radians();
            let (x, y) = (a.eval_in_plane(wo, ang)[0], b.eval_in_plane(wo, ang)[0]);
            assert!((x - y).abs() < 1e-9 * y, "{psi} {k}: {x} vs {y}");
        }
    }
    // 500 Hz needs the 400, 500 and 630 Hz thirds, none of which is there.
    let msg = build_err(&third, &[500, 1000], &[0.5, 0.5], false);
    assert!(
        msg.contains("500 Hz") && msg.contains("third-octave band 398 Hz"),
        "{msg}"
    );
}

#[test]
fn bad_polar_data_give_errors_naming_file_and_band() {
    let polar = load_polar_file(&data("plane_octave.toml")).unwrap();
    // A room band the file lacks.
    let msg = build_err(&polar, &[1000, 8000], &[0.5, 0.5], false);
    assert!(msg.contains("bad.toml") && msg.contains("8000 Hz"), "{msg}");
    assert!(msg.contains("125, 250, 500, 1000, 2000, 4000"), "{msg}");

    // An empty response.
    let mut empty = polar.clone();
    let r = empty
        .responses
        .iter_mut()
        .find(|r| r.band_hz == 500.0 && r.incidence_deg == 30.0)
        .unwrap();
    r.receiver_deg.clear();
    r.level_db.clear();
    let msg = build_err(&empty, &[500], &[0.5], true);
    assert!(
        msg.contains("bad.toml") && msg.contains("band 500 Hz"),
        "{msg}"
    );
    assert!(
        msg.contains("incidence 30°") && msg.contains("empty response"),
        "{msg}"
    );

    // All-zero energies (−inf dB everywhere): an error even where s = 0.
    let mut zero = polar.clone();
    let r = zero
        .responses
        .iter_mut()
        .find(|r| r.band_hz == 2000.0 && r.incidence_deg == 60.0)
        .unwrap();
    r.level_db.iter_mut().for_each(|l| *l = f64::NEG_INFINITY);
    let msg = build_err(&zero, &[2000], &[0.0], false);
    assert!(
        msg.contains("band 2000 Hz") && msg.contains("zero energy"),
        "{msg}"
    );

    // A level that is not a number, and mismatched lengths.
    let mut nan = polar.clone();
    nan.responses[0].level_db[4] = f64::NAN;
    let msg = build_err(&nan, &[125], &[0.5], false);
    assert!(
        msg.contains("band 125 Hz") && msg.contains("receiver 4"),
        "{msg}"
    );
    let mut short = polar.clone();
    short.responses[0].level_db.pop();
    let msg = build_err(&short, &[125], &[0.5], false);
    assert!(msg.contains("37 receivers but 36 levels"), "{msg}");

    // A file that does not parse, and a missing file.
    let dir = tempfile::tempdir().unwrap();
    let bad = dir.path().join("broken.toml");
    std::fs::write(&bad, "name = \"x\"\n[geometry]\narrangement = \"plane\"\n").unwrap();
    let err = load_polar_file(&bad).unwrap_err();
    assert!(matches!(err, MeasuredLawError::Parse { .. }));
    assert!(err.to_string().contains("broken.toml"));
    let err = load_polar_file(&dir.path().join("absent.toml")).unwrap_err();
    assert!(matches!(err, MeasuredLawError::Read { .. }));
    let err = MeasuredPolarLaw::from_material(
        &material(&[0.1], &[0.5]),
        &BandSet::new(&[1000]).unwrap(),
        false,
    )
    .unwrap_err();
    assert!(err
        .to_string()
        .contains("material 'diffuser' has no polar_file"));
}

#[test]
fn geometric_zone_follows_the_image_source() {
    // Without zone_half_width_deg the zone holds the receivers the image
    // source reaches through the sample (reference.md §2). Sample 1.2 m,
    // source 10 m, receivers 5 m, normal incidence: the line from the image
    // (0, −10) to the receiver at θ crosses z = 0 at x = 50 sin θ/(5 cos θ + 10):
    // 0.58 m at 10° (inside the ±0.6 m sample), 0.87 m at 15° (outside); so
    // −10°..10° are replaced, linearly between the receivers at ±15°, or keep
    // their own level where it is lower (law::measured: a dip is kept).
    let path = data("plane_octave.toml");
    let mut polar = load_polar_file(&path).unwrap();
    polar.geometry.zone_half_width_deg = None;
    let (law, _) = MeasuredPolarLaw::new(
        &material(&[0.0], &[1.0]),
        &BandSet::new(&[1000]).unwrap(),
        &polar,
        &path,
        true,
    )
    .unwrap();
    let r = polar
        .responses
        .iter()
        .find(|r| r.band_hz == 1000.0 && r.incidence_deg == 0.0)
        .unwrap();
    let e = |i: usize| 10f64.powf(r.level_db[i] / 10.0);
    let wo = DVec3::Z;
    let g = |deg: f64| law.eval_in_plane(wo, f64::to_radians(deg))[0];
    // Receivers: index 18 is 0°, 15 is −15°, 21 is 15°.
    let ratio_15 = g(15.0) / e(21);
    for (k, deg) in [(16, -10.0), (17, -5.0), (18, 0.0), (19, 5.0), (20, 10.0)] {
        let f = (deg + 15.0) / 30.0;
        let want = (e(15) + f * (e(21) - e(15))).min(e(k)) * ratio_15;
        assert!(
            (g(deg) - want).abs() < 1e-9 * want,
            "{deg}°: {} vs {want}",
            g(deg)
        );
        assert!(e(k) > 1.5 * e(15).max(e(21)) || deg.abs() > 5.0);
    }
    // 20° keeps its own level.
    assert!((g(20.0) / e(22) - ratio_15).abs() < 1e-9 * ratio_15);
}

/// At s = 0 in every band the polar law's mirror part (taken from the
/// material's s) carries all the energy, so its polar data are never used:
/// the factory says so once and traces the split law, instead of warning
/// about data it does not use. With s > 0 in any band the data are used.
#[test]
fn at_zero_scattering_the_polar_data_are_not_used_and_the_report_says_so() {
    use polaray::law::LawKind;
    let bands = BandSet::new(&OCTAVES).unwrap();
    let all: Vec<usize> = (0..OCTAVES.len()).collect();
    let mut m = material(&ALPHA6, &[0.0; 6]);
    m.polar_file = Some(data("plane_octave.toml"));
    let (law, warnings) = LawKind::Polar.build(&m, &bands, &all, true).unwrap();
    assert_eq!(warnings.len(), 1, "{warnings:?}");
    assert!(
        warnings[0].contains("is not used") && warnings[0].contains("plane_octave.toml"),
        "{}",
        warnings[0]
    );
    // All energy by the mirror: 1 − α per band (every incidence).
    for theta in [0.0, 30.0, 70.0] {
        let f = law.mirror_fraction(dir(theta, 20.0));
        for b in 0..OCTAVES.len() {
            assert!(
                (f[b] - (1.0 - ALPHA6[b])).abs() < 1e-15,
                "{theta}° band {b}"
            );
        }
    }
    let mut s = [0.0; 6];
    s[3] = 0.2;
    m.scattering = Bands::from_slice(&s);
    let (_, warnings) = LawKind::Polar.build(&m, &bands, &all, true).unwrap();
    assert!(
        !warnings.iter().any(|w| w.contains("is not used")),
        "{warnings:?}"
    );
}
