//! Traversal of the 4-wide tree: a conservative f32 slab test of four child
//! boxes at once, nearest-first order for closest hits, early exit for
//! occlusion, exact f64 triangle tests in the leaves.

use std::mem::MaybeUninit;

use glam::DVec3;

use super::node::{f32_down, f32_up, ChildRef, Node4};
use super::triangle::{LeafTriangle, ShearedRay};

/// Stack capacity. The build bounds the binary depth (SAH up to depth 40,
/// then median halving, at most 27 more levels for 2^27 triangles); each
/// wide level pushes at most 3 entries, so 3 × 67 + 4 < 256.
const STACK: usize = 256;

/// Relative widening of the far slab distance that absorbs the rounding of
/// the f32 slab test: computed distances are within γ₄ = 4u/(1 − 4u) of the
/// exact ones (u = 2⁻²⁴: one subtraction, the rounded reciprocal, one
/// product), so far × (1 + 2γ₄) ≥ exact near whenever exact near ≤ exact
/// far. Ize, "Robust BVH Ray Traversal", JCGT 2(2), 2013; 5 ulp ≥ 2γ₄.
const FAR_SCALE: f32 = 1.0 + 5.0 * f32::EPSILON;

/// Per-ray constants of the slab test.
///
/// For each axis the near plane is the box minimum for a non-negative
/// direction component and the maximum otherwise. The origin is rounded to
/// f32 in the direction that can only move the near distance down and the
/// far distance up, so the f32 test never rejects a box the f64 ray enters.
struct BoxRay {
    near_row: [usize; 3],
    far_row: [usize; 3],
    origin_near: [f32; 3],
    origin_far: [f32; 3],
    inv_dir: [f32; 3],
}

impl BoxRay {
    fn new(origin: DVec3, direction: DVec3) -> Self {
        let mut r = Self {
            near_row: [0; 3],
            far_row: [0; 3],
            origin_near: [0.0; 3],
            origin_far: [0.0; 3],
            inv_dir: [0.0; 3],
        };
        for a in 0..3 {
            let d = direction[a];
            let o = origin[a];
            // A finite reciprocal even for d = ±0 keeps (plane − origin) × inv
            // free of 0 × ∞ = NaN; the sign of zero picks the near plane.
            let inv = (1.0 / d) as f32;
            let inv = if inv.is_finite() {
                inv
            } else {
                f32::MAX.copysign(inv)
            };
            let positive = !d.is_sign_negative();
            r.inv_dir[a] = inv;
            if positive {
                r.near_row[a] = a;
                r.far_row[a] = a + 3;
                r.origin_near[a] = f32_up(o);
                r.origin_far[a] = f32_down(o);
            } else {
                r.near_row[a] = a + 3;
                r.far_row[a] = a;
                r.origin_near[a] = f32_down(o);
                r.origin_far[a] = f32_up(o);
            }
        }
        r
    }

    /// Entry distances of the four children and a bit mask of those whose
    /// box the ray enters within [0, `t_max`].
    #[inline]
    fn test(&self, node: &Node4, t_max: f32) -> ([f32; 4], u32) {
        #[cfg(target_arch = "x86_64")]
        {
            self.test_sse(node, t_max)
        }
        #[cfg(not(target_arch = "x86_64"))]
        {
            self.test_scalar(node, t_max)
        }
    }

    #[cfg(target_arch = "x86_64")]
    #[inline]
    fn test_sse(&self, node: &Node4, t_max: f32) -> ([f32; 4], u32) {
        use std::arch::x86_64::*;
        // SAFETY: SSE2 is part of the x86_64 baseline; every load reads one
        // [f32; 4] row of `node.bounds` (unaligned load, in bounds).
        unsafe {
            let row = |r: usize| _mm_loadu_ps(node.bounds[r].as_ptr());
            let slab = |r: usize, o: f32, inv: f32| {
                _mm_mul_ps(_mm_sub_ps(row(r), _mm_set1_ps(o)), _mm_set1_ps(inv))
            };
            let nx = slab(self.near_row[0], self.origin_near[0], self.inv_dir[0]);
            let ny = slab(self.near_row[1], self.origin_near[1], self.inv_dir[1]);
            let nz = slab(self.near_row[2], self.origin_near[2], self.inv_dir[2]);
            let fx = slab(self.far_row[0], self.origin_far[0], self.inv_dir[0]);
            let fy = slab(self.far_row[1], self.origin_far[1], self.inv_dir[1]);
            let fz = slab(self.far_row[2], self.origin_far[2], self.inv_dir[2]);
            let near = _mm_max_ps(_mm_max_ps(nx, ny), _mm_max_ps(nz, _mm_setzero_ps()));
            let far = _mm_mul_ps(_mm_min_ps(_mm_min_ps(fx, fy), fz), _mm_set1_ps(FAR_SCALE));
            let far = _mm_min_ps(far, _mm_set1_ps(t_max));
            let mask = _mm_movemask_ps(_mm_cmple_ps(near, far)) as u32;
            let mut out = [0.0f32; 4];
            _mm_storeu_ps(out.as_mut_ptr(), near);
            (out, mask)
        }
    }

    /// Same test lane by lane (other architectures, and a cross-check).
    #[cfg_attr(target_arch = "x86_64", allow(dead_code))]
    fn test_scalar(&self, node: &Node4, t_max: f32) -> ([f32; 4], u32) {
        let mut near_out = [0.0f32; 4];
        let mut mask = 0;
        for (lane, near_slot) in near_out.iter_mut().enumerate() {
            let mut near = 0.0f32;
            let mut far = f32::INFINITY;
            for a in 0..3 {
                let n =
                    (node.bounds[self.near_row[a]][lane] - self.origin_near[a]) * self.inv_dir[a];
                let f = (node.bounds[self.far_row[a]][lane] - self.origin_far[a]) * self.inv_dir[a];
                near = if n > near { n } else { near };
                far = if f < far { f } else { far };
            }
            let far = (far * FAR_SCALE).min(t_max);
            *near_slot = near;
            if near <= far {
                mask |= 1 << lane;
            }
        }
        (near_out, mask)
    }
}

/// Which triangles a query skips: those of one surface (the one a ray
/// leaves), or none.
#[derive(Clone, Copy)]
pub(crate) struct Skip(pub(crate) u32);

impl Skip {
    pub(crate) const NONE: Self = Self(u32::MAX);
}

/// Closest hit: (t, leaf triangle position) with 0 < t < `t_max`.
pub(crate) fn closest(
    nodes: &[Node4],
    triangles: &[LeafTriangle],
    origin: DVec3,
    direction: DVec3,
    t_max: f64,
    skip: Skip,
) -> Option<(f64, usize)> {
    if nodes.is_empty() || t_max.is_nan() || t_max <= 0.0 {
        return None;
    }
    let box_ray = BoxRay::new(origin, direction);
    let tri_ray = ShearedRay::new(origin, direction);
    let mut best_t = t_max;
    let mut best_t32 = f32_up(best_t);
    let mut best: Option<usize> = None;

    // Left uninitialized: zeroing 2 KiB per ray costs more than a shallow
    // traversal; only entries below `sp` are ever read.
    let mut stack = [MaybeUninit::<(ChildRef, f32)>::uninit(); STACK];
    let mut sp = 0usize;
    let mut current = ChildRef::inner(0);
    loop {
        if current.is_leaf() {
            for k in current.leaf_range() {
                let tri = &triangles[k];
                if tri.surface == skip.0 {
                    continue;
                }
                if let Some(t) = tri.intersect(&tri_ray, best_t) {
                    best_t = t;
                    best_t32 = f32_up(t);
                    best = Some(k);
                }
            }
        } else {
            let node = &nodes[current.0 as usize];
            let (near, mask) = box_ray.test(node, best_t32);
            match mask.count_ones() {
                0 => {}
                1 => {
                    current = node.children[mask.trailing_zeros() as usize];
                    continue;
                }
                _ => {
                    // Sort the entered children by entry distance, push all
                    // but the nearest (farthest first) and descend into it.
                    let mut hits = [(0.0f32, ChildRef::EMPTY); 4];
                    let mut n = 0;
                    let mut m = mask;
                    while m != 0 {
                        let lane = m.trailing_zeros() as usize;
                        m &= m - 1;
                        let entry = (near[lane], node.children[lane]);
                        // Insertion keeps equal distances in lane order.
                        let mut j = n;
                        while j > 0 && hits[j - 1].0 > entry.0 {
                            hits[j] = hits[j - 1];
                            j -= 1;
                        }
                        hits[j] = entry;
                        n += 1;
                    }
                    for k in (1..n).rev() {
                        stack[sp] = MaybeUninit::new((hits[k].1, hits[k].0));
                        sp += 1;
                    }
                    current = hits[0].1;
                    continue;
                }
            }
        }
        // Pop the next child still nearer than the best hit.
        loop {
            if sp == 0 {
                return best.map(|k| (best_t, k));
            }
            sp -= 1;
            // SAFETY: entries 0..sp were written by the push above.
            let (child, entry) = unsafe { stack[sp].assume_init() };
            if entry <= best_t32 {
                current = child;
                break;
            }
        }
    }
}

/// Whether any triangle is hit with 0 < t < `t_max`.
pub(crate) fn any(
    nodes: &[Node4],
    triangles: &[LeafTriangle],
    origin: DVec3,
    direction: DVec3,
    t_max: f64,
    skip: Skip,
) -> bool {
    if nodes.is_empty() || t_max.is_nan() || t_max <= 0.0 {
        return false;
    }
    let box_ray = BoxRay::new(origin, direction);
    let tri_ray = ShearedRay::new(origin, direction);
    let t_max32 = f32_up(t_max);
    let mut stack = [MaybeUninit::<ChildRef>::uninit(); STACK];
    let mut sp = 0usize;
    let mut current = ChildRef::inner(0);
    loop {
        if current.is_leaf() {
            for k in current.leaf_range() {
                let tri = &triangles[k];
                if tri.surface != skip.0 && tri.intersect(&tri_ray, t_max).is_some() {
                    return true;
                }
            }
        } else {
            let node = &nodes[current.0 as usize];
            let (_, mask) = box_ray.test(node, t_max32);
            if mask != 0 {
                let mut m = mask;
                let first = m.trailing_zeros() as usize;
                m &= m - 1;
                while m != 0 {
                    stack[sp] = MaybeUninit::new(node.children[m.trailing_zeros() as usize]);
                    sp += 1;
                    m &= m - 1;
                }
                current = node.children[first];
                continue;
            }
        }
        if sp == 0 {
            return false;
        }
        sp -= 1;
        // SAFETY: entries 0..sp were written by the push above.
        current = unsafe { stack[sp].assume_init() };
    }
}
