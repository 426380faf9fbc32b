//! Specular shoebox: the direct sound and the six first-order reflections
//! arrive at the image-source delays (Allen & Berkley, JASA 65 (1979)).

mod common;

use common::*;
use glam::DVec3;
use polaray::law::LawKind;
use polaray::trace::{self, TraceOptions};

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
