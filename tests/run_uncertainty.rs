//! `polaray run` in batches: pooling, jackknife standard errors and the
//! warning for values too noisy to read.

mod common;

use assert_cmd::Command;
use common::*;
use glam::DVec3;
use polaray::law::LawKind;
use polaray::metrics::Parameter;
use polaray::report::batches::{delete_one_tables, ValueTable};
use polaray::report::run_parameters;
use polaray::room::Room;
use polaray::trace::{self, TraceOptions};

fn room() -> Room {
    shoebox(
        DVec3::new(6.0, 5.0, 3.0),
        uniform_material("plaster", 0.12, 0.3),
        settings(&[500, 1000], false),
        DVec3::new(1.5, 1.5, 1.2),
        &[
            (DVec3::new(4.5, 3.5, 1.2), Some(0.4)),
            (DVec3::new(2.0, 4.0, 1.7), None),
        ],
    )
}

fn options(room: &Room, rays: usize, seed: u64) -> TraceOptions {
    let mut o = TraceOptions::from_room(room, LawKind::Split);
    o.rays = rays;
    o.seed = seed;
    o.duration_s = 0.8;
    o
}

#[test]
fn pooled_batches_equal_one_run_of_all_their_rays() {
    // Batch b traces stream indices [b·n, (b+1)·n), so four batches of 500
    // rays are the 2,000 rays of one run; only the order of the sums
    // differs (derived here). The default radius counts all 2,000 rays.
    // Detection spheres with independent start directions: the exact-early
    // estimator's start directions are one evenly spread set per batch, so
    // its batches are not pieces of one longer run.
    let room = room();
    let sphere = |rays| TraceOptions {
        estimator: trace::Estimator::Sphere,
        ..options(&room, rays, 5)
    };
    let whole = trace::run(&room, &sphere(2000)).unwrap();
    let batches = trace::run_batches(&room, &sphere(500), 4, &|_| {}).unwrap();
    let pooled = trace::pool(&batches).unwrap();
    assert_eq!(pooled.stats.rays, whole.stats.rays);
    assert_eq!(pooled.stats.segments, whole.stats.segments);
    assert_eq!(pooled.stats.batches, 4);
    for (a, b) in pooled.receivers.iter().zip(&whole.receivers) {
        assert_eq!(a.radius_m, b.radius_m, "{}", a.name);
    }
    let mut compared = 0;
    for (p, w) in pooled.echograms.iter().zip(&whole.echograms) {
        for (x, y) in p.echogram.energy.iter().zip(&w.echogram.energy) {
            for band in 0..2 {
                let scale = x[band].abs().max(y[band].abs()).max(1e-300);
                assert!(
                    (x[band] - y[band]).abs() <= 1e-12 * scale,
                    "{} {}",
                    x[band],
                    y[band]
                );
                compared += usize::from(x[band] > 0.0);
            }
        }
    }
    assert!(compared > 500, "{compared} non-empty bins");
}

#[test]
fn jackknife_standard_errors_match_the_spread_over_seeds() {
    // The jackknife standard error estimates the standard deviation of the
    // pooled value (Efron & Tibshirani 1993, ch. 11; from memory): over
    // independent seeds, the spread of the values and the typical standard
    // error agree. 24 seeds estimate a standard deviation to about ±15 %,
    // so a factor of 1.6 either way would fail only by a gross error (with
    // 12 seeds, D50 under the exact-early estimator came out at 1.61 by
    // chance; seeds 100–111 gave a pass).
    let room = room();
    let slot = 2; // two bands, so slot 2 is the single-number value
    let checked = [
        Parameter::Edt,
        Parameter::T30,
        Parameter::C80,
        Parameter::D50,
        Parameter::Ts,
        Parameter::G,
    ];
    let mut values = vec![Vec::new(); checked.len()];
    let mut errors = vec![Vec::new(); checked.len()];
    for seed in 0..24 {
        let batches = trace::run_batches(&room, &options(&room, 300, seed), 10, &|_| {}).unwrap();
        let pooled = trace::pool(&batches).unwrap();
        let parameters = run_parameters(&pooled);
        let se = ValueTable::standard_errors(&delete_one_tables(&batches, 0)).unwrap();
        for (k, &p) in checked.iter().enumerate() {
            values[k].push(p.of_averages(&parameters[0].averages).unwrap());
            errors[k].push(se.get(p, slot).unwrap());
        }
    }
    for (k, p) in checked.iter().enumerate() {
        let n = values[k].len() as f64;
        let mean = values[k].iter().sum::<f64>() / n;
        let sd = (values[k].iter().map(|v| (v - mean).powi(2)).sum::<f64>() / (n - 1.0)).sqrt();
        let rms_se = (errors[k].iter().map(|e| e * e).sum::<f64>() / n).sqrt();
        let ratio = rms_se / sd;
        assert!(
            (1.0 / 1.6..=1.6).contains(&ratio),
            "{p:?}: spread over seeds {sd:.4}, jackknife {rms_se:.4} (ratio {ratio:.2})"
        );
    }
}

#[test]
fn run_writes_standard_errors_and_warns_when_they_exceed_half_a_jnd() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("res");
    let output = Command::cargo_bin("polaray")
        .unwrap()
        .args([
            "run",
            "rooms/shoebox.toml",
            "--rays",
            "1500",
            "--quiet",
            "--out",
        ])
        .arg(&out)
        .output()
        .unwrap();
    assert!(output.status.success());
    let stdout = String::from_utf8_lossy(&output.stdout);
    let stderr = String::from_utf8_lossy(&output.stderr);
    assert!(stdout.contains("in 20 batches"), "{stdout}");
    assert!(stdout.contains('±'), "{stdout}");
    // At 1,500 rays T30 in the 168 m³ shoebox is far noisier than half a
    // JND (2.5 % of about 2 s, i.e. 0.05 s).
    assert!(
        stderr.contains("standard error above half a JND for")
            && stderr.contains("T30")
            && stderr.contains("rays per source (now 1500)"),
        "{stderr}"
    );
    let json: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("result.json")).unwrap()).unwrap();
    assert_eq!(json["settings"]["batches"], 20);
    // Provenance: the build that computed the numbers (build.rs).
    let build = &json["build"];
    assert!(
        build["compiler"].as_str().unwrap().starts_with("rustc "),
        "{build}"
    );
    assert_eq!(build["version"], env!("CARGO_PKG_VERSION"));
    assert!(!build["target"].as_str().unwrap().is_empty());
    assert!(!build["commit"].as_str().unwrap().is_empty());
    assert_eq!(json["stats"]["batches"], 20);
    let r = &json["receivers"][0];
    let edt_se = r["averages_standard_errors"]["EDT_s"].as_f64().unwrap();
    assert!(edt_se > 0.0 && edt_se < r["averages"]["EDT_s"].as_f64().unwrap());
    assert!(r["bands"][0]["standard_errors"]["C80_db"].as_f64().unwrap() > 0.0);
    assert!(json["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .any(|w| w.as_str().unwrap().contains("half a JND")));
    let csv = std::fs::read_to_string(out.join("parameters.csv")).unwrap();
    let header: Vec<&str> = csv.lines().next().unwrap().split(',').collect();
    let row: Vec<&str> = csv.lines().nth(1).unwrap().split(',').collect();
    let at = header.iter().position(|&h| h == "C80_db_se").unwrap();
    assert!(row[at].parse::<f64>().unwrap() > 0.0, "{row:?}");
}

#[test]
fn one_batch_has_no_standard_errors_and_uneven_batches_are_refused() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("one");
    Command::cargo_bin("polaray")
        .unwrap()
        .args([
            "run",
            "rooms/shoebox.toml",
            "--rays",
            "1500",
            "--batches",
            "1",
            "--quiet",
            "--out",
        ])
        .arg(&out)
        .assert()
        .success();
    let json: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("result.json")).unwrap()).unwrap();
    assert!(json["receivers"][0]
        .get("averages_standard_errors")
        .is_none());

    let output = Command::cargo_bin("polaray")
        .unwrap()
        .args([
            "run",
            "rooms/shoebox.toml",
            "--rays",
            "1000",
            "--batches",
            "3",
            "--out",
        ])
        .arg(dir.path().join("uneven"))
        .output()
        .unwrap();
    assert!(!output.status.success());
    let stderr = String::from_utf8_lossy(&output.stderr);
    assert!(
        stderr.contains("rooms/shoebox.toml")
            && stderr.contains("do not split into 3 equal batches")
            && stderr.contains("1002"),
        "{stderr}"
    );
    assert!(!dir.path().join("uneven").exists());
}
