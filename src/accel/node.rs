//! Storage of the 4-wide tree: child boxes in f32, structure of arrays, so
//! one node's four slab tests run as four-lane vector operations.

use glam::DVec3;

/// Reference to a child: an inner node, a leaf (range of triangle pairs) or
/// an empty slot.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct ChildRef(pub(crate) u32);

impl ChildRef {
    const LEAF_BIT: u32 = 1 << 31;
    const COUNT_SHIFT: u32 = 27;
    /// First pair index must stay below this (27 bits).
    pub(crate) const MAX_START: u32 = 1 << Self::COUNT_SHIFT;
    /// An unused slot (its box is empty, so it is never entered).
    pub(crate) const EMPTY: Self = Self(u32::MAX);

    pub(crate) fn inner(node: u32) -> Self {
        debug_assert!(node < Self::LEAF_BIT);
        Self(node)
    }

    /// A leaf of 1..=16 triangle pairs starting at `start`.
    pub(crate) fn leaf(start: u32, count: u32) -> Self {
        debug_assert!(start < Self::MAX_START && (1..=16).contains(&count));
        Self(Self::LEAF_BIT | ((count - 1) << Self::COUNT_SHIFT) | start)
    }

    #[inline]
    pub(crate) fn is_leaf(self) -> bool {
        self.0 & Self::LEAF_BIT != 0
    }

    /// Range of triangle pairs (only for leaves).
    #[inline]
    pub(crate) fn leaf_range(self) -> std::ops::Range<usize> {
        let start = (self.0 & (Self::MAX_START - 1)) as usize;
        let count = ((self.0 >> Self::COUNT_SHIFT) & 0xF) as usize + 1;
        start..start + count
    }
}

/// One child box in f32, rounded outward from f64 so it always contains the
/// f64 box.
pub(crate) struct WideBox {
    min: [f32; 3],
    max: [f32; 3],
}

impl WideBox {
    pub(crate) fn outward(min: DVec3, max: DVec3) -> Self {
        Self {
            min: min.to_array().map(f32_down),
            max: max.to_array().map(f32_up),
        }
    }
}

/// Nearest f32 not above `x`.
pub(crate) fn f32_down(x: f64) -> f32 {
    let f = x as f32;
    if f as f64 > x {
        f.next_down()
    } else {
        f
    }
}

/// Nearest f32 not below `x`.
pub(crate) fn f32_up(x: f64) -> f32 {
    let f = x as f32;
    if (f as f64) < x {
        f.next_up()
    } else {
        f
    }
}

/// A node with four child slots. `bounds` holds, per axis, a row of the four
/// children's minima then a row of their maxima: x min, x max, y min, y max,
/// z min, z max. So the near row of an axis is `2·axis` or `2·axis + 1` by the
/// sign of the ray direction, and the far row is the other one (index ^ 1).
/// Empty slots have an inverted box (min +∞, max −∞) that every ray misses.
/// Aligned to a cache line: one node is two whole lines.
#[derive(Clone, Copy, Debug)]
#[repr(C, align(64))]
pub(crate) struct Node4 {
    pub(crate) bounds: [[f32; 4]; 6],
    pub(crate) children: [ChildRef; 4],
}

impl Node4 {
    pub(crate) const EMPTY: Self = Self {
        bounds: [
            [f32::INFINITY; 4],
            [f32::NEG_INFINITY; 4],
            [f32::INFINITY; 4],
            [f32::NEG_INFINITY; 4],
            [f32::INFINITY; 4],
            [f32::NEG_INFINITY; 4],
        ],
        children: [ChildRef::EMPTY; 4],
    };

    pub(crate) fn set_box(&mut self, slot: usize, b: &WideBox) {
        for axis in 0..3 {
            self.bounds[2 * axis][slot] = b.min[axis];
            self.bounds[2 * axis + 1][slot] = b.max[axis];
        }
    }
}
