//! `polaray analyze` end to end: good and bad files.

use assert_cmd::Command;
use predicates::prelude::*;
use std::path::Path;

fn write_wav_i16(path: &Path, samples: &[f64], fs: u32) {
    let spec = hound::WavSpec {
        channels: 1,
        sample_rate: fs,
        bits_per_sample: 16,
        sample_format: hound::SampleFormat::Int,
    };
    let mut w = hound::WavWriter::create(path, spec).unwrap();
    for &s in samples {
        w.write_sample((s * 32767.0).round() as i16).unwrap();
    }
    w.finalize().unwrap();
}

fn polaray() -> Command {
    Command::cargo_bin("polaray").unwrap()
}

#[test]
fn bad_files_fail_with_a_clear_message() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    std::fs::write(d.join("text.wav"), "not a wav file").unwrap();
    std::fs::write(d.join("zero_bytes.wav"), "").unwrap();
    write_wav_i16(&d.join("no_samples.wav"), &[], 48_000);
    write_wav_i16(&d.join("zeros.wav"), &vec![0.0; 48_000], 48_000);
    let mut short = vec![0.0; 2_400];
    short[10] = 0.5;
    write_wav_i16(&d.join("short.wav"), &short, 48_000);
    let mut clipped = vec![0.0; 48_000];
    clipped[100..110].iter_mut().for_each(|v| *v = 1.0);
    write_wav_i16(&d.join("clipped.wav"), &clipped, 48_000);
    for (name, needle) in [
        ("text.wav", "cannot read as a WAV"),
        ("zero_bytes.wav", "cannot read as a WAV"),
        ("no_samples.wav", "no samples"),
        ("zeros.wav", "every sample is zero"),
        ("short.wav", "s of response after the onset"),
        ("clipped.wav", "clipped"),
        ("missing.wav", "cannot read"),
    ] {
        polaray()
            .arg("analyze")
            .arg(d.join(name))
            .assert()
            .failure()
            .stderr(predicate::str::contains(name).and(predicate::str::contains(needle)));
    }
}

#[test]
fn bad_band_list_is_refused() {
    polaray()
        .args(["analyze", "x.wav", "--bands", "1000,1250"])
        .assert()
        .failure()
        .stderr(predicate::str::contains(
            "1250 Hz is not an octave-band centre",
        ));
}

#[test]
fn good_file_gives_table_json_and_chart() {
    use polaray::metrics::synthetic::SyntheticResponse;
    let r = SyntheticResponse {
        sample_rate_hz: 16_000.0,
        duration_s: 1.5,
        onset_s: 0.01,
        direct_amplitude: 0.3,
        bands: vec![(500, 0.8), (1000, 0.8)],
        band_rms: 0.05,
        noise_db: Some(-60.0),
        seed: 7,
        carrier: polaray::metrics::synthetic::Carrier::FlatMultisine,
    };
    let dir = tempfile::tempdir().unwrap();
    let wav = dir.path().join("room.wav");
    write_wav_i16(&wav, &r.samples(), 16_000);
    let json = dir.path().join("out").join("room.json");
    let plots = dir.path().join("plots");
    polaray()
        .arg("analyze")
        .arg(&wav)
        .args(["--bands", "500,1000"])
        .arg("--json")
        .arg(&json)
        .arg("--out")
        .arg(&plots)
        .assert()
        .success()
        .stdout(predicate::str::contains("T30").and(predicate::str::contains("1000")));
    let v: serde_json::Value = serde_json::from_slice(&std::fs::read(&json).unwrap()).unwrap();
    assert_eq!(v["sample_rate_hz"], 16_000.0);
    assert!(v["file"].as_str().unwrap().ends_with("room.wav"));
    let bands = v["bands"].as_array().unwrap();
    assert_eq!(bands.len(), 2);
    for key in [
        "band_hz",
        "EDT_s",
        "T20_s",
        "T30_s",
        "C50_db",
        "C80_db",
        "D50",
        "Ts_s",
        "noise_floor_db",
    ] {
        assert!(bands[0].get(key).is_some(), "missing {key}");
    }
    // 16-bit quantisation and −60 dB noise: T30 of the 0.8 s decay within 5 % (task tolerance).
    let t30 = bands[1]["T30_s"].as_f64().unwrap();
    assert!((t30 / 0.8 - 1.0).abs() < 0.05, "T30 {t30}");
    assert!(v["averages"]["T30_s"].as_f64().is_some());
    assert!(v["onset_s"].as_f64().unwrap() > 0.0);
    let png = plots.join("room-decay.png");
    let bytes = std::fs::read(&png).unwrap();
    assert_eq!(&bytes[1..4], b"PNG");
    // No temporary files left behind.
    assert_eq!(std::fs::read_dir(&plots).unwrap().count(), 1);
}
