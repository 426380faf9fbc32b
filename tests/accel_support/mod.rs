//! Helpers shared by the accel tests: a brute-force reference and random
//! triangle soups.
#![allow(dead_code)]

use glam::DVec3;
use polaray::random::Stream;
use polaray::room::Triangle;

/// Möller–Trumbore ray–triangle test in f64 (Möller & Trumbore, "Fast,
/// Minimum Storage Ray/Triangle Intersection", JGT 2(1), 1997), two-sided,
/// accepting 0 < t < `t_max`.
pub fn moller_trumbore(tri: &Triangle, o: DVec3, d: DVec3, t_max: f64) -> Option<f64> {
    let [v0, v1, v2] = tri.vertices;
    let e1 = v1 - v0;
    let e2 = v2 - v0;
    let p = d.cross(e2);
    let det = e1.dot(p);
    if det == 0.0 {
        return None;
    }
    let inv = 1.0 / det;
    let s = o - v0;
    let u = s.dot(p) * inv;
    if !(0.0..=1.0).contains(&u) {
        return None;
    }
    let q = s.cross(e1);
    let v = d.dot(q) * inv;
    if v < 0.0 || u + v > 1.0 {
        return None;
    }
    let t = e2.dot(q) * inv;
    (t > 0.0 && t < t_max).then_some(t)
}

/// Closest hit by testing every triangle: (distance, triangle index).
pub fn brute_force(
    triangles: &[Triangle],
    o: DVec3,
    d: DVec3,
    t_max: f64,
    skip_surface: Option<u32>,
) -> Option<(f64, u32)> {
    let mut best: Option<(f64, u32)> = None;
    for (i, tri) in triangles.iter().enumerate() {
        if Some(tri.surface) == skip_surface {
            continue;
        }
        let limit = best.map_or(t_max, |b| b.0);
        if let Some(t) = moller_trumbore(tri, o, d, limit) {
            best = Some((t, i as u32));
        }
    }
    best
}

/// A uniformly distributed unit vector (common practice, no source).
pub fn random_direction(s: &mut Stream) -> DVec3 {
    let z = 1.0 - 2.0 * s.uniform();
    let r = (1.0 - z * z).max(0.0).sqrt();
    let phi = std::f64::consts::TAU * s.uniform();
    DVec3::new(r * phi.cos(), r * phi.sin(), z)
}

/// A point uniform in the box [lo, hi)³.
pub fn random_point(s: &mut Stream, lo: f64, hi: f64) -> DVec3 {
    DVec3::new(s.uniform(), s.uniform(), s.uniform()) * (hi - lo) + DVec3::splat(lo)
}

/// `count` random triangles in [-10, 10]³ with edges up to `size_m`; each
/// is its own surface.
pub fn soup(seed: u64, count: usize, size_m: f64) -> Vec<Triangle> {
    (0..count)
        .map(|i| {
            let mut s = Stream::new(seed, i as u64);
            let c = random_point(&mut s, -10.0, 10.0);
            let vertices = [0, 1, 2].map(|_| c + random_point(&mut s, -0.5, 0.5) * size_m);
            Triangle {
                vertices,
                surface: i as u32,
            }
        })
        .collect()
}

/// Unit icosphere subdivided `levels` times, scaled by `radius_m`, normals
/// outward; a closed, convex mesh whose vertices are shared exactly.
pub fn icosphere(levels: usize, radius_m: f64) -> Vec<Triangle> {
    let t = (1.0 + 5f64.sqrt()) / 2.0;
    let mut verts: Vec<DVec3> = [
        (-1.0, t, 0.0),
        (1.0, t, 0.0),
        (-1.0, -t, 0.0),
        (1.0, -t, 0.0),
        (0.0, -1.0, t),
        (0.0, 1.0, t),
        (0.0, -1.0, -t),
        (0.0, 1.0, -t),
        (t, 0.0, -1.0),
        (t, 0.0, 1.0),
        (-t, 0.0, -1.0),
        (-t, 0.0, 1.0),
    ]
    .iter()
    .map(|&(x, y, z)| DVec3::new(x, y, z).normalize())
    .collect();
    let mut faces: Vec<[usize; 3]> = vec![
        [0, 11, 5],
        [0, 5, 1],
        [0, 1, 7],
        [0, 7, 10],
        [0, 10, 11],
        [1, 5, 9],
        [5, 11, 4],
        [11, 10, 2],
        [10, 7, 6],
        [7, 1, 8],
        [3, 9, 4],
        [3, 4, 2],
        [3, 2, 6],
        [3, 6, 8],
        [3, 8, 9],
        [4, 9, 5],
        [2, 4, 11],
        [6, 2, 10],
        [8, 6, 7],
        [9, 8, 1],
    ];
    for _ in 0..levels {
        let mut midpoints = std::collections::HashMap::new();
        let mut mid = |a: usize, b: usize, verts: &mut Vec<DVec3>| {
            *midpoints.entry((a.min(b), a.max(b))).or_insert_with(|| {
                verts.push(((verts[a] + verts[b]) * 0.5).normalize());
                verts.len() - 1
            })
        };
        let mut next = Vec::with_capacity(faces.len() * 4);
        for [a, b, c] in faces {
            let ab = mid(a, b, &mut verts);
            let bc = mid(b, c, &mut verts);
            let ca = mid(c, a, &mut verts);
            next.extend([[a, ab, ca], [b, bc, ab], [c, ca, bc], [ab, bc, ca]]);
        }
        faces = next;
    }
    faces
        .iter()
        .enumerate()
        .map(|(i, f)| Triangle {
            vertices: f.map(|k| verts[k] * radius_m),
            surface: i as u32,
        })
        .collect()
}
