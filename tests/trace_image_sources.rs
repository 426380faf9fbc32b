//! Specular shoebox: the direct sound and the six first-order reflections
//! arrive at the image-source delays (Allen & Berkley, JASA 65 (1979)).

mod common;

use common::*;
use glam::DVec3;
use polaray::law::LawKind;
use polaray::trace::{self, Estimator, NextEventSettings, TraceOptions};

#[test]
fn first_order_reflections_arrive_at_image_source_delays() {
    let size = DVec3::new(7.0, 5.0, 3.0);
    let source = DVec3::new(2.0, 1.5, 1.2);
    let receiver = DVec3::new(4.5, 3.0, 1.7);
    let room = shoebox(
        size,
        uniform_material("mirror", 0.1, 0.0),
        settings(&[1000], false),
        source,
        &[(receiver, Some(0.3))],
    );
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.rays = 60_000;
    options.duration_s = 0.05;
    let result = trace::run(&room, &options).unwrap();
    let pair = result.pair(0, 0);
    let c = result.speed_of_sound_m_s;
    let bin_s = options.bin_s;
    let bin_of = |d: f64| (d / c / bin_s) as usize;

    // Image sources computed here, independently of the tracer: mirror the
    // source in each wall plane x = 0, x = Lx, ... (Allen & Berkley 1979).
    let mut images = Vec::new();
    for axis in 0..3 {
        for wall in [0.0, size[axis]] {
            let mut p = source;
            p[axis] = 2.0 * wall - source[axis];
            images.push(p);
        }
    }
    let direct_bin = bin_of((receiver - source).length());
    assert_eq!(pair.echogram.first_nonzero_bin(), Some(direct_bin));
    let first_order_bins: Vec<usize> = images
        .iter()
        .map(|p| bin_of((receiver - *p).length()))
        .collect();

    // Every first-order reflection is found within one bin of its delay.
    let e: Vec<f64> = pair.echogram.energy.iter().map(|b| b[0]).collect();
    for (img, &b) in images.iter().zip(&first_order_bins) {
        let near = e[b.saturating_sub(1)..=b + 1].iter().sum::<f64>();
        assert!(near > 0.0, "no reflection near bin {b} from image {img}");
    }

    // Before the earliest second-order path, energy only in those bins (±1).
    let mut second = f64::INFINITY;
    for a in 0..3 {
        for b in 0..3 {
            for wa in [0.0, size[a]] {
                for wb in [0.0, size[b]] {
                    if a == b && wa == wb {
                        continue;
                    }
                    let mut p = source;
                    p[a] = 2.0 * wa - p[a];
                    p[b] = 2.0 * wb - p[b];
                    second = second.min((receiver - p).length());
                }
            }
        }
    }
    // Rays reach the sphere up to one radius early.
    let second_bin = bin_of(second - 0.3);
    for (k, &x) in e.iter().enumerate().take(second_bin) {
        if x > 0.0 && k != direct_bin {
            assert!(
                first_order_bins.iter().any(|&b| b.abs_diff(k) <= 1),
                "energy in bin {k} matches no first-order image (bins {first_order_bins:?})"
            );
        }
    }
}

/// Image sources of a shoebox [0, L]³ up to `max_order` reflections, with
/// their orders (Allen & Berkley 1979): per axis the image coordinate is
/// x_s + 2mL (|2m| reflections on that axis's walls) or −x_s + 2mL
/// (|2m − 1| reflections).
fn shoebox_images(size: DVec3, source: DVec3, max_order: usize) -> Vec<(DVec3, usize)> {
    let span = max_order as i64 + 1;
    let mut per_axis: [Vec<(f64, usize)>; 3] = Default::default();
    for (axis, list) in per_axis.iter_mut().enumerate() {
        for m in -span..=span {
            let shift = 2.0 * m as f64 * size[axis];
            list.push((source[axis] + shift, (2 * m).unsigned_abs() as usize));
            list.push((-source[axis] + shift, (2 * m - 1).unsigned_abs() as usize));
        }
    }
    let mut images = Vec::new();
    for &(x, ox) in &per_axis[0] {
        for &(y, oy) in &per_axis[1] {
            for &(z, oz) in &per_axis[2] {
                if ox + oy + oz <= max_order {
                    images.push((DVec3::new(x, y, z), ox + oy + oz));
                }
            }
        }
    }
    images
}

/// The exact part of the next-event estimator in a specular shoebox, with
/// mirror paths up to `image_order` evaluated as image sources.
fn specular_shoebox_run(image_order: usize) -> (polaray::trace::TraceResult, f64) {
    let room = shoebox(
        SIZE,
        uniform_material("mirror", ALPHA, 0.0),
        settings(&[1000], true),
        SOURCE,
        &[(RECEIVER, Some(RADIUS_M))],
    );
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.rays = 2000;
    options.duration_s = 0.1;
    options.estimator = Estimator::NextEvent(NextEventSettings {
        image_order,
        ..NextEventSettings::default()
    });
    let bin_s = options.bin_s;
    (trace::run(&room, &options).unwrap(), bin_s)
}

const SIZE: DVec3 = DVec3::new(7.0, 5.0, 3.0);
const SOURCE: DVec3 = DVec3::new(2.0, 1.5, 1.2);
const RECEIVER: DVec3 = DVec3::new(4.5, 3.0, 1.7);
const RADIUS_M: f64 = 0.3;
const ALPHA: f64 = 0.1;

/// The largest relative difference per bin between the traced echogram and
/// the image-source sum of orders 0–3, over the bins before the earliest
/// order-4 path can reach the sphere; and how many images were compared.
fn worst_difference(result: &polaray::trace::TraceResult, bin_s: f64) -> (f64, usize) {
    let pair = result.pair(0, 0);
    let c = result.speed_of_sound_m_s;
    let mu = result.air_attenuation_per_m[0];
    let images = shoebox_images(SIZE, SOURCE, 4);
    let order4 = images
        .iter()
        .filter(|(_, n)| *n == 4)
        .map(|(p, _)| (RECEIVER - *p).length())
        .fold(f64::INFINITY, f64::min);
    // A traced order-4 path reaches the sphere at most one radius early.
    let last_bin = ((order4 - RADIUS_M) / c / bin_s) as usize;
    let mut expected = vec![0.0; last_bin];
    let mut counted = 0;
    for (p, n) in images.iter().filter(|(_, n)| *n <= 3) {
        let d = (RECEIVER - *p).length();
        let bin = (d / c / bin_s) as usize;
        if bin < last_bin {
            expected[bin] += (1.0 - ALPHA).powi(*n as i32) * (-mu * d).exp()
                / (4.0 * std::f64::consts::PI * d * d);
            counted += 1;
        }
    }
    let worst = expected
        .iter()
        .enumerate()
        .map(|(bin, want)| {
            let got = pair.echogram.energy[bin][0];
            (got - want).abs() / want.max(1e-300)
        })
        .fold(0.0, f64::max);
    (worst, counted)
}

#[test]
fn exact_mirror_paths_equal_the_image_source_sum() {
    // A specular shoebox (s = 0, α = 0.1, air on): every mirror path is an
    // image source whose fluence at the receiver is (1 − α)^n e^(−μd)/(4π d²)
    // at d/c (Allen & Berkley, JASA 65 (1979) 943–950). The next-event
    // estimator adds the paths up to order 3 exactly and the tracer skips
    // them, so before the earliest order-4 path can reach the sphere the
    // echogram holds nothing else, bin by bin to rounding.
    let (result, bin_s) = specular_shoebox_run(3);
    let (worst, counted) = worst_difference(&result, bin_s);
    assert!(counted > 20, "only {counted} image sources before order 4");
    assert!(worst <= 1e-9, "largest relative difference {worst:e}");
    // The check can fail: with exact paths only to order 2, the order-3
    // paths come from sphere crossings and miss the sum by far more.
    let (coarse, _) = worst_difference(&specular_shoebox_run(2).0, bin_s);
    assert!(coarse > 1e-3, "order 2 only: {coarse:e}");
}
