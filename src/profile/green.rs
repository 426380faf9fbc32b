//! Free-field Green's functions, time convention e^{jωt}, solving
//! (∇² + k²) G = −δ.

use num_complex::Complex64;

/// The 2D (line source) Green's function G = (−j/4) H0^(2)(kr) and its
/// derivative dG/dr = (jk/4) H1^(2)(kr), exact via Bessel J and Y
/// (H^(2) = J − jY; Abramowitz & Stegun 9.1.3, 9.1.28).
#[must_use]
pub fn green_2d(k_per_m: f64, r_m: f64) -> (Complex64, Complex64) {
    let x = k_per_m * r_m;
    let (j0, y0) = (puruspe::Jn(0, x), puruspe::Yn(0, x));
    let (j1, y1) = (puruspe::Jn(1, x), puruspe::Yn(1, x));
    // (−j/4)(J0 − jY0) = −Y0/4 − j J0/4
    let g = Complex64::new(-0.25 * y0, -0.25 * j0);
    // (jk/4)(J1 − jY1) = k Y1/4 + j k J1/4
    let dg = Complex64::new(0.25 * k_per_m * y1, 0.25 * k_per_m * j1);
    (g, dg)
}

/// The 3D (point source) Green's function G = e^{−jkr}/(4πr) and dG/dr =
/// −(jk + 1/r) G.
#[must_use]
pub fn green_3d(k_per_m: f64, r_m: f64) -> (Complex64, Complex64) {
    let g = Complex64::from_polar(1.0 / (4.0 * std::f64::consts::PI * r_m), -k_per_m * r_m);
    let dg = -Complex64::new(1.0 / r_m, k_per_m) * g;
    (g, dg)
}

/// sin(x)/x, 1 at 0.
#[must_use]
pub fn sinc(x: f64) -> f64 {
    if x.abs() < 1e-8 {
        1.0 - x * x / 6.0
    } else {
        x.sin() / x
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn hankel_matches_its_large_argument_form() {
        // H0^(2)(x) ≈ √(2/(πx)) e^{−j(x − π/4)} (Abramowitz & Stegun 9.2.4), error O(1/x).
        let (k, r) = (10.0, 20.0);
        let (g, dg) = green_2d(k, r);
        let x: f64 = k * r;
        let h0 = Complex64::from_polar(
            (2.0 / (std::f64::consts::PI * x)).sqrt(),
            -(x - std::f64::consts::FRAC_PI_4),
        );
        let g_asym = Complex64::new(0.0, -0.25) * h0;
        assert!((g - g_asym).norm() / g.norm() < 1.0 / x);
        // dG/dr ≈ −jk G at large kr.
        assert!((dg - Complex64::new(0.0, -k) * g).norm() / dg.norm() < 1.0 / x);
    }
}
