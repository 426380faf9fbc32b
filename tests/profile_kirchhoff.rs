//! Physics checks of the Kirchhoff prediction against analytic results.

use glam::DVec3;
use num_complex::Complex64;
use polaray::profile::kirchhoff::{scattered_2d, scattered_3d};
use polaray::profile::predict::{plane_position_m, sphere_position_m};
use polaray::profile::spec::ProfileShape;
use polaray::profile::surface::{Surface1d, Surface2d};

const C: f64 = 343.0;

fn k_of(f_hz: f64) -> f64 {
    2.0 * std::f64::consts::PI * f_hz / C
}

fn sinc(x: f64) -> f64 {
    if x.abs() < 1e-12 {
        1.0
    } else {
        x.sin() / x
    }
}

fn db(p: Complex64, p_ref: Complex64) -> f64 {
    20.0 * (p.norm() / p_ref.norm()).log10()
}

#[test]
fn flat_strip_far_field_matches_single_slit_pattern() {
    // Fraunhofer single slit with obliquity (reference.md §7; Cox & D'Antonio,
    // Acoustic Absorbers and Diffusers, Fourier/Kirchhoff far field):
    // |p|² ∝ (cos θ + cos ψ)² sinc²(k a (sin θ + sin ψ) / 2).
    let (a, f, psi_deg, r) = (1.0, 2000.0, 20.0, 1.0e4);
    let k = k_of(f);
    let s = Surface1d::flat(a, C / f / 10.0);
    let src = plane_position_m(psi_deg, r);
    let angles: Vec<f64> = (-89..=89).map(f64::from).collect();
    let rec: Vec<[f64; 2]> = angles.iter().map(|&t| plane_position_m(t, r)).collect();
    let p = scattered_2d(&s, src, &rec, k);
    let psi = psi_deg.to_radians();
    let expected = |t: f64| {
        let t = t.to_radians();
        (t.cos() + psi.cos()) * sinc(0.5 * k * a * (t.sin() + psi.sin()))
    };
    let i_spec = angles.iter().position(|&t| t == -psi_deg).unwrap();
    let e_spec = expected(-psi_deg);
    let mut compared = 0;
    for (i, &t) in angles.iter().enumerate() {
        let e_db = 20.0 * (expected(t).abs() / e_spec.abs()).log10();
        // Away from nulls: within 20 dB of the specular peak.
        if e_db > -20.0 {
            let got = db(p[i], p[i_spec]);
            assert!(
                (got - e_db).abs() < 0.1,
                "θ = {t}°: Kirchhoff {got:.3} dB, slit {e_db:.3} dB"
            );
            compared += 1;
        }
    }
    assert!(compared > 20, "only {compared} receivers compared");
}

/// Far-field lobe energies of a periodic quadratic residue diffuser, N = 7, no
/// fins, divided by the obliquity (cos θ + 1)² and the well aperture factor
/// sinc²(π m / N); returns them in dB re lobe 0.
fn qrd_lobes_db(harmonic: u32, orders: i32) -> Vec<(i32, f64)> {
    let (n, f0) = (7u32, 500.0);
    let lambda0 = C / f0;
    let period = 3.5 * lambda0;
    let shape = ProfileShape::QuadraticResidue {
        prime: n,
        design_hz: f0,
        well_width_m: period / f64::from(n),
        fin_width_m: 0.0,
        periods: 10,
    };
    let f = f0 * f64::from(harmonic);
    let s = Surface1d::from_shape(&shape, C, C / f / 10.0, 4).unwrap();
    let r = 1.0e5;
    let src = plane_position_m(0.0, r);
    let lambda = C / f;
    let lobes: Vec<(i32, f64)> = (-orders..=orders)
        .map(|m| (m, (f64::from(m) * lambda / period).asin()))
        .collect();
    let rec: Vec<[f64; 2]> = lobes
        .iter()
        .map(|&(_, t)| plane_position_m(t.to_degrees(), r))
        .collect();
    let p = scattered_2d(&s, src, &rec, k_of(f));
    let corrected: Vec<f64> = lobes
        .iter()
        .zip(&p)
        .map(|(&(m, t), p)| {
            let aperture = sinc(std::f64::consts::PI * f64::from(m) / f64::from(n));
            p.norm_sqr() / ((t.cos() + 1.0).powi(2) * aperture * aperture)
        })
        .collect();
    let mid = corrected[orders as usize];
    lobes
        .iter()
        .zip(&corrected)
        .map(|(&(m, _), &e)| (m, 10.0 * (e / mid).log10()))
        .collect()
}

#[test]
fn quadratic_residue_diffuser_lobes_carry_equal_energy_at_design_frequency() {
    // Schroeder (1975); Cox & D'Antonio, Acoustic Absorbers and Diffusers:
    // at f0 and its multiples below N f0 the grating lobes of a periodic QRD
    // carry equal energy (|DFT|² = N), within 0.5 dB (task tolerance).
    for (harmonic, orders) in [(1, 3), (2, 6)] {
        for (m, e_db) in qrd_lobes_db(harmonic, orders) {
            assert!(
                e_db.abs() < 0.5,
                "{harmonic} f0, lobe {m}: {e_db:.3} dB from lobe 0"
            );
        }
    }
}

#[test]
fn reciprocity_holds_for_asymmetric_profiles() {
    // Helmholtz reciprocity (e.g. Pierce, Acoustics, ch. 3; from memory):
    // swapping source and receiver leaves the pressure unchanged at equal distances.
    let shapes = [
        ProfileShape::QuadraticResidue {
            prime: 7,
            design_hz: 600.0,
            well_width_m: 0.05,
            fin_width_m: 0.006,
            periods: 3,
        },
        ProfileShape::Sinusoid {
            width_m: 1.7,
            amplitude_m: 0.08,
            period_m: 0.45,
            phase_deg: 30.0,
        },
        ProfileShape::Points {
            points_m: vec![[0.0, 0.0], [0.3, 0.12], [0.5, 0.02], [1.1, 0.2], [1.4, 0.0]],
        },
    ];
    let r = 4.0;
    for shape in &shapes {
        for f in [500.0, 2000.0] {
            let s = Surface1d::from_shape(shape, C, C / f / 10.0, 4).unwrap();
            for (a, b) in [(0.0, 35.0), (-50.0, 20.0), (60.0, 75.0)] {
                let ab = scattered_2d(
                    &s,
                    plane_position_m(a, r),
                    &[plane_position_m(b, r)],
                    k_of(f),
                )[0];
                let ba = scattered_2d(
                    &s,
                    plane_position_m(b, r),
                    &[plane_position_m(a, r)],
                    k_of(f),
                )[0];
                assert!(
                    (ab.norm() - ba.norm()).abs() <= 1e-9 * ab.norm(),
                    "{shape:?} at {f} Hz, {a}°→{b}°: {} vs {}",
                    ab.norm(),
                    ba.norm()
                );
            }
        }
    }
    // The same in 3D over a grid of wells.
    let grid = ProfileShape::QuadraticResidueGrid {
        prime: 5,
        design_hz: 800.0,
        well_width_m: 0.08,
        fin_width_m: 0.01,
        periods_x: 1,
        periods_y: 1,
    };
    let s = Surface2d::from_shape(&grid, C, C / 1000.0 / 6.0, 2).unwrap();
    let (x, y) = (
        sphere_position_m(30.0, 20.0, 3.0),
        sphere_position_m(50.0, 200.0, 3.0),
    );
    let ab = scattered_3d(&s, x, &[y], k_of(1000.0))[0];
    let ba = scattered_3d(&s, y, &[x], k_of(1000.0))[0];
    assert!((ab.norm() - ba.norm()).abs() <= 1e-9 * ab.norm());
}

#[test]
fn results_converge_as_the_step_is_refined() {
    // Step rule (ours): elements ≤ λ / ppw at the frequency; one element per
    // well at least here, so that the wavelength rule alone sets the step.
    // Near field, QRD N = 7 at 2.2 kHz. Reference: ppw = 80. Common practice,
    // no source, for the expectation that 10 per wavelength is enough.
    let shape = ProfileShape::QuadraticResidue {
        prime: 7,
        design_hz: 600.0,
        well_width_m: 0.052,
        fin_width_m: 0.005,
        periods: 4,
    };
    let f = 2200.0;
    let src = plane_position_m(30.0, 6.0);
    let rec: Vec<[f64; 2]> = (-18..=18)
        .map(|i| plane_position_m(5.0 * f64::from(i), 3.0))
        .collect();
    let run = |ppw: f64| {
        let s = Surface1d::from_shape(&shape, C, C / f / ppw, 1).unwrap();
        scattered_2d(&s, src, &rec, k_of(f))
    };
    let fine = run(80.0);
    let peak = fine.iter().map(|p| p.norm()).fold(0.0, f64::max);
    let err = |ppw: f64| {
        run(ppw)
            .iter()
            .zip(&fine)
            .filter(|(_, q)| q.norm() > 0.1 * peak)
            .map(|(p, q)| db(*p, *q).abs())
            .fold(0.0, f64::max)
    };
    let (e6, e10, e20, e40) = (err(6.0), err(10.0), err(20.0), err(40.0));
    eprintln!(
        "largest level error vs ppw 80: {e6:.5} {e10:.5} {e20:.5} {e40:.5} dB at ppw 6 10 20 40"
    );
    assert!(e10 < 0.05, "10 per wavelength: {e10:.4} dB");
    assert!(
        e40 < e10 && e20 < e6,
        "errors {e6:.5} {e10:.5} {e20:.5} {e40:.5} dB"
    );
}

#[test]
fn flat_rectangle_far_field_matches_two_slit_factors() {
    // 3D Fraunhofer pattern of a rectangular rigid plate with obliquity
    // (Kirchhoff far field): |p| ∝ (cos θ + cos θs) |sinc(k a u/2) sinc(k b v/2)|,
    // u, v the sums of the direction cosines along x and y (reference.md §7, in 2D).
    let (a, b, f, r) = (0.6, 0.4, 2000.0, 1.0e4);
    let k = k_of(f);
    let s = Surface2d::flat(a, b, C / f / 6.0);
    let (ts, ps) = (25.0f64, 40.0f64);
    let src = sphere_position_m(ts, ps, r);
    let dirs: Vec<(f64, f64)> = (0..=8)
        .flat_map(|i| (0..12).map(move |j| (f64::from(i) * 10.0, f64::from(j) * 30.0)))
        .collect();
    let rec: Vec<DVec3> = dirs
        .iter()
        .map(|&(t, p)| sphere_position_m(t, p, r))
        .collect();
    let p = scattered_3d(&s, src, &rec, k);
    let spec = scattered_3d(&s, src, &[sphere_position_m(ts, ps + 180.0, r)], k)[0];
    let unit = |t: f64, p: f64| sphere_position_m(t, p, 1.0);
    let expected = |t: f64, ph: f64| {
        let (d, e) = (unit(t, ph), unit(ts, ps));
        (d.z + e.z) * sinc(0.5 * k * a * (d.x + e.x)) * sinc(0.5 * k * b * (d.y + e.y))
    };
    let e_spec = expected(ts, ps + 180.0);
    let mut compared = 0;
    for (i, &(t, ph)) in dirs.iter().enumerate() {
        let e_db = 20.0 * (expected(t, ph).abs() / e_spec.abs()).log10();
        if e_db > -25.0 {
            let got = db(p[i], spec);
            assert!(
                (got - e_db).abs() < 0.1,
                "({t}°, {ph}°): {got:.3} vs {e_db:.3} dB"
            );
            compared += 1;
        }
    }
    assert!(compared >= 5, "only {compared} receivers compared");
}
