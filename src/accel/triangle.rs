//! Watertight ray–triangle intersection in f64 (Woop, Benthin & Wald,
//! "Watertight Ray/Triangle Intersection", JCGT 2(1), 2013).
//!
//! The ray is sheared so that it runs along +Z through the origin; each
//! triangle edge then gets a 2D edge function computed from the two
//! transformed end points only. A neighbour that shares the edge computes
//! exactly the negated value (same products, swapped operands), so a ray
//! through a shared edge is accepted by at least one of the two triangles:
//! no gaps between adjacent triangles, whatever the rounding.

use glam::DVec3;

/// Per-ray constants of the watertight test.
#[derive(Clone, Copy, Debug)]
pub(crate) struct ShearedRay {
    origin: [f64; 3],
    /// Axis of the largest direction component (the new Z) and the other two,
    /// swapped when that component is negative to keep the winding.
    kx: usize,
    ky: usize,
    kz: usize,
    /// Shear constants Sx = dx/dz, Sy = dy/dz, Sz = 1/dz.
    sx: f64,
    sy: f64,
    sz: f64,
}

impl ShearedRay {
    /// Prepares the test for a ray with a non-zero, finite `direction`.
    pub(crate) fn new(origin: DVec3, direction: DVec3) -> Self {
        let d = direction.to_array();
        let a = direction.abs();
        let kz = if a.x >= a.y && a.x >= a.z {
            0
        } else if a.y >= a.z {
            1
        } else {
            2
        };
        let mut kx = (kz + 1) % 3;
        let mut ky = (kx + 1) % 3;
        if d[kz] < 0.0 {
            std::mem::swap(&mut kx, &mut ky);
        }
        Self {
            origin: origin.to_array(),
            kx,
            ky,
            kz,
            sx: d[kx] / d[kz],
            sy: d[ky] / d[kz],
            sz: 1.0 / d[kz],
        }
    }
}

/// A triangle as stored in the leaves: the original corners (never
/// precomputed edges, which would break watertightness), its index in the
/// caller's slice and its surface.
#[derive(Clone, Copy, Debug)]
pub(crate) struct LeafTriangle {
    pub(crate) vertices: [[f64; 3]; 3],
    pub(crate) index: u32,
    pub(crate) surface: u32,
}

impl LeafTriangle {
    /// Ray parameter t of the hit if 0 < t < `t_max`. Edge and vertex hits
    /// count (edge functions equal to zero are accepted); a ray in the plane
    /// of the triangle (determinant zero) misses.
    #[inline]
    pub(crate) fn intersect(&self, ray: &ShearedRay, t_max: f64) -> Option<f64> {
        let o = ray.origin;
        let [p0, p1, p2] = self.vertices;
        let a = [p0[0] - o[0], p0[1] - o[1], p0[2] - o[2]];
        let b = [p1[0] - o[0], p1[1] - o[1], p1[2] - o[2]];
        let c = [p2[0] - o[0], p2[1] - o[1], p2[2] - o[2]];
        let (kx, ky, kz) = (ray.kx, ray.ky, ray.kz);

        // Shear and scale the vertices into ray space (Woop et al. 2013, fig. 6).
        let ax = a[kx] - ray.sx * a[kz];
        let ay = a[ky] - ray.sy * a[kz];
        let bx = b[kx] - ray.sx * b[kz];
        let by = b[ky] - ray.sy * b[kz];
        let cx = c[kx] - ray.sx * c[kz];
        let cy = c[ky] - ray.sy * c[kz];

        // Scaled barycentric coordinates: one 2D edge function per edge.
        let u = cx * by - cy * bx;
        let v = ax * cy - ay * cx;
        let w = bx * ay - by * ax;
        if (u < 0.0 || v < 0.0 || w < 0.0) && (u > 0.0 || v > 0.0 || w > 0.0) {
            return None;
        }
        let det = u + v + w;
        if det == 0.0 {
            return None;
        }

        // Scaled hit distance, then the one division.
        let az = ray.sz * a[kz];
        let bz = ray.sz * b[kz];
        let cz = ray.sz * c[kz];
        let t = (u * az + v * bz + w * cz) / det;
        (t > 0.0 && t < t_max).then_some(t)
    }
}
