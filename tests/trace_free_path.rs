//! Mean free path of Lambert-reflected rays equals 4V/S for any room shape
//! (Kuttruff, Room Acoustics, 6th ed., §5.2; reference.md §6).

mod common;

use common::*;
use glam::DVec3;
use polaray::law::LawKind;
use polaray::room::estimates;
use polaray::trace::{self, TraceOptions};

fn check(room: &polaray::room::Room) {
    let mut options = TraceOptions::from_room(room, LawKind::Split);
    options.rays = 3000;
    options.duration_s = 0.5;
    options.roulette = None;
    let result = trace::run(room, &options).unwrap();
    let expected = estimates::mean_free_path_m(room);
    let traced = result.stats.traced_mean_free_path_m.unwrap();
    let reflections = result.stats.reflections;
    assert!(reflections >= 100_000, "only {reflections} reflections");
    // Kuttruff: 4V/S exactly in expectation; 1 % over ≥ 1e5 segments (standard
    // error ≈ 0.6/√1e5 ≈ 0.2 %).
    eprintln!(
        "{}: traced {traced:.4} m, 4V/S = {expected:.4} m, {reflections} reflections",
        room.name
    );
    assert!(
        (traced / expected - 1.0).abs() < 0.01,
        "{}: traced {traced:.4} m, 4V/S = {expected:.4} m",
        room.name
    );
    assert_eq!(
        result.stats.lost_rays, 0,
        "{}: closed room leaked",
        room.name
    );
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
