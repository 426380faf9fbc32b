//! Writes `demo-rooms/recital-hall.obj`, the invented demo recital hall
//! (ours, modelled on no real hall): a raised stage, a flat front floor,
//! raked terraces carrying two blocks of seating (boxes), a rear cross aisle,
//! a ceiling that rises from the stage and bends down into tilted side
//! reflectors, and a rear wall kept as its own group (`RearWall`) so a
//! comparison can swap its treatment.
//!
//! The hall is built on a plan grid: each cell has a floor height (stage,
//! floor, terrace or seat-block top) and the ceiling is a continuous height
//! field over the grid points. Every face is written with its normal pointing
//! into the hall (counter-clockwise seen from inside).
//!
//! Run with `cargo run --example demo_hall_geometry`.

use std::collections::HashMap;
use std::fmt::Write as _;

/// Hall width along x, m.
const WIDTH_M: f64 = 14.0;
/// Hall length along y (stage at y = 0), m.
const LENGTH_M: f64 = 24.0;
/// Plan grid step across the hall, m.
const STEP_X_M: f64 = 0.5;
/// Plan grid step along the hall (one seat row), m.
const STEP_Y_M: f64 = 1.0;
/// Stage depth and height, m.
const STAGE_DEPTH_M: f64 = 5.0;
const STAGE_HEIGHT_M: f64 = 0.9;
/// Where the raked terraces begin and end along y, m.
const RAKE_START_M: f64 = 8.0;
const RAKE_END_M: f64 = 23.0;
/// Rise per terrace (row), m.
const RISE_PER_ROW_M: f64 = 0.15;
/// Height of a seating block above its terrace, m.
const SEAT_HEIGHT_M: f64 = 0.8;
/// Seating blocks across the hall: [start, end) in x, m.
const SEAT_BLOCKS_X_M: [(f64, f64); 2] = [(1.5, 6.5), (7.5, 12.5)];
/// Ceiling height over the hall, m, and over the stage front wall.
const CEILING_M: f64 = 9.0;
const CEILING_AT_STAGE_WALL_M: f64 = 7.0;
/// Width of the tilted side reflectors and how far they drop at the wall, m.
const REFLECTOR_WIDTH_M: f64 = 2.5;
const REFLECTOR_DROP_M: f64 = 1.75;

#[derive(Clone, Copy, PartialEq)]
enum Cell {
    Stage,
    Floor,
    Seats,
}

impl Cell {
    fn name(self) -> &'static str {
        match self {
            Cell::Stage => "Stage",
            Cell::Floor => "Floor",
            Cell::Seats => "Seats",
        }
    }
}

struct Obj {
    text: String,
    index: HashMap<(i64, i64, i64), usize>,
    count: usize,
    faces: Vec<(String, String, Vec<usize>)>,
}

impl Obj {
    fn vertex(&mut self, x: f64, y: f64, z: f64) -> usize {
        let key = (
            (x * 1e6).round() as i64,
            (y * 1e6).round() as i64,
            (z * 1e6).round() as i64,
        );
        if let Some(&i) = self.index.get(&key) {
            return i;
        }
        self.count += 1;
        let _ = writeln!(self.text, "v {x:.6} {y:.6} {z:.6}");
        self.index.insert(key, self.count);
        self.count
    }

    fn face(&mut self, group: &str, material: &str, corners: Vec<usize>) {
        self.faces
            .push((group.to_string(), material.to_string(), corners));
    }
}

fn nx() -> usize {
    (WIDTH_M / STEP_X_M).round() as usize
}

fn ny() -> usize {
    (LENGTH_M / STEP_Y_M).round() as usize
}

/// Kind and floor height of cell (i, j).
fn cell(i: usize, j: usize) -> (Cell, f64) {
    let x = (i as f64 + 0.5) * STEP_X_M;
    let y = (j as f64 + 0.5) * STEP_Y_M;
    if y < STAGE_DEPTH_M {
        return (Cell::Stage, STAGE_HEIGHT_M);
    }
    if y < RAKE_START_M {
        return (Cell::Floor, 0.0);
    }
    let rows = ((RAKE_END_M - RAKE_START_M) / STEP_Y_M).round();
    let row = ((y - RAKE_START_M) / STEP_Y_M).floor().min(rows - 1.0);
    let terrace = RISE_PER_ROW_M * (row + 1.0);
    let in_block = SEAT_BLOCKS_X_M.iter().any(|&(a, b)| x > a && x < b);
    if y < RAKE_END_M && in_block {
        (Cell::Seats, terrace + SEAT_HEIGHT_M)
    } else {
        (Cell::Floor, terrace)
    }
}

/// Ceiling height at grid point (i, j).
fn ceiling(i: usize, j: usize) -> f64 {
    let x = i as f64 * STEP_X_M;
    let y = j as f64 * STEP_Y_M;
    let along =
        (CEILING_AT_STAGE_WALL_M + (CEILING_M - CEILING_AT_STAGE_WALL_M) * y / 6.0).min(CEILING_M);
    let to_wall = x.min(WIDTH_M - x);
    let drop = REFLECTOR_DROP_M * (1.0 - to_wall / REFLECTOR_WIDTH_M).max(0.0);
    along - drop
}

fn in_reflector(i: usize) -> bool {
    let x = (i as f64 + 0.5) * STEP_X_M;
    x.min(WIDTH_M - x) < REFLECTOR_WIDTH_M
}

/// A vertical quad on the plan segment a–b whose normal (in plan) is `n`;
/// heights (low, high) at a and at b.
fn vertical(
    obj: &mut Obj,
    a: (f64, f64),
    b: (f64, f64),
    n: (f64, f64),
    za: (f64, f64),
    zb: (f64, f64),
) -> Vec<usize> {
    // Seen from the normal side the quad runs counter-clockwise when its
    // bottom edge runs along z × n.
    let along = (-n.1, n.0);
    let forward = (b.0 - a.0) * along.0 + (b.1 - a.1) * along.1 > 0.0;
    let (s, zs, e, ze) = if forward {
        (a, za, b, zb)
    } else {
        (b, zb, a, za)
    };
    vec![
        obj.vertex(s.0, s.1, zs.0),
        obj.vertex(e.0, e.1, ze.0),
        obj.vertex(e.0, e.1, ze.1),
        obj.vertex(s.0, s.1, zs.1),
    ]
}

fn main() -> std::io::Result<()> {
    let mut obj = Obj {
        text: String::new(),
        index: HashMap::new(),
        count: 0,
        faces: Vec::new(),
    };
    let (nx, ny) = (nx(), ny());
    let px = |i: usize| i as f64 * STEP_X_M;
    let py = |j: usize| j as f64 * STEP_Y_M;

    // Floor tops (stage, floor, terraces, seat tops), normal +z.
    for j in 0..ny {
        for i in 0..nx {
            let (kind, h) = cell(i, j);
            let f = vec![
                obj.vertex(px(i), py(j), h),
                obj.vertex(px(i + 1), py(j), h),
                obj.vertex(px(i + 1), py(j + 1), h),
                obj.vertex(px(i), py(j + 1), h),
            ];
            obj.face(kind.name(), kind.name(), f);
        }
    }

    // Steps between neighbouring cells: stage front, terrace risers, seat-block
    // sides. The face belongs to the higher cell and faces the lower one.
    for j in 0..ny {
        for i in 0..nx {
            let (ka, ha) = cell(i, j);
            for (di, dj) in [(1usize, 0usize), (0, 1)] {
                let (i2, j2) = (i + di, j + dj);
                if i2 >= nx || j2 >= ny {
                    continue;
                }
                let (kb, hb) = cell(i2, j2);
                if (ha - hb).abs() < 1e-9 {
                    continue;
                }
                // Shared plan edge.
                let (a, b) = if di == 1 {
                    ((px(i2), py(j)), (px(i2), py(j + 1)))
                } else {
                    ((px(i), py(j2)), (px(i + 1), py(j2)))
                };
                // Normal from the higher cell towards the lower one.
                let towards_b = if di == 1 { (1.0, 0.0) } else { (0.0, 1.0) };
                let (n, kind) = if ha > hb {
                    (towards_b, ka)
                } else {
                    ((-towards_b.0, -towards_b.1), kb)
                };
                let z = (ha.min(hb), ha.max(hb));
                let f = vertical(&mut obj, a, b, n, z, z);
                obj.face(kind.name(), kind.name(), f);
            }
        }
    }

    // Outer walls, from each boundary cell's floor up to the ceiling.
    for j in 0..ny {
        for (i, x, n, group) in [
            (0, 0.0, (1.0, 0.0), "SideWalls"),
            (nx - 1, WIDTH_M, (-1.0, 0.0), "SideWalls"),
        ] {
            let (_, h) = cell(i, j);
            let gi = if x == 0.0 { 0 } else { nx };
            let f = vertical(
                &mut obj,
                (x, py(j)),
                (x, py(j + 1)),
                n,
                (h, ceiling(gi, j)),
                (h, ceiling(gi, j + 1)),
            );
            obj.face(group, "Wall", f);
        }
    }
    for i in 0..nx {
        for (j, y, n, group, material) in [
            (0, 0.0, (0.0, 1.0), "StageWall", "Wall"),
            (ny - 1, LENGTH_M, (0.0, -1.0), "RearWall", "RearWall"),
        ] {
            let (_, h) = cell(i, j);
            let gj = if y == 0.0 { 0 } else { ny };
            let f = vertical(
                &mut obj,
                (px(i), y),
                (px(i + 1), y),
                n,
                (h, ceiling(i, gj)),
                (h, ceiling(i + 1, gj)),
            );
            obj.face(group, material, f);
        }
    }

    // Ceiling: two triangles per cell (the height field is not planar per
    // cell), normal −z; the outer strips are the tilted side reflectors.
    for j in 0..ny {
        for i in 0..nx {
            let c = |obj: &mut Obj, a: usize, b: usize| obj.vertex(px(a), py(b), ceiling(a, b));
            let p00 = c(&mut obj, i, j);
            let p10 = c(&mut obj, i + 1, j);
            let p11 = c(&mut obj, i + 1, j + 1);
            let p01 = c(&mut obj, i, j + 1);
            let (group, material) = if in_reflector(i) {
                ("SideReflectors", "Reflector")
            } else {
                ("Ceiling", "Ceiling")
            };
            obj.face(group, material, vec![p00, p01, p11]);
            obj.face(group, material, vec![p00, p11, p10]);
        }
    }

    // Faces sorted by group so each `g`/`usemtl` pair is written once.
    let mut faces = std::mem::take(&mut obj.faces);
    faces.sort_by(|a, b| (&a.0, &a.1).cmp(&(&b.0, &b.1)));
    let mut out = String::from(
        "# polaray demo recital hall: invented geometry (ours, not any real hall).\n\
         # Written by `cargo run --example demo_hall_geometry`; metres, z up;\n\
         # faces run counter-clockwise seen from inside the hall.\n",
    );
    out.push_str(&obj.text);
    let mut current = (String::new(), String::new());
    let mut triangles = 0;
    for (group, material, corners) in &faces {
        if (group, material) != (&current.0, &current.1) {
            let _ = writeln!(out, "g {group}\nusemtl {material}");
            current = (group.clone(), material.clone());
        }
        triangles += corners.len() - 2;
        let list: Vec<String> = corners.iter().map(usize::to_string).collect();
        let _ = writeln!(out, "f {}", list.join(" "));
    }
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/demo-rooms/recital-hall.obj");
    std::fs::create_dir_all(concat!(env!("CARGO_MANIFEST_DIR"), "/demo-rooms"))?;
    std::fs::write(path, out)?;
    println!(
        "wrote {path}: {} vertices, {} faces, {triangles} triangles",
        obj.count,
        faces.len()
    );
    Ok(())
}
