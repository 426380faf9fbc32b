//! Traversal of the 4-wide tree: a conservative f32 slab test of four child
//! boxes at once, nearest-first order for closest hits, early exit for
//! occlusion, exact f64 triangle tests in the leaves.

use std::mem::MaybeUninit;

use glam::DVec3;

use super::node::{ChildRef, Node4};
use super::triangle::{PairRay, ShearedRay, TrianglePair};
use crate::lanes::F4;

/// Stack capacity. The build bounds the binary depth (SAH up to depth 40,
/// then median halving, at most 27 more levels for 2^27 triangles); each
/// wide level pushes at most 3 entries, so 3 × 67 + 4 < 256.
const STACK: usize = 256;

/// Relative widening, 1 + 2⁻²⁰ (8 single-precision epsilons), of the far
/// slab distances and of the distance limit. It absorbs the rounding of the
/// f32 slab test: a computed near distance is at most (1 + u)³ times the
/// exact one and a computed far distance at least (1 − u)³ · W times the
/// exact one (u = 2⁻²⁴: the subtraction, the rounded reciprocal, the
/// product), so computed near ≤ computed far whenever exact near ≤ exact
/// far. Ize, "Robust BVH Ray Traversal", JCGT 2(2), 2013.
const WIDEN: f64 = 1.0 + 1.0 / (1u64 << 20) as f64;

/// One f32 rounding step relative to the value (rounding to nearest moves a
/// value by at most half a step), plus an absolute step far below any
/// coordinate that matters: moving a coordinate by this much before rounding
/// to f32 keeps the rounded value on the chosen side.
const NUDGE_REL: f64 = f32::EPSILON as f64;
const NUDGE_ABS: f64 = 1e-30;

/// An f32 not below `x` (at most about two f32 steps above it), without
/// branches: the nudge exceeds half a step, so rounding to nearest cannot
/// fall back below `x`.
#[inline(always)]
fn f32_at_or_above(x: f64) -> f32 {
    (x + (x.abs() * NUDGE_REL + NUDGE_ABS)).max(-f64::from(f32::MAX)) as f32
}

/// An f32 not above `x` (at most about two f32 steps below it).
#[inline(always)]
fn f32_at_or_below(x: f64) -> f32 {
    (x - (x.abs() * NUDGE_REL + NUDGE_ABS)).min(f64::from(f32::MAX)) as f32
}

/// A distance limit in f32 not below `t · WIDEN` (+∞ stays +∞): what a
/// computed near distance is compared with.
#[inline(always)]
fn widened_limit(t: f64) -> f32 {
    (t * WIDEN) as f32
}

/// (`up`, `down`) for a non-negative direction component, (`down`, `up`)
/// for a negative one, chosen with bit masks: the sign of a random direction
/// is a branch no predictor can learn.
#[inline(always)]
fn by_sign(negative: bool, up: f32, down: f32) -> (f32, f32) {
    let pick_down = u32::from(negative).wrapping_neg();
    let (u, d) = (up.to_bits(), down.to_bits());
    (
        f32::from_bits((d & pick_down) | (u & !pick_down)),
        f32::from_bits((u & pick_down) | (d & !pick_down)),
    )
}

/// Per-ray constants of the slab test, splatted to four lanes.
///
/// For each axis the near plane is the box minimum for a non-negative
/// direction component and the maximum otherwise. The origin is rounded to
/// f32 in the direction that can only move the near distance down and the
/// far distance up, and the far reciprocal is widened by [`WIDEN`], so the
/// f32 test never rejects a box the f64 ray enters.
struct SlabRay {
    /// Whether the direction component is negative (sign bit set), per axis.
    negative: [bool; 3],
    origin_near: [F4; 3],
    origin_far: [F4; 3],
    inv_near: [F4; 3],
    inv_far: [F4; 3],
}

impl SlabRay {
    #[inline(always)]
    fn new(origin: DVec3, direction: DVec3) -> Self {
        let axis = |a: usize| {
            let d = direction[a];
            let o = origin[a];
            // 1/±0 = ±∞ becomes ±f32::MAX: finite, so (plane − origin) × inv is
            // never 0 × ∞ = NaN, and the sign of zero still picks the near plane.
            let q = 1.0 / d;
            let clamp = |x: f64| (x as f32).clamp(-f32::MAX, f32::MAX);
            let negative = d.is_sign_negative();
            let (near, far) = by_sign(negative, f32_at_or_above(o), f32_at_or_below(o));
            (negative, near, far, clamp(q), clamp(q * WIDEN))
        };
        let [x, y, z] = [axis(0), axis(1), axis(2)];
        Self {
            negative: [x.0, y.0, z.0],
            origin_near: [F4::splat(x.1), F4::splat(y.1), F4::splat(z.1)],
            origin_far: [F4::splat(x.2), F4::splat(y.2), F4::splat(z.2)],
            inv_near: [F4::splat(x.3), F4::splat(y.3), F4::splat(z.3)],
            inv_far: [F4::splat(x.4), F4::splat(y.4), F4::splat(z.4)],
        }
    }

    /// Entry distances of the four children and a bit mask of those whose
    /// box the ray enters at a distance in [0, `limit`].
    #[inline(always)]
    fn test(&self, node: &Node4, limit: F4) -> (F4, u32) {
        let slab = |a: usize| {
            let n = usize::from(self.negative[a]);
            let near_row = F4::load(&node.bounds[2 * a + n]);
            let far_row = F4::load(&node.bounds[2 * a + 1 - n]);
            (
                near_row.sub(self.origin_near[a]).mul(self.inv_near[a]),
                far_row.sub(self.origin_far[a]).mul(self.inv_far[a]),
            )
        };
        let (nx, fx) = slab(0);
        let (ny, fy) = slab(1);
        let (nz, fz) = slab(2);
        let near = nx.max(ny).max(nz.max(F4::splat(0.0)));
        let far = fx.min(fy).min(fz.min(limit));
        (near, near.le_mask(far))
    }
}

/// Which triangles a query skips: those of one surface (the one a ray
/// leaves), or none.
#[derive(Clone, Copy)]
pub(crate) struct Skip(pub(crate) u32);

impl Skip {
    pub(crate) const NONE: Self = Self(u32::MAX);
}

/// A deferred child and the distance at which the ray enters its box.
#[derive(Clone, Copy)]
struct Deferred {
    child: ChildRef,
    entry: f32,
}

/// Closest hit: (t, triangle index) with 0 < t < `t_max`.
pub(crate) fn closest(
    nodes: &[Node4],
    pairs: &[TrianglePair],
    origin: DVec3,
    direction: DVec3,
    t_max: f64,
    skip: Skip,
) -> Option<(f64, u32)> {
    if nodes.is_empty() || t_max.is_nan() || t_max <= 0.0 {
        return None;
    }
    let tri_ray = PairRay::new(&ShearedRay::new(origin, direction));
    let slab_ray = SlabRay::new(origin, direction);
    let mut best_t = t_max;
    let mut limit = widened_limit(best_t);
    let mut best: Option<u32> = None;

    // Left uninitialized: zeroing 2 KiB per ray costs more than a shallow
    // traversal; only entries below `sp` are ever read.
    let mut stack = [MaybeUninit::<Deferred>::uninit(); STACK];
    let mut sp = 0usize;
    let mut current = ChildRef::inner(0);
    loop {
        if current.is_leaf() {
            for pair in &pairs[current.leaf_range()] {
                if let Some((t, lane)) = pair.intersect(&tri_ray, best_t, skip.0) {
                    best_t = t;
                    limit = widened_limit(t);
                    best = Some(pair.index[lane]);
                }
            }
        } else {
            let node = &nodes[current.0 as usize];
            let (near, mask) = slab_ray.test(node, F4::splat(limit));
            if mask != 0 {
                let near = near.to_array();
                let first = mask.trailing_zeros() as usize;
                let rest = mask & (mask - 1);
                if rest == 0 {
                    current = node.children[first];
                    continue;
                }
                let second = rest.trailing_zeros() as usize;
                if rest & (rest - 1) == 0 {
                    // Two children: defer the farther one.
                    let (go, defer) = if near[second] < near[first] {
                        (second, first)
                    } else {
                        (first, second)
                    };
                    stack[sp] = MaybeUninit::new(Deferred {
                        child: node.children[defer],
                        entry: near[defer],
                    });
                    sp += 1;
                    current = node.children[go];
                    continue;
                }
                // Three or four: sort by entry distance (equal distances keep
                // lane order), defer all but the nearest, farthest first.
                let mut order = [0usize; 4];
                let mut n = 0;
                let mut m = mask;
                while m != 0 {
                    let lane = m.trailing_zeros() as usize;
                    m &= m - 1;
                    let mut j = n;
                    while j > 0 && near[order[j - 1]] > near[lane] {
                        order[j] = order[j - 1];
                        j -= 1;
                    }
                    order[j] = lane;
                    n += 1;
                }
                for &lane in order[1..n].iter().rev() {
                    stack[sp] = MaybeUninit::new(Deferred {
                        child: node.children[lane],
                        entry: near[lane],
                    });
                    sp += 1;
                }
                current = node.children[order[0]];
                continue;
            }
        }
        // Pop the next child still nearer than the best hit.
        loop {
            if sp == 0 {
                return best.map(|k| (best_t, k));
            }
            sp -= 1;
            // SAFETY: entries 0..sp were written by the pushes above.
            let deferred = unsafe { stack[sp].assume_init() };
            if deferred.entry <= limit {
                current = deferred.child;
                break;
            }
        }
    }
}

/// Whether any triangle is hit with 0 < t < `t_max`.
pub(crate) fn any(
    nodes: &[Node4],
    pairs: &[TrianglePair],
    origin: DVec3,
    direction: DVec3,
    t_max: f64,
    skip: Skip,
) -> bool {
    if nodes.is_empty() || t_max.is_nan() || t_max <= 0.0 {
        return false;
    }
    let tri_ray = PairRay::new(&ShearedRay::new(origin, direction));
    let slab_ray = SlabRay::new(origin, direction);
    let limit = F4::splat(widened_limit(t_max));
    let mut stack = [MaybeUninit::<ChildRef>::uninit(); STACK];
    let mut sp = 0usize;
    let mut current = ChildRef::inner(0);
    loop {
        if current.is_leaf() {
            for pair in &pairs[current.leaf_range()] {
                if pair.intersect(&tri_ray, t_max, skip.0).is_some() {
                    return true;
                }
            }
        } else {
            let node = &nodes[current.0 as usize];
            let (_, mask) = slab_ray.test(node, limit);
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::accel::node::WideBox;
    use crate::random::Stream;

    #[test]
    fn slab_test_never_rejects_a_box_the_ray_enters() {
        // Conservativeness (Ize, JCGT 2(2), 2013, the property the traversal
        // relies on): rays aimed at points just inside a face of a box, from
        // near and far, at any scale, must enter its slot; the distance limit
        // just beyond the entry point must not cut it off.
        let mut s = Stream::new(77, 0);
        let coordinate = |s: &mut Stream| {
            let scale = 10f64.powi((s.next_u64() % 7) as i32 - 3);
            (s.uniform() - 0.5) * 2.0 * scale
        };
        for _ in 0..20_000 {
            let mut node = Node4::EMPTY;
            let mut boxes = Vec::new();
            for slot in 0..4 {
                let a = DVec3::new(coordinate(&mut s), coordinate(&mut s), coordinate(&mut s));
                let b = DVec3::new(coordinate(&mut s), coordinate(&mut s), coordinate(&mut s));
                // Some boxes flat along one axis, like a wall's.
                let (min, mut max) = (a.min(b), a.max(b));
                if s.uniform() < 0.3 {
                    let k = (s.next_u64() % 3) as usize;
                    max[k] = min[k];
                }
                node.set_box(slot, &WideBox::outward(min, max));
                boxes.push((min, max));
            }
            let slot = (s.next_u64() % 4) as usize;
            let (min, max) = boxes[slot];
            // A point inside the box, then pushed onto one face (just inside).
            let t = DVec3::new(s.uniform(), s.uniform(), s.uniform());
            let mut target = min + (max - min) * t;
            let axis = (s.next_u64() % 3) as usize;
            target[axis] = if s.uniform() < 0.5 {
                min[axis]
            } else {
                max[axis]
            };
            let toward = DVec3::new(s.uniform(), s.uniform(), s.uniform()) * 2.0 - DVec3::ONE;
            let reach = 10f64.powi((s.next_u64() % 6) as i32 - 2);
            let origin = target - toward.normalize_or(DVec3::X) * reach;
            let offset = target - origin;
            let distance = offset.length();
            if distance == 0.0 {
                continue;
            }
            let direction = offset / distance;
            // The limit just beyond the target; the ray enters at or before it.
            let limit = widened_limit(distance * (1.0 + 1e-12));
            let ray = SlabRay::new(origin, direction);
            let (_, mask) = ray.test(&node, F4::splat(limit));
            assert!(
                mask & (1 << slot) != 0,
                "box {min:?}..{max:?} rejected: origin {origin:?} direction {direction:?} target {target:?}"
            );
        }
    }

    #[test]
    fn rounded_coordinates_stay_on_their_side() {
        // Values near f32 steps, signs, zero, tiny and huge magnitudes.
        let mut values = vec![0.0, -0.0, 1e-300, -1e-300, 1e300, -1e300, 3.0e38, -3.0e38];
        for k in 0..2000 {
            let x = (k as f64 * 0.7310585786).sin() * 10f64.powi(k % 13 - 6);
            values.extend([x, f64::from(x as f32), f64::from(x as f32).next_up()]);
        }
        for x in values {
            let up = f32_at_or_above(x);
            let down = f32_at_or_below(x);
            assert!(
                f64::from(up) >= x && f64::from(down) <= x,
                "{x}: {down} {up}"
            );
            // Never more than a few f32 steps away (for normal magnitudes).
            if (1e-30..1e30).contains(&x.abs()) {
                assert!(f64::from(up) - x <= 3.0 * f64::from(f32::EPSILON) * x.abs());
                assert!(x - f64::from(down) <= 3.0 * f64::from(f32::EPSILON) * x.abs());
            }
        }
        assert!(f64::from(widened_limit(7.25)) >= 7.25 * (1.0 + 7.0 * f64::from(f32::EPSILON)));
        assert_eq!(widened_limit(f64::INFINITY), f32::INFINITY);
    }
}
