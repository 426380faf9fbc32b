//! Reading profile specifications: defaults, and errors that name the file and field.

use std::path::Path;

use polaray::profile::{parse_spec, SpecError};

const GOOD: &str = r#"
name = "test"
[profile]
kind = "quadratic_residue"
prime = 7
design_hz = 600.0
well_width_m = 0.05
fin_width_m = 0.005
periods = 4
"#;

fn error_text(text: &str) -> String {
    match parse_spec(text, Path::new("wall.toml")) {
        Ok(_) => panic!("accepted:\n{text}"),
        Err(e) => e.to_string(),
    }
}

#[test]
fn defaults_give_the_usual_goniometer() {
    let spec = parse_spec(GOOD, Path::new("wall.toml")).unwrap();
    // Task defaults: arc −90..90° at 5° (37 receivers), octave bands 125–4000 Hz.
    let arc = polaray::profile::predict::arc_deg(
        spec.goniometer.receiver_start_deg,
        spec.goniometer.receiver_end_deg,
        spec.goniometer.receiver_step_deg,
    );
    assert_eq!(arc.len(), 37);
    assert_eq!(spec.bands.centres_hz.len(), 6);
}

#[test]
fn unknown_field_is_named_with_the_file() {
    let e = error_text(&GOOD.replace("periods = 4", "periods = 4\nwell_depth = 3"));
    assert!(
        e.starts_with("wall.toml:") && e.contains("well_depth"),
        "{e}"
    );
    let e = error_text(&format!("{GOOD}\n[goniometer]\nsource_distance = 5.0\n"));
    assert!(e.contains("source_distance"), "{e}");
}

#[test]
fn bad_values_are_named() {
    let cases = [
        (GOOD.replace("prime = 7", "prime = 9"), "profile.prime = 9"),
        (GOOD.replace("well_width_m = 0.05", "well_width_m = -0.05"), "profile.well_width_m"),
        (GOOD.replace("periods = 4", "periods = 0"), "profile.periods = 0"),
        (
            format!("{GOOD}\n[goniometer]\nreceiver_distance_m = 0.4\n"),
            "goniometer.receiver_distance_m = 0.4",
        ),
        (format!("{GOOD}\n[bands]\ncentres_hz = [125.0, 300.0]\n"), "bands.centres_hz[1] = 300"),
        (
            format!("{GOOD}\n[goniometer]\narrangement = \"hemisphere\"\n"),
            "only grid profiles",
        ),
        (format!("{GOOD}\n[integration]\npoints_per_wavelength = 4.0\n"), "points_per_wavelength = 4"),
        (
            "name = \"p\"\n[profile]\nkind = \"points\"\npoints_m = [[0.0, 0.0], [0.5, 0.1], [0.4, 0.0]]\n".to_string(),
            "profile.points_m[2]",
        ),
        (
            "name = \"p\"\n[profile]\nkind = \"primitive_root\"\nprime = 7\nroot = 2\ndesign_hz = 500.0\nwell_width_m = 0.05\nfin_width_m = 0.0\nperiods = 1\n".to_string(),
            "profile.root = 2: not a primitive root of 7 (the smallest is 3)",
        ),
    ];
    for (text, needle) in cases {
        let e = error_text(&text);
        assert!(
            e.starts_with("wall.toml:") && e.contains(needle),
            "expected {needle:?} in: {e}"
        );
    }
}

#[test]
fn a_missing_file_is_named() {
    let e = polaray::profile::load_spec(Path::new("/nonexistent/wall.toml")).unwrap_err();
    assert!(matches!(e, SpecError::Read { .. }));
    assert!(e.to_string().contains("/nonexistent/wall.toml"));
}
