//! Reciprocity and the diffuse-field invariant. A passive surface's BRDF
//! f(wo, wi) = eval(wo, wi) / cos θi is symmetric (Helmholtz reciprocity), and
//! a law that is reciprocal and conserves energy up to 1 − α maps a
//! cosine-weighted (Lambert) field of arrivals onto a cosine-weighted field of
//! exits, the invariant measure behind the 4V/S mean free path (Kuttruff,
//! Room Acoustics, §4.5 and §5.2; derivation in `law::bounded`). The split and
//! bounded laws are built that way and are tested for it; the polar law follows
//! measured data that need not be reciprocal, and its departure is measured.

mod stats_support;

use std::path::PathBuf;

use glam::DVec3;
use polaray::bands::{BandSet, Bands};
use polaray::law::{BoundedLaw, CalibrationArc, LawKind, ReflectionLaw, SplitLaw};
use polaray::random::Stream;
use polaray::room::Material;
use stats_support::{chi_square, critical};

fn material(s: f64, d: Option<f64>) -> Material {
    Material {
        name: "m".into(),
        absorption: Bands::from_slice(&[0.2]),
        scattering: Bands::from_slice(&[s]),
        diffusion: d.map(|d| Bands::from_slice(&[d])),
        polar_file: None,
        goniometer: None,
    }
}

/// Bounded laws over the (s, d) region they support, ends included.
fn bounded_laws() -> Vec<(String, BoundedLaw)> {
    let bands = BandSet::new(&[1000]).unwrap();
    let arc = CalibrationArc::standard();
    let mut out = Vec::new();
    for s in [0.2, 0.6, 0.95] {
        let range = BoundedLaw::reachable_diffusion(s, &arc).unwrap();
        for t in [0.0, 0.5, 1.0] {
            let d = range.least_even + t * (range.most_even - range.least_even);
            let (law, _) = BoundedLaw::new(&material(s, Some(d)), &bands).unwrap();
            out.push((format!("bounded s {s} d {d:.3}"), law));
        }
    }
    out
}

/// The laws built to be reciprocal: the bounded laws above and a split law.
fn reciprocal_laws() -> Vec<(String, Box<dyn ReflectionLaw>)> {
    let mut laws: Vec<(String, Box<dyn ReflectionLaw>)> = bounded_laws()
        .into_iter()
        .map(|(n, l)| (n, Box::new(l) as Box<dyn ReflectionLaw>))
        .collect();
    laws.push((
        "split s 0.6".into(),
        Box::new(SplitLaw::new(&material(0.6, None), 1)),
    ));
    laws
}

/// A cosine-weighted direction (Malley's method; reference.md §6).
fn lambert(u: [f64; 2]) -> DVec3 {
    polaray::law::sample_cosine(u)
}

#[test]
fn split_and_bounded_laws_are_reciprocal() {
    // f(wo, wi) = f(wi, wo) at random pairs of directions, to 1e-9 relative.
    let laws = reciprocal_laws();
    let mut rng = Stream::new(31, 0);
    let mut compared = vec![0usize; laws.len()];
    for (i, (name, law)) in laws.iter().enumerate() {
        for _ in 0..20_000 {
            let a = lambert(rng.uniform2());
            let b = lambert(rng.uniform2());
            let fab = law.eval(a, b)[0] / b.z;
            let fba = law.eval(b, a)[0] / a.z;
            let scale = fab.abs().max(fba.abs());
            if scale > 0.0 {
                compared[i] += 1;
            }
            assert!(
                (fab - fba).abs() <= 1e-9 * scale,
                "{name}: f(a, b) = {fab}, f(b, a) = {fba} at a {a}, b {b}"
            );
        }
    }
    // Pairs inside the bounded law's narrow near-mirror lobe, where most of
    // the density sits at small s(1 − w): b next to the mirror of a.
    for (i, (name, law)) in bounded_laws().iter().enumerate() {
        for _ in 0..20_000 {
            let a = lambert(rng.uniform2());
            let m = DVec3::new(-a.x, -a.y, a.z);
            let jitter = DVec3::new(rng.uniform() - 0.5, rng.uniform() - 0.5, 0.0) * 0.002;
            let b = (m + jitter).normalize();
            if b.z <= 0.0 {
                continue;
            }
            let fab = law.eval(a, b)[0] / b.z;
            let fba = law.eval(b, a)[0] / a.z;
            let scale = fab.abs().max(fba.abs());
            if scale > 0.0 {
                compared[i] += 1;
            }
            assert!(
                (fab - fba).abs() <= 1e-9 * scale,
                "{name}: near mirror f(a, b) = {fab}, f(b, a) = {fba}"
            );
        }
    }
    // Every law was compared where it is not zero, many times.
    for ((name, _), n) in laws.iter().zip(&compared) {
        assert!(*n > 5_000, "{name}: only {n} non-zero pairs compared");
    }
}

/// Chi-square of exits binned in sin²θ against the uniform distribution a
/// Lambert field has there, for Lambert arrivals; counts weighted by the
/// sample weight ÷ (1 − α) so a law that moves energy between directions
/// through its weights is seen too. Returns (chi², dof).
fn lambert_in_lambert_out(law: &dyn ReflectionLaw, reflectance: f64, seed: u64) -> (f64, usize) {
    let bins = 40;
    let n = 400_000;
    let mut counts = vec![0.0; bins];
    let mut rng = Stream::new(seed, 0);
    for _ in 0..n {
        let wo = lambert(rng.uniform2());
        let Some(s) = law.sample(wo, rng.uniform(), rng.uniform2()) else {
            continue;
        };
        let v = (s.wi.x * s.wi.x + s.wi.y * s.wi.y).min(1.0);
        let k = ((v * bins as f64) as usize).min(bins - 1);
        counts[k] += s.weight[0] / reflectance;
    }
    let expected = vec![n as f64 / bins as f64; bins];
    chi_square(&counts, &expected)
}

#[test]
fn split_and_bounded_laws_keep_a_lambert_field_lambert() {
    let laws = reciprocal_laws();
    for (i, (name, law)) in laws.iter().enumerate() {
        let (chi, dof) = lambert_in_lambert_out(law.as_ref(), 0.8, 40 + i as u64);
        eprintln!("{name}: chi² {chi:.1} over {dof} dof");
        assert!(
            chi < critical(dof),
            "{name}: exits of Lambert arrivals are not Lambert: chi² {chi:.1} over {dof} dof (limit {:.1})",
            critical(dof)
        );
    }
}

#[test]
fn polar_law_departure_from_the_lambert_invariant_is_measured() {
    // The demo well-diffuser data used rotationally at s = 0.9: not reciprocal
    // by construction. The test records the departure (printed; measured
    // chi² 9,892 over 39 dof) and checks that the same measurement that
    // passes the reciprocal laws does see it: a chi-square above the 99.9 %
    // limit, so the check above is not blind.
    let file = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("demo-rooms/treatments/qrd7-panel.polar.toml");
    let mut m = material(0.9, None);
    m.polar_file = Some(file);
    let bands = BandSet::new(&[1000]).unwrap();
    let (law, _) = LawKind::Polar.build(&m, &bands, &[0], false).unwrap();
    let (chi, dof) = lambert_in_lambert_out(law.as_ref(), 0.8, 77);
    eprintln!(
        "polar (demo well diffuser, 1 kHz, s = 0.9): chi² {chi:.1} over {dof} dof (99.9 % limit {:.1})",
        critical(dof)
    );
    assert!(
        dof == 39 && chi > critical(dof),
        "the polar law's departure went unseen: chi² {chi:.1}"
    );
}
