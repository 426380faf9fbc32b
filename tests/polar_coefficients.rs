//! Coefficients of polar responses: diffusion, scattering, the bound, the
//! material check and the reverberation-chamber method.

use approx::assert_relative_eq;
use proptest::prelude::*;

use polaray::polar::analysis::analyze_response;
use polaray::polar::bound::{check_material_pair, BoundViolation, ZoneSize};
use polaray::polar::chamber::{
    added_absorption, chamber_coefficients, load_chamber_file, scattering_from_absorption,
    speed_of_sound_m_s, Decay,
};
use polaray::polar::diffusion::{diffusion_coefficient, diffusion_coefficient_db};
use polaray::polar::weights::{hemisphere_area_weights, ring_solid_angles_sr};
use polaray::polar::zone::{ZoneGeometry, ZoneRule};
use polaray::polar::{Arrangement, PolarResponse};

fn arc_37() -> Vec<f64> {
    (0..37).map(|i| -90.0 + 5.0 * f64::from(i)).collect()
}

fn plane_response(level_db: Vec<f64>) -> PolarResponse {
    PolarResponse {
        band_hz: 1000.0,
        incidence_deg: 0.0,
        incidence_azimuth_deg: None,
        receiver_deg: arc_37(),
        receiver_azimuth_deg: None,
        level_db,
        pressure_re: None,
        pressure_im: None,
        reference_level_db: None,
        reference_re: None,
        reference_im: None,
    }
}

const ZONE_10DEG: ZoneRule = ZoneRule::HalfWidth {
    half_width_deg: 10.0,
};

#[test]
fn uniform_single_and_k_of_n() {
    // ISO 17497-2:2012 clause 8 / reference.md §1 check values: uniform → 1,
    // one non-zero receiver → 0, k equal of n → (k − 1)/(n − 1).
    assert_relative_eq!(
        diffusion_coefficient_db(&[-4.0; 37]).unwrap(),
        1.0,
        epsilon = 1e-12
    );
    let mut p = vec![0.0; 37];
    p[7] = 1.0;
    assert_relative_eq!(
        diffusion_coefficient(&p, &[1.0; 37]).unwrap(),
        0.0,
        epsilon = 1e-15
    );
    for k in 1..=37 {
        let p: Vec<f64> = (0..37).map(|i| if i < k { 3.0 } else { 0.0 }).collect();
        assert_relative_eq!(
            diffusion_coefficient(&p, &[1.0; 37]).unwrap(),
            (k as f64 - 1.0) / 36.0,
            epsilon = 1e-12
        );
    }
}

#[test]
fn bound_check_values_37_5() {
    // reference.md §3: M = 37, M_s = 5: d_max(0) = 1/9, d_max(0.5) = 67/148,
    // d_max = 1 at s* = (M − M_s)/M = 32/37.
    let z = ZoneSize::equal_area(37, 5);
    assert_relative_eq!(z.d_max(0.0).unwrap(), 1.0 / 9.0, epsilon = 1e-14);
    assert_relative_eq!(z.d_max(0.5).unwrap(), 67.0 / 148.0, epsilon = 1e-14);
    assert_relative_eq!(z.d_max(z.s_star()).unwrap(), 1.0, epsilon = 1e-14);
    assert_relative_eq!(z.s_star(), 32.0 / 37.0, epsilon = 1e-15);
}

/// Levels (dB) with a fraction 1 − s of the energy spread evenly over the zone
/// receivers and s evenly over the rest: the extremal response of reference.md §3.
fn two_level_response(s: f64, in_zone: &[bool]) -> Vec<f64> {
    let ms = in_zone.iter().filter(|&&z| z).count() as f64;
    let m = in_zone.len() as f64;
    in_zone
        .iter()
        .map(|&z| {
            let e = if z { (1.0 - s) / ms } else { s / (m - ms) };
            10.0 * e.log10()
        })
        .collect()
}

#[test]
fn two_level_response_reaches_the_bound_exactly() {
    // reference.md §3: equality in Cauchy–Schwarz for a response constant in the
    // zone and constant outside, so d = d_max(s) there.
    for s in [0.05, 0.2, 0.5, 32.0 / 37.0, 0.95] {
        let r = plane_response(vec![0.0; 37]);
        let in_zone = ZONE_10DEG.membership(
            polaray::polar::Direction::in_plane(0.0),
            &polaray::polar::analysis::receiver_directions(&r),
        );
        let c = analyze_response(
            Arrangement::Plane,
            &ZONE_10DEG,
            &plane_response(two_level_response(s, &in_zone)),
        )
        .unwrap();
        assert_eq!((c.receivers, c.zone_receivers), (37, 5));
        assert_relative_eq!(c.s_zone, s, epsilon = 1e-12);
        assert_relative_eq!(c.d, c.d_max.unwrap(), epsilon = 1e-12);
        assert_relative_eq!(c.d_ratio.unwrap(), 1.0, epsilon = 1e-11);
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 400, ..ProptestConfig::default() })]

    /// reference.md §3: no response lies above d_max(s_zone), whatever its
    /// levels and zone (equal-area receivers).
    #[test]
    fn random_responses_never_exceed_the_bound(
        levels in prop::collection::vec(-60.0f64..10.0, 3..40),
        zone_seed in any::<u64>(),
    ) {
        let m = levels.len();
        let mut in_zone: Vec<bool> = (0..m).map(|i| (zone_seed >> (i % 64)) & 1 == 1).collect();
        in_zone[0] = true;
        in_zone[m - 1] = false;
        let p: Vec<f64> = levels.iter().map(|l| 10f64.powf(l / 10.0)).collect();
        let w = vec![1.0; m];
        let d = diffusion_coefficient(&p, &w).unwrap();
        let s = polaray::polar::scattering::zone_scattering_ratio(&p, &w, &in_zone).unwrap();
        let bound = ZoneSize::from_membership(&in_zone, &w).d_max(s).unwrap();
        prop_assert!(d <= bound + 1e-12, "d = {d} above d_max({s}) = {bound}");
    }

    /// The area-weighted generalization (derivation in polar::bound) holds too.
    #[test]
    fn random_weighted_responses_never_exceed_the_bound(
        cells in prop::collection::vec((-40.0f64..10.0, 1.0f64..20.0, any::<bool>()), 3..40),
    ) {
        let mut in_zone: Vec<bool> = cells.iter().map(|c| c.2).collect();
        let m = in_zone.len();
        in_zone[0] = true;
        in_zone[m - 1] = false;
        let p: Vec<f64> = cells.iter().map(|c| 10f64.powf(c.0 / 10.0)).collect();
        let w: Vec<f64> = cells.iter().map(|c| c.1).collect();
        let d = diffusion_coefficient(&p, &w).unwrap();
        let s = polaray::polar::scattering::zone_scattering_ratio(&p, &w, &in_zone).unwrap();
        let bound = ZoneSize::from_membership(&in_zone, &w).d_max(s).unwrap();
        prop_assert!(d <= bound + 1e-12, "d = {d} above d_max({s}) = {bound}");
    }
}

#[test]
fn flat_reference_gives_zero_normalized_diffusion_and_correlation() {
    // Definitions (ISO 17497-2 clause 8; Mommertz 2000): the sample equal to its
    // reference gives d_n = 0 and s_c = 0.
    let levels: Vec<f64> = arc_37().iter().map(|t| -0.2 * t.abs()).collect();
    let re: Vec<f64> = arc_37().iter().map(|t| (0.1 * t).cos()).collect();
    let im: Vec<f64> = arc_37().iter().map(|t| (0.1 * t).sin()).collect();
    let mut r = plane_response(levels.clone());
    r.reference_level_db = Some(levels);
    r.pressure_re = Some(re.clone());
    r.pressure_im = Some(im.clone());
    r.reference_re = Some(re);
    r.reference_im = Some(im);
    let c = analyze_response(Arrangement::Plane, &ZONE_10DEG, &r).unwrap();
    assert_relative_eq!(c.d_n.unwrap(), 0.0, epsilon = 1e-12);
    assert_relative_eq!(c.s_corr.unwrap(), 0.0, epsilon = 1e-12);
}

#[test]
fn orthogonal_and_proportional_pressures() {
    // Mommertz (2000) / reference.md §2: p1 orthogonal to p0 → s_c = 1; p1 = κ p0 → 0.
    let mut r = plane_response(vec![0.0; 37]);
    r.reference_re = Some(vec![1.0; 37]);
    r.reference_im = Some(vec![0.0; 37]);
    // Alternating signs over 36 receivers and a zero at the last: Σ p1 p0* = 0.
    let alt: Vec<f64> = (0..37)
        .map(|i| {
            if i == 36 {
                0.0
            } else if i % 2 == 0 {
                1.0
            } else {
                -1.0
            }
        })
        .collect();
    r.pressure_re = Some(alt);
    r.pressure_im = Some(vec![0.0; 37]);
    let c = analyze_response(Arrangement::Plane, &ZONE_10DEG, &r).unwrap();
    assert_relative_eq!(c.s_corr.unwrap(), 1.0, epsilon = 1e-12);
    // κ = 2 − 3j times a varying reference.
    let p0: Vec<(f64, f64)> = (0..37)
        .map(|i| ((0.2 * i as f64).cos(), (0.5 * i as f64).sin()))
        .collect();
    r.reference_re = Some(p0.iter().map(|p| p.0).collect());
    r.reference_im = Some(p0.iter().map(|p| p.1).collect());
    r.pressure_re = Some(p0.iter().map(|p| 2.0 * p.0 + 3.0 * p.1).collect());
    r.pressure_im = Some(p0.iter().map(|p| 2.0 * p.1 - 3.0 * p.0).collect());
    let c = analyze_response(Arrangement::Plane, &ZONE_10DEG, &r).unwrap();
    assert_relative_eq!(c.s_corr.unwrap(), 0.0, epsilon = 1e-12);
}

/// A 5° hemisphere grid: the pole once, each ring at 5° azimuth steps.
fn hemisphere_5deg() -> (Vec<f64>, Vec<f64>) {
    let mut polar = vec![0.0];
    let mut azimuth = vec![0.0];
    for k in 1..=18 {
        for j in 0..72 {
            polar.push(5.0 * f64::from(k));
            azimuth.push(5.0 * f64::from(j));
        }
    }
    (polar, azimuth)
}

#[test]
fn hemisphere_weights_sum_to_two_pi_and_uniform_is_diffuse() {
    // ISO 17497-2:2012 clause 8 / reference.md §1: 5° grid weights sum to 2π;
    // a uniform response is fully diffuse with area weights too.
    let (polar, azimuth) = hemisphere_5deg();
    let a = ring_solid_angles_sr(&polar);
    assert_relative_eq!(
        a.iter().sum::<f64>(),
        2.0 * std::f64::consts::PI,
        epsilon = 1e-12
    );
    let n = hemisphere_area_weights(&polar);
    assert_relative_eq!(
        diffusion_coefficient(&vec![2.0; n.len()], &n).unwrap(),
        1.0,
        epsilon = 1e-12
    );
    // Analysis of hemispherical data with the image-source zone around the normal.
    let r = PolarResponse {
        receiver_azimuth_deg: Some(azimuth),
        receiver_deg: polar.clone(),
        level_db: vec![0.0; polar.len()],
        ..plane_response(vec![])
    };
    let zone = ZoneRule::HalfWidth {
        half_width_deg: 10.0,
    };
    let c = analyze_response(Arrangement::Hemisphere, &zone, &r).unwrap();
    assert_relative_eq!(c.d, 1.0, epsilon = 1e-12);
    // Zone: pole plus the 5° and 10° rings, 1 + 72 + 72 receivers.
    assert_eq!(c.zone_receivers, 145);
    // A uniform response sits at s* with d = d_max = 1 (weighted bound).
    assert_relative_eq!(c.d_max.unwrap(), 1.0, epsilon = 1e-12);
}

#[test]
fn material_check_refuses_above_and_accepts_below() {
    // reference.md §3 with the default geometry (M = 37, M_s = 5):
    // d_max(0.5) = 67/148 = 0.4527; d_max(0) = 1/9.
    let g = ZoneGeometry::default();
    assert!(check_material_pair(0.5, 0.40, &g).is_ok());
    assert!(check_material_pair(0.0, 0.11, &g).is_ok());
    assert!(
        check_material_pair(0.95, 0.99, &g).is_ok(),
        "above s* nothing is excluded"
    );
    let err = check_material_pair(0.5, 0.60, &g).unwrap_err();
    match &err {
        BoundViolation::Exceeds { d_max, excess, .. } => {
            assert_relative_eq!(*d_max, 67.0 / 148.0, epsilon = 1e-12);
            assert_relative_eq!(*excess, 0.60 - 67.0 / 148.0, epsilon = 1e-12);
        }
        other => panic!("unexpected {other:?}"),
    }
    let text = err.to_string();
    assert!(text.contains("by 0.147"), "{text}");
    assert!(text.contains("approximate"), "{text}");
    assert!(matches!(
        check_material_pair(1.2, 0.3, &g),
        Err(BoundViolation::OutOfRange { name: "s", .. })
    ));
    assert!(check_material_pair(f64::NAN, 0.3, &g).is_err());
}

#[test]
fn chamber_formulas_worked_example() {
    // ISO 17497-1:2004 clause 8 formulas, by hand: V = 200 m³, S = 10 m², V/S = 20,
    // 20 °C everywhere so c = 343.2 m/s, equal air attenuation (terms cancel).
    // α_s = 55.3·20·(1/(343.2·4.0) − 1/(343.2·5.0)) = 1106 · 0.05/343.2 = 0.161131
    // α_spec = 55.3·20·(1/(343.2·3.6) − 1/(343.2·4.8)) = 3.222611 · 0.069444 = 0.223792
    // s = (0.223792 − 0.161131)/(1 − 0.161131) = 0.062662/0.838869 = 0.074698
    let d = |t: f64| Decay {
        time_s: t,
        speed_m_s: 343.2,
        air_per_m: 0.001,
    };
    let alpha_s = added_absorption(200.0, 10.0, d(5.0), d(4.0));
    let alpha_spec = added_absorption(200.0, 10.0, d(4.8), d(3.6));
    assert_relative_eq!(alpha_s, 0.161131, epsilon = 1e-6);
    assert_relative_eq!(alpha_spec, 0.223792, epsilon = 1e-6);
    assert_relative_eq!(
        scattering_from_absorption(alpha_s, alpha_spec).unwrap(),
        0.074698,
        epsilon = 1e-6
    );
    // Air term: m1 = 0.0010, m2 = 0.0012 /m → −4·20·0.0002 = −0.016: α_s = 0.145131.
    let with_air = added_absorption(
        200.0,
        10.0,
        d(5.0),
        Decay {
            air_per_m: 0.0012,
            ..d(4.0)
        },
    );
    assert_relative_eq!(with_air, 0.145131, epsilon = 1e-6);
    // Temperature: 22 °C → c = 343.2·√(295.15/293.15) = 343.2·1.0034054 = 344.3687 m/s,
    // α_s = 1106·(1/(344.3687·4) − 1/(343.2·5)) = 0.158396.
    assert_relative_eq!(speed_of_sound_m_s(22.0), 344.3687, epsilon = 1e-4);
    let warm = added_absorption(
        200.0,
        10.0,
        d(5.0),
        Decay {
            speed_m_s: speed_of_sound_m_s(22.0),
            ..d(4.0)
        },
    );
    assert_relative_eq!(warm, 0.158396, epsilon = 1e-6);
}

#[test]
fn chamber_file_reproduces_the_worked_example() {
    // The demo file's 500 Hz band holds the times of the worked example above,
    // all at 20 °C / 50 %, so the air terms cancel: s = 0.074698.
    let path =
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/data/polar/demo-chamber.toml");
    let f = load_chamber_file(&path).unwrap();
    let b = &chamber_coefficients(&f)[0];
    assert_eq!(b.band_hz, 500.0);
    assert_relative_eq!(b.alpha_s, 0.161131, epsilon = 1e-6);
    assert_relative_eq!(b.alpha_spec, 0.223792, epsilon = 1e-6);
    assert_relative_eq!(b.s.unwrap(), 0.074698, epsilon = 1e-6);
}
