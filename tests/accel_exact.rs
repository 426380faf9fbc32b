//! The BVH's closest hit equals a brute-force Möller–Trumbore search in f64:
//! same distance within 1e-9 relative, same triangle unless the two are
//! tied at that distance. Seeded loops; a failure prints the ray.

mod accel_support;
#[path = "../benches/common/mod.rs"]
mod common;

use accel_support::{brute_force, moller_trumbore, random_direction, random_point, soup};
use glam::DVec3;
use polaray::accel::{Bvh, Hit};
use polaray::random::Stream;
use polaray::room::Triangle;

/// Relative distance tolerance of the brief (f64 against f64).
const REL_TOL: f64 = 1e-9;

/// Compares one query with brute force and panics with the ray on mismatch.
fn check(
    triangles: &[Triangle],
    got: Option<Hit>,
    o: DVec3,
    d: DVec3,
    t_max: f64,
    skip: Option<u32>,
    what: &str,
) {
    let want = brute_force(triangles, o, d, t_max, skip);
    match (got, want) {
        (None, None) => {}
        (Some(h), Some((t, i))) => {
            let close = (h.distance_m - t).abs() <= REL_TOL * t;
            // A different triangle is fine only if brute force hits it at the same distance.
            let tie = h.triangle == i
                || moller_trumbore(&triangles[h.triangle as usize], o, d, f64::INFINITY)
                    .is_some_and(|u| (u - t).abs() <= REL_TOL * t);
            assert!(
                close && tie,
                "{what}: origin {o:?} direction {d:?} t_max {t_max}: bvh {h:?}, brute force t {t} triangle {i}"
            );
        }
        _ => panic!(
            "{what}: origin {o:?} direction {d:?} t_max {t_max}: bvh {got:?}, brute force {want:?}"
        ),
    }
}

#[test]
fn random_soups_match_brute_force() {
    for (seed, count, size) in [
        (1, 1, 5.0),
        (2, 7, 3.0),
        (3, 300, 2.0),
        (4, 2000, 0.8),
        (5, 500, 12.0),
    ] {
        let triangles = soup(seed, count, size);
        let bvh = Bvh::build(&triangles);
        let mut s = Stream::new(seed, 1_000_000);
        for _ in 0..3000 {
            let o = random_point(&mut s, -12.0, 12.0);
            let d = random_direction(&mut s);
            // Mostly unlimited rays, some cut short.
            let t_max = if s.uniform() < 0.7 {
                f64::INFINITY
            } else {
                30.0 * s.uniform()
            };
            let what = format!("soup seed {seed} of {count}");
            check(
                &triangles,
                bvh.closest_hit(o, d, t_max),
                o,
                d,
                t_max,
                None,
                &what,
            );
        }
    }
}

#[test]
fn hall_matches_brute_force() {
    let triangles = common::hall();
    assert_eq!(triangles.len(), 2004);
    let bvh = Bvh::build(&triangles);
    for (k, ray) in common::hall_rays(4000, 77).iter().enumerate() {
        let t_max = if k.is_multiple_of(5) {
            8.0
        } else {
            f64::INFINITY
        };
        let got = bvh.closest_hit(ray.origin, ray.direction, t_max);
        check(
            &triangles,
            got,
            ray.origin,
            ray.direction,
            t_max,
            None,
            "hall",
        );
        // The hall is closed: an unlimited ray from the air always hits.
        if t_max.is_infinite() {
            assert!(got.is_some(), "hall ray {k} escaped: {ray:?}");
        }
    }
}

#[test]
fn axis_aligned_and_diagonal_rays_in_the_shoebox() {
    // Zero direction components exercise the infinite-reciprocal path of the slab test.
    let triangles = common::shoebox();
    let bvh = Bvh::build(&triangles);
    let size = common::SHOEBOX_SIZE_M;
    let o = DVec3::new(5.0, 4.0, 3.0);
    for axis in 0..3 {
        for sign in [1.0, -1.0] {
            let mut d = DVec3::ZERO;
            d[axis] = sign;
            let want = if sign > 0.0 {
                size[axis] - o[axis]
            } else {
                o[axis]
            };
            let hit = bvh.closest_hit(o, d, f64::INFINITY).expect("a wall");
            // Exact: plain subtraction of exactly representable coordinates.
            assert_eq!(hit.distance_m, want, "axis {axis} sign {sign}");
            // Negative zero components must behave like positive ones.
            let mut d2 = d;
            d2[(axis + 1) % 3] = -0.0;
            assert_eq!(bvh.closest_hit(o, d2, f64::INFINITY), Some(hit));
        }
    }
    for d in [
        DVec3::new(1.0, 1.0, 0.0),
        DVec3::new(-1.0, 0.0, -1.0),
        DVec3::ONE,
    ] {
        let d = d.normalize();
        check(
            &triangles,
            bvh.closest_hit(o, d, f64::INFINITY),
            o,
            d,
            f64::INFINITY,
            None,
            "diagonal",
        );
    }
}

#[test]
fn rays_leaving_a_surface_skip_it_and_never_escape() {
    // Rays start on a hall triangle (inside it, or exactly on the diagonal
    // it shares with the other half of its rectangle) and leave into the
    // air. The hall is closed, so each must hit another surface, and the
    // hit must equal brute force without the starting surface.
    let triangles = common::hall();
    let bvh = Bvh::build(&triangles);
    let mut s = Stream::new(9, 0);
    for k in 0..4000usize {
        let index = (s.next_u64() % triangles.len() as u64) as usize;
        let tri = &triangles[index];
        let [a, b, c] = tri.vertices;
        // Rectangle q0..q3 is split into (q0, q1, q2) and (q0, q2, q3): the
        // diagonal is edge a–c of the even triangle and a–b of the odd one.
        let (u, v) = if k.is_multiple_of(3) {
            if index.is_multiple_of(2) {
                (0.0, s.uniform())
            } else {
                (s.uniform(), 0.0)
            }
        } else {
            let (u, v) = (s.uniform(), s.uniform());
            if u + v > 1.0 {
                (1.0 - u, 1.0 - v)
            } else {
                (u, v)
            }
        };
        let o = a + (b - a) * u + (c - a) * v;
        let n = tri.cross().normalize();
        let mut d = random_direction(&mut s);
        if d.dot(n) < 0.0 {
            d = -d;
        }
        let got = bvh.closest_hit_leaving(o, d, f64::INFINITY, tri.surface);
        assert!(
            got.is_some(),
            "ray {k} from surface {} escaped: {o:?} {d:?}",
            tri.surface
        );
        check(
            &triangles,
            got,
            o,
            d,
            f64::INFINITY,
            Some(tri.surface),
            "leaving",
        );
    }
}

#[test]
fn degenerate_inputs_build_and_answer() {
    // Many identical triangles (no SAH split possible) and exponentially
    // spaced ones (deep SAH trees) must still give exact answers.
    let base = [
        DVec3::new(0.0, 0.0, 1.0),
        DVec3::new(1.0, 0.0, 1.0),
        DVec3::new(0.0, 1.0, 1.0),
    ];
    let copies: Vec<Triangle> = (0..100)
        .map(|i| Triangle {
            vertices: base,
            surface: i,
        })
        .collect();
    let spaced: Vec<Triangle> = (0..200)
        .map(|i| {
            let z = 1.2f64.powi(i as i32) * 1e-6;
            Triangle {
                vertices: base.map(|v| v + DVec3::Z * z),
                surface: i,
            }
        })
        .collect();
    for (name, triangles) in [("copies", copies), ("spaced", spaced)] {
        let bvh = Bvh::build(&triangles);
        let mut s = Stream::new(11, 0);
        for _ in 0..500 {
            let o = DVec3::new(0.3 * s.uniform(), 0.3 * s.uniform(), -1.0);
            let d = (DVec3::new(
                0.3 * s.uniform(),
                0.3 * s.uniform(),
                2.0 + 40.0 * s.uniform(),
            ) - o)
                .normalize();
            check(
                &triangles,
                bvh.closest_hit(o, d, f64::INFINITY),
                o,
                d,
                f64::INFINITY,
                None,
                name,
            );
        }
    }
    let empty = Bvh::build(&[]);
    assert_eq!(
        empty.closest_hit(DVec3::ZERO, DVec3::X, f64::INFINITY),
        None
    );
    assert!(!empty.occluded(DVec3::ZERO, DVec3::X, 1.0));
}

#[test]
fn bvh_is_shareable_between_threads() {
    fn assert_send_sync<T: Send + Sync>() {}
    assert_send_sync::<Bvh>();
    // Same answers from several threads as from one.
    let triangles = common::hall();
    let bvh = Bvh::build(&triangles);
    let rays = common::hall_rays(2000, 5);
    let serial: Vec<Option<Hit>> = rays
        .iter()
        .map(|r| bvh.closest_hit(r.origin, r.direction, f64::INFINITY))
        .collect();
    let parallel: Vec<Option<Hit>> = std::thread::scope(|scope| {
        let handles: Vec<_> = rays
            .chunks(500)
            .map(|chunk| {
                let bvh = &bvh;
                scope.spawn(move || {
                    chunk
                        .iter()
                        .map(|r| bvh.closest_hit(r.origin, r.direction, f64::INFINITY))
                        .collect::<Vec<_>>()
                })
            })
            .collect();
        handles
            .into_iter()
            .flat_map(|h| h.join().expect("thread"))
            .collect()
    });
    assert_eq!(serial, parallel);
}
