//! `polaray polar` on the real binary: results, files written, and clear
//! errors for bad input.

use std::path::{Path, PathBuf};

use assert_cmd::Command;
use predicates::prelude::*;

fn data(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data/polar")
        .join(name)
}

fn polaray() -> Command {
    Command::cargo_bin("polaray").unwrap()
}

/// The demo TOML with one edit applied, written to a temporary folder.
fn edited_demo(dir: &Path, mut edit: impl FnMut(&mut Vec<String>)) -> PathBuf {
    let text = std::fs::read_to_string(data("demo-qrd.toml")).unwrap();
    let mut lines: Vec<String> = text.lines().map(str::to_string).collect();
    edit(&mut lines);
    let path = dir.join("edited.toml");
    std::fs::write(&path, lines.join("\n")).unwrap();
    path
}

/// Index (0-based) of the `n`-th line starting with `prefix`.
fn nth_line(lines: &[String], prefix: &str, n: usize) -> usize {
    lines
        .iter()
        .enumerate()
        .filter(|(_, l)| l.starts_with(prefix))
        .nth(n)
        .unwrap()
        .0
}

#[test]
fn toml_json_report_and_files() {
    let dir = tempfile::tempdir().unwrap();
    let out = polaray()
        .args([
            "polar",
            data("demo-qrd.toml").to_str().unwrap(),
            "--json",
            "--out",
        ])
        .arg(dir.path())
        .assert()
        .success()
        .get_output()
        .stdout
        .clone();
    let v: serde_json::Value = serde_json::from_slice(&out).unwrap();
    let bands = v["bands"].as_array().unwrap();
    // Demo file: 3 bands × 5 incidences.
    assert_eq!(bands.len(), 15);
    for b in bands {
        assert_eq!(b["receivers"], 37);
        let d = b["d"].as_f64().unwrap();
        let d_max = b["d_max"].as_f64().unwrap();
        // reference.md §3: every response lies on or under the bound.
        assert!(d <= d_max + 1e-12, "{b}");
        assert!((0.0..=1.0).contains(&b["s_corr"].as_f64().unwrap()));
        assert!(b["d_n"].is_f64());
        assert!((b["d_ratio"].as_f64().unwrap() - d / d_max).abs() < 1e-12);
    }
    let random = v["random_incidence"]["bands"].as_array().unwrap();
    assert_eq!(random.len(), 3);
    let weights: f64 = random[0]["incidence_weights"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w["weight"].as_f64().unwrap())
        .sum();
    assert!((weights - 1.0).abs() < 1e-12);
    // Charts: 15 polar charts and 5 bound charts, PNG and SVG each, plus the JSON.
    let files = v["files"].as_array().unwrap();
    assert_eq!(files.len(), 41);
    for f in files {
        let p = Path::new(f.as_str().unwrap());
        assert!(p.metadata().unwrap().len() > 1000, "{}", p.display());
    }
    let png = std::fs::read(dir.path().join("polar-1000hz-inc30.png")).unwrap();
    assert_eq!(&png[1..4], b"PNG");
    let svg = std::fs::read_to_string(dir.path().join("bound-inc0.svg")).unwrap();
    assert!(svg.contains("<svg") && svg.contains("diffusion coefficient"));
    // No temporary files left behind.
    assert!(std::fs::read_dir(dir.path()).unwrap().all(|e| !e
        .unwrap()
        .file_name()
        .to_string_lossy()
        .starts_with('.')));
}

#[test]
fn csv_with_half_width_zone_and_reference() {
    let dir = tempfile::tempdir().unwrap();
    let out = polaray()
        .args(["polar", data("demo-qrd-normal.csv").to_str().unwrap()])
        .args([
            "--incidence-deg",
            "0",
            "--zone-half-width-deg",
            "10",
            "--json",
        ])
        .args([
            "--reference",
            data("demo-flat-normal.csv").to_str().unwrap(),
        ])
        .arg("--out")
        .arg(dir.path())
        .assert()
        .success()
        .get_output()
        .stdout
        .clone();
    let v: serde_json::Value = serde_json::from_slice(&out).unwrap();
    let bands = v["bands"].as_array().unwrap();
    assert_eq!(bands.len(), 3);
    for b in bands {
        // Zone: receivers within 10° of the normal on a 5° arc: 0, ±5, ±10.
        assert_eq!(b["zone_receivers"], 5);
        assert_eq!(b["incidence_deg"], 0.0);
        assert!(b["s_corr"].is_null());
        assert!(b["d_n"].is_f64());
    }
    // Same data as the TOML demo at normal incidence: same d (levels rounded to
    // 0.001 dB in the CSV, 0.0001 dB in the TOML).
    let toml_out = polaray()
        .args([
            "polar",
            data("demo-qrd.toml").to_str().unwrap(),
            "--json",
            "--out",
        ])
        .arg(dir.path().join("toml"))
        .assert()
        .success()
        .get_output()
        .stdout
        .clone();
    let t: serde_json::Value = serde_json::from_slice(&toml_out).unwrap();
    let t500 = t["bands"]
        .as_array()
        .unwrap()
        .iter()
        .find(|b| b["band_hz"] == 500.0 && b["incidence_deg"] == 0.0)
        .unwrap();
    assert!((t500["d"].as_f64().unwrap() - bands[0]["d"].as_f64().unwrap()).abs() < 1e-4);
}

#[test]
fn table_names_the_incidence_and_columns() {
    let dir = tempfile::tempdir().unwrap();
    polaray()
        .args(["polar", data("demo-qrd-normal.csv").to_str().unwrap()])
        .args(["--incidence-deg", "0", "--sample-width-m", "1.5"])
        .args([
            "--source-distance-m",
            "10",
            "--receiver-distance-m",
            "5",
            "--out",
        ])
        .arg(dir.path())
        .assert()
        .success()
        .stdout(predicate::str::contains("incidence"))
        .stdout(predicate::str::contains("d/d_max"))
        // One response at 0° is no random-incidence value, and it says so.
        .stdout(predicate::str::contains(
            "Random incidence: not formed, the data hold one angle of incidence only",
        ))
        .stderr(predicate::str::contains(
            "no random-incidence value can be formed",
        ));
}

#[test]
fn csv_without_zone_or_incidence_is_refused() {
    polaray()
        .args([
            "polar",
            data("demo-qrd-normal.csv").to_str().unwrap(),
            "--incidence-deg",
            "0",
        ])
        .assert()
        .failure()
        .stderr(predicate::str::contains("--zone-half-width-deg"));
    polaray()
        .args([
            "polar",
            data("demo-qrd-normal.csv").to_str().unwrap(),
            "--zone-half-width-deg",
            "10",
        ])
        .assert()
        .failure()
        .stderr(predicate::str::contains("--incidence-deg"));
}

#[test]
fn missing_band_names_the_table_line() {
    let dir = tempfile::tempdir().unwrap();
    let mut removed_at = 0;
    let path = edited_demo(dir.path(), |lines| {
        let i = nth_line(lines, "band_hz", 3);
        lines.remove(i);
    });
    // The error points at the `[[responses]]` header of that table.
    let text = std::fs::read_to_string(&path).unwrap();
    let lines: Vec<String> = text.lines().map(str::to_string).collect();
    for (i, l) in lines.iter().enumerate() {
        if l == "[[responses]]" {
            removed_at += 1;
            if removed_at == 4 {
                let expected = format!("line {}", i + 1);
                polaray()
                    .args(["polar", path.to_str().unwrap()])
                    .assert()
                    .failure()
                    .stderr(predicate::str::contains(expected))
                    .stderr(predicate::str::contains("missing field `band_hz`"));
                return;
            }
        }
    }
    panic!("no fourth response table");
}

#[test]
fn receiver_count_mismatch_names_the_line() {
    let dir = tempfile::tempdir().unwrap();
    let mut line_no = 0;
    let path = edited_demo(dir.path(), |lines| {
        let i = nth_line(lines, "level_db", 1);
        let l = lines[i].clone();
        lines[i] = format!("{}]", l.rsplit_once(',').unwrap().0);
        line_no = i + 1;
    });
    polaray()
        .args(["polar", path.to_str().unwrap()])
        .assert()
        .failure()
        .stderr(predicate::str::contains(format!(
            "line {line_no}: responses[1].level_db"
        )))
        .stderr(predicate::str::contains(
            "has 36 values but receiver_deg has 37",
        ));
}

#[test]
fn non_numeric_and_nan_levels_name_the_line() {
    let dir = tempfile::tempdir().unwrap();
    let mut line_no = 0;
    let path = edited_demo(dir.path(), |lines| {
        let i = nth_line(lines, "level_db", 2);
        lines[i] = lines[i].replacen("[", "[\"loud\", ", 1);
        line_no = i + 1;
    });
    polaray()
        .args(["polar", path.to_str().unwrap()])
        .assert()
        .failure()
        .stderr(predicate::str::contains(format!(
            "line {line_no}: level_db"
        )))
        .stderr(predicate::str::contains("invalid type"));
    let path = edited_demo(dir.path(), |lines| {
        let i = nth_line(lines, "level_db", 2);
        let l = lines[i].clone();
        // Replace the first value by nan, keeping 37 values.
        let (head, rest) = l.split_once('[').unwrap();
        let rest = rest.split_once(',').unwrap().1;
        lines[i] = format!("{head}[nan,{rest}");
        line_no = i + 1;
    });
    polaray()
        .args(["polar", path.to_str().unwrap()])
        .assert()
        .failure()
        .stderr(predicate::str::contains(format!(
            "line {line_no}: responses[2].level_db[0]: NaN is not a finite level in dB"
        )));
}

#[test]
fn angle_and_geometry_problems_are_listed() {
    let dir = tempfile::tempdir().unwrap();
    let path = edited_demo(dir.path(), |lines| {
        let i = nth_line(lines, "incidence_deg", 0);
        lines[i] = "incidence_deg = 95.0".into();
        let j = nth_line(lines, "arrangement", 0);
        lines[j] = "arrangement = \"hemisphere\"".into();
    });
    polaray()
        .args(["polar", path.to_str().unwrap()])
        .assert()
        .failure()
        .stderr(predicate::str::contains("strictly between −90° and 90°"))
        .stderr(predicate::str::contains(
            "hemispherical data need receiver_azimuth_deg",
        ));
    let path = edited_demo(dir.path(), |lines| {
        let j = nth_line(lines, "arrangement", 0);
        lines[j] = "arrangement = \"sphere\"".into();
    });
    polaray()
        .args(["polar", path.to_str().unwrap()])
        .assert()
        .failure()
        .stderr(predicate::str::contains("unknown variant `sphere`"));
}

#[test]
fn bad_csv_names_line_and_column() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("bad.csv");
    std::fs::write(
        &path,
        "angle_deg,500,1000\n-10,1.0,2.0\n0,x,3.0\n10,4.0,inf\n",
    )
    .unwrap();
    polaray()
        .args([
            "polar",
            path.to_str().unwrap(),
            "--incidence-deg",
            "0",
            "--zone-half-width-deg",
            "5",
        ])
        .assert()
        .failure()
        .stderr(predicate::str::contains(
            "line 3: column 2 (500 Hz): `x` is not a level in dB",
        ))
        .stderr(predicate::str::contains(
            "line 4: column 3 (1000 Hz): inf is not a finite number",
        ));
}

#[test]
fn chamber_prints_per_band_coefficients() {
    let out = polaray()
        .args([
            "polar",
            "--chamber",
            data("demo-chamber.toml").to_str().unwrap(),
            "--json",
        ])
        .assert()
        .success()
        .get_output()
        .stdout
        .clone();
    let v: serde_json::Value = serde_json::from_slice(&out).unwrap();
    let b0 = &v["bands"][0];
    // Worked example in polar_coefficients.rs (ISO 17497-1 formulas by hand).
    assert!((b0["s"].as_f64().unwrap() - 0.074698).abs() < 1e-6);
    assert_eq!(v["bands"].as_array().unwrap().len(), 4);
    polaray()
        .args([
            "polar",
            "--chamber",
            data("demo-chamber.toml").to_str().unwrap(),
        ])
        .assert()
        .success()
        .stdout(predicate::str::contains("alpha_spec"));
}

#[test]
fn bad_chamber_file_names_the_line() {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(data("demo-chamber.toml")).unwrap();
    let bad = text.replacen("[4.0, 3.8, 3.3, 2.5]", "[4.0, 3.8, 3.3]", 1);
    let line = bad
        .lines()
        .position(|l| l.contains("[4.0, 3.8, 3.3]"))
        .unwrap()
        + 1;
    let path = dir.path().join("chamber.toml");
    std::fs::write(&path, bad).unwrap();
    polaray()
        .args(["polar", "--chamber", path.to_str().unwrap()])
        .assert()
        .failure()
        .stderr(predicate::str::contains(format!(
            "line {line}: sample_still.reverberation_time_s: has 3 values but bands_hz has 4"
        )));
}

#[test]
fn hemispherical_data_use_area_weights_and_plot_the_plane_of_incidence() {
    // 10° grid: the pole once, rings at 10° azimuth steps.
    let mut polar = vec![0.0];
    let mut azimuth = vec![0.0];
    for k in 1..=9 {
        for j in 0..36 {
            polar.push(10.0 * f64::from(k));
            azimuth.push(10.0 * f64::from(j));
        }
    }
    let list = |v: &[f64]| {
        let s: Vec<String> = v.iter().map(|x| format!("{x:.1}")).collect();
        format!("[{}]", s.join(", "))
    };
    // 1 kHz uniform; 2 kHz a lobe towards the mirror direction (30°, 180°).
    let lobe: Vec<f64> = polar
        .iter()
        .zip(&azimuth)
        .map(|(&t, &a)| {
            let (t, a) = (f64::to_radians(t), f64::to_radians(a));
            let v = [t.sin() * a.cos(), t.sin() * a.sin(), t.cos()];
            let m = [-(30f64.to_radians().sin()), 0.0, 30f64.to_radians().cos()];
            let c = v[0] * m[0] + v[1] * m[1] + v[2] * m[2];
            10.0 * (0.05 + c.max(0.0).powi(8)).log10()
        })
        .collect();
    let mut text = String::from(
        "name = \"hemisphere test\"\n[geometry]\narrangement = \"hemisphere\"\nsample_width_m = 2.0\nsource_distance_m = 10.0\nreceiver_distance_m = 5.0\nzone_half_width_deg = 15.0\n",
    );
    for (band, levels) in [(1000.0, vec![0.0; polar.len()]), (2000.0, lobe)] {
        text += &format!(
            "\n[[responses]]\nband_hz = {band:.1}\nincidence_deg = 30.0\nincidence_azimuth_deg = 0.0\nreceiver_deg = {}\nreceiver_azimuth_deg = {}\nlevel_db = {}\n",
            list(&polar),
            list(&azimuth),
            list(&levels)
        );
    }
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("hemi.toml");
    std::fs::write(&path, text).unwrap();
    // The default output folder is `<stem>-polar/` in the working folder.
    let out = polaray()
        .current_dir(dir.path())
        .args(["polar", path.to_str().unwrap(), "--json"])
        .assert()
        .success()
        .get_output()
        .stdout
        .clone();
    let v: serde_json::Value = serde_json::from_slice(&out).unwrap();
    let uniform = &v["bands"][0];
    // ISO 17497-2 clause 8: a uniform response is fully diffuse (area-weighted),
    // and it sits at s* where the weighted bound is 1 (polar::bound derivation).
    assert!((uniform["d"].as_f64().unwrap() - 1.0).abs() < 1e-12);
    assert!((uniform["d_max"].as_f64().unwrap() - 1.0).abs() < 1e-12);
    let lobe = &v["bands"][1];
    assert!(lobe["d"].as_f64().unwrap() < 0.5);
    assert!(lobe["d"].as_f64().unwrap() <= lobe["d_max"].as_f64().unwrap() + 1e-12);
    assert!(dir
        .path()
        .join("hemi-polar/polar-2000hz-inc30-az0.png")
        .exists());
}

#[test]
fn a_closed_stdout_neither_panics_nor_loses_the_files() {
    // `polaray polar … | head -1`: the reader goes away; the command must
    // still write its files and exit 0, without a panic message.
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("res");
    let mut child = std::process::Command::new(assert_cmd::cargo::cargo_bin("polaray"))
        .args(["polar"])
        .arg(data("demo-qrd.toml"))
        .arg("--out")
        .arg(&out)
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    drop(child.stdout.take());
    let output = child.wait_with_output().unwrap();
    let stderr = String::from_utf8_lossy(&output.stderr);
    assert!(output.status.success(), "{:?}: {stderr}", output.status);
    assert!(!stderr.contains("panicked"), "{stderr}");
    assert!(std::fs::read_dir(&out).unwrap().count() > 0);
}
