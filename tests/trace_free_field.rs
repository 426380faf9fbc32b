//! Free field: the receiver unit gives 1 / (4π d²) for a source of 1 J
//! (inverse-square law; reference.md §6), here through the direct-sound path.

mod common;

use common::*;
use glam::DVec3;
use polaray::law::LawKind;
use polaray::trace::{self, TraceOptions};

#[test]
fn receiver_at_ten_metres_in_free_field() {
    let mut room = empty_room(
        "free field",
        uniform_material("none", 1.0, 0.0),
        settings(&[500, 1000], false),
    );
    room.settings.open = true;
    place(
        &mut room,
        DVec3::ZERO,
        &[(DVec3::new(6.0, 8.0, 0.0), Some(0.5))],
    );
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.rays = 1000;
    options.duration_s = 0.1;
    let result = trace::run(&room, &options).unwrap();
    let pair = result.pair(0, 0);
    let total = pair.echogram.total();
    // 1 / (4π · 100) J/m² (inverse-square law); within 1 %.
    let expected = 1.0 / (4.0 * std::f64::consts::PI * 100.0);
    for b in 0..2 {
        assert!(
            (total[b] / expected - 1.0).abs() < 0.01,
            "band {b}: {} vs {expected}",
            total[b]
        );
    }
    assert_eq!(result.stats.lost_rays, 1000);
    // Direct sound at d / c = 10 / 343.2 s → bin 29 (1 ms bins).
    assert_eq!(pair.echogram.first_nonzero_bin(), Some(29));
    // Source and receiver at the same height: no lateral energy (ISO 3382-1 A.3).
    // Computed geometrically, so zero up to round-off.
    let lateral: f64 = pair.echogram.lateral.iter().map(|b| b[0]).sum();
    assert!(lateral.abs() < 1e-12 * expected, "lateral {lateral}");
}

#[test]
fn air_absorption_attenuates_the_direct_sound() {
    let mut room = empty_room(
        "free field",
        uniform_material("none", 1.0, 0.0),
        settings(&[4000], true),
    );
    room.settings.open = true;
    place(
        &mut room,
        DVec3::ZERO,
        &[(DVec3::new(0.0, 50.0, 0.0), Some(0.5))],
    );
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.rays = 100;
    options.duration_s = 0.3;
    let result = trace::run(&room, &options).unwrap();
    let m = result.air_attenuation_per_m[0];
    // e^(−m d) / (4π d²) (ISO 9613-1 energy attenuation); round-off only.
    let expected = (-m * 50.0).exp() / (4.0 * std::f64::consts::PI * 2500.0);
    let total = result.pair(0, 0).echogram.total()[0];
    assert!(m > 0.0);
    assert!(
        (total / expected - 1.0).abs() < 1e-12,
        "{total} vs {expected}"
    );
}
