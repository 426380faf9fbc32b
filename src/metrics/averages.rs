//! Single-number values: arithmetic means over octave bands as ISO 3382-1:2009,
//! Annex A, Table A.1 ("frequency averaging" column) prescribes: EDT, C80, D50,
//! Ts and G over 500 and 1000 Hz, J_LF over 125 to 1000 Hz. T20 and T30 are
//! averaged over 500 and 1000 Hz like EDT (the usual "T_mid"; common practice).
//! C50 is averaged over 500 and 1000 Hz too (common practice, no source).

use std::collections::BTreeMap;

use serde::Serialize;

use super::parameters::BandParameters;

/// Bands of the 500/1000 Hz mean.
pub const MID_BANDS_HZ: [u32; 2] = [500, 1000];
/// Bands of the J_LF mean.
pub const LATERAL_BANDS_HZ: [u32; 4] = [125, 250, 500, 1000];

/// Single-number averages; `None` where a band is missing or undefined, with the
/// reason in `undefined`.
#[derive(Clone, Debug, Default, PartialEq, Serialize)]
pub struct Averages {
    /// EDT over 500–1000 Hz (s).
    #[serde(rename = "EDT_s")]
    pub edt_s: Option<f64>,
    /// T20 over 500–1000 Hz (s).
    #[serde(rename = "T20_s")]
    pub t20_s: Option<f64>,
    /// T30 over 500–1000 Hz (s).
    #[serde(rename = "T30_s")]
    pub t30_s: Option<f64>,
    /// C50 over 500–1000 Hz (dB).
    #[serde(rename = "C50_db")]
    pub c50_db: Option<f64>,
    /// C80 over 500–1000 Hz (dB).
    #[serde(rename = "C80_db")]
    pub c80_db: Option<f64>,
    /// D50 over 500–1000 Hz.
    #[serde(rename = "D50")]
    pub d50: Option<f64>,
    /// Ts over 500–1000 Hz (s).
    #[serde(rename = "Ts_s")]
    pub ts_s: Option<f64>,
    /// G over 500–1000 Hz (dB).
    #[serde(rename = "G_db")]
    pub g_db: Option<f64>,
    /// J_LF over 125–1000 Hz.
    #[serde(rename = "JLF")]
    pub jlf: Option<f64>,
    /// Why each missing average is missing, keyed by field name.
    pub undefined: BTreeMap<String, String>,
}

fn mean_over(
    bands: &[BandParameters],
    wanted: &[u32],
    name: &str,
    get: impl Fn(&BandParameters) -> Option<f64>,
    undefined: &mut BTreeMap<String, String>,
) -> Option<f64> {
    let mut sum = 0.0;
    for &hz in wanted {
        match bands.iter().find(|b| b.band_hz == hz) {
            None => {
                undefined.insert(name.into(), format!("the {hz} Hz band was not computed"));
                return None;
            }
            Some(b) => match get(b) {
                Some(v) => sum += v,
                None => {
                    undefined.insert(name.into(), format!("{name} is undefined at {hz} Hz"));
                    return None;
                }
            },
        }
    }
    Some(sum / wanted.len() as f64)
}

/// Averages of a set of bands (any order; looked up by `band_hz`).
#[must_use]
pub fn averages(bands: &[BandParameters]) -> Averages {
    let mut u = BTreeMap::new();
    let m = &MID_BANDS_HZ;
    Averages {
        edt_s: mean_over(bands, m, "EDT_s", |b| b.edt_s, &mut u),
        t20_s: mean_over(bands, m, "T20_s", |b| b.t20_s, &mut u),
        t30_s: mean_over(bands, m, "T30_s", |b| b.t30_s, &mut u),
        c50_db: mean_over(bands, m, "C50_db", |b| b.c50_db, &mut u),
        c80_db: mean_over(bands, m, "C80_db", |b| b.c80_db, &mut u),
        d50: mean_over(bands, m, "D50", |b| b.d50, &mut u),
        ts_s: mean_over(bands, m, "Ts_s", |b| b.ts_s, &mut u),
        g_db: mean_over(bands, m, "G_db", |b| b.g_db, &mut u),
        jlf: mean_over(bands, &LATERAL_BANDS_HZ, "JLF", |b| b.jlf, &mut u),
        undefined: u,
    }
}
