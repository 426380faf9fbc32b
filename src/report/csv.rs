//! Echogram tables: one row per bin, one column per pair and band.

use std::fmt::Write as _;

use crate::trace::TraceResult;

/// Which echogram a table holds.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum EchogramKind {
    /// Energy fluence per bin, J/m² (`echograms.csv`).
    Energy,
    /// Lateral-weighted fluence per bin, J/m² (`echograms-lateral.csv`).
    Lateral,
}

impl EchogramKind {
    /// The file name polaray uses.
    #[must_use]
    pub fn file_name(self) -> &'static str {
        match self {
            Self::Energy => "echograms.csv",
            Self::Lateral => "echograms-lateral.csv",
        }
    }
}

/// Column prefix of a pair: `RECEIVER` with one source, `SOURCE/RECEIVER`
/// with several; the band follows after a colon (`R1:1000`, `S2/R1:1000`).
#[must_use]
pub fn column_prefix(result: &TraceResult, source: usize, receiver: usize) -> String {
    let r = &result.receivers[receiver].name;
    if result.sources.len() == 1 {
        r.clone()
    } else {
        format!("{}/{r}", result.sources[source].name)
    }
}

/// Quotes a CSV field when it holds a comma, quote or line break (RFC 4180).
fn field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

/// The CSV text: header `time_s,<prefix>:<band Hz>,...`, then one row per bin
/// with the bin start time in s and fluences in J/m² for 1 J emitted per band,
/// numbers in shortest round-trip form.
#[must_use]
pub fn echogram_csv(result: &TraceResult, kind: EchogramKind) -> String {
    let bands = result.bands.centres_hz();
    let mut out = String::from("time_s");
    for p in &result.echograms {
        let prefix = column_prefix(result, p.source, p.receiver);
        for hz in bands {
            out.push(',');
            out.push_str(&field(&format!("{prefix}:{hz}")));
        }
    }
    out.push('\n');
    let bins = result.echograms.first().map_or(0, |p| p.echogram.bins());
    for k in 0..bins {
        let _ = write!(out, "{}", k as f64 * result.bin_s);
        for p in &result.echograms {
            let row = match kind {
                EchogramKind::Energy => &p.echogram.energy[k],
                EchogramKind::Lateral => &p.echogram.lateral[k],
            };
            for b in 0..bands.len() {
                let _ = write!(out, ",{:e}", row[b]);
            }
        }
        out.push('\n');
    }
    out
}
