//! Ray–triangle acceleration: a bounding volume hierarchy over the room's triangles.
//!
//! The public interface is [`Bvh::build`], [`Bvh::closest_hit`] and
//! [`Bvh::occluded`], plus [`Bvh::closest_hit_leaving`] and
//! [`Bvh::occluded_leaving`] for rays that start on a surface. Everything is
//! in metres; directions are unit vectors (distances are then in metres).
//!
//! Inside: a 4-wide tree built by binned SAH ([`build`]), f32 child boxes
//! tested four at a time with a conservative slab test, and exact f64
//! watertight triangle tests, two triangles at a time in two f64 lanes
//! ([`traverse`], [`triangle`]). A ray never slips between two
//! triangles that share an edge or a vertex, and the distances are exactly
//! those of the scalar f64 test.
//!
//! Rays that start on a surface: pass that surface's index to the
//! `*_leaving` queries. A planar surface cannot be hit again by a ray that
//! leaves it, so skipping it is exact, needs no offset of the origin, and
//! cannot let the ray escape through a neighbouring surface.

mod build;
mod node;
mod traverse;
mod triangle;

use glam::DVec3;

use crate::room::Triangle;
use node::Node4;
use traverse::Skip;
use triangle::TrianglePair;

/// The nearest intersection along a ray.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Hit {
    /// Distance from the ray origin, metres.
    pub distance_m: f64,
    /// Index of the triangle hit, into the slice given to [`Bvh::build`].
    pub triangle: u32,
}

/// A bounding volume hierarchy over triangles; shareable between threads.
pub struct Bvh {
    nodes: Vec<Node4>,
    pairs: Vec<TrianglePair>,
    triangle_count: usize,
}

impl Bvh {
    /// Builds the hierarchy (binned SAH; about a second per million triangles
    /// on one core). Triangle indices in [`Hit`] refer to `triangles`.
    ///
    /// # Panics
    /// With 2^27 (134 million) triangles or more.
    #[must_use]
    pub fn build(triangles: &[Triangle]) -> Self {
        let built = build::build(triangles);
        Self {
            nodes: built.nodes,
            pairs: built.pairs,
            triangle_count: triangles.len(),
        }
    }

    /// Number of triangles in the hierarchy.
    #[must_use]
    pub fn triangle_count(&self) -> usize {
        self.triangle_count
    }

    /// Closest hit with distance in (0, `max_distance_m`), if any.
    /// Triangles are two-sided; a ray in a triangle's plane misses it.
    #[must_use]
    pub fn closest_hit(&self, origin: DVec3, direction: DVec3, max_distance_m: f64) -> Option<Hit> {
        self.closest(origin, direction, max_distance_m, Skip::NONE)
    }

    /// Like [`Bvh::closest_hit`] for a ray that starts on surface
    /// `surface` (the [`Triangle::surface`] index) and leaves it: that
    /// surface's triangles are skipped, so the ray cannot hit its own
    /// starting point again.
    #[must_use]
    pub fn closest_hit_leaving(
        &self,
        origin: DVec3,
        direction: DVec3,
        max_distance_m: f64,
        surface: u32,
    ) -> Option<Hit> {
        self.closest(origin, direction, max_distance_m, Skip(surface))
    }

    /// Whether any triangle lies on the open segment from `origin` to
    /// `origin + direction · distance_m`.
    #[must_use]
    pub fn occluded(&self, origin: DVec3, direction: DVec3, distance_m: f64) -> bool {
        traverse::any(
            &self.nodes,
            &self.pairs,
            origin,
            direction,
            distance_m,
            Skip::NONE,
        )
    }

    /// Like [`Bvh::occluded`] for a segment that starts on surface
    /// `surface`, whose triangles are skipped.
    #[must_use]
    pub fn occluded_leaving(
        &self,
        origin: DVec3,
        direction: DVec3,
        distance_m: f64,
        surface: u32,
    ) -> bool {
        traverse::any(
            &self.nodes,
            &self.pairs,
            origin,
            direction,
            distance_m,
            Skip(surface),
        )
    }

    fn closest(&self, origin: DVec3, direction: DVec3, max_m: f64, skip: Skip) -> Option<Hit> {
        debug_assert!(direction.is_finite() && direction != DVec3::ZERO);
        traverse::closest(&self.nodes, &self.pairs, origin, direction, max_m, skip).map(
            |(t, triangle)| Hit {
                distance_m: t,
                triangle,
            },
        )
    }
}
