//! Whole predictions from specifications: the flat reference, the written file
//! and the committed demo treatments.

use std::path::Path;

use num_complex::Complex64;
use polaray::polar::PolarFile;
use polaray::profile::{parse_spec, predict};

/// Correlation scattering coefficient with equal weights (Mommertz, Applied
/// Acoustics 60 (2000); reference.md §2):
/// s_c = 1 − |Σ p1 p0*|² / (Σ |p1|² Σ |p0|²).
fn correlation_scattering(p1: &[Complex64], p0: &[Complex64]) -> f64 {
    let cross: Complex64 = p1.iter().zip(p0).map(|(a, b)| a * b.conj()).sum();
    let e1: f64 = p1.iter().map(|p| p.norm_sqr()).sum();
    let e0: f64 = p0.iter().map(|p| p.norm_sqr()).sum();
    1.0 - cross.norm_sqr() / (e1 * e0)
}

fn pressures(re: &Option<Vec<f64>>, im: &Option<Vec<f64>>) -> Vec<Complex64> {
    re.as_ref()
        .unwrap()
        .iter()
        .zip(im.as_ref().unwrap())
        .map(|(&a, &b)| Complex64::new(a, b))
        .collect()
}

fn worst_sc(polar: &PolarFile) -> (f64, f64) {
    let sc: Vec<f64> = polar
        .responses
        .iter()
        .map(|r| {
            correlation_scattering(
                &pressures(&r.pressure_re, &r.pressure_im),
                &pressures(&r.reference_re, &r.reference_im),
            )
        })
        .collect();
    (
        sc.iter().copied().fold(f64::INFINITY, f64::min),
        sc.iter().copied().fold(0.0, f64::max),
    )
}

const GONIOMETER: &str = r#"
[goniometer]
source_distance_m = 6.0
receiver_distance_m = 4.0
incidence_deg = [0.0, 40.0]
[bands]
centres_hz = [250.0, 1000.0]
"#;

#[test]
fn flat_surfaces_have_no_correlation_scattering_against_their_reference() {
    // A flat surface built another way (zero-depth wells with fins; a
    // polyline with many vertices) discretizes differently from the flat
    // reference but is the same surface: s_c ≈ 0 (Mommertz 2000: p1 = κ p0 → 0).
    let specs = [
        "name = \"zero wells\"\n[profile]\nkind = \"well_depths\"\ndepths_m = [0.0, 0.0, 0.0]\nwell_width_m = 0.11\nfin_width_m = 0.013\nperiods = 4\n".to_string(),
        format!(
            "name = \"flat points\"\n[profile]\nkind = \"points\"\npoints_m = [{}]\n",
            (0..=17).map(|i| format!("[{}, 0.0]", 0.3 + 0.083 * f64::from(i))).collect::<Vec<_>>().join(", ")
        ),
    ];
    for text in specs {
        let spec = parse_spec(&format!("{text}{GONIOMETER}"), Path::new("flat.toml")).unwrap();
        let (_, worst) = worst_sc(&predict(&spec).unwrap().polar);
        eprintln!("{}: s_c at most {worst:e}", spec.name);
        assert!(worst < 1e-6, "{}: s_c up to {worst:e}", spec.name);
    }
    // And the test can fail: a quadratic residue diffuser (design 250 Hz)
    // scatters at 1 kHz, where the 1.47 m sample spans 4.3 wavelengths.
    let qrd = "name = \"qrd\"\n[profile]\nkind = \"quadratic_residue\"\nprime = 7\ndesign_hz = 250.0\nwell_width_m = 0.07\nfin_width_m = 0.0\nperiods = 3\n";
    let spec = parse_spec(&format!("{qrd}{GONIOMETER}"), Path::new("qrd.toml")).unwrap();
    let mut polar = predict(&spec).unwrap().polar;
    polar.responses.retain(|r| r.band_hz == 1000.0);
    let (least, _) = worst_sc(&polar);
    eprintln!("QRD s_c at 1 kHz: at least {least:.3}");
    assert!(least > 0.3, "QRD s_c only {least}");
}

#[test]
fn large_flat_panel_reads_near_zero_db_in_the_mirror_direction() {
    // Kirchhoff is exact for an infinite plane (image source); a panel many
    // Fresnel zones wide gives the image-source level within ~1 dB (edge ripple).
    // Normalization: level re the image source (ours, FORMAT.md).
    let text = "name = \"wide\"\n[profile]\nkind = \"flat\"\nwidth_m = 8.0\n[goniometer]\nsource_distance_m = 10.0\nreceiver_distance_m = 5.0\nincidence_deg = [30.0]\n[bands]\ncentres_hz = [2000.0, 4000.0]\n";
    let spec = parse_spec(text, Path::new("wide.toml")).unwrap();
    let polar = predict(&spec).unwrap().polar;
    for r in &polar.responses {
        let i = r.receiver_deg.iter().position(|&a| a == -30.0).unwrap();
        assert!(
            r.level_db[i].abs() < 1.0,
            "{} Hz: {} dB",
            r.band_hz,
            r.level_db[i]
        );
        assert_eq!(r.level_db, r.reference_level_db.clone().unwrap());
    }
}

#[test]
fn grid_prediction_covers_the_hemisphere_and_warns_where_due() {
    let text = "name = \"grid\"\n[profile]\nkind = \"quadratic_residue_grid\"\nprime = 5\ndesign_hz = 1000.0\nwell_width_m = 0.06\nfin_width_m = 0.0\nperiods_x = 2\nperiods_y = 2\n[goniometer]\nsource_distance_m = 4.0\nreceiver_distance_m = 3.0\nincidence_deg = [0.0]\nreceiver_step_deg = 15.0\nazimuth_step_deg = 30.0\n[bands]\ncentres_hz = [1000.0]\nevaluation = \"centre\"\n";
    let spec = parse_spec(text, Path::new("grid.toml")).unwrap();
    let p = predict(&spec).unwrap();
    let r = &p.polar.responses[0];
    // Pole plus 6 rings of 12 azimuths.
    assert_eq!(r.receiver_deg.len(), 1 + 6 * 12);
    assert_eq!(
        r.receiver_azimuth_deg.as_ref().unwrap().len(),
        r.receiver_deg.len()
    );
    // At the design frequency the specular level drops well below the flat
    // reference's (energy goes into the lobes; Cox & D'Antonio).
    let refl = r.reference_level_db.as_ref().unwrap();
    assert!(
        refl[0] - r.level_db[0] > 6.0,
        "{} vs {}",
        r.level_db[0],
        refl[0]
    );
    // 0.6 m at 1 kHz is 1.8 wavelengths: the small-sample warning must appear.
    assert!(p
        .warnings
        .iter()
        .any(|w| w.to_string().contains("wavelengths across")));
}

#[test]
fn committed_demo_treatments_match_the_current_prediction() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-rooms/treatments");
    for name in ["flat-panel", "sinusoid-panel", "qrd7-panel"] {
        let spec = polaray::profile::load_spec(&dir.join(format!("{name}.toml"))).unwrap();
        let now = polaray::profile::predict::rounded(&predict(&spec).unwrap().polar, 7);
        let text = std::fs::read_to_string(dir.join(format!("{name}.polar.toml"))).unwrap();
        let committed: PolarFile = toml::from_str(&text).unwrap();
        assert_eq!(committed.responses.len(), 30, "{name}");
        assert_eq!(committed.geometry, now.geometry, "{name}");
        // Tolerant comparison: last-digit rounding may differ between maths libraries.
        for (a, b) in committed.responses.iter().zip(&now.responses) {
            assert_eq!(
                (a.band_hz, a.incidence_deg),
                (b.band_hz, b.incidence_deg),
                "{name}"
            );
            assert_eq!(a.receiver_deg, b.receiver_deg, "{name}");
            let close = |x: &[f64], y: &[f64], tol: f64| {
                x.len() == y.len() && x.iter().zip(y).all(|(p, q)| (p - q).abs() <= tol)
            };
            assert!(
                close(&a.level_db, &b.level_db, 0.01),
                "{name}: levels differ; regenerate with polaray profile"
            );
            for (x, y) in [
                (&a.pressure_re, &b.pressure_re),
                (&a.pressure_im, &b.pressure_im),
                (&a.reference_re, &b.reference_re),
                (&a.reference_im, &b.reference_im),
            ] {
                assert!(
                    close(x.as_ref().unwrap(), y.as_ref().unwrap(), 1e-5),
                    "{name}: pressures differ; regenerate"
                );
            }
        }
    }
}

#[test]
fn an_unchecked_bad_spec_is_refused_not_panicked_on() {
    let mut spec = parse_spec(
        "name = \"r\"\n[profile]\nkind = \"primitive_root\"\nprime = 7\ndesign_hz = 500.0\nwell_width_m = 0.05\nfin_width_m = 0.0\nperiods = 1\n",
        Path::new("r.toml"),
    )
    .unwrap();
    if let polaray::profile::spec::ProfileShape::PrimitiveRoot { prime, .. } = &mut spec.profile {
        *prime = 8;
    }
    let e = predict(&spec).unwrap_err();
    assert!(
        e.problems.iter().any(|p| p.contains("profile.prime = 8")),
        "{e}"
    );
}
