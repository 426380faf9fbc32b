//! Octave-band filters for measured impulse responses: Butterworth band-pass
//! filters designed here (analogue prototype, low-pass to band-pass transform,
//! bilinear transform with prewarped edges), run as second-order sections forward
//! and backward (zero phase, so the early decay is not shifted or smeared
//! one-sidedly).
//!
//! The two passes square the magnitude response. The prototype is therefore
//! designed so that one pass loses 1.5 dB at the band edges and the combined
//! response is −3 dB there, the nominal edge attenuation of IEC 61260-1:2014
//! (clause 5.10, Table 1, relative attenuation limits; checked in the tests). Band
//! edges are f_m · G^(±1/2) with G = 10^(3/10) and f_m the exact mid-band frequency
//! (IEC 61260-1:2014, 5.2–5.4, base-ten system).

use super::super::bands::exact_octave_centre_hz;

/// Octave ratio of the base-ten system, G = 10^(3/10) (IEC 61260-1:2014, 5.2).
pub const OCTAVE_RATIO: f64 = 1.995_262_314_968_879_5;

/// Order of the low-pass prototype (the band-pass has twice this order per pass).
pub const PROTOTYPE_ORDER: usize = 3;

/// Attenuation of one pass at the band edges (dB); two passes give 3 dB.
pub const SINGLE_PASS_EDGE_LOSS_DB: f64 = 1.5;

/// A filter that cannot be built at this sample rate.
#[derive(Debug, thiserror::Error, PartialEq)]
pub enum FilterError {
    /// The band's upper edge lies too close to the Nyquist frequency.
    #[error("the {centre_hz:.0} Hz band reaches {upper_hz:.0} Hz, above 0.9 × the Nyquist frequency of a {sample_rate_hz} Hz recording; drop the band or use a higher sample rate")]
    AboveNyquist {
        /// Mid-band frequency (Hz).
        centre_hz: f64,
        /// Upper band edge (Hz).
        upper_hz: f64,
        /// Sample rate (Hz).
        sample_rate_hz: f64,
    },
}

#[derive(Clone, Copy, Debug, PartialEq)]
struct Complex {
    re: f64,
    im: f64,
}

impl Complex {
    const fn new(re: f64, im: f64) -> Self {
        Self { re, im }
    }
    fn add(self, o: Self) -> Self {
        Self::new(self.re + o.re, self.im + o.im)
    }
    fn sub(self, o: Self) -> Self {
        Self::new(self.re - o.re, self.im - o.im)
    }
    fn mul(self, o: Self) -> Self {
        Self::new(
            self.re * o.re - self.im * o.im,
            self.re * o.im + self.im * o.re,
        )
    }
    fn scale(self, k: f64) -> Self {
        Self::new(self.re * k, self.im * k)
    }
    fn div(self, o: Self) -> Self {
        let d = o.re * o.re + o.im * o.im;
        Self::new(
            (self.re * o.re + self.im * o.im) / d,
            (self.im * o.re - self.re * o.im) / d,
        )
    }
    fn abs(self) -> f64 {
        self.re.hypot(self.im)
    }
    fn sqrt(self) -> Self {
        let r = self.abs();
        let re = ((r + self.re) / 2.0).max(0.0).sqrt();
        let im = ((r - self.re) / 2.0).max(0.0).sqrt().copysign(self.im);
        Self::new(re, im)
    }
    fn expi(phase: f64) -> Self {
        Self::new(phase.cos(), phase.sin())
    }
}

/// One second-order section: y = (b0 + b1 z⁻¹ + b2 z⁻²)/(1 + a1 z⁻¹ + a2 z⁻²) x.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Biquad {
    /// Numerator coefficients b0, b1, b2.
    pub b: [f64; 3],
    /// Denominator coefficients a1, a2 (a0 = 1).
    pub a: [f64; 2],
}

impl Biquad {
    fn response(&self, w: f64) -> Complex {
        let z1 = Complex::expi(-w);
        let z2 = Complex::expi(-2.0 * w);
        let num = Complex::new(self.b[0], 0.0)
            .add(z1.scale(self.b[1]))
            .add(z2.scale(self.b[2]));
        let den = Complex::new(1.0, 0.0)
            .add(z1.scale(self.a[0]))
            .add(z2.scale(self.a[1]));
        num.div(den)
    }

    fn run(&self, x: &mut [f64]) {
        // Direct form II transposed.
        let (mut s1, mut s2) = (0.0, 0.0);
        for v in x.iter_mut() {
            let xin = *v;
            let y = self.b[0] * xin + s1;
            s1 = self.b[1] * xin - self.a[0] * y + s2;
            s2 = self.b[2] * xin - self.a[1] * y;
            *v = y;
        }
    }
}

/// A band-pass filter as second-order sections.
#[derive(Clone, Debug, PartialEq)]
pub struct BandFilter {
    /// Exact mid-band frequency (Hz).
    pub centre_hz: f64,
    /// Lower band edge (Hz).
    pub lower_hz: f64,
    /// Upper band edge (Hz).
    pub upper_hz: f64,
    /// Sample rate (Hz).
    pub sample_rate_hz: f64,
    /// The cascade.
    pub sections: Vec<Biquad>,
}

impl BandFilter {
    /// The octave-band filter of a nominal centre (e.g. 1000 Hz) at `sample_rate_hz`.
    pub fn octave(nominal_hz: u32, sample_rate_hz: f64) -> Result<Self, FilterError> {
        Self::design(
            exact_octave_centre_hz(nominal_hz),
            1.0,
            PROTOTYPE_ORDER,
            SINGLE_PASS_EDGE_LOSS_DB,
            sample_rate_hz,
        )
    }

    /// A Butterworth band-pass of `width_octaves` (1 = octave, 1/3 = third octave)
    /// around `centre_hz`, prototype order `order`, losing `edge_loss_db` per pass
    /// at the edges f_m G^(±width/2).
    pub fn design(
        centre_hz: f64,
        width_octaves: f64,
        order: usize,
        edge_loss_db: f64,
        sample_rate_hz: f64,
    ) -> Result<Self, FilterError> {
        let lower_hz = centre_hz * OCTAVE_RATIO.powf(-width_octaves / 2.0);
        let upper_hz = centre_hz * OCTAVE_RATIO.powf(width_octaves / 2.0);
        if upper_hz >= 0.45 * sample_rate_hz {
            return Err(FilterError::AboveNyquist {
                centre_hz,
                upper_hz,
                sample_rate_hz,
            });
        }
        let fs2 = 2.0 * sample_rate_hz;
        // Prewarped analogue edges (rad/s) so the digital edges land exactly.
        let prewarp = |f: f64| fs2 * (std::f64::consts::PI * f / sample_rate_hz).tan();
        let (w1, w2) = (prewarp(lower_hz), prewarp(upper_hz));
        let w0sq = w1 * w2;
        let bw = w2 - w1;
        // Prototype cut-off so that |H(Ω = 1)|² = 1/(1 + ε²), 10 lg(1 + ε²) = loss.
        let eps2 = 10f64.powf(edge_loss_db / 10.0) - 1.0;
        let cutoff = eps2.powf(-1.0 / (2.0 * order as f64));
        let mut sections = Vec::with_capacity(order);
        let bilinear = |s: Complex| {
            Complex::new(fs2, 0.0)
                .add(s)
                .div(Complex::new(fs2, 0.0).sub(s))
        };
        // Section with poles z1, z2 (a conjugate pair or two real poles) and zeros at ±1.
        let section_from = |z1: Complex, z2: Complex| Biquad {
            b: [1.0, 0.0, -1.0],
            a: [-(z1.add(z2)).re, z1.mul(z2).re],
        };
        let conj = |z: Complex| Complex::new(z.re, -z.im);
        for k in 1..=order {
            let angle = std::f64::consts::PI * (2 * k + order - 1) as f64 / (2 * order) as f64;
            let p = Complex::expi(angle).scale(cutoff);
            if p.im < -1e-12 {
                continue; // its conjugate partner gives the same sections
            }
            // Band-pass poles: s² − p B s + ω0² = 0.
            let pb = p.scale(bw);
            let disc = pb.mul(pb).sub(Complex::new(4.0 * w0sq, 0.0)).sqrt();
            let s1 = pb.add(disc).scale(0.5);
            let s2 = pb.sub(disc).scale(0.5);
            if p.im.abs() <= 1e-12 {
                // Real prototype pole: s1 and s2 are a conjugate pair.
                sections.push(section_from(bilinear(s1), bilinear(s2)));
            } else {
                sections.push(section_from(bilinear(s1), conj(bilinear(s1))));
                sections.push(section_from(bilinear(s2), conj(bilinear(s2))));
            }
        }
        let mut filter = Self {
            centre_hz,
            lower_hz,
            upper_hz,
            sample_rate_hz,
            sections,
        };
        // Unit gain at the digital image of the analogue centre ω0.
        let f0 = sample_rate_hz / std::f64::consts::PI * (w0sq.sqrt() / fs2).atan();
        let g = filter.response(f0).abs();
        let per_section = g.powf(-1.0 / filter.sections.len() as f64);
        for s in &mut filter.sections {
            s.b = [per_section, 0.0, -per_section];
        }
        Ok(filter)
    }

    fn response(&self, f_hz: f64) -> Complex {
        let w = 2.0 * std::f64::consts::PI * f_hz / self.sample_rate_hz;
        self.sections
            .iter()
            .fold(Complex::new(1.0, 0.0), |acc, s| acc.mul(s.response(w)))
    }

    /// Attenuation of the zero-phase (forward + backward) filter at `f_hz`, dB
    /// (positive = attenuated): −20 lg|H|², i.e. twice the single-pass value.
    #[must_use]
    pub fn zero_phase_attenuation_db(&self, f_hz: f64) -> f64 {
        -40.0 * self.response(f_hz).abs().log10()
    }

    /// Runs the cascade forward in place (causal, one pass).
    pub fn filter_forward(&self, x: &mut [f64]) {
        for s in &self.sections {
            s.run(x);
        }
    }

    /// Zero-phase filtering: pads both ends with zeros (eight periods of the lower
    /// edge), runs forward, reverses, runs again, reverses, trims to `x.len()`.
    #[must_use]
    pub fn filter_zero_phase(&self, x: &[f64]) -> Vec<f64> {
        let pad = (8.0 * self.sample_rate_hz / self.lower_hz).ceil() as usize;
        let mut y = vec![0.0; x.len() + 2 * pad];
        y[pad..pad + x.len()].copy_from_slice(x);
        self.filter_forward(&mut y);
        y.reverse();
        self.filter_forward(&mut y);
        y.reverse();
        y.drain(..pad);
        y.truncate(x.len());
        y
    }
}
