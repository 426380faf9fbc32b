//! Polar data files: what the `profile` engineer writes (serde of `PolarFile`)
//! reads back, in-memory checks, the CSV form, and the charts' public API.

use std::path::Path;

use polaray::polar::csv::parse_polar_csv;
use polaray::polar::plot::{
    draw_bound_chart_for_geometry, draw_polar_chart, zone_interval_deg, BoundPoint, PlotError,
    PolarChart, PolarCurve,
};
use polaray::polar::{
    check_polar_file, parse_polar_toml, Arrangement, GoniometerGeometry, PolarFile, PolarResponse,
    ZoneGeometry,
};

fn sample_file() -> PolarFile {
    let angles: Vec<f64> = (0..19).map(|i| -90.0 + 10.0 * f64::from(i)).collect();
    PolarFile {
        name: "round trip".into(),
        origin: "written by a test".into(),
        geometry: GoniometerGeometry {
            arrangement: Arrangement::Plane,
            sample_width_m: 1.2,
            sample_depth_m: None,
            source_distance_m: 8.0,
            receiver_distance_m: 4.0,
            zone_half_width_deg: None,
        },
        responses: vec![PolarResponse {
            band_hz: 500.0,
            incidence_deg: -30.0,
            incidence_azimuth_deg: None,
            level_db: angles.iter().map(|t| -0.1 * t.abs()).collect(),
            receiver_deg: angles,
            receiver_azimuth_deg: None,
            pressure_re: None,
            pressure_im: None,
            reference_level_db: None,
            reference_re: None,
            reference_im: None,
        }],
    }
}

#[test]
fn serialized_polar_file_reads_back() {
    let f = sample_file();
    let text = toml::to_string(&f).unwrap();
    let back = parse_polar_toml(&text, Path::new("written.toml")).unwrap();
    assert_eq!(back, f);
    assert!(check_polar_file(&f).is_empty());
}

#[test]
fn in_memory_check_names_the_item() {
    let mut f = sample_file();
    f.responses[0].level_db.pop();
    f.responses[0].receiver_deg[3] = 120.0;
    let problems = check_polar_file(&f);
    assert_eq!(problems.len(), 2, "{problems:?}");
    assert!(
        problems[0].starts_with("responses[0].receiver_deg[3]: 120"),
        "{problems:?}"
    );
    assert!(
        problems[1].starts_with("responses[0].level_db: has 18 values"),
        "{problems:?}"
    );
}

#[test]
fn csv_skips_comments_and_reads_columns() {
    let text = "# demo\n\nangle_deg, 125, 250\n-10, 1, 2\n0, 3, 4\n# end\n10, 5, 6\n";
    let c = parse_polar_csv(text, Path::new("x.csv")).unwrap();
    assert_eq!(c.bands_hz, vec![125.0, 250.0]);
    assert_eq!(c.angle_deg, vec![-10.0, 0.0, 10.0]);
    assert_eq!(c.level_db[1], vec![2.0, 4.0, 6.0]);
    let err = parse_polar_csv("angle,125\n0,1\n", Path::new("x.csv")).unwrap_err();
    assert!(err.to_string().contains("x.csv: line 1: column 1"), "{err}");
}

#[test]
fn zone_interval_reaches_halfway_to_neighbours() {
    // Receivers at 5° steps, zone −10…10: shaded from −12.5° to 12.5°.
    let a: Vec<f64> = (0..37).map(|i| -90.0 + 5.0 * f64::from(i)).collect();
    let z: Vec<bool> = a.iter().map(|t| t.abs() <= 10.0).collect();
    assert_eq!(zone_interval_deg(&a, &z), Some((-12.5, 12.5)));
    assert_eq!(zone_interval_deg(&a, &[false; 37]), None);
}

#[test]
fn charts_write_png_and_svg_and_refuse_other_names() {
    let dir = tempfile::tempdir().unwrap();
    let chart = PolarChart {
        title: "test".into(),
        curves: vec![PolarCurve {
            label: "flat".into(),
            angle_deg: vec![-90.0, 0.0, 90.0],
            level_db: vec![-3.0, 0.0, -3.0],
            dashed: false,
        }],
        zone_deg: Some((-10.0, 10.0)),
        incidence_deg: Some(0.0),
        range_db: 30.0,
    };
    for name in ["p.png", "p.svg"] {
        draw_polar_chart(&dir.path().join(name), &chart).unwrap();
        assert!(dir.path().join(name).metadata().unwrap().len() > 1000);
    }
    assert!(matches!(
        draw_polar_chart(&dir.path().join("p.jpg"), &chart),
        Err(PlotError::Format(_))
    ));
    let points = [BoundPoint {
        label: "panel".into(),
        s: 0.4,
        d: 0.3,
    }];
    let path = dir.path().join("b.svg");
    draw_bound_chart_for_geometry(&path, "materials", &ZoneGeometry::default(), &points).unwrap();
    let svg = std::fs::read_to_string(&path).unwrap();
    assert!(svg.contains("37 receivers, 5 in the zone"));
}
