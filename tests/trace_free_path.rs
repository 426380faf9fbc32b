//! Mean free path of Lambert-reflected rays equals 4V/S for any room shape
//! (Kuttruff, Room Acoustics, 6th ed., §5.2; reference.md §6), and so does the
//! mean free path under any law that is reciprocal and lossless up to 1 − α:
//! such a law maps cosine-weighted arrivals onto cosine-weighted exits, the
//! invariant measure behind Kuttruff's result. `split` (mirror + Lambert) and
//! `bounded` (built reciprocal, see `law::bounded`) are such laws; `polar` is
//! not in general (a measured pattern need not be reciprocal), and its effect
//! is measured and reported here.

mod common;

use common::*;
use glam::DVec3;
use polaray::law::LawKind;
use polaray::room::estimates;
use polaray::trace::{self, TraceOptions};

fn check(room: &polaray::room::Room) {
    check_law(room, LawKind::Split);
}

/// Traces `room` under `law` and asserts the traced mean free path is 4V/S
/// within 1 %; returns the ratio traced / (4V/S).
fn check_law(room: &polaray::room::Room, law: LawKind) -> f64 {
    let ratio = free_path_ratio(room, law);
    // Kuttruff: 4V/S exactly in expectation; 1 % over ≥ 1e5 segments (standard
    // error ≈ 0.6/√1e5 ≈ 0.2 %).
    assert!(
        (ratio - 1.0).abs() < 0.01,
        "{} under `{law}`: traced / (4V/S) = {ratio:.4}",
        room.name
    );
    ratio
}

/// Traced mean free path ÷ 4V/S of `room` under `law` (≥ 1e5 reflections,
/// closed room, no roulette).
fn free_path_ratio(room: &polaray::room::Room, law: LawKind) -> f64 {
    let mut options = TraceOptions::from_room(room, law);
    options.rays = 3000;
    options.duration_s = 0.5;
    options.roulette = None;
    let result = trace::run(room, &options).unwrap();
    let expected = estimates::mean_free_path_m(room);
    let traced = result.stats.traced_mean_free_path_m.unwrap();
    let reflections = result.stats.reflections;
    assert!(reflections >= 100_000, "only {reflections} reflections");
    eprintln!(
        "{} under `{law}`: traced {traced:.4} m, 4V/S = {expected:.4} m, {reflections} reflections",
        room.name
    );
    assert_eq!(
        result.stats.lost_rays, 0,
        "{}: closed room leaked",
        room.name
    );
    traced / expected
}

#[test]
fn shoebox_lambert_mean_free_path_is_4v_over_s() {
    // α = 0.1 keeps rays alive (no roulette) while the weights play no role here.
    let room = shoebox(
        DVec3::new(9.0, 6.0, 3.5),
        uniform_material("lambert", 0.1, 1.0),
        settings(&[1000], false),
        DVec3::new(2.0, 2.0, 1.5),
        &[(DVec3::new(6.0, 4.0, 1.2), Some(0.5))],
    );
    check(&room);
}

#[test]
fn skewed_polyhedron_lambert_mean_free_path_is_4v_over_s() {
    let room = skewed_polyhedron(
        uniform_material("lambert", 0.1, 1.0),
        settings(&[1000], false),
    );
    check(&room);
}

/// A shoebox whose every surface scatters strongly (s = 0.9) with diffusion
/// `d` for the bounded law, and the demo well-diffuser polar data for the
/// polar law (used rotationally: no profile axis).
fn scattering_shoebox(d: f64) -> polaray::room::Room {
    let mut material = uniform_material("diffuser", 0.1, 0.9);
    material.diffusion = Some(polaray::bands::Bands::splat(d));
    material.polar_file = Some(
        std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR"))
            .join("demo-rooms/treatments/qrd7-panel.polar.toml"),
    );
    shoebox(
        DVec3::new(8.0, 6.0, 3.5),
        material,
        settings(&[1000], false),
        DVec3::new(2.0, 2.0, 1.5),
        &[(DVec3::new(6.0, 4.0, 1.2), Some(0.5))],
    )
}

#[test]
fn bounded_law_keeps_4v_over_s_at_both_ends_of_its_range() {
    // The bounded law at s = 0.9 with its least and most even diffusion
    // (`BoundedLaw::reachable_diffusion`), in a shoebox and in the skewed room.
    use polaray::law::{BoundedLaw, CalibrationArc};
    let range = BoundedLaw::reachable_diffusion(0.9, &CalibrationArc::standard()).unwrap();
    for d in [range.least_even, range.most_even] {
        check_law(&scattering_shoebox(d), LawKind::Bounded);
        let mut material = uniform_material("diffuser", 0.1, 0.9);
        material.diffusion = Some(polaray::bands::Bands::splat(d));
        check_law(
            &skewed_polyhedron(material, settings(&[1000], false)),
            LawKind::Bounded,
        );
    }
}

#[test]
fn split_law_keeps_4v_over_s_with_partial_scattering() {
    check_law(&scattering_shoebox(0.5), LawKind::Split);
}

#[test]
fn polar_law_mean_free_path_is_measured_not_assumed() {
    // The polar law draws the scattered part from a measured pattern that need
    // not be reciprocal, so 4V/S is not guaranteed. Measured here with the
    // demo well-diffuser data (rotational use, s = 0.9): see the printed ratio.
    // The bound asserted is the documented tolerance for the shipped demo
    // data (measured: within 1 %; DEVELOPERS.md), not a law of physics.
    let ratio = free_path_ratio(&scattering_shoebox(0.5), LawKind::Polar);
    assert!((ratio - 1.0).abs() < 0.02, "polar: {ratio:.4}");
}
