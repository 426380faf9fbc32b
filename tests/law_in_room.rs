//! Every law traced in a room: the `polar` law with measured (here predicted)
//! data on an extruded rear wall, fallbacks, and agreement of the laws where
//! they must agree.

mod common;

use std::path::PathBuf;

use common::*;
use glam::DVec3;
use polaray::law::LawKind;
use polaray::room::Room;
use polaray::trace::{self, TraceOptions};

fn demo_polar(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("demo-rooms/treatments")
        .join(name)
}

/// A lossless shoebox (α = 0, no air) whose wall y1 takes the well-diffuser
/// polar data with its profile axis vertical (wells run floor to ceiling).
fn room_with_diffuser(scattering: f64, alpha: f64) -> Room {
    let mut room = shoebox(
        DVec3::new(6.0, 5.0, 3.0),
        uniform_material("walls", alpha, scattering),
        settings(&[500, 1000], false),
        DVec3::new(1.5, 1.5, 1.4),
        &[(DVec3::new(4.5, 3.5, 1.2), Some(0.5))],
    );
    room.materials[0].polar_file = Some(demo_polar("qrd7-panel.polar.toml"));
    for s in &mut room.surfaces {
        if s.label == "y1" {
            s.profile_axis = Some(DVec3::Z);
        }
    }
    room
}

#[test]
fn polar_law_conserves_energy_in_a_closed_room() {
    // α = 0, no air: all 1 J per band must still travel at the end
    // (conservation; common practice, no source). The polar law's weights are
    // exactly 1 − α within a single-band pass, extruded cone included.
    let room = room_with_diffuser(0.6, 0.0);
    let mut options = TraceOptions::from_room(&room, LawKind::Polar);
    options.rays = 2000;
    options.duration_s = 0.1;
    let result = trace::run(&room, &options).unwrap();
    assert_eq!(result.stats.lost_rays, 0, "{:?}", result.warnings);
    assert_eq!(result.stats.passes, 2);
    for b in 0..2 {
        let e = result.stats.energy_at_end_j[b];
        assert!((e - 1.0).abs() < 1e-9, "band {b}: {e}");
    }
}

#[test]
fn all_laws_agree_when_every_surface_is_flat() {
    // s = 0 makes every law a pure mirror (issue contract); with equal
    // absorption in all bands and common random numbers the echograms agree
    // bit for bit (common practice, no source).
    let room = room_with_diffuser(0.0, 0.1);
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.rays = 1500;
    options.duration_s = 0.15;
    let split = trace::run(&room, &options).unwrap();
    options.law = LawKind::Polar;
    let polar = trace::run(&room, &options).unwrap();
    assert_eq!(split.echograms[0].echogram, polar.echograms[0].echogram);
    // The bounded law needs a diffusion coefficient: at s = 0 the only value
    // a finite flat sample shows is d_max(0) = 1/9 (reference.md §3).
    let mut flat = room.clone();
    flat.materials[0].diffusion = Some(polaray::bands::Bands::splat(1.0 / 9.0));
    options.law = LawKind::Bounded;
    let bounded = trace::run(&flat, &options).unwrap();
    assert_eq!(split.echograms[0].echogram, bounded.echograms[0].echogram);
}

#[test]
fn missing_polar_data_is_an_error_unless_a_fallback_is_given() {
    let mut room = room_with_diffuser(0.5, 0.1);
    room.materials[0].polar_file = None;
    let mut options = TraceOptions::from_room(&room, LawKind::Polar);
    options.rays = 200;
    options.duration_s = 0.05;
    let err = trace::run(&room, &options).unwrap_err().to_string();
    assert!(
        err.contains("material `walls`") && err.contains("--fallback"),
        "{err}"
    );
    options.fallback = Some(LawKind::Split);
    let result = trace::run(&room, &options).unwrap();
    assert_eq!(result.fallbacks.len(), 1, "{:?}", result.fallbacks);
    assert!(result.fallbacks[0].contains("walls"));
}

#[test]
fn every_law_conserves_energy_per_reflection() {
    // Mean sample weight = 1 − α per band (energy conservation, as renderers
    // test their reflection models; common practice, no source), 10^6 samples,
    // tolerance 5 standard errors of the mean weight.
    use polaray::random::Stream;
    let mut room = room_with_diffuser(0.5, 0.2);
    room.materials[0].diffusion = Some(polaray::bands::Bands::splat(0.3));
    let material = &room.materials[0];
    let bands = &room.settings.bands;
    let wo = DVec3::new(0.4, 0.2, 0.8).normalize();
    for kind in [LawKind::Split, LawKind::Bounded, LawKind::Polar] {
        for band in 0..bands.len() {
            let (law, _) = kind.build(material, bands, &[band], false).unwrap();
            let mut rng = Stream::new(5, band as u64);
            let n = 1_000_000;
            let (mut sum, mut sum2) = (0.0, 0.0);
            for _ in 0..n {
                let w = law
                    .sample(wo, rng.uniform(), rng.uniform2())
                    .map_or(0.0, |s| s.weight[band]);
                sum += w;
                sum2 += w * w;
            }
            let mean = sum / n as f64;
            let se = ((sum2 / n as f64 - mean * mean).max(0.0) / n as f64).sqrt();
            assert!(
                (mean - 0.8).abs() <= 5.0 * se + 1e-9,
                "{kind} band {band}: mean weight {mean} (se {se})"
            );
        }
    }
}

#[test]
fn a_users_own_law_traces_like_the_law_it_wraps() {
    // An own law (law::OwnLaw, one band per pass) that builds the split law
    // gives the split law's echograms bit for bit when every band has the
    // same coefficients (the same streams choose the same lobes; common
    // practice, no source), and its build errors name the material.
    use polaray::law::{OwnLaw, ReflectionLaw, SplitLaw};
    let room = room_with_diffuser(0.4, 0.15);
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.rays = 1500;
    options.duration_s = 0.15;
    let split = trace::run(&room, &options).unwrap();
    let own = OwnLaw::new("wrapped split", |m, _bands| {
        Ok(Box::new(SplitLaw::new(m, 1)) as Box<dyn ReflectionLaw>)
    });
    let traced = trace::run_with_laws(&room, &options, &own, &|_| {}).unwrap();
    assert_eq!(traced.stats.passes, 2);
    for (a, b) in split.echograms.iter().zip(&traced.echograms) {
        assert_eq!(a.echogram, b.echogram);
    }
    let failing = OwnLaw::new("fussy", |_m, _bands| Err("needs data".to_string()));
    let err = trace::run_with_laws(&room, &options, &failing, &|_| {})
        .unwrap_err()
        .to_string();
    assert!(err.contains("walls") && err.contains("needs data"), "{err}");
}
