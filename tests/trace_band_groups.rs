//! Bands with different scattering coefficients are traced in separate passes
//! (`LawKind::band_groups`), so each band follows exactly the rays it would
//! follow in a room where every band had its coefficients, with no weight noise
//! from sharing rays (derivation in `src/law/split.rs`; common practice, no source).

mod common;

use common::*;
use glam::DVec3;
use polaray::bands::Bands;
use polaray::law::LawKind;
use polaray::room::Room;
use polaray::trace::{self, TraceOptions};

fn room_with_scattering(s: [f64; 3]) -> Room {
    let mut material = uniform_material("walls", 0.2, 0.0);
    material.scattering = Bands::from_slice(&s);
    shoebox(
        DVec3::new(6.0, 5.0, 3.0),
        material,
        settings(&[250, 1000, 4000], false),
        DVec3::new(1.5, 1.5, 1.4),
        &[(DVec3::new(4.5, 3.5, 1.2), Some(0.5))],
    )
}

fn band_series(room: &Room, band: usize) -> Vec<f64> {
    let mut options = TraceOptions::from_room(room, LawKind::Split);
    options.rays = 2_000;
    options.duration_s = 0.3;
    let result = trace::run(room, &options).unwrap();
    result.echograms[0]
        .echogram
        .energy
        .iter()
        .map(|e| e[band])
        .collect()
}

#[test]
fn groups_follow_equal_scattering_columns() {
    let split = room_with_scattering([0.1, 0.5, 0.1]);
    assert_eq!(
        LawKind::Split.band_groups(&split),
        vec![vec![0, 2], vec![1]]
    );
    let even = room_with_scattering([0.3, 0.3, 0.3]);
    assert_eq!(LawKind::Split.band_groups(&even), vec![vec![0, 1, 2]]);
}

#[test]
fn each_band_matches_a_room_with_its_own_coefficients() {
    // Absorption is equal in all bands, so roulette decisions agree too and the
    // match is exact, bit for bit.
    let mixed = room_with_scattering([0.1, 0.9, 0.5]);
    for (band, s) in [0.1, 0.9, 0.5].into_iter().enumerate() {
        let uniform = room_with_scattering([s; 3]);
        assert_eq!(
            band_series(&mixed, band),
            band_series(&uniform, band),
            "band {band}"
        );
    }
}
