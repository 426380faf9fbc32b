//! Shared benchmark scenes: a 30 × 20 × 12 m hall of 2,004 triangles (closed
//! box, raked rows of seat blocks standing on the floor, tilted reflector
//! panels) and a
//! 12-triangle shoebox, plus deterministic incoherent rays inside them.
//!
//! Use with `mod common;` from a bench, or
//! `#[path = "../benches/common/mod.rs"] mod common;` from a test.
//! Triangle normals (v1 − v0) × (v2 − v0) point into the air; every
//! rectangular face is one surface (two triangles, one surface index).
#![allow(dead_code)]

use std::f64::consts::TAU;

use glam::DVec3;
use polaray::random::Stream;
use polaray::room::Triangle;

/// Hall size, metres (x, y, z).
pub const HALL_SIZE_M: DVec3 = DVec3::new(30.0, 20.0, 12.0);
/// Shoebox size, metres (x, y, z).
pub const SHOEBOX_SIZE_M: DVec3 = DVec3::new(20.0, 12.0, 8.0);

/// A ray: origin (m) and unit direction.
#[derive(Clone, Copy, Debug)]
pub struct Ray {
    /// Start point, metres.
    pub origin: DVec3,
    /// Unit direction.
    pub direction: DVec3,
}

/// A solid box with orthonormal, right-handed axes.
#[derive(Clone, Copy, Debug)]
pub struct OrientedBox {
    /// Centre, metres.
    pub center: DVec3,
    /// Unit axes (a0 × a1 = a2).
    pub axes: [DVec3; 3],
    /// Half extents along the axes, metres.
    pub half_m: DVec3,
}

impl OrientedBox {
    /// An axis-aligned box between two corners.
    pub fn aligned(min: DVec3, max: DVec3) -> Self {
        Self {
            center: (min + max) * 0.5,
            axes: [DVec3::X, DVec3::Y, DVec3::Z],
            half_m: (max - min) * 0.5,
        }
    }

    /// A box turned by `angle_rad` about one world axis (0 = x, 1 = y, 2 = z).
    pub fn turned(center: DVec3, half_m: DVec3, axis: usize, angle_rad: f64) -> Self {
        let (s, c) = angle_rad.sin_cos();
        let rotate = |v: DVec3| match axis {
            0 => DVec3::new(v.x, c * v.y - s * v.z, s * v.y + c * v.z),
            1 => DVec3::new(c * v.x + s * v.z, v.y, -s * v.x + c * v.z),
            _ => DVec3::new(c * v.x - s * v.y, s * v.x + c * v.y, v.z),
        };
        Self {
            center,
            axes: [rotate(DVec3::X), rotate(DVec3::Y), rotate(DVec3::Z)],
            half_m,
        }
    }

    /// Whether `p` lies inside or on the box.
    pub fn contains(&self, p: DVec3) -> bool {
        let d = p - self.center;
        (0..3).all(|k| d.dot(self.axes[k]).abs() <= self.half_m[k])
    }

    /// The faces as triangles, two per face, normals pointing out of the box
    /// when `outward`, into it otherwise; the bottom face (−z side of the
    /// third axis) is left out when `with_bottom` is false (a block standing
    /// on the floor). Faces get surfaces `first_surface`, `first_surface + 1`, …
    pub fn triangles(
        &self,
        outward: bool,
        with_bottom: bool,
        first_surface: u32,
        out: &mut Vec<Triangle>,
    ) {
        let h = self.half_m.to_array();
        let mut face = 0;
        for k in 0..3 {
            for sign in [1.0, -1.0] {
                if k == 2 && sign < 0.0 && !with_bottom {
                    continue;
                }
                // (u, v, n) right-handed with n the outward face normal.
                let (iu, iv) = if sign > 0.0 {
                    ((k + 1) % 3, (k + 2) % 3)
                } else {
                    ((k + 2) % 3, (k + 1) % 3)
                };
                let n = self.axes[k] * sign;
                let u = self.axes[iu] * h[iu];
                let v = self.axes[iv] * h[iv];
                let c = self.center + n * h[k];
                let mut quad = [c - u - v, c + u - v, c + u + v, c - u + v];
                if !outward {
                    quad.reverse();
                }
                let surface = first_surface + face;
                out.push(Triangle {
                    vertices: [quad[0], quad[1], quad[2]],
                    surface,
                });
                out.push(Triangle {
                    vertices: [quad[0], quad[2], quad[3]],
                    surface,
                });
                face += 1;
            }
        }
    }
}

/// Number of seat blocks in [`hall_solids`] (they come first).
pub const HALL_SEAT_BLOCKS: usize = 12 * 14;

/// The solids in the hall: 12 raked rows of 14 seat blocks standing on the
/// floor, then 26 tilted reflector panels (14 under the ceiling, 6 on each
/// side wall).
pub fn hall_solids() -> Vec<OrientedBox> {
    let mut solids = Vec::new();
    for row in 0..12 {
        let x0 = 8.0 + 1.75 * row as f64;
        let top_m = 0.9 + 0.12 * row as f64;
        for seat in 0..14 {
            let y0 = 1.0 + 1.28 * seat as f64;
            solids.push(OrientedBox::aligned(
                DVec3::new(x0, y0, 0.0),
                DVec3::new(x0 + 0.8, y0 + 1.1, top_m),
            ));
        }
    }
    for y in [6.0, 14.0] {
        for i in 0..7 {
            let x = 4.0 + 3.5 * i as f64;
            solids.push(OrientedBox::turned(
                DVec3::new(x, y, 10.0),
                DVec3::new(1.5, 1.0, 0.025),
                1,
                15f64.to_radians(),
            ));
        }
    }
    for (y, angle) in [(1.0, 20.0), (19.0, -20.0)] {
        for i in 0..6 {
            let x = 4.0 + 4.4 * i as f64;
            solids.push(OrientedBox::turned(
                DVec3::new(x, y, 5.0),
                DVec3::new(1.25, 0.025, 0.75),
                2,
                f64::to_radians(angle),
            ));
        }
    }
    solids
}

/// The hall: 12 triangles of the enclosing box (normals inward), 10 per
/// seat block (no bottom: the floor closes it) and 12 per reflector panel
/// (normals outward), 2,004 in all; each face is one surface.
pub fn hall() -> Vec<Triangle> {
    let mut out = Vec::new();
    OrientedBox::aligned(DVec3::ZERO, HALL_SIZE_M).triangles(false, true, 0, &mut out);
    let mut surface = 6;
    for (i, solid) in hall_solids().iter().enumerate() {
        let with_bottom = i >= HALL_SEAT_BLOCKS;
        solid.triangles(true, with_bottom, surface, &mut out);
        surface += if with_bottom { 6 } else { 5 };
    }
    out
}

/// The shoebox: 12 triangles, normals inward.
pub fn shoebox() -> Vec<Triangle> {
    let mut out = Vec::new();
    OrientedBox::aligned(DVec3::ZERO, SHOEBOX_SIZE_M).triangles(false, true, 0, &mut out);
    out
}

/// A uniformly distributed unit vector from two uniform numbers.
pub fn uniform_direction(u: f64, v: f64) -> DVec3 {
    let z = 1.0 - 2.0 * u;
    let r = (1.0 - z * z).max(0.0).sqrt();
    let (s, c) = (TAU * v).sin_cos();
    DVec3::new(r * c, r * s, z)
}

/// `count` rays with origins uniform in the air of a box room of `size_m`
/// (outside every solid) and uniform directions; ray i uses stream (seed, i).
pub fn rays_in(size_m: DVec3, solids: &[OrientedBox], count: usize, seed: u64) -> Vec<Ray> {
    (0..count)
        .map(|i| {
            let mut s = Stream::new(seed, i as u64);
            let origin = loop {
                let p = DVec3::new(s.uniform(), s.uniform(), s.uniform()) * size_m;
                if !solids.iter().any(|b| b.contains(p)) {
                    break p;
                }
            };
            let direction = uniform_direction(s.uniform(), s.uniform());
            Ray { origin, direction }
        })
        .collect()
}

/// Incoherent rays in the hall's air.
pub fn hall_rays(count: usize, seed: u64) -> Vec<Ray> {
    rays_in(HALL_SIZE_M, &hall_solids(), count, seed)
}

/// Incoherent rays in the shoebox.
pub fn shoebox_rays(count: usize, seed: u64) -> Vec<Ray> {
    rays_in(SHOEBOX_SIZE_M, &[], count, seed)
}
