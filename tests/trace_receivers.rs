//! Detection spheres and the walls: a default radius that reaches a wall is
//! reported (a cut sphere counts less than its volume), one clear of the walls is not.

mod common;

use common::*;
use glam::DVec3;
use polaray::law::LawKind;
use polaray::trace::{self, TraceOptions};

fn warnings_for(receiver: DVec3) -> (f64, Vec<String>) {
    let room = shoebox(
        DVec3::new(8.0, 6.0, 3.5),
        uniform_material("wall", 0.2, 0.5),
        settings(&[1000], false),
        DVec3::new(2.0, 2.0, 1.5),
        &[(receiver, None)],
    );
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.rays = 200;
    options.duration_s = 0.2;
    let result = trace::run(&room, &options).unwrap();
    (result.receivers[0].radius_m, result.warnings)
}

#[test]
fn default_radius_reaching_a_wall_is_reported() {
    // The default rule gives a radius of at least 0.1 m (MIN_DEFAULT_RADIUS_M),
    // so a receiver 0.05 m from the floor is always cut by it.
    let (radius_m, warnings) = warnings_for(DVec3::new(5.0, 3.0, 0.05));
    assert!(radius_m > 0.05);
    let hit: Vec<_> = warnings
        .iter()
        .filter(|w| w.contains("default detection radius"))
        .collect();
    assert_eq!(hit.len(), 1, "{warnings:?}");
    assert!(hit[0].contains("receiver `R1`"), "{}", hit[0]);
    assert!(hit[0].contains("0.05 m from the centre"), "{}", hit[0]);
}

#[test]
fn default_radius_clear_of_the_walls_is_not_reported() {
    let (radius_m, warnings) = warnings_for(DVec3::new(5.0, 3.0, 1.75));
    assert!(radius_m < 1.75);
    assert!(
        !warnings
            .iter()
            .any(|w| w.contains("default detection radius")),
        "{warnings:?}"
    );
}
