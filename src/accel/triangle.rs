//! Watertight ray–triangle intersection in f64 (Woop, Benthin & Wald,
//! "Watertight Ray/Triangle Intersection", JCGT 2(1), 2013).
//!
//! The ray is sheared so that it runs along +Z through the origin; each
//! triangle edge then gets a 2D edge function computed from the two
//! transformed end points only. A neighbour that shares the edge computes
//! exactly the negated value (same products, swapped operands), so a ray
//! through a shared edge is accepted by at least one of the two triangles:
//! no gaps between adjacent triangles, whatever the rounding.
//!
//! The axis permutation of the shear depends on the ray only: the test
//! reads each vertex coordinate through the ray's axis indices (plain
//! indexed loads, no branches on the permutation). Leaves store triangles in
//! pairs, coordinates interleaved, so two triangles are tested with the same
//! instructions in two f64 lanes; each lane computes exactly what the scalar
//! test computes (same operations in the same order).

use glam::DVec3;

use crate::lanes::F2;
use crate::room::Triangle;

/// A coordinate axis; as an index it is known to be below 3.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[repr(usize)]
pub(crate) enum Axis {
    X = 0,
    Y = 1,
    Z = 2,
}

impl Axis {
    const ALL: [Self; 3] = [Self::X, Self::Y, Self::Z];
}

/// Per-ray constants of the watertight test.
#[derive(Clone, Copy, Debug)]
pub(crate) struct ShearedRay {
    /// The origin's coordinates in the order (kx, ky, kz).
    origin: [f64; 3],
    /// The axis of the largest direction component (the new Z) and the other
    /// two, swapped when that component is negative to keep the winding.
    kx: Axis,
    ky: Axis,
    kz: Axis,
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
        // The axis of the largest component becomes z; kx, ky follow it
        // cyclically, swapped when that component is negative to keep the winding.
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
        let o = origin.to_array();
        debug_assert!(kx < 3 && ky < 3 && kz < 3);
        Self {
            origin: [o[kx], o[ky], o[kz]],
            kx: Axis::ALL[kx],
            ky: Axis::ALL[ky],
            kz: Axis::ALL[kz],
            sx: d[kx] / d[kz],
            sy: d[ky] / d[kz],
            sz: 1.0 / d[kz],
        }
    }
}

/// Per-ray constants of the pair test, splatted to both lanes.
#[derive(Clone, Copy)]
pub(crate) struct PairRay {
    kx: Axis,
    ky: Axis,
    kz: Axis,
    origin: [F2; 3],
    sx: F2,
    sy: F2,
    sz: F2,
}

impl PairRay {
    #[inline(always)]
    pub(crate) fn new(ray: &ShearedRay) -> Self {
        Self {
            kx: ray.kx,
            ky: ray.ky,
            kz: ray.kz,
            origin: ray.origin.map(F2::splat),
            sx: F2::splat(ray.sx),
            sy: F2::splat(ray.sy),
            sz: F2::splat(ray.sz),
        }
    }
}

/// Two triangles as stored in the leaves, coordinates interleaved by lane:
/// `vertices[corner][axis]` holds that coordinate of both. The original
/// corners, never precomputed edges (which would break watertightness). A
/// leaf with an odd count repeats its last triangle in lane 1, which never
/// counts: a later lane must be strictly nearer.
#[derive(Clone, Copy, Debug)]
#[repr(C, align(16))]
pub(crate) struct TrianglePair {
    vertices: [[[f64; 2]; 3]; 3],
    /// Index of each lane's triangle in the caller's slice.
    pub(crate) index: [u32; 2],
    /// Surface of each lane's triangle.
    surface: [u32; 2],
}

impl TrianglePair {
    /// The pair of triangles `first` and `second` (indices into `triangles`).
    pub(crate) fn new(triangles: &[Triangle], first: u32, second: u32) -> Self {
        let [a, b] = [first, second].map(|i| &triangles[i as usize]);
        Self {
            vertices: std::array::from_fn(|corner| {
                std::array::from_fn(|axis| [a.vertices[corner][axis], b.vertices[corner][axis]])
            }),
            index: [first, second],
            surface: [a.surface, b.surface],
        }
    }

    /// The nearer hit of the two triangles with 0 < t < `t_max`, as (t,
    /// lane), skipping triangles of surface `skip`; lane 0 wins ties. Edge
    /// and vertex hits count (edge functions equal to zero are accepted); a
    /// ray in the plane of a triangle (determinant zero) misses it.
    #[inline(always)]
    pub(crate) fn intersect(&self, ray: &PairRay, t_max: f64, skip: u32) -> Option<(f64, usize)> {
        let corner = |c: usize| {
            let v = &self.vertices[c];
            (
                F2::load(&v[ray.kx as usize]).sub(ray.origin[0]),
                F2::load(&v[ray.ky as usize]).sub(ray.origin[1]),
                F2::load(&v[ray.kz as usize]).sub(ray.origin[2]),
            )
        };
        // Vertices relative to the origin, then sheared and scaled into ray
        // space (Woop et al. 2013, fig. 6).
        let (a_x, a_y, a_z) = corner(0);
        let (b_x, b_y, b_z) = corner(1);
        let (c_x, c_y, c_z) = corner(2);
        let ax = a_x.sub(ray.sx.mul(a_z));
        let ay = a_y.sub(ray.sy.mul(a_z));
        let bx = b_x.sub(ray.sx.mul(b_z));
        let by = b_y.sub(ray.sy.mul(b_z));
        let cx = c_x.sub(ray.sx.mul(c_z));
        let cy = c_y.sub(ray.sy.mul(c_z));

        // Scaled barycentric coordinates: one 2D edge function per edge; a
        // lane misses when they have both signs.
        let u = cx.mul(by).sub(cy.mul(bx));
        let v = ax.mul(cy).sub(ay.mul(cx));
        let w = bx.mul(ay).sub(by.mul(ax));
        let zero = F2::splat(0.0);
        let negative = u.lt_mask(zero) | v.lt_mask(zero) | w.lt_mask(zero);
        let positive = zero.lt_mask(u) | zero.lt_mask(v) | zero.lt_mask(w);
        let skipped =
            u32::from(self.surface[0] == skip) | (u32::from(self.surface[1] == skip) << 1);
        let mut lanes = !(negative & positive) & !skipped & 0b11;
        if lanes == 0 {
            return None;
        }
        let det = u.add(v).add(w);
        lanes &= det.ne_mask(zero);

        // Scaled hit distance, then the one division.
        let az = ray.sz.mul(a_z);
        let bz = ray.sz.mul(b_z);
        let cz = ray.sz.mul(c_z);
        let t = u.mul(az).add(v.mul(bz)).add(w.mul(cz)).div(det);
        lanes &= zero.lt_mask(t) & t.lt_mask(F2::splat(t_max));
        if lanes == 0 {
            return None;
        }
        // Lane 1 wins when lane 0 misses or is farther (bit operations, not
        // branches: which lane hits is random).
        let [t0, t1] = t.to_array();
        let lane = ((lanes >> 1) & ((!lanes & 1) | u32::from(t1 < t0))) as usize;
        Some((t.to_array()[lane], lane))
    }
}
