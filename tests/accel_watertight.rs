//! Watertightness: rays from inside closed meshes aimed exactly at shared
//! edges and vertices always hit (no lost rays), 10^5 rays in all.

mod accel_support;
#[path = "../benches/common/mod.rs"]
mod common;

use accel_support::{icosphere, random_point};
use glam::DVec3;
use polaray::accel::Bvh;
use polaray::random::Stream;
use polaray::room::Triangle;

/// A point on an edge or at a corner of a random triangle.
fn edge_target(triangles: &[Triangle], s: &mut Stream, k: usize) -> DVec3 {
    let tri = &triangles[(s.next_u64() % triangles.len() as u64) as usize];
    let e = (s.next_u64() % 3) as usize;
    let (a, b) = (tri.vertices[e], tri.vertices[(e + 1) % 3]);
    if k.is_multiple_of(4) {
        a
    } else {
        a + (b - a) * s.uniform()
    }
}

/// Aims `count` rays from `origin_of` at edges and corners of a convex
/// closed mesh; each must hit at the target's distance (the mesh is convex,
/// so the target is the only crossing).
fn convex_mesh_has_no_leaks(
    name: &str,
    triangles: &[Triangle],
    count: usize,
    origin_of: impl Fn(&mut Stream) -> DVec3,
) {
    let bvh = Bvh::build(triangles);
    let mut s = Stream::new(31, 0);
    for k in 0..count {
        let o = origin_of(&mut s);
        let target = edge_target(triangles, &mut s, k);
        let d = (target - o).normalize();
        let want = (target - o).length();
        let hit = bvh.closest_hit(o, d, f64::INFINITY).unwrap_or_else(|| {
            panic!("{name}: ray {k} leaked: origin {o:?} direction {d:?} target {target:?}")
        });
        // Rounding of the direction moves the crossing by ~1e-15 relative.
        assert!(
            (hit.distance_m - want).abs() <= 1e-9 * want,
            "{name}: ray {k}: hit at {} m, target at {want} m (origin {o:?} direction {d:?})",
            hit.distance_m
        );
    }
}

#[test]
fn icosphere_edges_and_vertices_do_not_leak() {
    let sphere = icosphere(3, 5.0);
    assert_eq!(sphere.len(), 1280);
    convex_mesh_has_no_leaks("icosphere", &sphere, 40_000, |s| random_point(s, -2.0, 2.0));
}

#[test]
fn subdivided_box_edges_and_vertices_do_not_leak() {
    // A 4 × 3 × 2.5 m box, each face a 9 × 9 grid of rectangles split in two.
    let size = DVec3::new(4.0, 3.0, 2.5);
    let n = 9;
    let mut triangles = Vec::new();
    for k in 0..3 {
        let (iu, iv) = ((k + 1) % 3, (k + 2) % 3);
        for side in [0.0, 1.0] {
            let corner = |i: usize, j: usize| {
                let mut p = DVec3::ZERO;
                p[k] = side * size[k];
                p[iu] = size[iu] * i as f64 / n as f64;
                p[iv] = size[iv] * j as f64 / n as f64;
                p
            };
            for i in 0..n {
                for j in 0..n {
                    let q = [
                        corner(i, j),
                        corner(i + 1, j),
                        corner(i + 1, j + 1),
                        corner(i, j + 1),
                    ];
                    let surface = triangles.len() as u32 / 2;
                    triangles.push(Triangle {
                        vertices: [q[0], q[1], q[2]],
                        surface,
                    });
                    triangles.push(Triangle {
                        vertices: [q[0], q[2], q[3]],
                        surface,
                    });
                }
            }
        }
    }
    assert_eq!(triangles.len(), 6 * 2 * n * n);
    convex_mesh_has_no_leaks("box", &triangles, 40_000, |s| {
        DVec3::new(s.uniform(), s.uniform(), s.uniform()) * size * 0.8 + size * 0.1
    });
}

#[test]
fn hall_edges_and_vertices_do_not_leak() {
    // Not convex, so only non-silhouette targets: any edge or corner of the
    // enclosing box (convex seen from inside), or a point on the diagonal
    // shared by the two triangles of a solid's face that faces the ray.
    // Something must be hit no farther than the aimed-at point.
    let triangles = common::hall();
    let bvh = Bvh::build(&triangles);
    let mut s = Stream::new(32, 0);
    for (k, ray) in common::hall_rays(20_000, 33).iter().enumerate() {
        let o = ray.origin;
        let target = if k.is_multiple_of(2) {
            edge_target(&triangles[..12], &mut s, k)
        } else {
            loop {
                let index = 12 + (s.next_u64() % (triangles.len() as u64 - 12)) as usize;
                let [a, b, c] = triangles[index].vertices;
                // Rectangles split as (q0, q1, q2), (q0, q2, q3): the diagonal
                // is edge a–c of the even triangle and a–b of the odd one.
                let end = if index.is_multiple_of(2) { c } else { b };
                let p = a + (end - a) * s.uniform();
                if (p - o).dot(triangles[index].cross()) < 0.0 {
                    break p;
                }
            }
        };
        let d = (target - o).normalize();
        let want = (target - o).length();
        let hit = bvh
            .closest_hit(o, d, f64::INFINITY)
            .unwrap_or_else(|| panic!("hall: ray {k} leaked: origin {o:?} direction {d:?}"));
        assert!(
            hit.distance_m <= want * (1.0 + 1e-9),
            "hall: ray {k} passed its target {target:?}: hit {} m, target {want} m",
            hit.distance_m
        );
    }
}
