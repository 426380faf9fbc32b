//! One Lambert plane, nothing else: the first-order scattered fluence that
//! both receiver estimators record equals the double integral of Lambert's
//! law over the plane, evaluated numerically here.
//!
//! A source emitting 1 J (uniform in direction) gives a surface element dA at
//! distance r₁ the irradiance cos θ₁ / (4π r₁²) per m²; a Lambert surface with
//! reflected fraction ρ = (1 − α) s sends it out with radiance ρ E / π, so
//! the element adds ρ cos θ₁ cos θ₂ dA / (4π² r₁² r₂²) to the fluence at a
//! receiver at distance r₂ (Kuttruff, Room Acoustics, 5th ed. 2009, §4.1 on
//! Lambert's law and §9 on radiosity; from memory). Integrating over the
//! plane gives E₁.

mod common;

use common::*;
use glam::DVec3;
use polaray::law::LawKind;
use polaray::room::Room;
use polaray::trace::{self, Estimator, NextEventSettings, TraceOptions, TraceResult};

const HALF_SIDE_M: f64 = 12.0;
const SOURCE: DVec3 = DVec3::new(0.0, 0.0, 1.5);
const RECEIVER: DVec3 = DVec3::new(3.0, 0.5, 1.0);
const RADIUS_M: f64 = 0.25;
/// Reflected fraction ρ = (1 − α) s: α = 0.2, s = 1 (all scattered).
const ALPHA: f64 = 0.2;
const BATCHES: usize = 10;

fn plane() -> Room {
    let mut room = empty_room(
        "Lambert plane",
        uniform_material("lambert", ALPHA, 1.0),
        settings(&[1000], false),
    );
    room.settings.open = true;
    let h = HALF_SIDE_M;
    add_polygon(
        &mut room,
        "plane",
        0,
        vec![
            DVec3::new(-h, -h, 0.0),
            DVec3::new(h, -h, 0.0),
            DVec3::new(h, h, 0.0),
            DVec3::new(-h, h, 0.0),
        ],
        DVec3::new(0.0, 0.0, 1.0),
    );
    place(&mut room, SOURCE, &[(RECEIVER, Some(RADIUS_M))]);
    room
}

/// E₁ by the midpoint rule on an n × n grid over the square, J/m².
fn lambert_integral(n: usize) -> f64 {
    let rho = 1.0 - ALPHA;
    let step = 2.0 * HALF_SIDE_M / n as f64;
    let mut sum = 0.0;
    for i in 0..n {
        let x = -HALF_SIDE_M + (i as f64 + 0.5) * step;
        for j in 0..n {
            let y = -HALF_SIDE_M + (j as f64 + 0.5) * step;
            let p = DVec3::new(x, y, 0.0);
            let r1 = (SOURCE - p).length_squared();
            let r2 = (RECEIVER - p).length_squared();
            // cos θ = height / r for a horizontal plane.
            let cos1 = SOURCE.z / r1.sqrt();
            let cos2 = RECEIVER.z / r2.sqrt();
            sum += cos1 * cos2 / (r1 * r2);
        }
    }
    rho * sum * step * step / (4.0 * std::f64::consts::PI.powi(2))
}

/// Reflected fluence per batch: the echogram total minus the direct sound
/// 1/(4π d²) (air off), J/m².
fn first_order(batches: &[TraceResult]) -> Vec<f64> {
    let d = (RECEIVER - SOURCE).length();
    let direct = 1.0 / (4.0 * std::f64::consts::PI * d * d);
    batches
        .iter()
        .map(|r| r.pair(0, 0).echogram.total()[0] - direct)
        .collect()
}

fn traced(estimator: Estimator, rays: usize) -> Vec<TraceResult> {
    let room = plane();
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.rays = rays;
    options.duration_s = 0.15;
    options.seed = 3;
    options.roulette = None;
    options.estimator = estimator;
    trace::run_batches(&room, &options, BATCHES, &|_| {}).unwrap()
}

fn mean_se(v: &[f64]) -> (f64, f64) {
    let n = v.len() as f64;
    let mean = v.iter().sum::<f64>() / n;
    let var = v.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1.0);
    (mean, (var / n).sqrt())
}

#[test]
fn first_order_scattering_from_a_lambert_plane_matches_the_integral() {
    let coarse = lambert_integral(1200);
    let exact = lambert_integral(2400);
    // The quadrature itself has converged (midpoint rule, error ∝ step²).
    assert!((coarse - exact).abs() < 1e-5 * exact, "{coarse} vs {exact}");

    let sphere = first_order(&traced(Estimator::Sphere, 20_000));
    // Default settings: the sphere grows after 0.1 s, to 0.9 m here (0.9 ×
    // the 1 m to the plane), which the late first-order paths reach.
    let next_event = first_order(&traced(
        Estimator::NextEvent(NextEventSettings::default()),
        20_000,
    ));
    for (name, values, largest_se) in [
        ("sphere", &sphere, 0.05),
        ("next-event", &next_event, 0.005),
    ] {
        let (mean, se) = mean_se(values);
        // Unbiased: within 4 standard errors (a false alarm about 1 in 10⁴
        // for a normal mean, common practice, no source), plus 0.5 % for the
        // sphere's averaging of the field over its volume (a bound from the
        // field's curvature over 0.25 m, ours).
        let allowed = 4.0 * se + 0.005 * exact;
        assert!(
            (mean - exact).abs() < allowed,
            "{name}: traced {mean:.6e} ± {se:.2e}, integral {exact:.6e}"
        );
        assert!(
            se < largest_se * exact,
            "{name}: standard error {se:.2e} of {exact:.3e}"
        );
    }
}
