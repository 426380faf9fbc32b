//! Planar polygons: normal and area (Newell's method), planarity, and ear-clipping
//! triangulation of convex and non-convex simple polygons.

use glam::{DVec2, DVec3};

/// Largest distance in metres a vertex may lie from its polygon's plane.
pub const PLANARITY_TOLERANCE_M: f64 = 1e-3;

/// Smallest polygon area in m² that is not treated as degenerate.
pub const MIN_AREA_M2: f64 = 1e-8;

/// Newell's vector of a polygon: its direction is the normal given by the
/// vertex order (right-hand rule) and its length twice the area (Newell's
/// method; Sutherland, Sproull & Schumacker, Computing Surveys 6 (1974)).
#[must_use]
pub fn newell_vector(vertices: &[DVec3]) -> DVec3 {
    let n = vertices.len();
    let mut sum = DVec3::ZERO;
    for i in 0..n {
        let a = vertices[i];
        let b = vertices[(i + 1) % n];
        sum += a.cross(b);
    }
    sum
}

/// Area in m² of a planar polygon.
#[must_use]
pub fn area_m2(vertices: &[DVec3]) -> f64 {
    0.5 * newell_vector(vertices).length()
}

/// Largest distance in metres of a vertex from the plane through the vertex
/// centroid with the Newell normal; `None` for a zero-area polygon.
#[must_use]
pub fn plane_deviation_m(vertices: &[DVec3]) -> Option<f64> {
    let normal = newell_vector(vertices).try_normalize()?;
    let centroid = vertices.iter().copied().sum::<DVec3>() / vertices.len() as f64;
    Some(
        vertices
            .iter()
            .map(|v| (*v - centroid).dot(normal).abs())
            .fold(0.0, f64::max),
    )
}

/// Why a polygon could not be triangulated.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum TriangulationError {
    /// Zero area: no normal to project along.
    #[error("the polygon has zero area")]
    ZeroArea,
    /// No ear found: edges cross each other or the polygon folds onto itself.
    #[error("the polygon cannot be split into triangles: its edges cross or it folds onto itself; give it as a simple polygon (edges meeting only at shared corners)")]
    NotSimple,
}

/// Splits a planar simple polygon (convex or not) into triangles by ear
/// clipping (Meisters, Amer. Math. Monthly 82 (1975)). Returns triples of
/// indices into `vertices`, each ordered like the polygon, so every triangle's
/// normal points the same way as [`newell_vector`]. Collinear vertices are kept
/// as corners of neighbouring triangles.
pub fn triangulate(vertices: &[DVec3]) -> Result<Vec<[usize; 3]>, TriangulationError> {
    let normal = newell_vector(vertices)
        .try_normalize()
        .ok_or(TriangulationError::ZeroArea)?;
    let points = project_to_plane(vertices, normal);
    let scale = bounding_size(&points).max(1e-12);
    // Twice-area threshold below which an ear counts as flat.
    let flat = 1e-12 * scale * scale;
    if edges_cross(&points, flat) {
        return Err(TriangulationError::NotSimple);
    }

    let mut remaining: Vec<usize> = (0..vertices.len()).collect();
    let mut triangles = Vec::with_capacity(vertices.len().saturating_sub(2));
    while remaining.len() > 3 {
        let n = remaining.len();
        let ear = (0..n).find(|&i| {
            let (a, b, c) = (
                remaining[(i + n - 1) % n],
                remaining[i],
                remaining[(i + 1) % n],
            );
            is_ear(&points, &remaining, a, b, c, flat)
        });
        let Some(i) = ear else {
            // Only flat corners left (all remaining vertices collinear) means
            // the rest has no area: done. Anything else is not simple.
            if remaining_is_flat(&points, &remaining, flat) {
                return Ok(triangles);
            }
            return Err(TriangulationError::NotSimple);
        };
        triangles.push([
            remaining[(i + n - 1) % n],
            remaining[i],
            remaining[(i + 1) % n],
        ]);
        remaining.remove(i);
    }
    if cross2(
        points[remaining[1]] - points[remaining[0]],
        points[remaining[2]] - points[remaining[0]],
    ) > flat
    {
        triangles.push([remaining[0], remaining[1], remaining[2]]);
    }
    Ok(triangles)
}

/// Projects onto the polygon's plane in a 2D frame where the polygon runs
/// counter-clockwise.
fn project_to_plane(vertices: &[DVec3], normal: DVec3) -> Vec<DVec2> {
    let u = normal.any_orthonormal_vector();
    let v = normal.cross(u);
    vertices
        .iter()
        .map(|p| DVec2::new(p.dot(u), p.dot(v)))
        .collect()
}

/// Whether two non-adjacent edges of the closed 2D polygon cross or touch.
fn edges_cross(points: &[DVec2], flat: f64) -> bool {
    let n = points.len();
    let side = |a: DVec2, b: DVec2, p: DVec2| {
        let c = cross2(b - a, p - a);
        if c > flat {
            1
        } else if c < -flat {
            -1
        } else {
            0
        }
    };
    let on_segment = |a: DVec2, b: DVec2, p: DVec2| {
        p.x >= a.x.min(b.x) && p.x <= a.x.max(b.x) && p.y >= a.y.min(b.y) && p.y <= a.y.max(b.y)
    };
    for i in 0..n {
        let (a, b) = (points[i], points[(i + 1) % n]);
        for j in (i + 2)..n {
            if (j + 1) % n == i {
                continue;
            }
            let (c, d) = (points[j], points[(j + 1) % n]);
            let (d1, d2) = (side(a, b, c), side(a, b, d));
            let (d3, d4) = (side(c, d, a), side(c, d, b));
            if d1 * d2 < 0 && d3 * d4 < 0 {
                return true;
            }
            // Touching: a vertex of one edge lying on the other (collinear case).
            if (d1 == 0 && on_segment(a, b, c) && c != a && c != b)
                || (d2 == 0 && on_segment(a, b, d) && d != a && d != b)
                || (d3 == 0 && on_segment(c, d, a) && a != c && a != d)
                || (d4 == 0 && on_segment(c, d, b) && b != c && b != d)
            {
                return true;
            }
        }
    }
    false
}

fn bounding_size(points: &[DVec2]) -> f64 {
    let min = points.iter().copied().fold(DVec2::INFINITY, DVec2::min);
    let max = points.iter().copied().fold(DVec2::NEG_INFINITY, DVec2::max);
    (max - min).max_element()
}

fn cross2(a: DVec2, b: DVec2) -> f64 {
    a.x * b.y - a.y * b.x
}

/// A strictly convex corner b (between a and c) whose triangle holds no other
/// remaining vertex (on its boundary counts as inside, except copies of a, b, c).
fn is_ear(points: &[DVec2], remaining: &[usize], a: usize, b: usize, c: usize, flat: f64) -> bool {
    let (pa, pb, pc) = (points[a], points[b], points[c]);
    if cross2(pb - pa, pc - pa) <= flat {
        return false;
    }
    remaining.iter().all(|&k| {
        if k == a || k == b || k == c {
            return true;
        }
        let p = points[k];
        if p == pa || p == pb || p == pc {
            return true;
        }
        !(cross2(pb - pa, p - pa) >= -flat
            && cross2(pc - pb, p - pb) >= -flat
            && cross2(pa - pc, p - pc) >= -flat)
    })
}

fn remaining_is_flat(points: &[DVec2], remaining: &[usize], flat: f64) -> bool {
    let n = remaining.len();
    let twice_area: f64 = (0..n)
        .map(|i| cross2(points[remaining[i]], points[remaining[(i + 1) % n]]))
        .sum();
    twice_area.abs() <= flat * n as f64
}

#[cfg(test)]
mod tests {
    use super::*;

    fn total_area(vertices: &[DVec3], tris: &[[usize; 3]]) -> f64 {
        tris.iter()
            .map(|t| {
                0.5 * (vertices[t[1]] - vertices[t[0]])
                    .cross(vertices[t[2]] - vertices[t[0]])
                    .length()
            })
            .sum()
    }

    #[test]
    fn l_shape_triangulates_to_its_area_with_consistent_normals() {
        // L shape in the plane z = 1: a 3 x 3 square less a 2 x 2 corner, area 5 m².
        let l: Vec<DVec3> = [[0., 0.], [3., 0.], [3., 1.], [1., 1.], [1., 3.], [0., 3.]]
            .iter()
            .map(|p| DVec3::new(p[0], p[1], 1.0))
            .collect();
        let tris = triangulate(&l).unwrap();
        assert_eq!(tris.len(), 4);
        assert!((total_area(&l, &tris) - 5.0).abs() < 1e-12);
        assert!((area_m2(&l) - 5.0).abs() < 1e-12);
        for t in &tris {
            let n = (l[t[1]] - l[t[0]]).cross(l[t[2]] - l[t[0]]);
            assert!(n.z > 0.0, "triangle {t:?} flipped");
        }
    }

    #[test]
    fn collinear_vertices_are_kept() {
        // Rectangle 2 x 1 with an extra vertex in the middle of the bottom edge.
        let r: Vec<DVec3> = [[0., 0.], [1., 0.], [2., 0.], [2., 1.], [0., 1.]]
            .iter()
            .map(|p| DVec3::new(p[0], 0.0, p[1]))
            .collect();
        let tris = triangulate(&r).unwrap();
        assert!((total_area(&r, &tris) - 2.0).abs() < 1e-12);
        assert!(tris.iter().any(|t| t.contains(&1)));
    }

    #[test]
    fn bow_tie_is_rejected() {
        let b: Vec<DVec3> = [[0., 0.], [2., 2.], [2., 0.], [0., 2.]]
            .iter()
            .map(|p| DVec3::new(p[0], p[1], 0.0))
            .collect();
        // A bow tie's Newell area is zero (the two lobes cancel).
        assert_eq!(triangulate(&b), Err(TriangulationError::ZeroArea));
        let b2: Vec<DVec3> = [[0., 0.], [3., 3.], [3., 0.], [0., 1.]]
            .iter()
            .map(|p| DVec3::new(p[0], p[1], 0.0))
            .collect();
        assert_eq!(triangulate(&b2), Err(TriangulationError::NotSimple));
    }

    #[test]
    fn planarity_deviation() {
        let q = [
            DVec3::new(0., 0., 0.),
            DVec3::new(1., 0., 0.),
            DVec3::new(1., 1., 0.01),
            DVec3::new(0., 1., 0.),
        ];
        let d = plane_deviation_m(&q).unwrap();
        // Symmetric warp: every corner sits 0.01/4 m from the mean plane.
        assert!((d - 0.0025).abs() < 1e-4, "{d}");
    }
}
