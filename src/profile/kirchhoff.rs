//! The Kirchhoff (Helmholtz–Kirchhoff) integral for the pressure scattered by
//! a profile, with the real source and receiver positions (near field kept).
//!
//! On the surface the scattered field is taken as the locally reflected
//! incident field: p_s = R p_i, ∂p_s/∂n = −R ∂p_i/∂n (Kirchhoff
//! approximation; total field p = (1 + R) p_i, ∂p/∂n = (1 − R) ∂p_i/∂n). The
//! Helmholtz–Kirchhoff integral p_s(X) = ∫ (p_s ∂G/∂n − G ∂p_s/∂n) dS, n into
//! the air, then gives, with p_i = G(·, S),
//!
//! p_s(X) = ∫ R [G(s, S) ∂G(s, X)/∂n + G(s, X) ∂G(s, S)/∂n] dS,
//!
//! symmetric in S and X (reciprocity). Its far-field limit is
//! jk (cos θ + cos ψ) ∫ R e^{jkx(sin θ + sin ψ)} dx times the spreading
//! factors (reference.md §7).
//!
//! Quadrature: one point per element, with the element's phase progression
//! integrated exactly (the integrand is taken as A e^{jβs} along the element,
//! β the phase slope of e^{−jk(|s−S| + |s−X|)} at the midpoint, giving the
//! factor L sinc(βL/2), a Filon-type midpoint rule). Errors then come from the
//! phase curvature and amplitude change across an element only.

use glam::DVec3;
use num_complex::Complex64;
use rayon::prelude::*;

use super::green::{green_2d, green_3d, sinc};
use super::surface::{Surface1d, Surface2d};

/// Source-side (or receiver-side) values per element: G, ∂G/∂n and the unit
/// direction's tangential part(s), for one point.
struct Side2d {
    g: Vec<Complex64>,
    dgdn: Vec<Complex64>,
    along: Vec<f64>,
}

fn side_2d(surface: &Surface1d, point: [f64; 2], k: f64) -> Side2d {
    let n = surface.panels.len();
    let mut s = Side2d {
        g: Vec::with_capacity(n),
        dgdn: Vec::with_capacity(n),
        along: Vec::with_capacity(n),
    };
    for p in &surface.panels {
        let r = [p.mid_m[0] - point[0], p.mid_m[1] - point[1]];
        let d = r[0].hypot(r[1]);
        let (g, dg) = green_2d(k, d);
        s.g.push(g);
        s.dgdn
            .push(dg * ((r[0] * p.normal[0] + r[1] * p.normal[1]) / d));
        s.along
            .push((r[0] * p.tangent[0] + r[1] * p.tangent[1]) / d);
    }
    s
}

/// Scattered pressure of an extruded profile at each receiver, for a line
/// source at `source_m` ([x, z], m) of unit strength (incident field
/// G = (−j/4) H0^(2)(kr)), wavenumber `k_per_m`.
#[must_use]
pub fn scattered_2d(
    surface: &Surface1d,
    source_m: [f64; 2],
    receivers_m: &[[f64; 2]],
    k_per_m: f64,
) -> Vec<Complex64> {
    let src = side_2d(surface, source_m, k_per_m);
    let factors: Vec<Complex64> = surface
        .panels
        .iter()
        .map(|p| p.reflection.factor(k_per_m) * p.length_m)
        .collect();
    receivers_m
        .iter()
        .map(|&x| {
            let rec = side_2d(surface, x, k_per_m);
            let mut sum = Complex64::new(0.0, 0.0);
            for (i, p) in surface.panels.iter().enumerate() {
                let beta = -k_per_m * (src.along[i] + rec.along[i]);
                let kernel = src.g[i] * rec.dgdn[i] + rec.g[i] * src.dgdn[i];
                sum += factors[i] * kernel * sinc(0.5 * beta * p.length_m);
            }
            sum
        })
        .collect()
}

/// Scattered pressure of a grid profile's aperture plane at each receiver,
/// for a point source at `source_m` of unit strength (incident field
/// e^{−jkr}/(4πr)), wavenumber `k_per_m`. Receivers run in parallel; each sum
/// runs in a fixed order, so results do not depend on the thread count.
#[must_use]
pub fn scattered_3d(
    surface: &Surface2d,
    source_m: DVec3,
    receivers_m: &[DVec3],
    k_per_m: f64,
) -> Vec<Complex64> {
    // Source side once: G, ∂G/∂n (n = +z) and the tangential direction parts.
    let src: Vec<(Complex64, Complex64, f64, f64)> = surface
        .patches
        .iter()
        .map(|p| {
            let r = DVec3::new(p.centre_m[0], p.centre_m[1], 0.0) - source_m;
            let d = r.length();
            let (g, dg) = green_3d(k_per_m, d);
            (g, dg * (r.z / d), r.x / d, r.y / d)
        })
        .collect();
    let factors: Vec<Complex64> = surface
        .patches
        .iter()
        .map(|p| p.reflection.factor(k_per_m) * (p.dx_m * p.dy_m))
        .collect();
    receivers_m
        .par_iter()
        .map(|&x| {
            let mut sum = Complex64::new(0.0, 0.0);
            for (i, p) in surface.patches.iter().enumerate() {
                let r = DVec3::new(p.centre_m[0], p.centre_m[1], 0.0) - x;
                let d = r.length();
                let (g, dg) = green_3d(k_per_m, d);
                let (gs, dgs, sx, sy) = src[i];
                let kernel = gs * (dg * (r.z / d)) + g * dgs;
                let bx = -k_per_m * (sx + r.x / d);
                let by = -k_per_m * (sy + r.y / d);
                sum += factors[i] * kernel * (sinc(0.5 * bx * p.dx_m) * sinc(0.5 * by * p.dy_m));
            }
            sum
        })
        .collect()
}
