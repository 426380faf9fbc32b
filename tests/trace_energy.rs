//! Energy bookkeeping: a lossless closed room keeps all emitted energy; a room
//! with a missing wall loses rays and reports them.

mod common;

use common::*;
use glam::DVec3;
use polaray::bands::Bands;
use polaray::law::LawKind;
use polaray::room::Material;
use polaray::trace::{self, TraceOptions};

#[test]
fn mixed_scattering_bands_are_exact() {
    // α = 0 and no air: the energy alive at the end is 1 J per band
    // (conservation; common practice, no source). With s = 0.1/0.5/0.9 each
    // band is traced in its own pass (`LawKind::band_groups`), so every
    // reflection weight is exactly 1 and round-off is the only difference.
    let material = Material {
        scattering: Bands::from_slice(&[0.1, 0.5, 0.9]),
        ..uniform_material("hard", 0.0, 0.0)
    };
    let room = shoebox(
        DVec3::new(5.0, 4.0, 3.0),
        material,
        settings(&[500, 1000, 2000], false),
        DVec3::new(1.0, 1.5, 1.2),
        &[(DVec3::new(3.5, 2.5, 1.5), Some(0.5))],
    );
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.rays = 4000;
    options.duration_s = 0.03;
    let result = trace::run(&room, &options).unwrap();
    assert_eq!(result.stats.lost_rays, 0);
    assert_eq!(result.stats.passes, 3);
    for b in 0..3 {
        let e = result.stats.energy_at_end_j[b];
        assert!((e - 1.0).abs() < 1e-9, "band {b}: {e}");
    }
}

#[test]
fn lambert_lossless_room_is_exact() {
    // α = 0, s = 1 in every band: each weight is exactly 1 (SplitLaw), so
    // round-off is the only difference from 1 J.
    let room = shoebox(
        DVec3::new(5.0, 4.0, 3.0),
        uniform_material("hard", 0.0, 1.0),
        settings(&[125, 1000, 4000], false),
        DVec3::new(1.0, 1.5, 1.2),
        &[(DVec3::new(3.5, 2.5, 1.5), Some(0.5))],
    );
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.rays = 3000;
    options.duration_s = 0.2;
    let result = trace::run(&room, &options).unwrap();
    assert_eq!(result.stats.lost_rays, 0);
    for b in 0..3 {
        let e = result.stats.energy_at_end_j[b];
        assert!((e - 1.0).abs() < 1e-9, "band {b}: {e}");
    }
}

#[test]
fn open_box_reports_lost_rays_and_accounts_for_their_energy() {
    let mut room = empty_room(
        "open box",
        uniform_material("hard", 0.0, 1.0),
        settings(&[1000], false),
    );
    shoebox_walls(&mut room, DVec3::new(5.0, 4.0, 3.0), &["ceiling"]);
    room.settings.open = true;
    place(
        &mut room,
        DVec3::new(1.0, 1.5, 1.2),
        &[(DVec3::new(3.5, 2.5, 1.5), Some(0.5))],
    );
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.rays = 2000;
    options.duration_s = 0.5;
    let result = trace::run(&room, &options).unwrap();
    // Without a ceiling (12 of 94 m²) almost every ray escapes within 0.5 s
    // (about 12 reflections); at least the direct upward ones (~half the
    // sphere's upper part) must be lost.
    assert!(result.stats.lost_rays > 1000, "{:?}", result.stats);
    let total = result.stats.lost_energy_j[0] + result.stats.energy_at_end_j[0];
    assert!((total - 1.0).abs() < 1e-9, "lost + alive = {total}");
    assert!(
        result.warnings.iter().any(|w| w.contains("left the room")),
        "{:?}",
        result.warnings
    );
}

#[test]
fn russian_roulette_leaves_the_echogram_unbiased() {
    // Roulette keeps the expected energy (survivors carry weight / q): the
    // echogram total with an aggressive threshold (−20 dB) must match the run
    // without roulette within the Monte Carlo noise (common practice, no
    // source; e.g. pbrt, §13.7). Both totals come from ~5000 rays × many
    // crossings; the roulette run's extra noise stays under a few percent.
    let room = shoebox(
        DVec3::new(6.0, 5.0, 3.0),
        uniform_material("plaster", 0.3, 1.0),
        settings(&[1000], false),
        DVec3::new(1.5, 1.5, 1.2),
        &[(DVec3::new(4.5, 3.5, 1.5), Some(1.0))],
    );
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.rays = 5000;
    options.duration_s = 0.5;
    options.roulette = None;
    let plain = trace::run(&room, &options).unwrap();
    options.roulette = Some(polaray::trace::Roulette {
        threshold: 1e-2,
        survival: 0.5,
    });
    let played = trace::run(&room, &options).unwrap();
    assert!(
        played.stats.roulette_stopped_rays > 1000,
        "{:?}",
        played.stats
    );
    assert!(played.stats.segments < plain.stats.segments);
    let a = plain.pair(0, 0).echogram.total()[0];
    let b = played.pair(0, 0).echogram.total()[0];
    assert!((b / a - 1.0).abs() < 0.05, "with roulette {b}, without {a}");
}
