//! Room parameters of one band from an energy-time series: the result struct and
//! the computation shared by simulated echograms and measured impulse responses.

use std::collections::BTreeMap;

use serde::Serialize;

use super::decay_fit::{fit_decay, DecayFit, EDT_RANGE, T20_RANGE, T30_RANGE};
use super::energy_ratios::{centre_time_s, clarity_db, definition};
use super::lateral::lateral_fraction;
use super::schroeder::{decay_curve, onset_bin, DecayCurve, Tail};
use super::strength::strength_db;
use super::truncation::truncation_tail;

/// One band of a simulated echogram: energy fluence per time bin.
#[derive(Clone, Copy, Debug)]
pub struct EchogramBand<'a> {
    /// Nominal octave-band centre (Hz).
    pub band_hz: u32,
    /// Energy fluence per bin (J/m² per bin, source emitting 1 J in the band).
    pub energy: &'a [f64],
    /// Lateral-weighted fluence per bin (energy × cos² to the lateral axis), for J_LF.
    pub lateral: Option<&'a [f64]>,
    /// Bin width (s); bin k spans [k·bin_s, (k+1)·bin_s).
    pub bin_s: f64,
    /// Arrival time of the direct sound (s, same clock as the bins).
    pub onset_s: f64,
}

/// The three decay fits of a band.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct DecayFits {
    /// 0 to −10 dB.
    pub edt: DecayFit,
    /// −5 to −25 dB.
    pub t20: DecayFit,
    /// −5 to −35 dB.
    pub t30: DecayFit,
}

/// ISO 3382-1 parameters of one band. Each value is `None` (JSON `null`) where it
/// is undefined; `undefined` then says why, keyed by the field name.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct BandParameters {
    /// Nominal octave-band centre (Hz).
    pub band_hz: u32,
    /// Early decay time (s).
    #[serde(rename = "EDT_s")]
    pub edt_s: Option<f64>,
    /// Reverberation time from −5 to −25 dB (s).
    #[serde(rename = "T20_s")]
    pub t20_s: Option<f64>,
    /// Reverberation time from −5 to −35 dB (s).
    #[serde(rename = "T30_s")]
    pub t30_s: Option<f64>,
    /// Clarity, 50 ms limit (dB).
    #[serde(rename = "C50_db")]
    pub c50_db: Option<f64>,
    /// Clarity, 80 ms limit (dB).
    #[serde(rename = "C80_db")]
    pub c80_db: Option<f64>,
    /// Definition, 50 ms limit (ratio 0–1).
    #[serde(rename = "D50")]
    pub d50: Option<f64>,
    /// Centre time (s).
    #[serde(rename = "Ts_s")]
    pub ts_s: Option<f64>,
    /// Sound strength (dB re free field at 10 m).
    #[serde(rename = "G_db")]
    pub g_db: Option<f64>,
    /// Early lateral energy fraction (ratio 0–1).
    #[serde(rename = "JLF")]
    pub jlf: Option<f64>,
    /// Why each missing value is missing, keyed by field name (`"T30_s"` …).
    pub undefined: BTreeMap<String, String>,
    /// Values given but doubtful (e.g. a fit range less than 10 dB above the floor).
    pub warnings: Vec<String>,
    /// Fit details: correlation coefficients, spans, status flags.
    pub fits: DecayFits,
    /// Curvature C = 100 (T30/T20 − 1) in percent (ISO 3382-2:2008, B.3); large
    /// values flag a bent decay.
    pub curvature_percent: Option<f64>,
    /// Noise or truncation floor on the decay curve's scale (dB re total): below it
    /// the curve is extrapolated.
    pub floor_db: Option<f64>,
    /// Exponential continuation added past the data's end, if any.
    pub tail: Option<Tail>,
    /// The Schroeder decay curve (t = 0 at the direct sound), for plots.
    #[serde(skip)]
    pub decay: DecayCurve,
}

/// Computes everything except G and J_LF from `energy` (per bin), with an optional
/// tail continuation and a floor in dB re total.
pub(crate) fn decay_parameters(
    band_hz: u32,
    energy: &[f64],
    bin_s: f64,
    onset_s: f64,
    tail: Option<Tail>,
    floor_db: Option<f64>,
) -> BandParameters {
    let decay = decay_curve(energy, bin_s, onset_s, tail.as_ref());
    let fits = DecayFits {
        edt: fit_decay(&decay.times_s, &decay.level_db, EDT_RANGE, floor_db),
        t20: fit_decay(&decay.times_s, &decay.level_db, T20_RANGE, floor_db),
        t30: fit_decay(&decay.times_s, &decay.level_db, T30_RANGE, floor_db),
    };
    let mut undefined = BTreeMap::new();
    let mut warnings = Vec::new();
    let mut take = |name: &str, fit: &DecayFit| {
        match (&fit.reason, fit.time_s) {
            (Some(r), Some(_)) => warnings.push(r.clone()),
            (Some(r), None) => {
                undefined.insert(name.to_string(), r.clone());
            }
            _ => {}
        }
        fit.time_s
    };
    let edt_s = take("EDT_s", &fits.edt);
    let t20_s = take("T20_s", &fits.t20);
    let t30_s = take("T30_s", &fits.t30);

    // Ratios need data up to the 80 ms limit; the tail counts as late energy.
    let data_end_s = energy.len() as f64 * bin_s - onset_s;
    let (mut c50, mut c80, mut d50, mut ts) = (None, None, None, None);
    if data_end_s < 0.080 {
        for name in ["C50_db", "C80_db", "D50", "Ts_s"] {
            undefined.insert(
                name.into(),
                format!(
                    "the data end {:.1} ms after the direct sound, before the 80 ms limit",
                    data_end_s * 1e3
                ),
            );
        }
    } else {
        c50 = clarity_db(energy, bin_s, onset_s, 0.050, tail.as_ref());
        c80 = clarity_db(energy, bin_s, onset_s, 0.080, tail.as_ref());
        d50 = definition(energy, bin_s, onset_s, tail.as_ref());
        ts = centre_time_s(energy, bin_s, onset_s, tail.as_ref());
        for (name, v) in [("C50_db", c50), ("C80_db", c80), ("D50", d50), ("Ts_s", ts)] {
            if v.is_none() {
                undefined.insert(
                    name.into(),
                    "no energy on one side of the time limit".into(),
                );
            }
        }
    }
    let curvature_percent = match (t20_s, t30_s) {
        (Some(a), Some(b)) => Some(100.0 * (b / a - 1.0)),
        _ => None,
    };
    BandParameters {
        band_hz,
        edt_s,
        t20_s,
        t30_s,
        c50_db: c50,
        c80_db: c80,
        d50,
        ts_s: ts,
        g_db: None,
        jlf: None,
        undefined,
        warnings,
        fits,
        curvature_percent,
        floor_db,
        tail,
        decay,
    }
}

/// ISO 3382-1 parameters of a simulated echogram band. The histogram's end is a
/// truncation floor: the decay is continued with an exponential fitted to its late
/// part (see [`super::truncation`]), and the continuation's level re the total is
/// the floor the fit ranges must stay 10 dB above.
#[must_use]
pub fn histogram_parameters(band: &EchogramBand<'_>) -> BandParameters {
    let first = onset_bin(band.onset_s, band.bin_s);
    let tail = truncation_tail(band.energy, band.bin_s, first);
    let raw_total: f64 = band.energy.iter().sum();
    let mut notes = None;
    let floor_db = match &tail {
        Some(t) => Some(10.0 * (t.energy / (raw_total + t.energy)).log10()),
        None => {
            // No late decay to continue: the floor is the level of the last bin start.
            let last = band.energy.iter().rposition(|&e| e > 0.0);
            notes = Some(
                "no decaying late part found: the end of the echogram is not compensated"
                    .to_string(),
            );
            last.filter(|_| raw_total > 0.0)
                .map(|k| 10.0 * (band.energy[k] / raw_total).log10())
        }
    };
    let mut p = decay_parameters(
        band.band_hz,
        band.energy,
        band.bin_s,
        band.onset_s,
        tail,
        floor_db,
    );
    if let Some(n) = notes {
        p.warnings.push(n);
    }
    p.g_db = strength_db(band.energy, p.tail.as_ref());
    if p.g_db.is_none() {
        p.undefined
            .insert("G_db".into(), "the echogram holds no energy".into());
    }
    match band.lateral {
        Some(lat) if lat.len() == band.energy.len() => {
            p.jlf = lateral_fraction(lat, band.energy, band.bin_s, band.onset_s);
            if p.jlf.is_none() {
                p.undefined
                    .insert("JLF".into(), "no energy in the first 80 ms".into());
            }
        }
        Some(lat) => {
            p.undefined.insert(
                "JLF".into(),
                format!(
                    "lateral series has {} bins but the echogram {}",
                    lat.len(),
                    band.energy.len()
                ),
            );
        }
        None => {
            p.undefined
                .insert("JLF".into(), "no lateral-weighted series given".into());
        }
    }
    p
}
