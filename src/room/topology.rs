//! How the room's polygons fit together: vertex welding, shared edges
//! (closedness), connected pieces, and orientation of the normals.
//!
//! Edges are compared after welding vertices closer than [`WELD_TOLERANCE_M`]
//! and after splitting each polygon edge at the welded vertices lying on it,
//! so a wall split in two against an unsplit floor still counts as closed.

use std::collections::HashMap;

use glam::DVec3;

use super::inside;

/// Vertices closer than this (metres) are the same vertex.
pub const WELD_TOLERANCE_M: f64 = 1e-6;

/// An edge used by other than exactly two polygons.
#[derive(Clone, Debug, PartialEq)]
pub struct BadEdge {
    /// End points, metres.
    pub ends: [DVec3; 2],
    /// Polygons (indices into the input) that use it.
    pub polygons: Vec<usize>,
}

/// Two neighbouring polygons whose vertex orders disagree along their shared edge.
#[derive(Clone, Debug, PartialEq)]
pub struct Disagreement {
    /// The two polygons.
    pub polygons: [usize; 2],
    /// End points of the shared edge, metres.
    pub ends: [DVec3; 2],
}

/// What the analysis found.
#[derive(Clone, Debug, Default)]
pub struct Topology {
    /// Edges that belong to one polygon only or to more than two.
    pub bad_edges: Vec<BadEdge>,
    /// Orientation disagreements in pieces that cannot be fixed (not closed).
    pub disagreements: Vec<Disagreement>,
    /// Closed pieces whose polygons cannot be oriented consistently (one-sided surfaces).
    pub non_orientable: Vec<usize>,
    /// Polygons whose vertex order must be reversed so that every normal points
    /// into the room (only within closed, manifold, connected pieces).
    pub reverse: Vec<usize>,
    /// Number of connected pieces.
    pub pieces: usize,
}

impl Topology {
    /// Every edge is shared by exactly two polygons.
    #[must_use]
    pub fn is_closed(&self) -> bool {
        self.bad_edges.is_empty()
    }
}

/// Analyses polygons given as vertex lists (at least three vertices each,
/// non-degenerate).
#[must_use]
pub fn analyse(polygons: &[Vec<DVec3>]) -> Topology {
    let (points, loops) = weld(polygons);
    let loops = split_at_t_junctions(&points, &loops);

    // Undirected edge -> uses (polygon, runs from lower to higher vertex id).
    let mut edges: HashMap<(usize, usize), Vec<(usize, bool)>> = HashMap::new();
    for (p, l) in loops.iter().enumerate() {
        for i in 0..l.len() {
            let (a, b) = (l[i], l[(i + 1) % l.len()]);
            if a == b {
                continue;
            }
            edges
                .entry((a.min(b), a.max(b)))
                .or_default()
                .push((p, a < b));
        }
    }
    let mut sorted_edges: Vec<_> = edges.into_iter().collect();
    sorted_edges.sort_by_key(|(k, _)| *k);

    let mut topo = Topology::default();
    let mut pieces = UnionFind::new(polygons.len());
    for ((a, b), uses) in &sorted_edges {
        for w in uses.windows(2) {
            pieces.union(w[0].0, w[1].0);
        }
        if uses.len() != 2 || uses[0].0 == uses[1].0 {
            let mut polys: Vec<usize> = uses.iter().map(|u| u.0).collect();
            polys.dedup();
            topo.bad_edges.push(BadEdge {
                ends: [points[*a], points[*b]],
                polygons: polys,
            });
        }
    }

    // Group polygons by piece, in order of first polygon.
    let mut piece_of = vec![usize::MAX; polygons.len()];
    let mut members: Vec<Vec<usize>> = Vec::new();
    for p in 0..polygons.len() {
        let root = pieces.find(p);
        if piece_of[root] == usize::MAX {
            piece_of[root] = members.len();
            members.push(Vec::new());
        }
        members[piece_of[root]].push(p);
    }
    let piece_index: Vec<usize> = (0..polygons.len())
        .map(|p| piece_of[pieces.find(p)])
        .collect();
    topo.pieces = members.len();

    let mut piece_closed = vec![true; members.len()];
    for e in &topo.bad_edges {
        for &p in &e.polygons {
            piece_closed[piece_index[p]] = false;
        }
    }

    // Relative orientation by walking across manifold edges.
    let mut neighbours: Vec<Vec<(usize, bool)>> = vec![Vec::new(); polygons.len()];
    for (_, uses) in &sorted_edges {
        if uses.len() == 2 && uses[0].0 != uses[1].0 {
            // Consistent neighbours traverse the shared edge in opposite directions.
            let agree = uses[0].1 != uses[1].1;
            neighbours[uses[0].0].push((uses[1].0, agree));
            neighbours[uses[1].0].push((uses[0].0, agree));
        }
    }
    let mut flip: Vec<Option<bool>> = vec![None; polygons.len()];
    for (piece, polys) in members.iter().enumerate() {
        let start = polys[0];
        flip[start] = Some(false);
        let mut stack = vec![start];
        let mut orientable = true;
        while let Some(p) = stack.pop() {
            let fp = flip[p].unwrap_or(false);
            for &(q, agree) in &neighbours[p] {
                let want = if agree { fp } else { !fp };
                match flip[q] {
                    None => {
                        flip[q] = Some(want);
                        stack.push(q);
                    }
                    Some(fq) if fq != want => orientable = false,
                    Some(_) => {}
                }
            }
        }
        if piece_closed[piece] && !orientable {
            topo.non_orientable.push(piece);
        }
    }

    // Pieces that cannot be fixed: report disagreements in the given order.
    for ((a, b), uses) in &sorted_edges {
        if uses.len() == 2 && uses[0].0 != uses[1].0 && uses[0].1 == uses[1].1 {
            let piece = piece_index[uses[0].0];
            if !piece_closed[piece] {
                topo.disagreements.push(Disagreement {
                    polygons: [uses[0].0, uses[1].0],
                    ends: [points[*a], points[*b]],
                });
            }
        }
    }

    // Closed, orientable pieces: orient so normals point into the room. A piece
    // nested inside an odd number of other closed pieces is an obstacle whose
    // normals point away from its own inside.
    let closed_pieces: Vec<usize> = (0..members.len())
        .filter(|&k| piece_closed[k] && !topo.non_orientable.contains(&k))
        .collect();
    let oriented_triangles = |k: usize| -> Vec<[DVec3; 3]> {
        let mut tris = Vec::new();
        for &p in &members[k] {
            let v = &polygons[p];
            let rev = flip[p].unwrap_or(false);
            for i in 1..v.len() - 1 {
                if rev {
                    tris.push([v[0], v[i + 1], v[i]]);
                } else {
                    tris.push([v[0], v[i], v[i + 1]]);
                }
            }
        }
        tris
    };
    let piece_tris: HashMap<usize, Vec<[DVec3; 3]>> = closed_pieces
        .iter()
        .map(|&k| (k, oriented_triangles(k)))
        .collect();
    for &k in &closed_pieces {
        let probe = polygons[members[k][0]][0];
        let depth = closed_pieces
            .iter()
            .filter(|&&j| j != k && inside::winding_number(probe, &piece_tris[&j]).abs() > 0.5)
            .count();
        let volume = signed_volume_m3(&piece_tris[&k]);
        let want_positive = depth % 2 == 0;
        let reverse_piece = (volume > 0.0) != want_positive;
        for &p in &members[k] {
            if flip[p].unwrap_or(false) != reverse_piece {
                topo.reverse.push(p);
            }
        }
    }
    topo.reverse.sort_unstable();
    topo
}

/// Volume by the divergence theorem for triangles with normals into the
/// enclosed space (positive when they point inward), m³.
#[must_use]
pub fn signed_volume_m3(triangles: &[[DVec3; 3]]) -> f64 {
    -triangles
        .iter()
        .map(|t| t[0].dot(t[1].cross(t[2])))
        .sum::<f64>()
        / 6.0
}

/// Welds vertices closer than [`WELD_TOLERANCE_M`]; returns the points and each
/// polygon as a loop of point ids.
fn weld(polygons: &[Vec<DVec3>]) -> (Vec<DVec3>, Vec<Vec<usize>>) {
    let mut points: Vec<DVec3> = Vec::new();
    let mut cells: HashMap<[i64; 3], Vec<usize>> = HashMap::new();
    let cell_of = |p: DVec3| -> [i64; 3] {
        let q = (p / (4.0 * WELD_TOLERANCE_M)).floor();
        [q.x as i64, q.y as i64, q.z as i64]
    };
    let mut loops = Vec::with_capacity(polygons.len());
    for poly in polygons {
        let mut l = Vec::with_capacity(poly.len());
        for &p in poly {
            let c = cell_of(p);
            let mut found = None;
            'search: for dx in -1..=1 {
                for dy in -1..=1 {
                    for dz in -1..=1 {
                        if let Some(ids) = cells.get(&[c[0] + dx, c[1] + dy, c[2] + dz]) {
                            if let Some(&id) = ids
                                .iter()
                                .find(|&&id| points[id].distance(p) <= WELD_TOLERANCE_M)
                            {
                                found = Some(id);
                                break 'search;
                            }
                        }
                    }
                }
            }
            let id = found.unwrap_or_else(|| {
                points.push(p);
                cells.entry(c).or_default().push(points.len() - 1);
                points.len() - 1
            });
            l.push(id);
        }
        loops.push(l);
    }
    (points, loops)
}

/// Inserts into every polygon edge the welded points that lie on it.
fn split_at_t_junctions(points: &[DVec3], loops: &[Vec<usize>]) -> Vec<Vec<usize>> {
    let mut by_x: Vec<usize> = (0..points.len()).collect();
    by_x.sort_by(|&a, &b| points[a].x.total_cmp(&points[b].x));
    let xs: Vec<f64> = by_x.iter().map(|&i| points[i].x).collect();
    loops
        .iter()
        .map(|l| {
            let mut out = Vec::with_capacity(l.len());
            for i in 0..l.len() {
                let (a, b) = (l[i], l[(i + 1) % l.len()]);
                out.push(a);
                let (pa, pb) = (points[a], points[b]);
                let d = pb - pa;
                let len2 = d.length_squared();
                if len2 == 0.0 {
                    continue;
                }
                let lo = pa.x.min(pb.x) - WELD_TOLERANCE_M;
                let hi = pa.x.max(pb.x) + WELD_TOLERANCE_M;
                let start = xs.partition_point(|&x| x < lo);
                let mut on_edge: Vec<(f64, usize)> = Vec::new();
                for &k in &by_x[start..] {
                    let p = points[k];
                    if p.x > hi {
                        break;
                    }
                    if k == a || k == b {
                        continue;
                    }
                    let t = (p - pa).dot(d) / len2;
                    if t <= 0.0 || t >= 1.0 {
                        continue;
                    }
                    if (pa + d * t).distance(p) <= WELD_TOLERANCE_M {
                        on_edge.push((t, k));
                    }
                }
                on_edge.sort_by(|x, y| x.0.total_cmp(&y.0));
                out.extend(on_edge.into_iter().map(|(_, k)| k));
            }
            out
        })
        .collect()
}

struct UnionFind {
    parent: Vec<usize>,
}

impl UnionFind {
    fn new(n: usize) -> Self {
        Self {
            parent: (0..n).collect(),
        }
    }
    fn find(&mut self, mut x: usize) -> usize {
        while self.parent[x] != x {
            self.parent[x] = self.parent[self.parent[x]];
            x = self.parent[x];
        }
        x
    }
    fn union(&mut self, a: usize, b: usize) {
        let (ra, rb) = (self.find(a), self.find(b));
        if ra != rb {
            self.parent[ra.max(rb)] = ra.min(rb);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Unit cube faces with normals into the cube.
    fn cube(offset: DVec3, size: f64, inward: bool) -> Vec<Vec<DVec3>> {
        let c = |x: f64, y: f64, z: f64| offset + DVec3::new(x, y, z) * size;
        let mut faces = vec![
            vec![c(0., 0., 0.), c(1., 0., 0.), c(1., 1., 0.), c(0., 1., 0.)], // floor, +z
            vec![c(0., 0., 1.), c(0., 1., 1.), c(1., 1., 1.), c(1., 0., 1.)], // top, -z
            vec![c(0., 0., 0.), c(0., 0., 1.), c(1., 0., 1.), c(1., 0., 0.)], // y0, +y
            vec![c(0., 1., 0.), c(1., 1., 0.), c(1., 1., 1.), c(0., 1., 1.)], // y1, -y
            vec![c(0., 0., 0.), c(0., 1., 0.), c(0., 1., 1.), c(0., 0., 1.)], // x0, +x
            vec![c(1., 0., 0.), c(1., 0., 1.), c(1., 1., 1.), c(1., 1., 0.)], // x1, -x
        ];
        if !inward {
            for f in &mut faces {
                f.reverse();
            }
        }
        faces
    }

    #[test]
    fn inward_cube_is_closed_and_needs_nothing() {
        let t = analyse(&cube(DVec3::ZERO, 1.0, true));
        assert!(t.is_closed());
        assert!(t.reverse.is_empty());
        assert_eq!(t.pieces, 1);
    }

    #[test]
    fn outward_cube_is_reversed_entirely() {
        let t = analyse(&cube(DVec3::ZERO, 1.0, false));
        assert_eq!(t.reverse, vec![0, 1, 2, 3, 4, 5]);
    }

    #[test]
    fn one_flipped_face_is_found() {
        let mut faces = cube(DVec3::ZERO, 1.0, true);
        faces[3].reverse();
        let t = analyse(&faces);
        assert_eq!(t.reverse, vec![3]);
    }

    #[test]
    fn obstacle_inside_is_oriented_outward() {
        // A room cube of 4 m with a 1 m cube inside; the obstacle given with
        // normals into itself must be reversed, the room left alone.
        let mut faces = cube(DVec3::ZERO, 4.0, true);
        faces.extend(cube(DVec3::splat(1.0), 1.0, true));
        let t = analyse(&faces);
        assert!(t.is_closed());
        assert_eq!(t.pieces, 2);
        assert_eq!(t.reverse, vec![6, 7, 8, 9, 10, 11]);
    }

    #[test]
    fn missing_face_leaves_four_bad_edges_and_reports_disagreement() {
        let mut faces = cube(DVec3::ZERO, 1.0, true);
        faces.remove(1);
        faces[0].reverse();
        let t = analyse(&faces);
        assert_eq!(t.bad_edges.len(), 4);
        assert!(t.reverse.is_empty());
        assert_eq!(t.disagreements.len(), 4);
    }

    #[test]
    fn split_wall_against_whole_floor_is_closed() {
        let mut faces = cube(DVec3::ZERO, 1.0, true);
        // Replace the y0 wall (x from 0 to 1 at y = 0) by two halves.
        let c = DVec3::new;
        faces[2] = vec![c(0., 0., 0.), c(0., 0., 1.), c(0.5, 0., 1.), c(0.5, 0., 0.)];
        faces.push(vec![
            c(0.5, 0., 0.),
            c(0.5, 0., 1.),
            c(1., 0., 1.),
            c(1., 0., 0.),
        ]);
        let t = analyse(&faces);
        assert!(t.is_closed(), "{:?}", t.bad_edges);
        assert!(t.reverse.is_empty());
    }
}
