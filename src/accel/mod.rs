//! Ray–triangle acceleration: a bounding volume hierarchy over the room's triangles.
//!
//! The public interface is [`Bvh::build`], [`Bvh::closest_hit`] and
//! [`Bvh::occluded`]; everything is in metres, directions are unit vectors.

use glam::DVec3;

use crate::room::Triangle;

/// The nearest intersection along a ray.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Hit {
    /// Distance from the ray origin, metres.
    pub distance_m: f64,
    /// Index of the triangle hit, into the slice given to [`Bvh::build`].
    pub triangle: u32,
}

/// A bounding volume hierarchy over triangles.
///
/// PLACEHOLDER: brute force until the accel work lands; same interface.
pub struct Bvh {
    triangles: Vec<Triangle>,
}

impl Bvh {
    /// Builds the hierarchy.
    #[must_use]
    pub fn build(triangles: &[Triangle]) -> Self {
        Self {
            triangles: triangles.to_vec(),
        }
    }

    /// Closest hit with distance in (0, `max_distance_m`), if any.
    #[must_use]
    pub fn closest_hit(&self, origin: DVec3, direction: DVec3, max_distance_m: f64) -> Option<Hit> {
        let mut best: Option<Hit> = None;
        let mut t_max = max_distance_m;
        for (i, tri) in self.triangles.iter().enumerate() {
            if let Some(t) = intersect(tri, origin, direction, t_max) {
                t_max = t;
                best = Some(Hit {
                    distance_m: t,
                    triangle: i as u32,
                });
            }
        }
        best
    }

    /// Whether any triangle lies on the open segment from `origin` to
    /// `origin + direction · distance_m`.
    #[must_use]
    pub fn occluded(&self, origin: DVec3, direction: DVec3, distance_m: f64) -> bool {
        self.triangles
            .iter()
            .any(|t| intersect(t, origin, direction, distance_m).is_some())
    }
}

/// Möller–Trumbore ray–triangle intersection (Möller & Trumbore, JGT 2(1), 1997).
fn intersect(tri: &Triangle, o: DVec3, d: DVec3, t_max: f64) -> Option<f64> {
    let [v0, v1, v2] = tri.vertices;
    let e1 = v1 - v0;
    let e2 = v2 - v0;
    let p = d.cross(e2);
    let det = e1.dot(p);
    if det.abs() < 1e-14 {
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
    (t > 1e-9 && t < t_max).then_some(t)
}
