//! Construction: a binary tree by binned surface area heuristic (SAH), then
//! collapsed into a 4-wide tree stored depth-first in one array.
//!
//! Binned SAH: Wald, "On fast Construction of SAH-based Bounding Volume
//! Hierarchies", IEEE Symposium on Interactive Ray Tracing 2007. Collapsing a
//! binary tree into a wide one by opening the child of largest surface area:
//! common practice (e.g. Wald, Benthin & Boulos, "Getting Rid of Packets",
//! IEEE RT 2008), no single source.

use glam::DVec3;

use super::node::{ChildRef, Node4, WideBox};
use super::triangle::TrianglePair;
use crate::lanes::F2;
use crate::room::Triangle;

/// Most SAH bins per axis (nodes of fewer triangles use one bin per
/// triangle, at least two).
const BINS: usize = 32;
/// Leaves hold at most this many triangles (the 4-bit count in [`ChildRef`]
/// allows up to 16). 4 measured best on the hall bench, by a few percent
/// over 2, 8 and 16.
const MAX_LEAF: usize = 4;
/// SAH cost of visiting a node relative to one triangle test. Tuned on the
/// hall benchmark (benches/bvh.rs).
const NODE_COST: f64 = 1.0;
/// SAH cost of one triangle test.
const TRIANGLE_COST: f64 = 1.0;
/// Below this depth SAH chooses splits; deeper, the object median on the
/// longest axis halves the count, which bounds the depth (and so the
/// traversal stack) for pathological inputs.
const SAH_DEPTH: usize = 40;

/// An axis-aligned box in f64. Each corner is stored as two pairs of lanes,
/// (x, y) and (z, z), so that growing a box takes four two-lane operations.
#[derive(Clone, Copy, Debug)]
#[repr(C, align(16))]
pub(crate) struct Aabb {
    min: [[f64; 2]; 2],
    max: [[f64; 2]; 2],
}

/// A point as two pairs of lanes, (x, y) and (z, z).
fn lanes(p: DVec3) -> [[f64; 2]; 2] {
    [[p.x, p.y], [p.z, p.z]]
}

impl Aabb {
    const EMPTY: Self = Self {
        min: [[f64::INFINITY; 2]; 2],
        max: [[f64::NEG_INFINITY; 2]; 2],
    };

    /// Grows the box to contain `other` (coordinates are never NaN: the
    /// room loader rejects non-finite vertices).
    #[inline]
    fn grow(&mut self, other: &Self) {
        for h in 0..2 {
            self.min[h] = F2::load(&self.min[h])
                .min(F2::load(&other.min[h]))
                .to_array();
            self.max[h] = F2::load(&self.max[h])
                .max(F2::load(&other.max[h]))
                .to_array();
        }
    }

    #[inline]
    fn grow_point(&mut self, p: DVec3) {
        let p = lanes(p);
        self.grow(&Self { min: p, max: p });
    }

    fn min(&self) -> DVec3 {
        DVec3::new(self.min[0][0], self.min[0][1], self.min[1][0])
    }

    fn max(&self) -> DVec3 {
        DVec3::new(self.max[0][0], self.max[0][1], self.max[1][0])
    }

    /// Half the surface area (enough for SAH ratios); 0 for an empty box.
    fn half_area(&self) -> f64 {
        let e = self.max() - self.min();
        if e.x < 0.0 {
            0.0
        } else {
            e.x * e.y + e.y * e.z + e.z * e.x
        }
    }
}

/// A node of the intermediate binary tree.
#[derive(Clone, Copy, Debug)]
struct BinaryNode {
    bounds: Aabb,
    /// Leaf: first triangle in `order` and count. Inner: children indices.
    kind: BinaryKind,
}

#[derive(Clone, Copy, Debug)]
enum BinaryKind {
    Leaf { start: usize, count: usize },
    Inner { left: usize, right: usize },
}

/// Everything the build makes: the wide nodes (root at 0; empty when there
/// are no triangles) and the leaves' triangle pairs.
pub(crate) struct Built {
    pub(crate) nodes: Vec<Node4>,
    pub(crate) pairs: Vec<TrianglePair>,
}

/// Builds the tree over `triangles`.
///
/// # Panics
/// With more than 2^27 triangles (the leaf encoding's limit).
pub(crate) fn build(triangles: &[Triangle]) -> Built {
    assert!(
        triangles.len() < ChildRef::MAX_START as usize,
        "Bvh::build: {} triangles exceed the limit of {}",
        triangles.len(),
        ChildRef::MAX_START
    );
    if triangles.is_empty() {
        return Built {
            nodes: Vec::new(),
            pairs: Vec::new(),
        };
    }
    let prims: Vec<Prim> = triangles.iter().map(Prim::new).collect();
    let mut order: Vec<u32> = (0..triangles.len() as u32).collect();
    let mut binary = Vec::with_capacity(2 * triangles.len() / 2 + 1);
    let mut builder = BinaryBuilder {
        prims: &prims,
        nodes: &mut binary,
        bins: Vec::with_capacity(3 * BINS),
    };
    let root = builder.build(&mut order, 0, 0);

    let mut collapser = Collapser {
        binary: &binary,
        order: &order,
        triangles,
        nodes: Vec::with_capacity(binary.len() / 2 + 1),
        pairs: Vec::with_capacity(triangles.len() / 2 + 1),
    };
    collapser.collapse(root);
    Built {
        nodes: collapser.nodes,
        pairs: collapser.pairs,
    }
}

/// Bounds and centroid of one triangle (centroid lanes as in [`Aabb`]).
struct Prim {
    bounds: Aabb,
    centroid: [[f64; 2]; 2],
}

impl Prim {
    fn new(t: &Triangle) -> Self {
        let mut bounds = Aabb::EMPTY;
        for v in t.vertices {
            bounds.grow_point(v);
        }
        Self {
            bounds,
            centroid: lanes((bounds.min() + bounds.max()) * 0.5),
        }
    }
}

/// Where centroids fall into `bins` bins per axis: bin = ⌊(c − lo) · scale⌋,
/// clamped into range, for the three axes at once.
struct Binning {
    lo: [[f64; 2]; 2],
    scale: [[f64; 2]; 2],
    bins: usize,
}

impl Binning {
    /// Bins over the centroid bounds `centroids`; an axis where they all
    /// coincide puts everything in bin 0.
    fn new(centroids: &Aabb, bins: usize) -> Self {
        let extent = centroids.max() - centroids.min();
        let scale = DVec3::select(extent.cmpgt(DVec3::ZERO), bins as f64 / extent, DVec3::ZERO);
        Self {
            lo: centroids.min,
            scale: lanes(scale),
            bins,
        }
    }

    /// The bin of `centroid` along x, y and z.
    #[inline]
    fn of(&self, centroid: &[[f64; 2]; 2]) -> [usize; 3] {
        let bin = |h: usize| {
            F2::load(&centroid[h])
                .sub(F2::load(&self.lo[h]))
                .mul(F2::load(&self.scale[h]))
                .to_i32()
        };
        let ([x, y], [z, _]) = (bin(0), bin(1));
        let last = self.bins as i32 - 1;
        [x, y, z].map(|b| b.clamp(0, last) as usize)
    }
}

struct BinaryBuilder<'a> {
    prims: &'a [Prim],
    nodes: &'a mut Vec<BinaryNode>,
    /// Scratch space for the SAH bins: bounds and triangle count.
    bins: Vec<(Aabb, usize)>,
}

/// A chosen split: axis and the first bin of the right side, or a plain
/// cut of the index range in the middle.
enum Split {
    Bin {
        axis: usize,
        bin: usize,
        bins: usize,
    },
    Median {
        axis: usize,
    },
}

impl BinaryBuilder<'_> {
    /// Builds the subtree over `order` (a sub-slice of the global order that
    /// starts at `offset`) and returns its node index.
    fn build(&mut self, order: &mut [u32], offset: usize, depth: usize) -> usize {
        let mut bounds = Aabb::EMPTY;
        let mut centroids = Aabb::EMPTY;
        for &i in order.iter() {
            let p = &self.prims[i as usize];
            bounds.grow(&p.bounds);
            centroids.grow(&Aabb {
                min: p.centroid,
                max: p.centroid,
            });
        }
        let n = order.len();
        let index = self.nodes.len();
        self.nodes.push(BinaryNode {
            bounds,
            kind: BinaryKind::Leaf {
                start: offset,
                count: n,
            },
        });
        // Two triangles are one pair test however they are split.
        if n <= 2 {
            return index;
        }

        let split = if depth < SAH_DEPTH {
            match self.best_sah_split(order, &bounds, &centroids) {
                Some((split, cost)) => {
                    let leaf_cost = TRIANGLE_COST * n as f64;
                    if cost >= leaf_cost && n <= MAX_LEAF {
                        return index;
                    }
                    split
                }
                // All centroids coincide: no bin separates them.
                None if n <= MAX_LEAF => return index,
                None => Split::Median {
                    axis: longest_axis(&centroids),
                },
            }
        } else if n <= MAX_LEAF {
            return index;
        } else {
            Split::Median {
                axis: longest_axis(&centroids),
            }
        };

        let mid = match split {
            Split::Bin { axis, bin, bins } => {
                let binning = Binning::new(&centroids, bins);
                let prims = self.prims;
                partition(order, |i| {
                    binning.of(&prims[i as usize].centroid)[axis] < bin
                })
            }
            Split::Median { axis } => {
                let prims = self.prims;
                let mid = n / 2;
                let coordinate = |i: u32| {
                    let c = &prims[i as usize].centroid;
                    [c[0][0], c[0][1], c[1][0]][axis]
                };
                order.select_nth_unstable_by(mid, |&a, &b| {
                    let ca = coordinate(a);
                    let cb = coordinate(b);
                    ca.total_cmp(&cb).then(a.cmp(&b))
                });
                mid
            }
        };
        debug_assert!(mid > 0 && mid < n);
        let (left_order, right_order) = order.split_at_mut(mid);
        let left = self.build(left_order, offset, depth + 1);
        let right = self.build(right_order, offset + mid, depth + 1);
        self.nodes[index].kind = BinaryKind::Inner { left, right };
        index
    }

    /// The cheapest binned split over the three axes with its SAH cost
    /// (in triangle-test units, relative to the parent's area), or `None`
    /// if the centroids are all at one point.
    fn best_sah_split(
        &mut self,
        order: &[u32],
        bounds: &Aabb,
        centroids: &Aabb,
    ) -> Option<(Split, f64)> {
        let parent_area = bounds.half_area();
        let n = order.len();
        let bins = n.clamp(2, BINS);
        // Bin along all three axes in one pass over the triangles.
        let extent = centroids.max() - centroids.min();
        let binning = Binning::new(centroids, bins);
        // Bin b of an axis is slot axis·bins + b of the scratch space.
        let scratch = &mut self.bins;
        scratch.clear();
        scratch.resize(3 * bins, (Aabb::EMPTY, 0));
        for &i in order {
            let p = &self.prims[i as usize];
            for (axis, b) in binning.of(&p.centroid).into_iter().enumerate() {
                let slot = &mut scratch[axis * bins + b];
                slot.0.grow(&p.bounds);
                slot.1 += 1;
            }
        }
        let mut best: Option<(Split, f64)> = None;
        for axis in 0..3 {
            if extent[axis] <= 0.0 {
                continue;
            }
            let axis_bins = &scratch[axis * bins..(axis + 1) * bins];
            // Sweep from the right: area × count of bins b.. for each b.
            let mut right_cost = [0.0; BINS];
            let mut acc = Aabb::EMPTY;
            let mut count = 0;
            for b in (1..bins).rev() {
                acc.grow(&axis_bins[b].0);
                count += axis_bins[b].1;
                right_cost[b] = acc.half_area() * count as f64;
            }
            let mut acc = Aabb::EMPTY;
            let mut count = 0;
            for b in 1..bins {
                acc.grow(&axis_bins[b - 1].0);
                count += axis_bins[b - 1].1;
                if count == 0 || count == n {
                    continue;
                }
                let cost = NODE_COST
                    + TRIANGLE_COST * (acc.half_area() * count as f64 + right_cost[b])
                        / parent_area.max(f64::MIN_POSITIVE);
                if best.as_ref().is_none_or(|(_, c)| cost < *c) {
                    best = Some((Split::Bin { axis, bin: b, bins }, cost));
                }
            }
        }
        best
    }
}

fn longest_axis(b: &Aabb) -> usize {
    let e = b.max() - b.min();
    if e.x >= e.y && e.x >= e.z {
        0
    } else if e.y >= e.z {
        1
    } else {
        2
    }
}

/// Moves the items for which `left` holds to the front, keeping a
/// deterministic order; returns how many there are.
fn partition(order: &mut [u32], left: impl Fn(u32) -> bool) -> usize {
    let mut i = 0;
    let mut j = order.len();
    while i < j {
        if left(order[i]) {
            i += 1;
        } else {
            j -= 1;
            order.swap(i, j);
        }
    }
    i
}

/// Turns the binary tree into the wide one.
struct Collapser<'a> {
    binary: &'a [BinaryNode],
    /// Triangle indices in leaf order.
    order: &'a [u32],
    triangles: &'a [Triangle],
    nodes: Vec<Node4>,
    pairs: Vec<TrianglePair>,
}

impl Collapser<'_> {
    /// Writes the wide node for binary node `b` and its subtree depth-first;
    /// returns its index in `nodes`.
    fn collapse(&mut self, b: usize) -> u32 {
        let binary = self.binary;
        let index = self.nodes.len();
        self.nodes.push(Node4::EMPTY);

        // Open the inner child of largest area until there are four children.
        let mut children: Vec<usize> = match binary[b].kind {
            BinaryKind::Inner { left, right } => vec![left, right],
            BinaryKind::Leaf { .. } => vec![b],
        };
        while children.len() < 4 {
            let candidate = children
                .iter()
                .enumerate()
                .filter(|(_, &c)| matches!(binary[c].kind, BinaryKind::Inner { .. }))
                .max_by(|(_, &x), (_, &y)| {
                    binary[x]
                        .bounds
                        .half_area()
                        .total_cmp(&binary[y].bounds.half_area())
                })
                .map(|(slot, _)| slot);
            let Some(slot) = candidate else { break };
            let BinaryKind::Inner { left, right } = binary[children[slot]].kind else {
                unreachable!("filtered to inner nodes")
            };
            children[slot] = left;
            children.insert(slot + 1, right);
        }

        let mut node = Node4::EMPTY;
        for (slot, &c) in children.iter().enumerate() {
            let bounds = binary[c].bounds;
            node.set_box(slot, &WideBox::outward(bounds.min(), bounds.max()));
            node.children[slot] = match binary[c].kind {
                BinaryKind::Leaf { start, count } => self.leaf(start, count),
                BinaryKind::Inner { .. } => ChildRef::inner(self.collapse(c)),
            };
        }
        self.nodes[index] = node;
        index as u32
    }

    /// Stores the triangles `order[start..start + count]` as pairs (the last
    /// one repeated when the count is odd) and returns the leaf's reference.
    fn leaf(&mut self, start: usize, count: usize) -> ChildRef {
        let first = self.pairs.len();
        for two in self.order[start..start + count].chunks(2) {
            let second = *two.last().expect("chunks are never empty");
            self.pairs
                .push(TrianglePair::new(self.triangles, two[0], second));
        }
        ChildRef::leaf(first as u32, (self.pairs.len() - first) as u32)
    }
}
