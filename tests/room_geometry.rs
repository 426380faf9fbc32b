//! Reference rooms against hand computation: volumes, areas, normals,
//! diffuse-field estimates, point-in-room, and the demo hall's mesh.

use std::path::Path;

use glam::DVec3;
use polaray::room::{estimates, inside, load_room, LoadedRoom, Room};

fn load(path: &str) -> LoadedRoom {
    load_room(Path::new(path)).unwrap_or_else(|e| panic!("{e}"))
}

fn material_area(room: &Room, name: &str) -> f64 {
    let areas = estimates::area_by_material_m2(room);
    let i = room
        .materials
        .iter()
        .position(|m| m.name == name)
        .unwrap_or_else(|| panic!("no material {name}"));
    areas[i]
}

fn triangle_points(room: &Room) -> Vec<[DVec3; 3]> {
    room.triangles.iter().map(|t| t.vertices).collect()
}

/// Every triangle's winding agrees with its surface's normal, and the normals
/// point into the room: from the surface, a short step along the normal is
/// inside (winding number test), a short step against it is outside.
fn assert_normals_point_inward(room: &Room) {
    let tris = triangle_points(room);
    for t in &room.triangles {
        let s = &room.surfaces[t.surface as usize];
        let n = t.cross();
        assert!(
            n.dot(s.normal) > 0.0,
            "{}: triangle against surface normal",
            s.label
        );
        let centre = (t.vertices[0] + t.vertices[1] + t.vertices[2]) / 3.0;
        assert!(
            inside::is_inside_room(centre + s.normal * 1e-3, &tris),
            "{}",
            s.label
        );
        assert!(
            !inside::is_inside_room(centre - s.normal * 1e-3, &tris),
            "{}",
            s.label
        );
    }
}

#[test]
fn shoebox_volume_areas_and_normals() {
    let room = load("rooms/shoebox.toml").room;
    // 8 × 6 × 3.5 m (hand computation): V = 168 m³; floor and ceiling 48 m²
    // each; walls 2 × 8 × 3.5 + 2 × 6 × 3.5 = 98 m²; total 194 m².
    assert!((estimates::volume_m3(&room) - 168.0).abs() < 1e-9);
    assert!((estimates::area_m2(&room) - 194.0).abs() < 1e-9);
    assert!((material_area(&room, "carpet") - 48.0).abs() < 1e-9);
    assert!((material_area(&room, "ceiling-tile") - 48.0).abs() < 1e-9);
    assert!((material_area(&room, "plaster") - 98.0).abs() < 1e-9);
    assert_eq!(room.surfaces.len(), 6);
    assert_eq!(room.triangles.len(), 12);
    assert_normals_point_inward(&room);
    // Mean free path 4V/S (Kuttruff, Room Acoustics, §5.2).
    assert!((estimates::mean_free_path_m(&room) - 4.0 * 168.0 / 194.0).abs() < 1e-12);
}

#[test]
fn shoebox_sabine_and_eyring_match_hand_computation() {
    let mut room = load("rooms/shoebox.toml").room;
    room.settings.air_absorption = false;
    // Kuttruff, Room Acoustics (6th ed.), eqs. 5.10 (Sabine) and 5.24 (Eyring):
    // T = K V / A and T = K V / (−S ln(1 − ᾱ)), K = 24 ln 10 / c, c = 343.2 m/s
    // at 20 °C (ISO 9613-1 expression). At 500 Hz:
    // A = 98 · 0.03 + 48 · 0.60 + 48 · 0.25 = 2.94 + 28.8 + 12.0 = 43.74 m².
    let k = 24.0 * std::f64::consts::LN_10 / 343.2;
    let a_500 = 98.0 * 0.03 + 48.0 * 0.60 + 48.0 * 0.25;
    let sabine_500 = k * 168.0 / a_500; // 0.6185 s
    let eyring_500 = k * 168.0 / (-194.0 * (1.0 - a_500 / 194.0).ln()); // 0.5424 s
    let b = room.settings.bands.index_of(500).unwrap();
    assert!(
        (sabine_500 - 0.6185).abs() < 1e-3,
        "hand value {sabine_500}"
    );
    assert!((estimates::sabine_s(&room)[b] - sabine_500).abs() < 1e-9);
    assert!((estimates::eyring_s(&room)[b] - eyring_500).abs() < 1e-9);
    // At 125 Hz: A = 98 · 0.02 + 48 · 0.30 + 48 · 0.05 = 18.76 m².
    let a_125 = 98.0 * 0.02 + 48.0 * 0.30 + 48.0 * 0.05;
    let b = room.settings.bands.index_of(125).unwrap();
    assert!((estimates::sabine_s(&room)[b] - k * 168.0 / a_125).abs() < 1e-9);
    // Eyring is below Sabine whenever ᾱ > 0 (−ln(1 − ᾱ) > ᾱ).
    for b in 0..room.settings.bands.len() {
        assert!(estimates::eyring_s(&room)[b] < estimates::sabine_s(&room)[b]);
    }
}

/// The skewed room's defining parameters (see the comment in rooms/skewed.toml).
const APEX: [f64; 3] = [5.0, 4.0, 30.0];
const CEILING_PLANE: [f64; 3] = [3.0, 0.10, 0.05]; // z = h0 + gx x + gy y
const FLOOR_PLAN: [[f64; 2]; 6] = [
    [0., 0.],
    [10., 0.],
    [11., 7.],
    [6., 6.],
    [4., 8.],
    [-1., 7.],
];

fn shoelace_m2(p: &[[f64; 2]]) -> f64 {
    let n = p.len();
    0.5 * (0..n)
        .map(|i| p[i][0] * p[(i + 1) % n][1] - p[(i + 1) % n][0] * p[i][1])
        .sum::<f64>()
}

/// Where the line from the floor corner `a` to the apex meets the ceiling plane.
fn ceiling_corner(a: [f64; 2]) -> DVec3 {
    let [ax, ay, az] = APEX;
    let [h0, gx, gy] = CEILING_PLANE;
    let t = (az - h0 - gx * ax - gy * ay) / (az + gx * (a[0] - ax) + gy * (a[1] - ay));
    DVec3::new(ax + t * (a[0] - ax), ay + t * (a[1] - ay), az * (1.0 - t))
}

#[test]
fn skewed_room_volume_and_areas_match_hand_computation() {
    let room = load("rooms/skewed.toml").room;
    assert_normals_point_inward(&room);
    let [h0, gx, gy] = CEILING_PLANE;
    let slope = (1.0 + gx * gx + gy * gy).sqrt();
    // The room is a pyramid with apex APEX over the floor, less the pyramid
    // above the ceiling plane: V = (1/3) A_floor h − (1/3) A_ceiling d, with h
    // the apex height and d the apex's distance from the ceiling plane
    // (pyramid volume, elementary geometry).
    let floor = shoelace_m2(&FLOOR_PLAN);
    let ceiling_plan: Vec<[f64; 2]> = FLOOR_PLAN
        .iter()
        .map(|&a| {
            let c = ceiling_corner(a);
            [c.x, c.y]
        })
        .collect();
    let ceiling = shoelace_m2(&ceiling_plan) * slope;
    let d = (APEX[2] - h0 - gx * APEX[0] - gy * APEX[1]) / slope;
    let volume = floor * APEX[2] / 3.0 - ceiling * d / 3.0;
    assert!((floor - 77.0).abs() < 1e-12, "floor {floor}");
    assert!(
        (estimates::volume_m3(&room) - volume).abs() < 1e-3,
        "{volume}"
    );
    assert!((material_area(&room, "lino") - floor).abs() < 1e-6);
    assert!((material_area(&room, "panel") - ceiling).abs() < 1e-4);
    // Each wall is a planar quadrilateral: area = |d1 × d2| / 2 with d1, d2 its
    // diagonals (elementary geometry).
    let n = FLOOR_PLAN.len();
    let walls: f64 = (0..n)
        .map(|i| {
            let a = DVec3::new(FLOOR_PLAN[i][0], FLOOR_PLAN[i][1], 0.0);
            let b = DVec3::new(FLOOR_PLAN[(i + 1) % n][0], FLOOR_PLAN[(i + 1) % n][1], 0.0);
            let (ca, cb) = (
                ceiling_corner(FLOOR_PLAN[i]),
                ceiling_corner(FLOOR_PLAN[(i + 1) % n]),
            );
            0.5 * (cb - a).cross(ca - b).length()
        })
        .sum();
    assert!(
        (material_area(&room, "wood") - walls).abs() < 1e-4,
        "{walls}"
    );
    // The floor and ceiling are non-convex hexagons: 4 triangles each.
    assert_eq!(room.triangles.len(), 4 + 4 + 6 * 2);
}

#[test]
fn point_in_room_handles_the_reflex_corner_of_the_skewed_room() {
    let room = load("rooms/skewed.toml").room;
    let tris = triangle_points(&room);
    // Inside, near the reflex corner (6, 6) of the floor plan.
    assert!(inside::is_inside_room(DVec3::new(6.0, 5.5, 0.5), &tris));
    assert!(inside::is_inside_room(DVec3::new(8.0, 6.0, 0.5), &tris));
    // In the notch between (11, 7), (6, 6) and (4, 8): outside, although within
    // the convex hull.
    assert!(!inside::is_inside_room(DVec3::new(6.0, 7.0, 0.5), &tris));
    // Below the floor and above the sloping ceiling.
    assert!(!inside::is_inside_room(DVec3::new(5.0, 3.0, -0.1), &tris));
    assert!(!inside::is_inside_room(DVec3::new(5.0, 3.0, 3.7), &tris));
    assert!(inside::is_inside_room(DVec3::new(5.0, 3.0, 3.5), &tris));
}

#[test]
fn l_shaped_mesh_room() {
    let room = load("rooms/mesh-room.toml").room;
    // Plan area 8 · 8 − 4 · 4 = 48 m², height 3 m: V = 144 m³; perimeter 32 m,
    // walls 96 m²; total 48 + 48 + 96 = 192 m² (hand computation).
    assert!((estimates::volume_m3(&room) - 144.0).abs() < 1e-9);
    assert!((estimates::area_m2(&room) - 192.0).abs() < 1e-9);
    assert!((material_area(&room, "wood-floor") - 48.0).abs() < 1e-9);
    assert!((material_area(&room, "plaster") - 96.0).abs() < 1e-9);
    assert_normals_point_inward(&room);
    let floor = room.surfaces.iter().find(|s| s.group == "Floor").unwrap();
    assert_eq!(floor.label, "mesh face 1 (line 21, group Floor)");
    let tris = triangle_points(&room);
    assert!(inside::is_inside_room(DVec3::new(2.0, 6.0, 1.0), &tris));
    assert!(!inside::is_inside_room(DVec3::new(6.0, 6.0, 1.0), &tris));
}

#[test]
fn open_shoebox_misses_one_wall() {
    let loaded = load("rooms/open-shoebox.toml");
    let room = &loaded.room;
    assert!(room.settings.open);
    assert_eq!(room.surfaces.len(), 5);
    // 194 m² less the 8 × 3.5 m wall at y = 6 m (hand computation).
    assert!((estimates::area_m2(room) - 166.0).abs() < 1e-9);
    assert!(room.surfaces.iter().all(|s| s.group != "y1"));
    assert_eq!(loaded.warnings.len(), 1, "{:?}", loaded.warnings);
}

#[test]
fn demo_hall_is_closed_consistent_and_large_enough() {
    let loaded = load("demo-rooms/recital-hall.toml");
    assert!(loaded.warnings.is_empty(), "{:?}", loaded.warnings);
    let room = &loaded.room;
    assert!(room.triangles.len() >= 1000, "{}", room.triangles.len());
    for group in ["RearWall", "Seats", "Stage", "SideReflectors"] {
        assert!(
            room.surfaces.iter().any(|s| s.group == group),
            "no group {group}"
        );
    }
    // The rear wall stands at y = 24 m and faces the stage.
    for s in room.surfaces.iter().filter(|s| s.group == "RearWall") {
        assert!(s.vertices.iter().all(|v| (v.y - 24.0).abs() < 1e-9));
        assert!((s.normal - DVec3::NEG_Y).length() < 1e-12);
    }
    // Volume by the divergence theorem equals the sum over plan cells of
    // (ceiling − floor) only if every normal points inward; a cheaper
    // independent check: the volume lies between the box 14 × 24 × 5.25 m
    // (lowest ceiling) less the highest floor column and the 14 × 24 × 9 m box.
    let v = estimates::volume_m3(room);
    assert!(
        v > 14.0 * 24.0 * (5.25 - 3.05) && v < 14.0 * 24.0 * 9.0,
        "{v}"
    );
    let tris = triangle_points(room);
    // Normals into the hall, on every 25th triangle (the full check is quadratic).
    for t in room.triangles.iter().step_by(25) {
        let s = &room.surfaces[t.surface as usize];
        let centre = (t.vertices[0] + t.vertices[1] + t.vertices[2]) / 3.0;
        assert!(
            inside::is_inside_room(centre + s.normal * 1e-3, &tris),
            "{}",
            s.label
        );
        assert!(
            !inside::is_inside_room(centre - s.normal * 1e-3, &tris),
            "{}",
            s.label
        );
    }
    for r in &room.receivers {
        assert!(inside::is_inside_room(r.position, &tris), "{}", r.name);
    }
    assert!(estimates::default_duration_s(room) < 3.0);
}

#[test]
fn shoebox_sabine_with_air_absorption_at_1_khz() {
    let room = load("rooms/shoebox.toml").room;
    // ISO 9613-1:1993 at 20 °C, 50 % RH, 101.325 kPa, 1 kHz: 4.665 dB/km
    // (reference sheet §5 check value), m = α / (10 lg e) per metre (Kuttruff §4.1).
    let m = 4.665e-3 / (10.0 * std::f64::consts::E.log10());
    // A = 98 · 0.04 + 48 · 0.70 + 48 · 0.40 = 56.72 m²; T = K V / (A + 4 m V)
    // (Kuttruff, Room Acoustics, eq. 5.10 with air term).
    let k = 24.0 * std::f64::consts::LN_10 / 343.2;
    let expected = k * 168.0 / (56.72 + 4.0 * m * 168.0);
    let b = room.settings.bands.index_of(1000).unwrap();
    let t = estimates::sabine_s(&room)[b];
    assert!((t - expected).abs() < 1e-4 * expected, "{t} vs {expected}");
}
