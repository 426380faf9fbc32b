//! Loader details: defaults, optional fields, mapping of OBJ names, box
//! extensions, and the labels and groups surfaces get.

use std::path::Path;

use glam::DVec3;
use polaray::room::{estimates, load_room, LoadedRoom, RoomError};

const MATERIALS: &str = r#"
[materials.plaster]
absorption = [0.02, 0.02, 0.03, 0.04, 0.05, 0.05]
scattering = [0.05, 0.05, 0.05, 0.05, 0.05, 0.05]

[materials.panel]
absorption = [0.20, 0.30, 0.40, 0.40, 0.40, 0.40]
scattering = [0.10, 0.20, 0.30, 0.40, 0.50, 0.60]
diffusion = [0.05, 0.10, 0.15, 0.20, 0.25, 0.30]
polar = "panel-polar.toml"
"#;

const PLACEMENTS: &str = r#"
[[sources]]
name = "S1"
position = [1, 1, 1]

[[receivers]]
name = "R1"
position = [3, 2, 1.2]
"#;

/// A 4 x 3 x 2.5 m box as OBJ: the floor has no usemtl (group Floor), the top
/// usemtl Soft (group Top), the four walls usemtl Hard (group Walls).
const BOX_OBJ: &str = "\
v 0 0 0\nv 4 0 0\nv 4 3 0\nv 0 3 0\nv 0 0 2.5\nv 4 0 2.5\nv 4 3 2.5\nv 0 3 2.5
g Floor
f 1 2 3 4
g Top
usemtl Soft
f 5 8 7 6
g Walls
usemtl Hard
f 1 5 6 2
f 2 6 7 3
f 3 7 8 4
f 4 8 5 1
";

fn load_text(dir: &Path, name: &str, text: &str) -> Result<LoadedRoom, RoomError> {
    let path = dir.join(name);
    std::fs::write(&path, text).unwrap();
    load_room(&path)
}

#[test]
fn defaults_optional_fields_and_integer_coordinates() {
    let dir = tempfile::tempdir().unwrap();
    let text = format!(
        "name = \"t\"\n{MATERIALS}\n[box]\nsize_m = [4, 3, 2.5]\nfloor = \"plaster\"\nceiling = \"panel\"\nwalls = \"plaster\"\n{PLACEMENTS}"
    );
    let loaded = load_text(dir.path(), "room.toml", &text).unwrap();
    let room = &loaded.room;
    // Defaults of the room file schema.
    assert_eq!(room.settings.rays, 20_000);
    assert_eq!(room.settings.bin_s, 0.001);
    assert_eq!(room.settings.seed, 1);
    assert!(room.settings.duration_s.is_none());
    assert!(room.settings.air_absorption && !room.settings.open);
    assert_eq!(
        room.settings.bands.centres_hz(),
        &[125, 250, 500, 1000, 2000, 4000]
    );
    // Diffusion parsed; polar path resolved beside the room file, with a
    // warning because the file is missing.
    let panel = room.materials.iter().find(|m| m.name == "panel").unwrap();
    assert_eq!(
        panel.diffusion.unwrap().as_slice(6),
        &[0.05, 0.10, 0.15, 0.20, 0.25, 0.30]
    );
    assert_eq!(
        panel.polar_file.as_deref(),
        Some(dir.path().join("panel-polar.toml").as_path())
    );
    assert_eq!(loaded.warnings.len(), 1, "{:?}", loaded.warnings);
    assert!(loaded.warnings[0].contains("materials.panel.polar"));
    // Box labels and groups.
    let labels: Vec<&str> = room.surfaces.iter().map(|s| s.label.as_str()).collect();
    assert_eq!(
        labels,
        [
            "box.floor",
            "box.ceiling",
            "box.x0",
            "box.x1",
            "box.y0",
            "box.y1"
        ]
    );
    assert_eq!(room.surfaces[1].group, "ceiling");
    assert!(room.receivers[0].radius_m.is_none());
}

#[test]
fn box_origin_single_walls_and_omit() {
    let dir = tempfile::tempdir().unwrap();
    let text = format!(
        "{MATERIALS}\n[settings]\nopen = true\n[box]\nsize_m = [4, 3, 2.5]\norigin_m = [-2, -1.5, 0]\nfloor = \"plaster\"\nwalls = \"plaster\"\nx1 = \"panel\"\nomit = [\"ceiling\"]\n[[sources]]\nname = \"S1\"\nposition = [0, 0, 1]\n[[receivers]]\nname = \"R1\"\nposition = [1, 0.5, 1.2]\nradius_m = 0.2\n"
    );
    let loaded = load_text(dir.path(), "box.toml", &text).unwrap();
    let room = &loaded.room;
    assert_eq!(room.surfaces.len(), 5);
    let x1 = room.surfaces.iter().find(|s| s.label == "box.x1").unwrap();
    assert_eq!(room.materials[x1.material].name, "panel");
    assert!(x1.vertices.iter().all(|v| (v.x - 2.0).abs() < 1e-12));
    assert!((x1.normal - DVec3::NEG_X).length() < 1e-12);
    assert!((estimates::area_m2(room) - (12.0 + 2.0 * 10.0 + 2.0 * 7.5)).abs() < 1e-9);
    // The room is named after the file when the file gives no name.
    assert_eq!(room.name, "box");
}

#[test]
fn missing_box_material_and_bad_omit_are_named() {
    let dir = tempfile::tempdir().unwrap();
    let text = format!(
        "{MATERIALS}\n[box]\nsize_m = [4, 3, 2.5]\nfloor = \"plaster\"\nx0 = \"plaster\"\nomit = [\"roof\"]\n{PLACEMENTS}"
    );
    let err = load_text(dir.path(), "box.toml", &text).unwrap_err();
    let all = err.problems.join("\n");
    for item in [
        "box.omit: `roof`",
        "box.ceiling: no material",
        "box.x1: no material",
        "box.y0",
        "box.y1",
    ] {
        assert!(all.contains(item), "{item} missing: {all}");
    }
    assert!(!all.contains("box.x0"), "{all}");
}

#[test]
fn obj_faces_map_by_usemtl_then_group_and_get_labels() {
    let dir = tempfile::tempdir().unwrap();
    // The floor has no usemtl and maps by its group name.
    std::fs::write(dir.path().join("box.obj"), BOX_OBJ).unwrap();
    let text = format!(
        "{MATERIALS}\n[mesh]\nfile = \"box.obj\"\nmaterials = {{ Floor = \"plaster\", Soft = \"panel\", Hard = \"plaster\", Walls = \"panel\" }}\n{PLACEMENTS}"
    );
    let loaded = load_text(dir.path(), "mesh.toml", &text).unwrap();
    let room = &loaded.room;
    let material = |i: usize| room.materials[room.surfaces[i].material].name.as_str();
    assert_eq!(material(0), "plaster"); // by group Floor
    assert_eq!(material(1), "panel"); // by usemtl Soft
    assert_eq!(material(2), "plaster"); // usemtl Hard wins over group Walls
    assert_eq!(room.surfaces[2].label, "mesh face 3 (line 16, group Walls)");
    assert_eq!(room.surfaces[1].group, "Top");
    assert!((estimates::volume_m3(room) - 30.0).abs() < 1e-9);
    // The mapping entry `Walls` is never the one used: reported as a warning.
    assert!(
        loaded
            .warnings
            .iter()
            .any(|w| w.contains("mesh.materials.Walls")),
        "{:?}",
        loaded.warnings
    );
}

#[test]
fn profile_axis_and_group_of_explicit_surfaces() {
    let dir = tempfile::tempdir().unwrap();
    let mut text = format!("{MATERIALS}\n{PLACEMENTS}");
    let faces: [(&str, [[f64; 3]; 4]); 6] = [
        (
            "floor",
            [[0., 0., 0.], [4., 0., 0.], [4., 3., 0.], [0., 3., 0.]],
        ),
        (
            "ceiling",
            [[0., 0., 2.5], [0., 3., 2.5], [4., 3., 2.5], [4., 0., 2.5]],
        ),
        (
            "x0",
            [[0., 0., 0.], [0., 3., 0.], [0., 3., 2.5], [0., 0., 2.5]],
        ),
        (
            "x1",
            [[4., 0., 0.], [4., 0., 2.5], [4., 3., 2.5], [4., 3., 0.]],
        ),
        (
            "y0",
            [[0., 0., 0.], [0., 0., 2.5], [4., 0., 2.5], [4., 0., 0.]],
        ),
        (
            "y1",
            [[0., 3., 0.], [4., 3., 0.], [4., 3., 2.5], [0., 3., 2.5]],
        ),
    ];
    for (name, v) in faces {
        let extra = if name == "y1" {
            "group = \"rear wall\"\nprofile_axis = [0, 0, 2]\n"
        } else {
            ""
        };
        text.push_str(&format!(
            "[[surfaces]]\nmaterial = \"plaster\"\n{extra}vertices = {v:?}\n"
        ));
    }
    let room = load_text(dir.path(), "s.toml", &text).unwrap().room;
    assert_eq!(room.surfaces[5].group, "rear wall");
    assert_eq!(room.surfaces[0].group, "plaster");
    assert_eq!(room.surfaces[5].profile_axis, Some(DVec3::Z));
    assert_eq!(room.surfaces[0].profile_axis, None);
}

#[test]
fn obstacle_inside_a_closed_room_is_oriented_and_excluded() {
    let dir = tempfile::tempdir().unwrap();
    // A 1 m cube standing free in the 4 x 3 x 2.5 m box, given with normals
    // into the cube (wrong: they must face the room, i.e. out of the cube).
    let c = |x: f64, y: f64, z: f64| [1.5 + x, 1.0 + y, 0.5 + z];
    let faces = [
        [c(0., 0., 0.), c(1., 0., 0.), c(1., 1., 0.), c(0., 1., 0.)],
        [c(0., 0., 1.), c(0., 1., 1.), c(1., 1., 1.), c(1., 0., 1.)],
        [c(0., 0., 0.), c(0., 1., 0.), c(0., 1., 1.), c(0., 0., 1.)],
        [c(1., 0., 0.), c(1., 0., 1.), c(1., 1., 1.), c(1., 1., 0.)],
        [c(0., 0., 0.), c(0., 0., 1.), c(1., 0., 1.), c(1., 0., 0.)],
        [c(0., 1., 0.), c(1., 1., 0.), c(1., 1., 1.), c(0., 1., 1.)],
    ];
    let mut text = format!(
        "{MATERIALS}\n[box]\nsize_m = [4, 3, 2.5]\nfloor = \"plaster\"\nceiling = \"panel\"\nwalls = \"plaster\"\n{PLACEMENTS}"
    );
    for v in faces {
        text.push_str(&format!(
            "[[surfaces]]\nmaterial = \"plaster\"\ngroup = \"block\"\nvertices = {v:?}\n"
        ));
    }
    let loaded = load_text(dir.path(), "o.toml", &text).unwrap();
    let room = &loaded.room;
    // 30 m³ box less the 1 m³ block (hand computation).
    assert!((estimates::volume_m3(room) - 29.0).abs() < 1e-9);
    assert!(
        loaded
            .warnings
            .iter()
            .any(|w| w.contains("normals of 6 surface(s)")),
        "{:?}",
        loaded.warnings
    );
    let block_bottom = room
        .surfaces
        .iter()
        .find(|s| s.label == "surfaces[0]")
        .unwrap();
    assert!((block_bottom.normal - DVec3::NEG_Z).length() < 1e-12);
    // A source inside the block is outside the room.
    let inside_block = text.replace("position = [1, 1, 1]", "position = [2, 1.5, 1]");
    let err = load_text(dir.path(), "o2.toml", &inside_block).unwrap_err();
    assert!(
        err.problems
            .iter()
            .any(|p| p.contains("sources[0] (S1)") && p.contains("outside the room")),
        "{:?}",
        err.problems
    );
}

/// 1D diffusers on mesh and box faces: `[mesh].profile_axes` by usemtl or
/// group name (one warning per entry, not per face, when the axis leaves a
/// face's plane), `[box].profile_axes` by face; unknown names are problems.
#[test]
fn profile_axes_of_mesh_groups_and_box_faces() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("box.obj"), BOX_OBJ).unwrap();
    let mesh = |axes: &str| {
        format!(
            "{MATERIALS}\n[mesh]\nfile = \"box.obj\"\nmaterials = {{ Floor = \"plaster\", Soft = \"panel\", Hard = \"plaster\" }}\nprofile_axes = {{ {axes} }}\n{PLACEMENTS}"
        )
    };
    // Vertical ribs on the four walls (group Walls); the axis lies in every wall.
    let loaded = load_text(dir.path(), "mesh.toml", &mesh("Walls = [0, 0, 2]")).unwrap();
    let room = &loaded.room;
    for s in &room.surfaces {
        if s.group == "Walls" {
            assert_eq!(s.profile_axis, Some(DVec3::Z), "{}", s.label);
        } else {
            assert_eq!(s.profile_axis, None, "{}", s.label);
        }
    }
    assert!(
        !loaded.warnings.iter().any(|w| w.contains("profile_axes")),
        "{:?}",
        loaded.warnings
    );
    // Along x: in the plane of two walls, not of the other two: one warning.
    let loaded = load_text(dir.path(), "mesh2.toml", &mesh("Hard = [1, 0, 0]")).unwrap();
    let notes: Vec<&String> = loaded
        .warnings
        .iter()
        .filter(|w| w.contains("mesh.profile_axes.Hard"))
        .collect();
    assert_eq!(notes.len(), 1, "{:?}", loaded.warnings);
    assert!(notes[0].contains("2 of its 4 faces"), "{}", notes[0]);
    // A name no face has, and a zero axis: problems naming the entry.
    let err =
        load_text(dir.path(), "mesh3.toml", &mesh("Nowhere = [0, 0, 1]")).expect_err("refused");
    assert!(
        format!("{err}").contains("mesh.profile_axes.Nowhere"),
        "{err}"
    );
    let err = load_text(dir.path(), "mesh4.toml", &mesh("Walls = [0, 0, 0]")).expect_err("refused");
    assert!(format!("{err}").contains("non-zero"), "{err}");

    // The box: ribs along z on the wall at y = size.
    let boxed = |axes: &str| {
        format!(
            "{MATERIALS}\n[box]\nsize_m = [4, 3, 2.5]\nfloor = \"plaster\"\nceiling = \"plaster\"\nwalls = \"plaster\"\ny1 = \"panel\"\nprofile_axes = {{ {axes} }}\n{PLACEMENTS}"
        )
    };
    let room = load_text(dir.path(), "box.toml", &boxed("y1 = [0, 0, 1]"))
        .unwrap()
        .room;
    for s in &room.surfaces {
        let expected = (s.group == "y1").then_some(DVec3::Z);
        assert_eq!(s.profile_axis, expected, "{}", s.label);
    }
    let err = load_text(dir.path(), "box2.toml", &boxed("rear = [0, 0, 1]")).expect_err("refused");
    assert!(
        format!("{err}").contains("box.profile_axes: `rear` is not a face"),
        "{err}"
    );
}
