//! Random-incidence scattering coefficient from reverberation-chamber
//! measurements (ISO 17497-1:2004): four reverberation times per band, with and
//! without the sample, turntable still and rotating. The chamber file format is
//! polaray's own (see `FORMAT.md`).

use std::path::Path;

use serde::Deserialize;
use toml::de::{DeTable, DeValue};

use super::load::{item_name, line_of, span_of, syntax_problem, PolarFileError, Problem, Seg};
use crate::air::AirConditions;

/// Conditions and reverberation times of one of the four measurements.
#[derive(Clone, Debug, PartialEq, Deserialize, serde::Serialize)]
#[serde(deny_unknown_fields)]
pub struct ChamberMeasurement {
    /// Reverberation time per band, s.
    pub reverberation_time_s: Vec<f64>,
    /// Air temperature during the measurement, °C.
    pub temperature_c: f64,
    /// Relative humidity during the measurement, %.
    pub humidity_pct: f64,
    /// Ambient pressure, kPa (default 101.325).
    #[serde(default = "standard_pressure_kpa")]
    pub pressure_kpa: f64,
}

fn standard_pressure_kpa() -> f64 {
    101.325
}

/// A reverberation-chamber scattering measurement.
#[derive(Clone, Debug, PartialEq, Deserialize, serde::Serialize)]
#[serde(deny_unknown_fields)]
pub struct ChamberFile {
    /// Name of the sample.
    pub name: String,
    /// Chamber volume V, m³.
    pub volume_m3: f64,
    /// Sample area S, m².
    pub sample_area_m2: f64,
    /// Band centres, Hz (nominal octave or third-octave).
    pub bands_hz: Vec<f64>,
    /// T1: turntable without sample, still.
    pub empty_still: ChamberMeasurement,
    /// T2: sample on the turntable, still.
    pub sample_still: ChamberMeasurement,
    /// T3: turntable without sample, rotating.
    pub empty_rotating: ChamberMeasurement,
    /// T4: sample on the turntable, rotating.
    pub sample_rotating: ChamberMeasurement,
}

/// Result for one band.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct ChamberBand {
    /// Band centre, Hz.
    pub band_hz: f64,
    /// Random-incidence absorption coefficient of the sample, α_s.
    pub alpha_s: f64,
    /// Specular absorption coefficient, α_spec.
    pub alpha_spec: f64,
    /// Random-incidence scattering coefficient s (`None` when α_s = 1).
    pub s: Option<f64>,
}

/// Speed of sound at `temperature_c`, m/s: 343.2 √((273.15 + t)/293.15)
/// (ISO 17497-1:2004, clause 8).
#[must_use]
pub fn speed_of_sound_m_s(temperature_c: f64) -> f64 {
    343.2 * ((273.15 + temperature_c) / 293.15).sqrt()
}

/// One reverberation time with the air it was measured in: T (s), c (m/s), m (1/m).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Decay {
    /// Reverberation time, s.
    pub time_s: f64,
    /// Speed of sound, m/s.
    pub speed_m_s: f64,
    /// Air energy attenuation, 1/m.
    pub air_per_m: f64,
}

/// Absorption added between decay `before` and decay `after` (ISO 17497-1:2004,
/// clause 8): α = 55.3 (V/S)(1/(c_a T_a) − 1/(c_b T_b)) − 4 (V/S)(m_a − m_b),
/// a = after, b = before; gives α_s from (T1, T2) and α_spec from (T3, T4).
#[must_use]
pub fn added_absorption(volume_m3: f64, area_m2: f64, before: Decay, after: Decay) -> f64 {
    let vs = volume_m3 / area_m2;
    55.3 * vs * (1.0 / (after.speed_m_s * after.time_s) - 1.0 / (before.speed_m_s * before.time_s))
        - 4.0 * vs * (after.air_per_m - before.air_per_m)
}

/// s = (α_spec − α_s)/(1 − α_s) (ISO 17497-1:2004, clause 8). `None` when α_s = 1.
#[must_use]
pub fn scattering_from_absorption(alpha_s: f64, alpha_spec: f64) -> Option<f64> {
    let den = 1.0 - alpha_s;
    (den.abs() > 1e-12).then(|| (alpha_spec - alpha_s) / den)
}

/// Exact mid-band frequency of a nominal octave or third-octave centre (Hz),
/// 1000 · 10^(k/10) (IEC 61260-1 base-ten series), for air absorption.
#[must_use]
pub fn exact_mid_band_hz(nominal_hz: f64) -> f64 {
    let k = (10.0 * (nominal_hz / 1000.0).log10()).round();
    1000.0 * 10f64.powf(k / 10.0)
}

impl ChamberMeasurement {
    fn decay(&self, band: usize, band_hz: f64) -> Decay {
        let air = AirConditions {
            temperature_c: self.temperature_c,
            humidity_pct: self.humidity_pct,
            pressure_kpa: self.pressure_kpa,
        };
        Decay {
            time_s: self.reverberation_time_s[band],
            speed_m_s: speed_of_sound_m_s(self.temperature_c),
            air_per_m: air.energy_attenuation_per_m(exact_mid_band_hz(band_hz)),
        }
    }
}

/// α_s, α_spec and s per band of a checked chamber file.
#[must_use]
pub fn chamber_coefficients(f: &ChamberFile) -> Vec<ChamberBand> {
    f.bands_hz
        .iter()
        .enumerate()
        .map(|(b, &band_hz)| {
            let decay = |m: &ChamberMeasurement| m.decay(b, band_hz);
            let alpha_s = added_absorption(
                f.volume_m3,
                f.sample_area_m2,
                decay(&f.empty_still),
                decay(&f.sample_still),
            );
            let alpha_spec = added_absorption(
                f.volume_m3,
                f.sample_area_m2,
                decay(&f.empty_rotating),
                decay(&f.sample_rotating),
            );
            ChamberBand {
                band_hz,
                alpha_s,
                alpha_spec,
                s: scattering_from_absorption(alpha_s, alpha_spec),
            }
        })
        .collect()
}

/// Reads and checks a chamber file; errors name the line and the item.
pub fn load_chamber_file(path: &Path) -> Result<ChamberFile, PolarFileError> {
    let fail = |problems| PolarFileError {
        file: path.to_path_buf(),
        problems,
    };
    let text = std::fs::read_to_string(path).map_err(|e| {
        fail(vec![Problem {
            line: None,
            item: String::new(),
            message: format!("cannot read the file: {}", crate::messages::io_problem(&e)),
        }])
    })?;
    let parsed: ChamberFile =
        toml::from_str(&text).map_err(|e| fail(vec![syntax_problem(&text, &e)]))?;
    let found = validate(&parsed);
    if found.is_empty() {
        return Ok(parsed);
    }
    let tree = DeTable::parse(&text)
        .ok()
        .map(|t| DeValue::Table(t.into_inner()));
    Err(fail(
        found
            .into_iter()
            .map(|(path, message)| Problem {
                line: tree
                    .as_ref()
                    .and_then(|t| span_of(t, &path))
                    .map(|s| line_of(&text, s)),
                item: item_name(&path),
                message,
            })
            .collect(),
    ))
}

fn validate(f: &ChamberFile) -> Vec<(Vec<Seg>, String)> {
    let mut found = Vec::new();
    for (key, v, what) in [
        ("volume_m3", f.volume_m3, "a volume in m³"),
        ("sample_area_m2", f.sample_area_m2, "an area in m²"),
    ] {
        if !(v.is_finite() && v > 0.0) {
            found.push((vec![Seg::Key(key)], format!("{v} is not {what}")));
        }
    }
    if f.bands_hz.is_empty() {
        found.push((
            vec![Seg::Key("bands_hz")],
            "no band given; list the band centres in Hz".into(),
        ));
    }
    for (i, &b) in f.bands_hz.iter().enumerate() {
        if !(b.is_finite() && b > 0.0) {
            found.push((
                vec![Seg::Key("bands_hz"), Seg::Index(i)],
                format!("{b} is not a frequency in Hz"),
            ));
        }
    }
    let n = f.bands_hz.len();
    for (key, m) in [
        ("empty_still", &f.empty_still),
        ("sample_still", &f.sample_still),
        ("empty_rotating", &f.empty_rotating),
        ("sample_rotating", &f.sample_rotating),
    ] {
        let at = |k: &'static str| vec![Seg::Key(key), Seg::Key(k)];
        if m.reverberation_time_s.len() != n {
            found.push((
                at("reverberation_time_s"),
                format!(
                    "has {} values but bands_hz has {n}; give one reverberation time per band",
                    m.reverberation_time_s.len()
                ),
            ));
        }
        for (i, &t) in m.reverberation_time_s.iter().enumerate() {
            if !(t.is_finite() && t > 0.0) {
                found.push((
                    vec![
                        Seg::Key(key),
                        Seg::Key("reverberation_time_s"),
                        Seg::Index(i),
                    ],
                    format!("{t} is not a reverberation time in seconds"),
                ));
            }
        }
        if !(m.temperature_c.is_finite() && (-50.0..=60.0).contains(&m.temperature_c)) {
            found.push((
                at("temperature_c"),
                format!(
                    "{} is not an air temperature in °C (−50 to 60)",
                    m.temperature_c
                ),
            ));
        }
        if !(m.humidity_pct.is_finite() && (0.0..=100.0).contains(&m.humidity_pct)) {
            found.push((
                at("humidity_pct"),
                format!(
                    "{} is not a relative humidity in % (0 to 100)",
                    m.humidity_pct
                ),
            ));
        }
        if !(m.pressure_kpa.is_finite() && m.pressure_kpa > 0.0) {
            found.push((
                at("pressure_kpa"),
                format!("{} is not a pressure in kPa", m.pressure_kpa),
            ));
        }
    }
    found
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn speed_of_sound_expression() {
        // ISO 17497-1:2004 clause 8 expression: 343.2 m/s at 20 °C;
        // at 0 °C: 343.2 √(273.15/293.15) = 343.2 × 0.965285 = 331.286 m/s.
        assert_relative_eq!(speed_of_sound_m_s(20.0), 343.2, epsilon = 1e-12);
        assert_relative_eq!(speed_of_sound_m_s(0.0), 331.286, epsilon = 1e-3);
    }

    #[test]
    fn exact_mid_band() {
        // IEC 61260-1 base-ten series: 125 → 125.89 Hz, 315 → 316.23 Hz, 1000 → 1000.
        assert_relative_eq!(exact_mid_band_hz(125.0), 125.893, epsilon = 1e-3);
        assert_relative_eq!(exact_mid_band_hz(315.0), 316.228, epsilon = 1e-3);
        assert_relative_eq!(exact_mid_band_hz(1000.0), 1000.0, epsilon = 1e-9);
    }
}
