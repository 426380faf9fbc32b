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
