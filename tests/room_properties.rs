//! Seeded randomized checks of the geometry helpers: triangulation of random
//! star-shaped (often non-convex) polygons and point-in-room on the shoebox.

use std::path::Path;

use glam::DVec3;
use polaray::room::{inside, load_room, polygon};
use proptest::prelude::*;

/// A star-shaped polygon around the origin in a tilted plane: corners at
/// increasing angles with random radii (simple, usually non-convex).
fn star(radii: &[f64], tilt: f64) -> Vec<DVec3> {
    let n = radii.len();
    let u = DVec3::new(tilt.cos(), 0.0, tilt.sin());
    let v = DVec3::Y;
    (0..n)
        .map(|i| {
            let a = std::f64::consts::TAU * i as f64 / n as f64;
            (u * a.cos() + v * a.sin()) * radii[i] + DVec3::new(1.0, 2.0, 3.0)
        })
        .collect()
}

proptest! {
    #![proptest_config(ProptestConfig {
        cases: 200,
        rng_seed: proptest::test_runner::RngSeed::Fixed(20_261_202),
        ..ProptestConfig::default()
    })]

    #[test]
    fn triangulation_covers_the_polygon_once(
        radii in proptest::collection::vec(0.2f64..3.0, 3..24),
        tilt in 0.0f64..3.0,
    ) {
        let p = star(&radii, tilt);
        let tris = polygon::triangulate(&p).expect("star-shaped polygons are simple");
        prop_assert_eq!(tris.len(), p.len() - 2);
        let normal = polygon::newell_vector(&p).normalize();
        let mut area = 0.0;
        for t in &tris {
            let c = (p[t[1]] - p[t[0]]).cross(p[t[2]] - p[t[0]]);
            // Same orientation as the polygon, never flipped.
            prop_assert!(c.dot(normal) > 0.0);
            area += 0.5 * c.length();
        }
        let expected = polygon::area_m2(&p);
        prop_assert!((area - expected).abs() < 1e-9 * expected.max(1.0), "{} vs {}", area, expected);
    }

    #[test]
    fn shoebox_inside_test_agrees_with_its_bounds(
        x in -1.0f64..9.0, y in -1.0f64..7.0, z in -1.0f64..4.5,
    ) {
        let room = load_room(Path::new("rooms/shoebox.toml")).unwrap().room;
        let tris: Vec<[DVec3; 3]> = room.triangles.iter().map(|t| t.vertices).collect();
        let p = DVec3::new(x, y, z);
        let margin = 1e-6;
        let strictly_in = x > margin && x < 8.0 - margin && y > margin && y < 6.0 - margin && z > margin && z < 3.5 - margin;
        let strictly_out = x < -margin || x > 8.0 + margin || y < -margin || y > 6.0 + margin || z < -margin || z > 3.5 + margin;
        if strictly_in {
            prop_assert!(inside::is_inside_room(p, &tris));
        }
        if strictly_out {
            prop_assert!(!inside::is_inside_room(p, &tris));
        }
    }
}
