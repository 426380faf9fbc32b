//! Point queries against a triangle mesh: inside or outside (winding number),
//! distance to the nearest triangle, and the first triangle along a ray.

use glam::DVec3;

/// Generalized winding number of `point` with respect to triangles: the sum of
/// their signed solid angles over 4π (Van Oosterom & Strackee, IEEE Trans.
/// Biomed. Eng. 30 (1983) for the solid angle; Jacobson et al., SIGGRAPH 2013
/// for the winding number). For a closed mesh whose normals point away from
/// the enclosed space it is 1 inside and 0 outside; with polaray's inward
/// normals it is −1 inside.
#[must_use]
pub fn winding_number(point: DVec3, triangles: &[[DVec3; 3]]) -> f64 {
    let mut total = 0.0;
    for t in triangles {
        let a = t[0] - point;
        let b = t[1] - point;
        let c = t[2] - point;
        let (la, lb, lc) = (a.length(), b.length(), c.length());
        let numerator = a.dot(b.cross(c));
        let denominator = la * lb * lc + a.dot(b) * lc + a.dot(c) * lb + b.dot(c) * la;
        total += 2.0 * numerator.atan2(denominator);
    }
    total / (4.0 * std::f64::consts::PI)
}

/// Whether `point` lies inside a closed mesh whose normals point into the room
/// (winding number −1; obstacles inside the room bring it back to 0).
#[must_use]
pub fn is_inside_room(point: DVec3, triangles: &[[DVec3; 3]]) -> bool {
    winding_number(point, triangles) < -0.5
}

/// Distance in metres from `p` to the closest point of triangle `t`
/// (Ericson, Real-Time Collision Detection, 2005, §5.1.5).
#[must_use]
pub fn distance_to_triangle_m(p: DVec3, t: &[DVec3; 3]) -> f64 {
    closest_point_on_triangle(p, t).distance(p)
}

fn closest_point_on_triangle(p: DVec3, t: &[DVec3; 3]) -> DVec3 {
    let [a, b, c] = *t;
    let ab = b - a;
    let ac = c - a;
    let ap = p - a;
    let d1 = ab.dot(ap);
    let d2 = ac.dot(ap);
    if d1 <= 0.0 && d2 <= 0.0 {
        return a;
    }
    let bp = p - b;
    let d3 = ab.dot(bp);
    let d4 = ac.dot(bp);
    if d3 >= 0.0 && d4 <= d3 {
        return b;
    }
    let vc = d1 * d4 - d3 * d2;
    if vc <= 0.0 && d1 >= 0.0 && d3 <= 0.0 {
        return a + ab * (d1 / (d1 - d3));
    }
    let cp = p - c;
    let d5 = ab.dot(cp);
    let d6 = ac.dot(cp);
    if d6 >= 0.0 && d5 <= d6 {
        return c;
    }
    let vb = d5 * d2 - d1 * d6;
    if vb <= 0.0 && d2 >= 0.0 && d6 <= 0.0 {
        return a + ac * (d2 / (d2 - d6));
    }
    let va = d3 * d6 - d5 * d4;
    if va <= 0.0 && (d4 - d3) >= 0.0 && (d5 - d6) >= 0.0 {
        return b + (c - b) * ((d4 - d3) / ((d4 - d3) + (d5 - d6)));
    }
    let denom = 1.0 / (va + vb + vc);
    a + ab * (vb * denom) + ac * (vc * denom)
}

/// Nearest triangle along a ray from `origin` in unit direction `dir`:
/// (distance in metres, triangle index). Möller & Trumbore, JGT 2(1), 1997.
#[must_use]
pub fn first_hit(origin: DVec3, dir: DVec3, triangles: &[[DVec3; 3]]) -> Option<(f64, usize)> {
    let mut best: Option<(f64, usize)> = None;
    for (i, t) in triangles.iter().enumerate() {
        let e1 = t[1] - t[0];
        let e2 = t[2] - t[0];
        let p = dir.cross(e2);
        let det = e1.dot(p);
        if det.abs() < 1e-14 {
            continue;
        }
        let inv = 1.0 / det;
        let s = origin - t[0];
        let u = s.dot(p) * inv;
        if !(0.0..=1.0).contains(&u) {
            continue;
        }
        let q = s.cross(e1);
        let v = dir.dot(q) * inv;
        if v < 0.0 || u + v > 1.0 {
            continue;
        }
        let d = e2.dot(q) * inv;
        if d > 1e-9 && best.is_none_or(|(bd, _)| d < bd) {
            best = Some((d, i));
        }
    }
    best
}

/// `n` unit directions spread evenly over the sphere (Fibonacci lattice),
/// deterministic; used to probe what a point sees.
#[must_use]
pub fn probe_directions(n: usize) -> Vec<DVec3> {
    let golden = std::f64::consts::PI * (3.0 - 5f64.sqrt());
    (0..n)
        .map(|i| {
            let z = 1.0 - (2.0 * i as f64 + 1.0) / n as f64;
            let r = (1.0 - z * z).sqrt();
            let phi = golden * i as f64;
            DVec3::new(r * phi.cos(), r * phi.sin(), z)
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Tetrahedron with normals pointing into it (polaray convention).
    fn tetra() -> Vec<[DVec3; 3]> {
        let o = DVec3::ZERO;
        let x = DVec3::X;
        let y = DVec3::Y;
        let z = DVec3::Z;
        vec![[o, x, y], [o, z, x], [o, y, z], [x, z, y]]
    }

    #[test]
    fn winding_number_inside_and_outside() {
        let t = tetra();
        assert!((winding_number(DVec3::splat(0.2), &t) + 1.0).abs() < 1e-12);
        assert!(winding_number(DVec3::splat(2.0), &t).abs() < 1e-12);
        assert!(is_inside_room(DVec3::new(0.1, 0.1, 0.1), &t));
        assert!(!is_inside_room(DVec3::new(-0.1, 0.1, 0.1), &t));
    }

    #[test]
    fn distance_to_face_edge_and_corner() {
        let t = [DVec3::ZERO, DVec3::X, DVec3::Y];
        assert!((distance_to_triangle_m(DVec3::new(0.2, 0.2, 0.5), &t) - 0.5).abs() < 1e-12);
        assert!((distance_to_triangle_m(DVec3::new(0.5, -1.0, 0.0), &t) - 1.0).abs() < 1e-12);
        assert!((distance_to_triangle_m(DVec3::new(-3.0, -4.0, 0.0), &t) - 5.0).abs() < 1e-12);
    }

    #[test]
    fn first_hit_finds_nearest() {
        let t = vec![
            [
                DVec3::new(-1., -1., 2.),
                DVec3::new(1., -1., 2.),
                DVec3::new(0., 1., 2.),
            ],
            [
                DVec3::new(-1., -1., 1.),
                DVec3::new(1., -1., 1.),
                DVec3::new(0., 1., 1.),
            ],
        ];
        let (d, i) = first_hit(DVec3::ZERO, DVec3::Z, &t).unwrap();
        assert_eq!(i, 1);
        assert!((d - 1.0).abs() < 1e-12);
        assert!(first_hit(DVec3::ZERO, -DVec3::Z, &t).is_none());
    }
}
