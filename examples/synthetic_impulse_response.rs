//! Writes the demo impulse response `examples/data/impulse.wav` that the
//! README's `polaray analyze` example reads: a synthetic room response of our
//! own, not a measurement. Each octave band decays exponentially with an
//! invented reverberation time (below) over a Gaussian-noise carrier, after a
//! direct sound at 10 ms, with a noise floor 70 dB below the band level, so
//! that `analyze` has a real onset, decay and floor to find.
//!
//! Run with `cargo run --release --example synthetic_impulse_response [PATH]`.

use polaray::metrics::synthetic::{Carrier, SyntheticResponse};

/// Invented reverberation times per octave band, s.
const BANDS: [(u32, f64); 6] = [
    (125, 1.9),
    (250, 1.7),
    (500, 1.5),
    (1000, 1.4),
    (2000, 1.25),
    (4000, 1.05),
];

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let path = std::env::args()
        .nth(1)
        .unwrap_or_else(|| "examples/data/impulse.wav".into());
    let response = SyntheticResponse {
        sample_rate_hz: 48_000.0,
        duration_s: 2.5,
        onset_s: 0.01,
        direct_amplitude: 1.0,
        bands: BANDS.to_vec(),
        band_rms: 0.05,
        noise_db: Some(-70.0),
        seed: 2026,
        carrier: Carrier::GaussianNoise,
    };
    let samples = response.samples();
    let peak = samples.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
    let spec = hound::WavSpec {
        channels: 1,
        sample_rate: 48_000,
        bits_per_sample: 24,
        sample_format: hound::SampleFormat::Int,
    };
    // Written to a temporary file, then renamed, so no half-written WAV is left.
    let tmp = format!("{path}.tmp");
    let mut writer = hound::WavWriter::create(&tmp, spec)?;
    let full_scale = f64::from((1 << 23) - 1);
    for v in &samples {
        writer.write_sample((0.9 * v / peak * full_scale).round() as i32)?;
    }
    writer.finalize()?;
    std::fs::rename(&tmp, &path)?;
    println!(
        "wrote {path}: {} samples at 48 kHz, invented T per band {:?}",
        samples.len(),
        BANDS
    );
    Ok(())
}
