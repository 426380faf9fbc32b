//! Test rooms built in code (no room files), shared by the trace tests.
#![allow(dead_code)]

use glam::DVec3;
use polaray::bands::{BandSet, Bands};
use polaray::room::{Material, Receiver, Room, Settings, Source, Surface, Triangle};

/// A material with the same α and s in every band.
pub fn uniform_material(name: &str, alpha: f64, scattering: f64) -> Material {
    Material {
        name: name.into(),
        absorption: Bands::splat(alpha),
        scattering: Bands::splat(scattering),
        diffusion: None,
        polar_file: None,
        goniometer: None,
    }
}

/// Settings for tests: given bands, air absorption off unless asked.
pub fn settings(bands: &[u32], air: bool) -> Settings {
    Settings {
        bands: BandSet::new(bands).unwrap(),
        air_absorption: air,
        ..Settings::default()
    }
}

/// Adds a planar convex polygon (vertices in order) as one surface, fanned
/// into triangles whose normal (v1 − v0) × (v2 − v0) points into the room.
/// `inside` is any point on the room side of the polygon.
pub fn add_polygon(
    room: &mut Room,
    label: &str,
    material: usize,
    mut vertices: Vec<DVec3>,
    inside: DVec3,
) {
    let mut normal = (vertices[1] - vertices[0])
        .cross(vertices[2] - vertices[0])
        .normalize();
    if normal.dot(inside - vertices[0]) < 0.0 {
        vertices.reverse();
        normal = -normal;
    }
    let surface = room.surfaces.len() as u32;
    let mut area = 0.0;
    for i in 1..vertices.len() - 1 {
        let t = Triangle {
            vertices: [vertices[0], vertices[i], vertices[i + 1]],
            surface,
        };
        area += 0.5 * t.cross().length();
        room.triangles.push(t);
    }
    room.surfaces.push(Surface {
        label: label.into(),
        material,
        vertices,
        normal,
        area_m2: area,
        profile_axis: None,
        group: label.into(),
    });
}

/// An empty room (no surfaces) with one material, to fill in.
pub fn empty_room(name: &str, material: Material, settings: Settings) -> Room {
    Room {
        name: name.into(),
        file: Default::default(),
        settings,
        materials: vec![material],
        surfaces: vec![],
        triangles: vec![],
        sources: vec![],
        receivers: vec![],
    }
}

/// The six walls of the box [0, lx] × [0, ly] × [0, lz], all of material 0,
/// normals inward; `skip` names walls to leave out ("floor", "ceiling",
/// "x0", "x1", "y0", "y1").
pub fn shoebox_walls(room: &mut Room, size: DVec3, skip: &[&str]) {
    let (x, y, z) = (size.x, size.y, size.z);
    let c = size * 0.5;
    let p = DVec3::new;
    let walls = [
        (
            "floor",
            vec![p(0., 0., 0.), p(x, 0., 0.), p(x, y, 0.), p(0., y, 0.)],
        ),
        (
            "ceiling",
            vec![p(0., 0., z), p(x, 0., z), p(x, y, z), p(0., y, z)],
        ),
        (
            "x0",
            vec![p(0., 0., 0.), p(0., y, 0.), p(0., y, z), p(0., 0., z)],
        ),
        (
            "x1",
            vec![p(x, 0., 0.), p(x, y, 0.), p(x, y, z), p(x, 0., z)],
        ),
        (
            "y0",
            vec![p(0., 0., 0.), p(x, 0., 0.), p(x, 0., z), p(0., 0., z)],
        ),
        (
            "y1",
            vec![p(0., y, 0.), p(x, y, 0.), p(x, y, z), p(0., y, z)],
        ),
    ];
    for (label, v) in walls {
        if !skip.contains(&label) {
            add_polygon(room, label, 0, v, c);
        }
    }
}

/// A closed shoebox of `size` with one material, a source and receivers.
pub fn shoebox(
    size: DVec3,
    material: Material,
    settings: Settings,
    source: DVec3,
    receivers: &[(DVec3, Option<f64>)],
) -> Room {
    let mut room = empty_room("test shoebox", material, settings);
    shoebox_walls(&mut room, size, &[]);
    place(&mut room, source, receivers);
    room
}

/// Adds source `S1` and receivers `R1`, `R2`, ...
pub fn place(room: &mut Room, source: DVec3, receivers: &[(DVec3, Option<f64>)]) {
    room.sources.push(Source {
        name: "S1".into(),
        position: source,
    });
    for (i, (p, r)) in receivers.iter().enumerate() {
        room.receivers.push(Receiver {
            name: format!("R{}", i + 1),
            position: *p,
            radius_m: *r,
        });
    }
}

/// A closed, convex, skewed hexahedron (no two faces parallel, no right
/// angles): a unit cube's corners moved about, every face split into two
/// triangles (each its own surface, since the quads are not planar).
pub fn skewed_polyhedron(material: Material, settings: Settings) -> Room {
    let corners = [
        DVec3::new(0.0, 0.0, 0.0),
        DVec3::new(7.0, 0.6, -0.3),
        DVec3::new(8.2, 5.5, 0.4),
        DVec3::new(-0.8, 4.6, 0.1),
        DVec3::new(0.5, -0.4, 3.6),
        DVec3::new(6.4, 0.2, 4.4),
        DVec3::new(7.5, 5.0, 5.2),
        DVec3::new(0.3, 5.2, 3.1),
    ];
    let centre = corners.iter().copied().sum::<DVec3>() / 8.0;
    // Cube faces by corner index (0–3 bottom, 4–7 top).
    let faces = [
        [0, 1, 2, 3],
        [4, 5, 6, 7],
        [0, 1, 5, 4],
        [1, 2, 6, 5],
        [2, 3, 7, 6],
        [3, 0, 4, 7],
    ];
    let mut room = empty_room("skewed hexahedron", material, settings);
    for (f, q) in faces.iter().enumerate() {
        for (k, tri) in [[q[0], q[1], q[2]], [q[0], q[2], q[3]]].iter().enumerate() {
            add_polygon(
                &mut room,
                &format!("face{f}.{k}"),
                0,
                tri.iter().map(|&i| corners[i]).collect(),
                centre,
            );
        }
    }
    place(
        &mut room,
        centre,
        &[(centre + DVec3::new(1.5, 0.5, 0.2), Some(0.5))],
    );
    room
}
