//! `polaray profile` end to end: file written, summary, warnings, errors.

use assert_cmd::Command;
use predicates::prelude::*;
use predicates::str::contains;

#[test]
fn writes_a_polar_file_and_prints_a_summary() {
    let dir = tempfile::tempdir().unwrap();
    let spec = dir.path().join("wall.toml");
    std::fs::write(
        &spec,
        "name = \"wall\"\n[profile]\nkind = \"sinusoid\"\nwidth_m = 1.2\namplitude_m = 0.1\nperiod_m = 0.3\n[goniometer]\nsource_distance_m = 4.0\nreceiver_distance_m = 3.0\nincidence_deg = [0.0, 50.0]\n[bands]\ncentres_hz = [500.0, 1000.0]\n",
    )
    .unwrap();
    let out = dir.path().join("res").join("wall.polar.toml");
    Command::cargo_bin("polaray")
        .unwrap()
        .args([
            "profile",
            spec.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
        ])
        .assert()
        .success()
        .stdout(contains("bands (Hz): 500, 1000"))
        .stderr(contains("faces away from the source"));
    let polar: polaray::polar::PolarFile =
        toml::from_str(&std::fs::read_to_string(&out).unwrap()).unwrap();
    assert_eq!(polar.responses.len(), 4);
    assert!(polar
        .responses
        .iter()
        .all(|r| r.pressure_re.is_some() && r.reference_im.is_some()));
}

#[test]
fn bad_spec_fails_with_file_and_field() {
    let dir = tempfile::tempdir().unwrap();
    let spec = dir.path().join("bad.toml");
    std::fs::write(
        &spec,
        "name = \"b\"\n[profile]\nkind = \"flat\"\nwidth_m = 0.0\n",
    )
    .unwrap();
    let out = dir.path().join("x.toml");
    Command::cargo_bin("polaray")
        .unwrap()
        .args([
            "profile",
            spec.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
        ])
        .assert()
        .failure()
        .stderr(contains("bad.toml").and(contains("profile.width_m = 0")));
    assert!(!out.exists());
}

#[test]
fn predicted_file_is_read_back_by_polar_and_charted() {
    // The profile output is the polar data format: `polaray polar` must read it
    // and compute s_c and d_n from the stored reference (issue contract), and
    // `--plots` draws the same charts as `polaray polar`.
    let dir = tempfile::tempdir().unwrap();
    let spec = dir.path().join("wall.toml");
    std::fs::write(
        &spec,
        "name = \"wall\"\n[profile]\nkind = \"sinusoid\"\nwidth_m = 1.2\namplitude_m = 0.1\nperiod_m = 0.3\n[goniometer]\nsource_distance_m = 4.0\nreceiver_distance_m = 3.0\nincidence_deg = [0.0]\n[bands]\ncentres_hz = [1000.0]\n",
    )
    .unwrap();
    let out = dir.path().join("wall.polar.toml");
    let plots = dir.path().join("plots");
    Command::cargo_bin("polaray")
        .unwrap()
        .args(["profile", spec.to_str().unwrap(), "--out"])
        .arg(&out)
        .arg("--plots")
        .arg(&plots)
        .assert()
        .success();
    assert!(plots.join("polar-1000hz-inc0.png").is_file());
    assert!(plots.join("polar-1000hz-inc0.svg").is_file());
    let json = Command::cargo_bin("polaray")
        .unwrap()
        .args(["polar", "--json", "--out"])
        .arg(dir.path().join("coeffs"))
        .arg(&out)
        .assert()
        .success()
        .get_output()
        .stdout
        .clone();
    let v: serde_json::Value = serde_json::from_slice(&json).unwrap();
    let band = &v["bands"][0];
    assert!(band["s_corr"].as_f64().is_some(), "{band}");
    assert!(band["d_n"].as_f64().is_some(), "{band}");
}
