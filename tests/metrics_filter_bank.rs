//! Octave filter bank against IEC 61260-1 class 1 limits.
//!
//! Limits used (relative attenuation, octave filters, class 1), from memory of
//! IEC 61260-1:2014 clause 5.10, Table 1 (and IEC 61260:1995 Table 1): at Ω = 1
//! within ±0.3 dB (we assert ±0.1 dB, tighter); at Ω = G^(±1), the neighbouring
//! band centres, at least 18.0 dB; at Ω = G^(±2) at least 42.5 dB.

use polaray::bands::{exact_octave_centre_hz, OCTAVE_CENTRES_HZ};
use polaray::metrics::filter_bank::{BandFilter, OCTAVE_RATIO};

const FS: f64 = 48_000.0;

/// Level (dB) of a unit sine at `f_hz` after zero-phase filtering, measured as
/// RMS over the middle half of a 1 s signal (away from the ends).
fn sine_gain_db(filter: &BandFilter, f_hz: f64) -> f64 {
    let n = FS as usize;
    let x: Vec<f64> = (0..n)
        .map(|i| (std::f64::consts::TAU * f_hz * i as f64 / FS).sin())
        .collect();
    let y = filter.filter_zero_phase(&x);
    let mid = &y[n / 4..3 * n / 4];
    let ms = mid.iter().map(|v| v * v).sum::<f64>() / mid.len() as f64;
    10.0 * (ms / 0.5).log10()
}

#[test]
fn each_band_passes_its_centre_and_rejects_its_neighbours() {
    for &hz in &OCTAVE_CENTRES_HZ {
        let f = BandFilter::octave(hz, FS).unwrap();
        let fm = exact_octave_centre_hz(hz);
        let centre = sine_gain_db(&f, fm);
        assert!(centre.abs() < 0.1, "{hz} Hz: {centre:.3} dB at its centre");
        for ratio in [OCTAVE_RATIO, 1.0 / OCTAVE_RATIO] {
            let fnb = fm * ratio;
            if fnb >= 0.45 * FS {
                continue;
            }
            let att = -sine_gain_db(&f, fnb);
            // IEC 61260-1 class 1 at Ω = G^(±1): ≥ 18.0 dB (from memory).
            assert!(att >= 18.0, "{hz} Hz: only {att:.1} dB at {fnb:.0} Hz");
            // Measured sine agrees with the designed response.
            assert!((att - f.zero_phase_attenuation_db(fnb)).abs() < 0.2);
        }
        for ratio in [
            OCTAVE_RATIO * OCTAVE_RATIO,
            1.0 / (OCTAVE_RATIO * OCTAVE_RATIO),
        ] {
            let f2 = fm * ratio;
            if f2 < 0.45 * FS {
                // IEC 61260-1 class 1 at Ω = G^(±2): ≥ 42.5 dB (from memory).
                assert!(
                    f.zero_phase_attenuation_db(f2) >= 42.5,
                    "{hz} Hz at {f2:.0} Hz"
                );
            }
        }
    }
}

#[test]
fn combined_response_is_three_db_down_at_the_edges() {
    // Design check: one pass loses 1.5 dB at f_m G^(±1/2), two passes 3 dB, the
    // nominal edge attenuation of IEC 61260-1 (band edges, clause 5.4).
    for &hz in &[125u32, 1000, 4000] {
        let f = BandFilter::octave(hz, FS).unwrap();
        for edge in [f.lower_hz, f.upper_hz] {
            let a = f.zero_phase_attenuation_db(edge);
            assert!((a - 3.0).abs() < 1e-6, "{hz} Hz edge {edge:.1}: {a:.4} dB");
        }
    }
}

#[test]
fn band_above_nyquist_is_refused() {
    let e = BandFilter::octave(8000, 16_000.0).unwrap_err();
    assert!(e.to_string().contains("Nyquist"), "{e}");
}
