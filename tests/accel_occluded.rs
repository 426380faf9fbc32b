//! `occluded` agrees with `closest_hit`: a segment is blocked exactly when
//! the closest hit lies inside it.

mod accel_support;
#[path = "../benches/common/mod.rs"]
mod common;

use accel_support::{random_direction, random_point, soup};
use polaray::accel::Bvh;
use polaray::random::Stream;

#[test]
fn occluded_agrees_with_closest_hit() {
    let scenes = [("hall", common::hall()), ("soup", soup(21, 800, 1.5))];
    for (name, triangles) in scenes {
        let bvh = Bvh::build(&triangles);
        let mut s = Stream::new(22, 0);
        let mut blocked = 0;
        for k in 0..20_000 {
            let o = if name == "hall" {
                common::hall_rays(1, k).remove(0).origin
            } else {
                random_point(&mut s, -11.0, 11.0)
            };
            let d = random_direction(&mut s);
            let hit = bvh.closest_hit(o, d, f64::INFINITY);
            // Segment lengths around the hit distance as well as random ones.
            let lengths = match hit {
                Some(h) => [
                    h.distance_m * (1.0 - 1e-6),
                    h.distance_m * (1.0 + 1e-6),
                    40.0 * s.uniform(),
                ],
                None => [1.0, 10.0, 100.0],
            };
            for length in lengths {
                let want = bvh.closest_hit(o, d, length).is_some();
                assert_eq!(
                    bvh.occluded(o, d, length),
                    want,
                    "{name}: ray {k} origin {o:?} direction {d:?} length {length}"
                );
                blocked += usize::from(want);
            }
        }
        // Both outcomes must actually occur for the comparison to mean anything.
        assert!(
            blocked > 1000 && blocked < 59_000,
            "{name}: {blocked} blocked"
        );
    }
}

#[test]
fn occluded_leaving_skips_the_start_surface() {
    let triangles = common::hall();
    let bvh = Bvh::build(&triangles);
    let mut s = Stream::new(23, 0);
    for k in 0..5000 {
        let tri = &triangles[(s.next_u64() % triangles.len() as u64) as usize];
        let [a, b, c] = tri.vertices;
        let (u, v) = (s.uniform() * 0.5, s.uniform() * 0.5);
        let o = a + (b - a) * u + (c - a) * v;
        let mut d = random_direction(&mut s);
        if d.dot(tri.cross()) < 0.0 {
            d = -d;
        }
        let length = 30.0 * s.uniform();
        let want = bvh.closest_hit_leaving(o, d, length, tri.surface).is_some();
        assert_eq!(
            bvh.occluded_leaving(o, d, length, tri.surface),
            want,
            "ray {k} origin {o:?} direction {d:?} length {length}"
        );
        // Without skipping, a ray leaving a surface can only hit more.
        if want {
            assert!(bvh.occluded(o, d, length));
        }
    }
}
