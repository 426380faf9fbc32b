//! The nine ISO 3382-1 parameters by name: their keys in files and JSON, units
//! for display, their JNDs, and how to read each from a band's
//! [`BandParameters`] or the single-number [`Averages`].

use serde::Serialize;

use super::{jnd_of, Averages, BandParameters, Jnd};

/// One room parameter.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
pub enum Parameter {
    /// Early decay time, s.
    #[serde(rename = "EDT_s")]
    Edt,
    /// Reverberation time from −5 to −25 dB, s.
    #[serde(rename = "T20_s")]
    T20,
    /// Reverberation time from −5 to −35 dB, s.
    #[serde(rename = "T30_s")]
    T30,
    /// Clarity with the 50 ms limit, dB.
    #[serde(rename = "C50_db")]
    C50,
    /// Clarity with the 80 ms limit, dB.
    #[serde(rename = "C80_db")]
    C80,
    /// Definition, ratio 0–1.
    #[serde(rename = "D50")]
    D50,
    /// Centre time, s.
    #[serde(rename = "Ts_s")]
    Ts,
    /// Sound strength, dB.
    #[serde(rename = "G_db")]
    G,
    /// Early lateral energy fraction, ratio 0–1.
    #[serde(rename = "JLF")]
    Jlf,
}

impl Parameter {
    /// Every parameter, in the order of `parameters.csv`.
    pub const ALL: [Parameter; 9] = [
        Self::Edt,
        Self::T20,
        Self::T30,
        Self::C50,
        Self::C80,
        Self::D50,
        Self::Ts,
        Self::G,
        Self::Jlf,
    ];

    /// Field name in JSON and CSV, the same as in `result.json` (`"T30_s"` …).
    #[must_use]
    pub fn key(self) -> &'static str {
        match self {
            Self::Edt => "EDT_s",
            Self::T20 => "T20_s",
            Self::T30 => "T30_s",
            Self::C50 => "C50_db",
            Self::C80 => "C80_db",
            Self::D50 => "D50",
            Self::Ts => "Ts_s",
            Self::G => "G_db",
            Self::Jlf => "JLF",
        }
    }

    /// Short name, as written in comparison files and table headings.
    #[must_use]
    pub fn short(self) -> &'static str {
        match self {
            Self::Edt => "EDT",
            Self::T20 => "T20",
            Self::T30 => "T30",
            Self::C50 => "C50",
            Self::C80 => "C80",
            Self::D50 => "D50",
            Self::Ts => "Ts",
            Self::G => "G",
            Self::Jlf => "JLF",
        }
    }

    /// The parameter named `name`, by short name or field name.
    #[must_use]
    pub fn from_name(name: &str) -> Option<Self> {
        Self::ALL
            .into_iter()
            .find(|p| p.short() == name || p.key() == name)
    }

    /// Factor from the stored unit to the displayed one, and the displayed
    /// unit: times in s except Ts in ms, levels in dB, ratios without unit.
    #[must_use]
    pub fn display_unit(self) -> (f64, &'static str) {
        match self {
            Self::Edt | Self::T20 | Self::T30 => (1.0, "s"),
            Self::Ts => (1000.0, "ms"),
            Self::C50 | Self::C80 | Self::G => (1.0, "dB"),
            Self::D50 | Self::Jlf => (1.0, ""),
        }
    }

    /// Decimals shown for a value in its display unit.
    #[must_use]
    pub fn display_decimals(self) -> usize {
        match self {
            Self::Edt | Self::T20 | Self::T30 | Self::D50 | Self::Jlf => 2,
            Self::C50 | Self::C80 | Self::G => 1,
            Self::Ts => 0,
        }
    }

    /// Heading with unit, e.g. `T30 (s)` or `D50`.
    #[must_use]
    pub fn heading(self) -> String {
        match self.display_unit().1 {
            "" => self.short().to_string(),
            unit => format!("{} ({unit})", self.short()),
        }
    }

    /// Its value in one band.
    #[must_use]
    pub fn of_band(self, b: &BandParameters) -> Option<f64> {
        match self {
            Self::Edt => b.edt_s,
            Self::T20 => b.t20_s,
            Self::T30 => b.t30_s,
            Self::C50 => b.c50_db,
            Self::C80 => b.c80_db,
            Self::D50 => b.d50,
            Self::Ts => b.ts_s,
            Self::G => b.g_db,
            Self::Jlf => b.jlf,
        }
    }

    /// Its single-number value (mean over the bands ISO 3382-1 Table A.1 names).
    #[must_use]
    pub fn of_averages(self, a: &Averages) -> Option<f64> {
        match self {
            Self::Edt => a.edt_s,
            Self::T20 => a.t20_s,
            Self::T30 => a.t30_s,
            Self::C50 => a.c50_db,
            Self::C80 => a.c80_db,
            Self::D50 => a.d50,
            Self::Ts => a.ts_s,
            Self::G => a.g_db,
            Self::Jlf => a.jlf,
        }
    }

    /// Its just noticeable difference ([`crate::metrics::JND_TABLE`]).
    #[must_use]
    pub fn jnd(self) -> Option<&'static Jnd> {
        jnd_of(self.key())
    }

    /// Which bands the single-number value averages, for headings.
    #[must_use]
    pub fn single_number_bands(self) -> &'static str {
        match self {
            Self::Jlf => "125–1000 Hz",
            _ => "500–1000 Hz",
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_parameter_has_a_jnd_and_round_trips_its_names() {
        for p in Parameter::ALL {
            assert!(p.jnd().is_some(), "{p:?}");
            assert_eq!(Parameter::from_name(p.short()), Some(p));
            assert_eq!(Parameter::from_name(p.key()), Some(p));
            assert_eq!(
                serde_json::to_value(p).unwrap(),
                serde_json::Value::String(p.key().into())
            );
        }
        assert_eq!(Parameter::from_name("RT60"), None);
    }
}
