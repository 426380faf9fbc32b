//! `polaray run`: the files it writes (through the library writers, on a room
//! built in code) and the command's handling of bad input.

mod common;

use assert_cmd::Command;
use common::*;
use glam::DVec3;
use polaray::law::LawKind;
use polaray::report::{self, echogram_csv, EchogramKind};
use polaray::room::Room;
use polaray::trace::{self, TraceOptions};

fn room() -> Room {
    shoebox(
        DVec3::new(6.0, 5.0, 3.0),
        uniform_material("plaster", 0.1, 0.3),
        settings(&[500, 1000, 2000], true),
        DVec3::new(1.5, 1.5, 1.2),
        &[
            (DVec3::new(4.5, 3.5, 1.2), None),
            (DVec3::new(2.0, 4.0, 1.7), Some(0.5)),
        ],
    )
}

fn options(room: &Room) -> TraceOptions {
    let mut o = TraceOptions::from_room(room, LawKind::Split);
    o.rays = 1500;
    o.duration_s = 0.3;
    o
}

#[test]
fn writes_result_json_echogram_tables_and_charts() {
    let room = room();
    let options = options(&room);
    let result = trace::run(&room, &options).unwrap();
    let dir = tempfile::tempdir().unwrap();
    let written = report::write_run(dir.path(), &room, &options, &result, vec![]).unwrap();
    let names: Vec<String> = written
        .iter()
        .map(|p| p.file_name().unwrap().to_string_lossy().into_owned())
        .collect();
    assert_eq!(
        names,
        [
            "result.json",
            "echograms.csv",
            "echograms-lateral.csv",
            "echogram-R1.png",
            "echogram-R2.png",
            "parameters.csv",
            "decay-R1.png",
            "decay-R2.png"
        ]
    );
    // No temporary files left behind.
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 8);

    // result.json holds the documented keys with sensible values.
    let json: serde_json::Value =
        serde_json::from_slice(&std::fs::read(dir.path().join("result.json")).unwrap()).unwrap();
    assert!((json["room"]["volume_m3"].as_f64().unwrap() - 90.0).abs() < 1e-9);
    assert!((json["room"]["area_m2"].as_f64().unwrap() - 126.0).abs() < 1e-9);
    assert!((json["room"]["mean_free_path_m"].as_f64().unwrap() - 360.0 / 126.0).abs() < 1e-9);
    assert_eq!(json["room"]["sabine_s"].as_array().unwrap().len(), 3);
    assert_eq!(json["room"]["eyring_s"].as_array().unwrap().len(), 3);
    let s = &json["settings"];
    assert_eq!(s["law"], "split");
    assert_eq!(s["rays"], 1500);
    assert_eq!(s["bands_hz"], serde_json::json!([500, 1000, 2000]));
    assert_eq!(s["bin_s"], 0.001);
    assert_eq!(s["duration_s"], 0.3);
    assert!(s["speed_of_sound_m_s"].as_f64().unwrap() > 340.0);
    // ISO 9613-1 at 20 °C, 50 %: 4.66 dB/km at 1 kHz (reference.md §5).
    assert!((s["air_attenuation_db_per_km"][1].as_f64().unwrap() - 4.665).abs() < 0.01);
    for key in ["temperature_c", "humidity_pct", "pressure_kpa", "seed"] {
        assert!(s[key].is_number(), "settings.{key}");
    }
    let st = &json["stats"];
    assert!(st["segments"].as_u64().unwrap() > 1500);
    assert!(st["traced_mean_free_path_m"].as_f64().unwrap() > 2.0);
    assert_eq!(st["lost_rays"], 0);
    assert!(st["wall_time_s"].as_f64().unwrap() >= 0.0);
    let receivers = json["receivers"].as_array().unwrap();
    assert_eq!(receivers[0]["name"], "R1");
    assert_eq!(receivers[1]["radius_m"], 0.5);
    assert_eq!(
        receivers[0]["radius_m"].as_f64().unwrap(),
        result.receivers[0].radius_m
    );
    assert!(json["advisory"].as_str().unwrap().contains("advisory"));

    // echograms.csv: header, one row per bin, sums equal the traced totals.
    let csv = std::fs::read_to_string(dir.path().join("echograms.csv")).unwrap();
    let mut lines = csv.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    assert_eq!(header[..4], ["time_s", "R1:500", "R1:1000", "R1:2000"]);
    assert_eq!(header.len(), 7);
    let rows: Vec<Vec<f64>> = lines
        .map(|l| l.split(',').map(|x| x.parse().unwrap()).collect())
        .collect();
    assert_eq!(rows.len(), 300);
    assert_eq!(rows[7][0], 0.007);
    let sum_r2_1k: f64 = rows.iter().map(|r| r[5]).sum();
    let expected = result.pair(0, 1).echogram.total()[1];
    assert!((sum_r2_1k / expected - 1.0).abs() < 1e-12);
    let lateral = std::fs::read_to_string(dir.path().join("echograms-lateral.csv")).unwrap();
    assert_eq!(lateral.lines().next(), csv.lines().next());
    assert_eq!(lateral.lines().count(), csv.lines().count());

    let png = std::fs::read(dir.path().join("echogram-R1.png")).unwrap();
    assert_eq!(&png[..4], b"\x89PNG");
}

#[test]
fn echogram_table_bytes_do_not_depend_on_threads() {
    let room = room();
    let options = options(&room);
    let csv = |threads| {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap();
        let r = pool.install(|| trace::run(&room, &options)).unwrap();
        (
            echogram_csv(&r, EchogramKind::Energy),
            echogram_csv(&r, EchogramKind::Lateral),
        )
    };
    assert_eq!(csv(1), csv(2));
}

#[test]
fn several_sources_get_prefixed_columns() {
    let mut room = room();
    room.sources.push(polaray::room::Source {
        name: "S2".into(),
        position: DVec3::new(5.0, 1.0, 1.5),
    });
    let mut options = options(&room);
    options.rays = 200;
    let result = trace::run(&room, &options).unwrap();
    let csv = echogram_csv(&result, EchogramKind::Energy);
    let header = csv.lines().next().unwrap();
    assert!(header.starts_with("time_s,S1/R1:500,"), "{header}");
    assert!(header.ends_with("S2/R2:2000"), "{header}");
    assert_eq!(report::plot_file_name(&result, 1, 0), "echogram-S2-R1.png");
}

#[test]
fn missing_room_file_is_a_clear_error() {
    let dir = tempfile::tempdir().unwrap();
    let missing = dir.path().join("no-such-room.toml");
    let out = Command::cargo_bin("polaray")
        .unwrap()
        .args(["run", missing.to_str().unwrap(), "--quiet", "--out"])
        .arg(dir.path().join("out"))
        .output()
        .unwrap();
    assert!(!out.status.success());
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(stderr.contains("no-such-room.toml"), "{stderr}");
    // Plain words, said once: no system codes, no repeated cause.
    assert!(stderr.contains("no such file"), "{stderr}");
    assert!(!stderr.contains("os error"), "{stderr}");
    assert_eq!(stderr.matches("no such file").count(), 1, "{stderr}");
    assert!(
        !dir.path().join("out").exists(),
        "output folder created for a failed run"
    );
}

#[test]
fn unknown_law_is_rejected_with_the_choices() {
    let out = Command::cargo_bin("polaray")
        .unwrap()
        .args(["run", "room.toml", "--law", "nonesuch"])
        .output()
        .unwrap();
    assert!(!out.status.success());
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(
        stderr.contains("nonesuch") && stderr.contains("split"),
        "{stderr}"
    );
}
