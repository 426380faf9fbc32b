//! `polaray check` on good and bad room files: exit codes, and messages that
//! name the file, the item and what is wrong.

use assert_cmd::Command;
use predicates::prelude::*;

fn check(file: &str) -> assert_cmd::assert::Assert {
    Command::cargo_bin("polaray")
        .expect("binary builds")
        .args(["check", file])
        .assert()
}

/// Runs `check` on a bad file and asserts a non-zero exit whose stderr starts
/// with `Error:`, names the file and contains every fragment.
fn rejects(file: &str, fragments: &[&str]) {
    let out = Command::cargo_bin("polaray")
        .expect("binary builds")
        .args(["check", file])
        .output()
        .expect("runs");
    assert!(!out.status.success(), "{file} was accepted");
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.starts_with("Error: "), "{err}");
    assert!(err.contains(file), "file not named: {err}");
    for f in fragments {
        assert!(err.contains(f), "`{f}` missing from: {err}");
    }
}

#[test]
fn reference_rooms_pass_with_report() {
    for room in [
        "rooms/shoebox.toml",
        "rooms/skewed.toml",
        "rooms/mesh-room.toml",
        "demo-rooms/recital-hall.toml",
    ] {
        check(room).success().stdout(
            predicate::str::contains("volume")
                .and(predicate::str::contains("m³"))
                .and(predicate::str::contains("mean free path"))
                .and(predicate::str::contains("Sabine T, s"))
                .and(predicate::str::contains("Eyring T, s"))
                .and(predicate::str::contains("no warnings")),
        );
    }
}

#[test]
fn open_shoebox_passes_with_a_warning() {
    check("rooms/open-shoebox.toml")
        .success()
        .stdout(predicate::str::contains("open model").and(predicate::str::contains("open edge")));
}

#[test]
fn not_closed_names_the_edge_and_surface() {
    rejects(
        "tests/data/rooms/not-closed.toml",
        &[
            "room not closed",
            "(4.000, 3.000, 0.000)–(0.000, 3.000, 0.000)",
            "surfaces[0]",
            "settings.open",
        ],
    );
}

#[test]
fn inconsistent_normals_in_an_open_model_are_errors() {
    rejects(
        "tests/data/rooms/inconsistent-open.toml",
        &["surfaces[0] and surfaces[2]", "reverse the vertex order"],
    );
}

#[test]
fn outward_normals_of_a_closed_room_are_fixed_and_reported() {
    check("tests/data/rooms/outward-normals.toml")
        .success()
        .stdout(
            predicate::str::contains("normals of 6 surface(s)")
                .and(predicate::str::contains("reversed"))
                .and(predicate::str::contains("volume          30.000 m³")),
        );
    check("tests/data/rooms/one-flipped.toml").success().stdout(
        predicate::str::contains("normals of 1 surface(s)")
            .and(predicate::str::contains("surfaces[3]")),
    );
}

#[test]
fn degenerate_polygons_are_all_reported() {
    rejects(
        "tests/data/rooms/degenerate.toml",
        &[
            "3 problems",
            "surfaces[0]: a polygon needs at least 3 vertices, found 2",
            "surfaces[1]: vertices 2 and 3 are the same point",
            "surfaces[2]: zero area",
        ],
    );
}

#[test]
fn non_planar_polygon_states_the_tolerance() {
    rejects(
        "tests/data/rooms/non-planar.toml",
        &["surfaces[0]: not planar", "tolerance 0.001 m"],
    );
}

#[test]
fn self_crossing_polygon_is_rejected() {
    rejects(
        "tests/data/rooms/self-crossing.toml",
        &["surfaces[0]", "cannot be split into triangles"],
    );
}

#[test]
fn source_outside_the_room() {
    rejects(
        "tests/data/rooms/source-outside.toml",
        &["sources[0] (S1)", "outside the room"],
    );
}

#[test]
fn receiver_sphere_reaching_a_surface() {
    rejects(
        "tests/data/rooms/receiver-too-close.toml",
        &["receivers[0] (R1)", "radius 0.3 m", "box.floor"],
    );
}

#[test]
fn coefficients_outside_unit_interval() {
    rejects(
        "tests/data/rooms/coefficient-range.toml",
        &[
            "materials.plaster.absorption[2]: 1.3 is outside [0, 1]",
            "materials.plaster.scattering[0]: -0.05 is outside [0, 1]",
        ],
    );
}

#[test]
fn unknown_material() {
    rejects(
        "tests/data/rooms/unknown-material.toml",
        &["box.ceiling", "material `plastr` is not defined"],
    );
}

#[test]
fn band_count_disagrees_with_bands() {
    rejects(
        "tests/data/rooms/band-count.toml",
        &["materials.plaster.absorption: expected 4 values", "found 6"],
    );
}

#[test]
fn bad_settings_are_all_reported() {
    rejects(
        "tests/data/rooms/bad-settings.toml",
        &[
            "settings.rays: must be at least 1",
            "settings.bin_s",
            "settings.bands_hz: 1250 Hz is not an octave-band centre",
        ],
    );
}

#[test]
fn schema_and_syntax_errors_carry_line_numbers() {
    rejects(
        "tests/data/rooms/typo-field.toml",
        &["line 4", "unknown field `absorbtion`"],
    );
    rejects("tests/data/rooms/syntax-error.toml", &["line 5"]);
}

#[test]
fn unreadable_and_broken_obj_files() {
    rejects(
        "tests/data/rooms/missing-obj.toml",
        &["mesh.file: cannot read the OBJ file", "does-not-exist.obj"],
    );
    rejects(
        "tests/data/rooms/bad-obj.toml",
        &["broken.obj, line 5", "broken.obj, line 7", "vertex 9"],
    );
}

#[test]
fn unmapped_obj_name() {
    rejects(
        "tests/data/rooms/unmapped-obj.toml",
        &["mesh.materials", "`Seats`", "two-names.obj"],
    );
}

#[test]
fn missing_sources_and_receivers() {
    rejects(
        "tests/data/rooms/no-sources.toml",
        &["no sources", "no receivers"],
    );
}

#[test]
fn missing_room_file() {
    rejects(
        "tests/data/rooms/no-such-room.toml",
        &["cannot read the room file"],
    );
}

#[test]
fn json_report_of_a_good_room() {
    let out = Command::cargo_bin("polaray")
        .unwrap()
        .args(["check", "rooms/shoebox.toml", "--json"])
        .output()
        .unwrap();
    assert!(out.status.success());
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).expect("valid JSON");
    assert_eq!(v["ok"], true);
    let room = &v["room"];
    // 8 × 6 × 3.5 m box: V = 168 m³, S = 2(48 + 28 + 21) = 194 m² (hand computation).
    assert!((room["volume_m3"].as_f64().unwrap() - 168.0).abs() < 1e-9);
    assert!((room["area_m2"].as_f64().unwrap() - 194.0).abs() < 1e-9);
    assert!((room["mean_free_path_m"].as_f64().unwrap() - 4.0 * 168.0 / 194.0).abs() < 1e-9);
    assert_eq!(room["bands_hz"].as_array().unwrap().len(), 6);
    assert_eq!(room["sabine_s"].as_array().unwrap().len(), 6);
    assert_eq!(room["eyring_s"].as_array().unwrap().len(), 6);
    assert!(v["warnings"].as_array().unwrap().is_empty());
    assert!(v["problems"].as_array().unwrap().is_empty());
}

#[test]
fn json_report_of_a_bad_room_lists_problems_and_fails() {
    let out = Command::cargo_bin("polaray")
        .unwrap()
        .args(["check", "tests/data/rooms/degenerate.toml", "--json"])
        .output()
        .unwrap();
    assert!(!out.status.success());
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).expect("valid JSON");
    assert_eq!(v["ok"], false);
    assert_eq!(v["problems"].as_array().unwrap().len(), 3);
    assert!(String::from_utf8_lossy(&out.stderr).starts_with("Error: "));
}

#[test]
fn open_model_facing_outward_is_rejected() {
    rejects(
        "tests/data/rooms/open-outward.toml",
        &["sources[0] (S1)", "receivers[0] (R1)", "face away"],
    );
}

#[test]
fn edge_shared_by_three_surfaces() {
    rejects(
        "tests/data/rooms/overused-edge.toml",
        &["is shared by 3 surfaces (surfaces[0], surfaces[4], surfaces[6])"],
    );
}

#[test]
fn receiver_outside_the_room() {
    rejects(
        "tests/data/rooms/receiver-outside.toml",
        &[
            "receivers[0] (R1)",
            "(3.000, 2.000, 3.200) is outside the room",
        ],
    );
}

#[test]
fn impossible_scattering_diffusion_pair() {
    // reference.md §3: with s = 0.1 the bound is d_max = 0.143 (37 receivers,
    // 5 in the zone), so d = 0.6 at 125 Hz is refused, and only that band.
    rejects(
        "tests/data/rooms/impossible-diffusion.toml",
        &["materials.panel", "125 Hz", "exceeds", "0.143"],
    );
    let out = check("tests/data/rooms/impossible-diffusion.toml")
        .get_output()
        .clone();
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(!stderr.contains("250 Hz"), "{stderr}");
}

#[test]
fn an_unusable_material_goniometer_is_named() {
    rejects(
        "tests/data/rooms/bad-goniometer.toml",
        &[
            "materials.panel.goniometer",
            "specular zone",
            "37 receivers",
        ],
    );
}

/// A diffusion coefficient below the least even response the bounded law
/// can give for its s (0.110 at s = 0.05 on the standard 37-receiver arc with
/// 5 zone receivers, `src/law/bounded.rs`) is raised by `run --law bounded`;
/// `check` says so in the same words, so the two never disagree.
#[test]
fn check_warns_where_the_bounded_law_would_change_the_diffusion_data() {
    let dir = tempfile::tempdir().unwrap();
    let room = dir.path().join("low-d.toml");
    std::fs::write(
        &room,
        r#"name = "low d"
[settings]
bands_hz = [500, 1000]
rays = 2000
[materials.wall]
absorption = [0.1, 0.1]
scattering = [0.05, 0.05]
diffusion = [0.02, 0.12]
[box]
size_m = [6.0, 5.0, 3.0]
floor = "wall"
ceiling = "wall"
walls = "wall"
[[sources]]
name = "S1"
position = [1.0, 1.0, 1.5]
[[receivers]]
name = "R1"
position = [4.0, 3.0, 1.2]
"#,
    )
    .unwrap();
    let checked = Command::cargo_bin("polaray")
        .unwrap()
        .args(["check", room.to_str().unwrap()])
        .output()
        .unwrap();
    assert!(checked.status.success());
    let text = String::from_utf8_lossy(&checked.stdout);
    let ran = Command::cargo_bin("polaray")
        .unwrap()
        .args(["run", room.to_str().unwrap(), "--law", "bounded", "--quiet"])
        .arg("--out")
        .arg(dir.path().join("res"))
        .output()
        .unwrap();
    assert!(ran.status.success());
    let run_warnings = String::from_utf8_lossy(&ran.stderr);
    let adjustment = run_warnings
        .lines()
        .find(|l| l.contains("the bounded law uses d = 0.110"))
        .unwrap_or_else(|| panic!("run did not warn: {run_warnings}"));
    let words = adjustment.trim_start_matches("warning: ");
    assert!(
        text.contains(&format!("under `--law bounded`: {words}")),
        "check does not say what run says ({words}):\n{text}"
    );
    assert!(!text.contains("1000 Hz: s = 0.050, d = 0.120"), "{text}");
}
