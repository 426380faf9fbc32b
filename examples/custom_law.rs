//! A user's own reflection law, written against polaray's public trait,
//! measured on the virtual goniometer and traced in a validation room, as an
//! algorithm developer would do.
//!
//! The law: a fraction `s` of the reflected energy leaves in a Phong-like
//! lobe cos^n around the mirror direction (normalized over the sphere around
//! the mirror axis, folded back above the surface), the rest as a mirror.
//! Run with `cargo run --release --example custom_law`.
//!
//! The validation room is the irregular reference room `rooms/skewed.toml`,
//! every surface given the same α and s, air absorption off. A law that is
//! reciprocal and conserves energy keeps the traced mean free path at 4V/S
//! (Kuttruff; see `tests/trace_free_path.rs`); the split law shows it. This
//! lobe, carried rigidly with the mirror direction and folded, is not
//! reciprocal, and the validation shows by how much the mean free path (and
//! with it T30) moves.

use std::f64::consts::TAU;

use glam::DVec3;
use polaray::bands::Bands;
use polaray::geometry::{mirror_local, Frame};
use polaray::gonio::{self, ArcGeometry, GonioRequest};
use polaray::law::{LawKind, LawSample, LawSet, Lobe, OwnLaw, ReflectionLaw};
use polaray::room::{estimates, load_room};
use polaray::trace::{self, TraceOptions};

/// Mirror plus a cos^n lobe around the mirror direction, one band.
struct GlossyLobe {
    reflectance: f64,
    scattering: f64,
    exponent: f64,
}

impl GlossyLobe {
    /// Density per steradian of the lobe (about the mirror axis), before folding.
    fn lobe_density(&self, wo: DVec3, wi: DVec3) -> f64 {
        let c = wi.dot(mirror_local(wo)).max(0.0);
        (self.exponent + 1.0) / TAU * c.powf(self.exponent)
    }
}

impl ReflectionLaw for GlossyLobe {
    fn name(&self) -> &'static str {
        "glossy-lobe"
    }

    fn sample(&self, wo: DVec3, u_lobe: f64, u_dir: [f64; 2]) -> Option<LawSample> {
        let one = |x: f64| Bands::from_slice(&[x]);
        if u_lobe >= self.scattering {
            return Some(LawSample {
                wi: mirror_local(wo),
                weight: one(self.reflectance),
                pdf: None,
                lobe: Lobe::Mirror,
            });
        }
        // cos θ = u^(1/(n+1)) about the mirror axis, φ uniform.
        let c = u_dir[0].powf(1.0 / (self.exponent + 1.0));
        let s = (1.0 - c * c).max(0.0).sqrt();
        let phi = TAU * u_dir[1];
        let axis = Frame::from_normal(mirror_local(wo));
        let mut wi = axis.to_world(DVec3::new(s * phi.cos(), s * phi.sin(), c));
        // Fold directions below the surface back above it (energy is kept).
        wi.z = wi.z.abs();
        Some(LawSample {
            wi,
            weight: one(self.reflectance),
            pdf: None,
            lobe: Lobe::Directional,
        })
    }

    fn mirror_fraction(&self, _wo: DVec3) -> Bands {
        Bands::from_slice(&[self.reflectance * (1.0 - self.scattering)])
    }

    fn eval(&self, wo: DVec3, wi: DVec3) -> Bands {
        // The lobe plus its folded image.
        let below = DVec3::new(wi.x, wi.y, -wi.z);
        let density = self.lobe_density(wo, wi) + self.lobe_density(wo, below);
        Bands::from_slice(&[self.reflectance * self.scattering * density])
    }

    fn pdf(&self, wo: DVec3, wi: DVec3) -> f64 {
        let below = DVec3::new(wi.x, wi.y, -wi.z);
        self.scattering * (self.lobe_density(wo, wi) + self.lobe_density(wo, below))
    }
}

fn main() {
    measure_on_the_goniometer();
    if let Err(e) = trace_a_validation_room() {
        eprintln!("Error: {e:#}");
        std::process::exit(1);
    }
}

fn measure_on_the_goniometer() {
    let request = GonioRequest {
        geometry: ArcGeometry::default(),
        incidence_deg: 0.0,
        bands_hz: vec![1000],
    };
    println!("glossy lobe around the mirror, s = 0.6, 10% absorption, normal incidence");
    println!(
        "{:>8} {:>8} {:>8} {:>8} {:>10}",
        "n", "s_zone", "d", "d_max", "law's s"
    );
    for exponent in [1.0, 5.0, 20.0, 100.0] {
        let law = GlossyLobe {
            reflectance: 0.9,
            scattering: 0.6,
            exponent,
        };
        match gonio::measure(&law, &request, 200_000, 1) {
            Ok(report) => {
                let b = &report.bands[0];
                let f = |x: Option<f64>| x.map_or("-".to_string(), |v| format!("{v:.3}"));
                println!(
                    "{exponent:>8} {:>8.3} {:>8} {:>8} {:>10}",
                    b.zone_ratio,
                    f(b.diffusion),
                    f(b.diffusion_bound),
                    f(b.law_scattering)
                );
            }
            Err(e) => eprintln!("Error: {e}"),
        }
    }
}

/// Traces the skewed reference room under the split law and under the glossy
/// lobe (s = 0.9, α = 0.1 everywhere) and prints mean free path and T30.
fn trace_a_validation_room() -> anyhow::Result<()> {
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("rooms/skewed.toml");
    let mut room = load_room(&path)?.room;
    for m in &mut room.materials {
        m.absorption = Bands::splat(0.1);
        m.scattering = Bands::splat(0.9);
    }
    room.settings.air_absorption = false;
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.rays = 4000;
    let glossy = OwnLaw::new("glossy-lobe n = 5", |m, _bands| {
        Ok(Box::new(GlossyLobe {
            reflectance: 1.0 - m.absorption[0],
            scattering: m.scattering[0],
            exponent: 5.0,
        }) as Box<dyn ReflectionLaw>)
    });
    let laws: [&dyn LawSet; 2] = [&LawKind::Split, &glossy];
    println!();
    println!(
        "validation room: {} (4V/S = {:.3} m), s = 0.9, α = 0.1, no air, {} rays",
        room.name,
        estimates::mean_free_path_m(&room),
        options.rays
    );
    println!(
        "{:>20} {:>14} {:>12} {:>14}",
        "law", "mean free m", "÷ 4V/S", "T30 1 kHz s"
    );
    for law in laws {
        let result = trace::run_with_laws(&room, &options, law, &|_| {})?;
        let free = result.stats.traced_mean_free_path_m.unwrap_or(f64::NAN);
        let params = polaray::report::run_parameters(&result);
        let k = room
            .settings
            .bands
            .centres_hz()
            .iter()
            .position(|&f| f == 1000)
            .unwrap_or(0);
        let t30 = params[0].bands[k].t30_s.unwrap_or(f64::NAN);
        println!(
            "{:>20} {:>14.3} {:>12.4} {:>14.3}",
            law.law_name(),
            free,
            free / estimates::mean_free_path_m(&room),
            t30
        );
    }
    Ok(())
}
