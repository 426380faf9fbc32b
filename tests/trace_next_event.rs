//! The next-event estimator (next-event estimation, exact early mirror
//! paths, stratified start directions, growing late sphere) agrees with the
//! detection-sphere estimator within their combined standard errors: both
//! estimate the same fluence, so any difference beyond the noise is a bias.

mod common;

use common::*;
use glam::DVec3;
use polaray::bands::Bands;
use polaray::law::LawKind;
use polaray::report;
use polaray::room::Room;
use polaray::trace::{self, Estimator, NextEventSettings, TraceOptions, TraceResult};

/// Batches per estimator; the standard error of a mean has B − 1 degrees of freedom.
const BATCHES: usize = 8;

/// A shoebox with a mostly mirror, a half-scattering and an absorbing surface
/// mix, so that mirror chains, density lobes and the late sphere all matter.
fn room() -> Room {
    let mut material = uniform_material("mixed", 0.12, 0.0);
    material.scattering = Bands::from_slice(&[0.1, 0.5]);
    shoebox(
        DVec3::new(7.0, 5.0, 3.0),
        material,
        settings(&[500, 2000], true),
        DVec3::new(2.0, 1.5, 1.2),
        &[
            (DVec3::new(5.0, 3.5, 1.5), Some(0.4)),
            (DVec3::new(4.0, 1.0, 1.6), Some(0.4)),
        ],
    )
}

/// The same shoebox with every wall cut into coplanar square patches of
/// `patch_m` (one surface each), as CAD exports walls: a receiver sphere then
/// sees a mirror image through several patches, each its own mirror chain.
fn patched_room(patch_m: f64) -> Room {
    let template = room();
    let size = DVec3::new(7.0, 5.0, 3.0);
    let mut patched = common::empty_room(
        "patched shoebox",
        template.materials[0].clone(),
        template.settings.clone(),
    );
    let centre = size * 0.5;
    // Each wall of the template is a quad v0 v1 v2 v3: cut it along its edges.
    for (w, wall) in template.surfaces.iter().enumerate() {
        let [corner, next, _, last] = [0, 1, 2, 3].map(|k| wall.vertices[k]);
        let (u, v) = (next - corner, last - corner);
        let (nu, nv) = (
            (u.length() / patch_m).round() as usize,
            (v.length() / patch_m).round() as usize,
        );
        let (du, dv) = (u / nu as f64, v / nv as f64);
        for i in 0..nu {
            for j in 0..nv {
                let a = corner + du * i as f64 + dv * j as f64;
                common::add_polygon(
                    &mut patched,
                    &format!("wall {w} patch {i},{j}"),
                    0,
                    vec![a, a + du, a + du + dv, a + dv],
                    centre,
                );
            }
        }
    }
    patched.sources = template.sources.clone();
    patched.receivers = template.receivers.clone();
    patched
}

fn batches(room: &Room, estimator: Estimator) -> Vec<TraceResult> {
    let mut options = TraceOptions::from_room(room, LawKind::Split);
    options.rays = 2048;
    options.duration_s = 0.8;
    options.seed = 11;
    options.estimator = estimator;
    trace::run_batches(room, &options, BATCHES, &|_| {}).unwrap()
}

/// Mean and standard error of the mean over batches.
fn mean_se(values: &[f64]) -> (f64, f64) {
    let n = values.len() as f64;
    let mean = values.iter().sum::<f64>() / n;
    let var = values.iter().map(|v| (v - mean).powi(2)).sum::<f64>() / (n - 1.0);
    (mean, (var / n).sqrt())
}

/// Every quantity compared, per batch: windowed reflected energies (ms
/// windows after emission) per pair and band, then T30, EDT, C80, D50 and G.
fn quantities(r: &TraceResult) -> Vec<(String, f64)> {
    let mut out = Vec::new();
    for (p, pair) in r.echograms.iter().enumerate() {
        let e = &pair.echogram;
        let direct_bin = (pair.direct_time_s / e.bin_s) as usize;
        for (lo, hi) in [
            (0.0, 0.05),
            (0.05, 0.08),
            (0.08, 0.2),
            (0.2, 0.5),
            (0.5, 0.8),
        ] {
            for b in 0..2 {
                let sum: f64 = e
                    .energy
                    .iter()
                    .enumerate()
                    .filter(|(k, _)| *k != direct_bin)
                    .filter(|(k, _)| {
                        let t = *k as f64 * e.bin_s;
                        t >= lo && t < hi
                    })
                    .map(|(_, x)| x[b])
                    .sum();
                out.push((format!("pair {p} band {b} energy {lo}-{hi} s"), sum));
            }
        }
    }
    for p in report::run_parameters(r) {
        for band in &p.bands {
            let tag = format!("pair {}/{} {} Hz", p.source, p.receiver, band.band_hz);
            for (name, v) in [
                ("T30", band.t30_s),
                ("EDT", band.edt_s),
                ("C80", band.c80_db),
                ("D50", band.d50),
                ("G", band.g_db),
            ] {
                out.push((format!("{tag} {name}"), v.expect("defined")));
            }
        }
    }
    out
}

/// Agreement within 4 combined standard errors for every quantity (a 4σ
/// bound keeps the chance of a false alarm over ~60 checks near 0.4 %,
/// common practice, no source); and the exact part found mirror paths.
#[test]
fn next_event_agrees_with_detection_spheres() {
    agrees_with_spheres(NextEventSettings::default());
}

/// The same without next-event scoring (exact mirror paths, stratified
/// starts and the growing late sphere only).
#[test]
fn the_exact_paths_and_late_sphere_alone_agree_with_detection_spheres() {
    agrees_with_spheres(NextEventSettings {
        rain: false,
        ..NextEventSettings::default()
    });
}

/// Walls of many coplanar patches: a mirror image seen through several
/// patches is several chains, valid at the receiver point for one of them.
/// Evaluating only the chains valid at the point and leaving the others to
/// the sphere counted the sphere's share of the neighbouring patches' beams
/// on top of the point value (a selection by the point's own value): in the
/// demo hall G came out about 0.5 dB high. Every candidate chain must be
/// evaluated at the point, the invalid ones adding zero.
#[test]
fn the_exact_paths_agree_with_detection_spheres_on_patched_walls() {
    agrees_with_spheres_in(
        &patched_room(0.5),
        NextEventSettings {
            rain: false,
            ..NextEventSettings::default()
        },
    );
}

fn agrees_with_spheres(settings: NextEventSettings) {
    agrees_with_spheres_in(&room(), settings);
}

fn agrees_with_spheres_in(room: &Room, settings: NextEventSettings) {
    let sphere = batches(room, Estimator::Sphere);
    let ne = batches(room, Estimator::NextEvent(settings));
    let qs: Vec<Vec<(String, f64)>> = sphere.iter().map(quantities).collect();
    let qn: Vec<Vec<(String, f64)>> = ne.iter().map(quantities).collect();
    let mut worst = (0.0, String::new());
    for k in 0..qs[0].len() {
        let a: Vec<f64> = qs.iter().map(|q| q[k].1).collect();
        let b: Vec<f64> = qn.iter().map(|q| q[k].1).collect();
        let ((ma, sa), (mb, sb)) = (mean_se(&a), mean_se(&b));
        let z = (ma - mb).abs() / (sa * sa + sb * sb).sqrt().max(1e-300);
        if z > worst.0 {
            worst = (
                z,
                format!(
                    "{}: sphere {ma:.5} ± {sa:.5}, next-event {mb:.5} ± {sb:.5}",
                    qs[0][k].0
                ),
            );
        }
    }
    assert!(
        worst.0 < 4.0,
        "worst disagreement {:.2} SE: {}",
        worst.0,
        worst.1
    );
}
